package priors

import (
	"math"
	"testing"
)

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

// truncNormalCases returns the truncated normal's cases of the continuous-distribution tests
// (TestContinuous* in dist_test.go), wide, one-sided and narrow.
func truncNormalCases() []contCase {
	inf := math.Inf(1)
	return []contCase{
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
	}
}

// halfNormalCase returns the half-normal case (the standard normal truncated at its mean) with
// its closed-form moments.
func halfNormalCase() contCase {
	inf := math.Inf(1)
	halfNormalMedian := 0.6744897501960817 // Φ⁻¹(0.75), from memory
	// Half-normal: mean √(2/π), variance 1 − 2/π (JKB 1994, ch. 13, the
	// folded/half-normal case); median Φ⁻¹(0.75).
	hn := tnCase("trunc-half-normal", 0, 1, 0, inf, 0, 40, []float64{0, 0.5, 1, 3})
	hn.mean, hn.variance, hn.median = math.Sqrt(2/math.Pi), 1-2/math.Pi, halfNormalMedian
	return hn
}

func TestTruncNormalOneSidedAndLiteral(t *testing.T) {
	// A literal value (no precomputed table) gives the same answers as the
	// constructed one, and so does a constructed value whose fields changed.
	built := mustDist(NewTruncNormal(3300, 200, 3000, 4000))
	lit := TruncNormal{Mu: 3300, Sigma: 200, Min: 3000, Max: 4000}
	changed := mustDist(NewTruncNormal(1, 1, 0, 2))
	changed.Mu, changed.Sigma, changed.Min, changed.Max = 3300, 200, 3000, 4000
	for _, x := range []float64{3000, 3200, 3999} {
		if a, b, c := built.LogProb(x), lit.LogProb(x), changed.LogProb(x); a != b || a != c {
			t.Errorf("LogProb(%v): built %v, literal %v, changed %v", x, a, b, c)
		}
	}
	// An untruncated "truncated" normal equals the normal.
	full := mustDist(NewTruncNormal(2, 3, math.Inf(-1), math.Inf(1)))
	n := mustDist(NewNormal(2, 3))
	for _, x := range []float64{-10, 0, 2, 7} {
		checkClose(t, "LogProb", full.LogProb(x), n.LogProb(x), 1e-14, 1)
	}
	checkClose(t, "StdDev", full.StdDev(), 3, 1e-14, 1)
	// An invalid literal never yields NaN from LogProb.
	bad := TruncNormal{Mu: 0, Sigma: 1, Min: 30, Max: 40}
	if lp := bad.LogProb(35); !math.IsInf(lp, -1) {
		t.Errorf("invalid literal LogProb = %v, want -Inf", lp)
	}
}

// FuzzTruncNormal checks that any accepted truncated normal behaves: the
// quantile lies in the support, the CDF inverts it, and nothing returns NaN.
func FuzzTruncNormal(f *testing.F) {
	f.Add(0.0, 1.0, -1.0, 1.0, 0.3)
	f.Add(0.0, 1.0, 6.5, math.Inf(1), 0.999)
	f.Add(3300.0, 200.0, 3000.0, 3000.5, 0.5)
	f.Add(-1.0, 0.5, math.Inf(-1), -4.5, 1e-9)
	f.Add(0.0, 1.0, 0.0, 1e-6, 0.7)
	f.Add(1e6, 1e-3, 1e6-1e-9, 1e6+1e-9, 0.2)
	f.Fuzz(func(t *testing.T, mu, sigma, lo, hi, p float64) {
		d, err := NewTruncNormal(mu, sigma, lo, hi)
		if err != nil {
			return
		}
		p = math.Abs(p)
		if !(p <= 1) {
			p = 0.5
		}
		x := d.Quantile(p)
		if !(x >= lo && x <= hi) {
			t.Fatalf("%v: Quantile(%v) = %v outside the support", d, p, x)
		}
		if lp := d.LogProb(x); math.IsNaN(lp) || math.IsInf(lp, 1) {
			t.Fatalf("%v: LogProb(%v) = %v", d, x, lp)
		}
		if c := d.CDF(x); !(c >= 0 && c <= 1) {
			t.Fatalf("%v: CDF(%v) = %v", d, x, c)
		}
		if sd := d.StdDev(); !(sd >= 0) || math.IsInf(sd, 0) {
			t.Fatalf("%v: StdDev = %v", d, sd)
		}
		if m := d.Mean(); !(m >= lo && m <= hi) {
			t.Fatalf("%v: Mean = %v outside the support", d, m)
		}
	})
}

// BenchmarkTruncNormalQuantile measures the inverse CDF on the wide and the
// narrow path.
func BenchmarkTruncNormalQuantile(b *testing.B) {
	for _, d := range []TruncNormal{
		mustDist(NewTruncNormal(0, 1, 6, math.Inf(1))),
		mustDist(NewTruncNormal(0, 1, 0.5, 0.9)),
	} {
		b.Run(d.String(), func(b *testing.B) {
			p := 0.0
			for b.Loop() {
				p += 1e-6
				if p >= 1 {
					p = 1e-6
				}
				d.Quantile(p)
			}
		})
	}
}
