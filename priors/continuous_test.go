package priors

import (
	"math"
	"testing"
)

// contCase is one continuous distribution with independent reference forms.
type contCase struct {
	name           string
	d              Dist
	pdf, cdf       func(float64) float64
	mean, variance float64
	median         float64
	qlo, qhi       float64   // quadrature range covering the support
	geom           bool      // use geometric panels for the quadrature
	points         []float64 // inside the support
	outside        []float64 // where LogProb must be −Inf
}

// mustDist unwraps a constructor result in test tables.
func mustDist[D Dist](d D, err error) D {
	if err != nil {
		panic(err)
	}
	return d
}

// tnCase builds a truncated normal case from the reference formulas.
func tnCase(name string, mu, sigma, lo, hi, qlo, qhi float64, points []float64) contCase {
	r := newRefTN(mu, sigma, lo, hi)
	m, v := r.moments()
	med := bisect(r.cdf, math.Max(lo, qlo), math.Min(hi, qhi), 0.5)
	out := []float64{math.NaN()}
	if !math.IsInf(lo, 0) {
		out = append(out, math.Nextafter(lo, math.Inf(-1)), lo-sigma)
	}
	if !math.IsInf(hi, 0) {
		out = append(out, math.Nextafter(hi, math.Inf(1)), hi+sigma)
	}
	return contCase{
		name: name, d: mustDist(NewTruncNormal(mu, sigma, lo, hi)),
		pdf: r.pdf, cdf: r.cdf, mean: m, variance: v, median: med,
		qlo: math.Max(lo, qlo), qhi: math.Min(hi, qhi), points: points, outside: out,
	}
}

// tnQuadCase builds a truncated normal case on a very narrow interval, where
// differences of the normal CDF cancel; the references are obtained by
// direct quadrature of the normal density φ over the interval.
func tnQuadCase(name string, mu, sigma, lo, hi float64, points []float64) contCase {
	phi := func(x float64) float64 { return refPhi((x-mu)/sigma) / sigma }
	z := integrate(phi, lo, hi, 4, false)
	mid := 0.5 * (lo + hi)
	m1 := integrate(func(x float64) float64 { return (x - mid) * phi(x) }, lo, hi, 4, false) / z
	m2 := integrate(func(x float64) float64 { return (x - mid) * (x - mid) * phi(x) }, lo, hi, 4, false) / z
	cdf := func(x float64) float64 {
		if x <= lo {
			return 0
		}
		return integrate(phi, lo, math.Min(x, hi), 4, false) / z
	}
	return contCase{
		name: name, d: mustDist(NewTruncNormal(mu, sigma, lo, hi)),
		pdf: func(x float64) float64 {
			if x < lo || x > hi {
				return 0
			}
			return phi(x) / z
		},
		cdf: cdf, mean: mid + m1, variance: m2 - m1*m1, median: bisect(cdf, lo, hi, 0.5),
		qlo: lo, qhi: hi, points: points,
		outside: []float64{math.NaN(), math.Nextafter(lo, math.Inf(-1)), math.Nextafter(hi, math.Inf(1))},
	}
}

// luCase builds a log-uniform case. Moments by direct integration of the
// density 1/(x L), L = ln(b/a): E[X^k] = (b^k − a^k)/(k L); median √(ab).
func luCase(name string, a, b float64, points []float64) contCase {
	L := math.Log(b / a)
	m := (b - a) / L
	return contCase{
		name: name, d: mustDist(NewLogUniform(a, b)),
		pdf: func(x float64) float64 {
			if x < a || x > b {
				return 0
			}
			return 1 / (x * L)
		},
		cdf:      func(x float64) float64 { return math.Log(x/a) / L },
		mean:     m,
		variance: (b*b-a*a)/(2*L) - m*m,
		median:   math.Sqrt(a * b),
		qlo:      a, qhi: b, geom: true, points: points,
		outside: []float64{math.NaN(), math.Nextafter(a, 0), 0, -a, math.Nextafter(b, math.Inf(1)), 2 * b},
	}
}

func continuousCases() []contCase {
	inf := math.Inf(1)
	halfNormalMedian := 0.6744897501960817 // Φ⁻¹(0.75), from memory
	cases := []contCase{
		{
			// Uniform closed forms: mean (a+b)/2, variance (b−a)²/12.
			name: "uniform", d: mustDist(NewUniform(1000, 3000)),
			pdf: func(x float64) float64 {
				if x < 1000 || x > 3000 {
					return 0
				}
				return 1.0 / 2000
			},
			cdf:  func(x float64) float64 { return (x - 1000) / 2000 },
			mean: 2000, variance: 2000.0 * 2000 / 12, median: 2000,
			qlo: 1000, qhi: 3000, points: []float64{1000, 1234.5, 2000, 3000},
			outside: []float64{math.NaN(), 999.999, 3000.001, -inf, inf},
		},
		{
			name: "normal", d: mustDist(NewNormal(5000, 100)),
			pdf: func(x float64) float64 { return refPhi((x-5000)/100) / 100 },
			cdf: func(x float64) float64 { return 1 - refQ((x-5000)/100) },
			// Normal: mean μ, variance σ², median μ.
			mean: 5000, variance: 1e4, median: 5000,
			qlo: 5000 - 1500, qhi: 5000 + 1500, points: []float64{4600, 4700, 5000, 5250, 5400},
			outside: []float64{math.NaN()},
		},
		tnCase("trunc-symmetric", 0, 1, -1, 1, -1, 1, []float64{-1, -0.3, 0, 0.7, 1}),
		tnCase("trunc-density", 3300, 200, 3000, 4000, 3000, 4000, []float64{3000, 3150, 3300, 3700, 4000}),
		tnCase("trunc-right-tail", 0, 1, 6, inf, 6, 14, []float64{6, 6.1, 6.5, 8}),
		tnCase("trunc-left-tail", -1, 0.5, -inf, -4, -9, -4, []float64{-6, -4.5, -4.1, -4}),
		tnCase("trunc-upper-only", 0, 1, -inf, 0.3, -12, 0.3, []float64{-3, -1, 0, 0.3}),
		tnCase("trunc-narrow", 0, 1, 0.5, 0.9, 0.5, 0.9, []float64{0.5, 0.6, 0.77, 0.9}),
		tnCase("trunc-narrow-tail", 0, 1, 5, 5.1, 5, 5.1, []float64{5, 5.03, 5.1}),
		tnCase("trunc-narrow-SI", 3.4e6, 1e5, 3.39e6, 3.41e6, 3.39e6, 3.41e6, []float64{3.39e6, 3.4e6, 3.405e6, 3.41e6}),
		tnQuadCase("trunc-very-narrow-tail", 0, 1, 2, 2+1e-7, []float64{2, 2 + 3e-8, 2 + 1e-7}),
		tnQuadCase("trunc-very-narrow-centre", 0, 1, -1e-8, 1e-8, []float64{-1e-8, 0, 5e-9, 1e-8}),
		luCase("loguniform-wide", 1e-3, 10, []float64{1e-3, 0.01, 0.5, 10}),
		luCase("loguniform-mid", 1, 2, []float64{1, 1.5, 2}),
		luCase("loguniform-narrow", 1000, 1001, []float64{1000, 1000.5, 1001}),
	}
	// Half-normal: mean √(2/π), variance 1 − 2/π (JKB 1994, ch. 13, the
	// folded/half-normal case); median Φ⁻¹(0.75).
	hn := tnCase("trunc-half-normal", 0, 1, 0, inf, 0, 40, []float64{0, 0.5, 1, 3})
	hn.mean, hn.variance, hn.median = math.Sqrt(2/math.Pi), 1-2/math.Pi, halfNormalMedian
	return append(cases, hn)
}

func TestContinuousLogProb(t *testing.T) {
	for _, c := range continuousCases() {
		t.Run(c.name, func(t *testing.T) {
			for _, x := range c.points {
				want := math.Log(c.pdf(x))
				checkClose(t, c.d.String()+" LogProb", c.d.LogProb(x), want, 1e-10, 1)
			}
			for _, x := range c.outside {
				if lp := c.d.LogProb(x); !math.IsInf(lp, -1) {
					t.Errorf("LogProb(%v) = %v outside the support, want -Inf", x, lp)
				}
			}
		})
	}
}

func TestContinuousIntegratesToOne(t *testing.T) {
	for _, c := range continuousCases() {
		t.Run(c.name, func(t *testing.T) {
			f := func(x float64) float64 { return math.Exp(c.d.LogProb(x)) }
			got := integrate(f, c.qlo, c.qhi, 200, c.geom)
			checkClose(t, "∫ density", got, 1, 1e-9, 1)
		})
	}
}

func TestContinuousCDFAndQuantile(t *testing.T) {
	for _, c := range continuousCases() {
		t.Run(c.name, func(t *testing.T) {
			cd := c.d.(CDFer)
			sd := math.Sqrt(c.variance)
			for _, x := range c.points {
				checkClose(t, "CDF", cd.CDF(x), c.cdf(x), 1e-10, 1)
				// Quantile(CDF(x)) round trip.
				checkClose(t, "Quantile(CDF(x))", c.d.Quantile(cd.CDF(x)), x, 1e-7, sd/math.Max(math.Abs(x), 1e-300))
			}
			for _, p := range []float64{1e-9, 1e-4, 0.01, 0.1, 0.25, 0.5, 0.75, 0.9, 0.99, 1 - 1e-9} {
				x := c.d.Quantile(p)
				if lo, hi := c.d.Support(); !(x >= lo && x <= hi) {
					t.Errorf("Quantile(%g) = %v outside [%v, %v]", p, x, lo, hi)
				}
				// Allow for the float spacing of x itself: a few ulps of x
				// move the CDF by pdf(x)·ulp.
				ulp := math.Nextafter(x, math.Inf(1)) - x
				if got := cd.CDF(x); math.Abs(got-p) > 1e-9*math.Max(p, 1e-3)+4*ulp*c.pdf(x) {
					t.Errorf("CDF(Quantile(%g)) = %.17g", p, got)
				}
			}
			checkClose(t, "median Quantile(0.5)", c.d.Quantile(0.5), c.median, 1e-9, sd)
			for _, p := range []float64{-0.1, 1.1, math.NaN()} {
				if q := c.d.Quantile(p); !math.IsNaN(q) {
					t.Errorf("Quantile(%v) = %v, want NaN", p, q)
				}
			}
			lo, hi := c.d.Support()
			if q := c.d.Quantile(0); q != lo {
				t.Errorf("Quantile(0) = %v, want %v", q, lo)
			}
			if q := c.d.Quantile(1); q != hi {
				t.Errorf("Quantile(1) = %v, want %v", q, hi)
			}
		})
	}
}

func TestContinuousMoments(t *testing.T) {
	type meaner interface{ Mean() float64 }
	for _, c := range continuousCases() {
		t.Run(c.name, func(t *testing.T) {
			sd := math.Sqrt(c.variance)
			checkClose(t, "Mean()", c.d.(meaner).Mean(), c.mean, 1e-9, sd)
			checkClose(t, "StdDev()", c.d.StdDev(), sd, 1e-6, 0)
		})
	}
}

func TestContinuousSampling(t *testing.T) {
	const n = 100_000
	for i, c := range continuousCases() {
		t.Run(c.name, func(t *testing.T) {
			r := newRand(20240601, uint64(i))
			x := make([]float64, n)
			lo, hi := c.d.Support()
			for j := range x {
				x[j] = c.d.Rand(r)
				if !(x[j] >= lo && x[j] <= hi) {
					t.Fatalf("draw %d = %v outside [%v, %v]", j, x[j], lo, hi)
				}
			}
			m, v, seM, seV := sampleMoments(x)
			if math.Abs(m-c.mean) > 4*seM {
				t.Errorf("sample mean %.10g, closed form %.10g, |diff| = %.3g > 4 SE = %.3g", m, c.mean, math.Abs(m-c.mean), 4*seM)
			}
			if math.Abs(v-c.variance) > 4*seV {
				t.Errorf("sample variance %.10g, closed form %.10g, |diff| = %.3g > 4 SE = %.3g", v, c.variance, math.Abs(v-c.variance), 4*seV)
			}
		})
	}
}
