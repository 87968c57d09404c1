package priors

import (
	"math"
	"strings"
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

// continuousCases returns the cases of every continuous kind; each kind's cases are written
// beside its tests (uniformCases in uniform_test.go, normalCases in normal_test.go,
// truncNormalCases and halfNormalCase in truncnormal_test.go, logUniformCases in
// loguniform_test.go). The order fixes each case's random stream in TestContinuousSampling.
func continuousCases() []contCase {
	var cases []contCase
	for _, kind := range [][]contCase{
		uniformCases(), normalCases(), truncNormalCases(), logUniformCases(), {halfNormalCase()},
	} {
		cases = append(cases, kind...)
	}
	return cases
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

// allKinds returns one valid value of every kind.
func allKinds() []Dist {
	return []Dist{
		mustDist(NewUniform(1, 2)),
		mustDist(NewNormal(0, 1)),
		mustDist(NewTruncNormal(0, 1, 0.5, math.Inf(1))),
		mustDist(NewTruncNormal(0, 1, 0.5, 0.9)), // narrow path (accept–reject)
		mustDist(NewLogUniform(1, 100)),
		mustDist(NewCategorical([]string{"a", "b", "c"}, []float64{1, 1, 2})),
		mustDist(NewFixed(4)),
	}
}

func TestDeterminism(t *testing.T) {
	for _, d := range allKinds() {
		t.Run(d.String(), func(t *testing.T) {
			r1, r2, r3 := newRand(42, 99), newRand(42, 99), newRand(43, 99)
			differ := false
			for i := range 1000 {
				a, b, c := d.Rand(r1), d.Rand(r2), d.Rand(r3)
				if a != b {
					t.Fatalf("draw %d: same seed gave %v and %v", i, a, b)
				}
				if a != c {
					differ = true
				}
			}
			_, isFixed := d.(Fixed)
			if !differ && !isFixed {
				t.Errorf("different seeds gave identical sequences")
			}
		})
	}
}

func TestConstructorErrors(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	tests := []struct {
		name string
		err  error
		want string // substring naming the problem
	}{
		{"uniform min>max", errOf(NewUniform(3000, 1000)), "min (3000) must be less than max (1000)"},
		{"uniform min=max", errOf(NewUniform(1, 1)), "must be less than max"},
		{"uniform NaN", errOf(NewUniform(nan, 1)), "min is NaN"},
		{"uniform Inf", errOf(NewUniform(0, inf)), "max is +Inf; it must be a finite number"},
		{"uniform overflow", errOf(NewUniform(-1e308, 1e308)), "overflows"},
		{"normal sigma 0", errOf(NewNormal(0, 0)), "sigma is 0; it must be positive"},
		{"normal sigma<0", errOf(NewNormal(0, -2)), "sigma is -2"},
		{"normal NaN mean", errOf(NewNormal(nan, 1)), "mean is NaN"},
		{"normal Inf sigma", errOf(NewNormal(0, inf)), "sigma is +Inf"},
		{"trunc min>max", errOf(NewTruncNormal(0, 1, 2, 1)), "min (2) must be less than max (1)"},
		{"trunc sigma", errOf(NewTruncNormal(0, -1, 0, 1)), "sigma is -1"},
		{"trunc NaN bound", errOf(NewTruncNormal(0, 1, nan, 1)), "contain NaN"},
		{"trunc Inf mean", errOf(NewTruncNormal(inf, 1, 0, 1)), "mean is +Inf"},
		{"trunc far tail", errOf(NewTruncNormal(0, 1, 20, 30)), "negligible mass"},
		{"trunc far below", errOf(NewTruncNormal(5000, 10, 1, 2)), "negligible mass"},
		{"trunc too narrow", errOf(NewTruncNormal(0, 1, 0, 1e-13)), "negligible mass"},
		{"trunc both +Inf", errOf(NewTruncNormal(0, 1, inf, inf)), "must be less than max"},
		{"loguniform min 0", errOf(NewLogUniform(0, 1)), "min is 0; it must be positive"},
		{"loguniform min<0", errOf(NewLogUniform(-1, 1)), "min is -1; it must be positive"},
		{"loguniform min>max", errOf(NewLogUniform(2, 1)), "min (2) must be less than max (1)"},
		{"loguniform Inf", errOf(NewLogUniform(1, inf)), "max is +Inf"},
		{"categorical no labels", errOf(NewCategorical(nil, nil)), "no labels"},
		{"categorical duplicate", errOf(NewCategorical([]string{"a", "b", "a"}, []float64{1, 1, 1})), `duplicate label "a" (positions 1 and 3)`},
		{"categorical empty label", errOf(NewCategorical([]string{"a", ""}, []float64{1, 1})), "label 2 is empty"},
		{"categorical length", errOf(NewCategorical([]string{"a", "b"}, []float64{1})), "2 labels but 1 weights"},
		{"categorical zero weight", errOf(NewCategorical([]string{"a", "b"}, []float64{1, 0})), `weight of label "b" is 0; weights must be positive`},
		{"categorical negative weight", errOf(NewCategorical([]string{"a", "b"}, []float64{-1, 1})), `weight of label "a" is -1`},
		{"categorical NaN weight", errOf(NewCategorical([]string{"a", "b"}, []float64{1, nan})), `weight of label "b" is NaN`},
		{"categorical Inf weight", errOf(NewCategorical([]string{"a"}, []float64{inf})), "positive and finite"},
		{"categorical sum overflow", errOf(NewCategorical([]string{"a", "b"}, []float64{1.5e308, 1.5e308})), "sum to infinity"},
		{"categorical negligible weight", errOf(NewCategorical([]string{"a", "b"}, []float64{1e-300, 1e300})), `weight of label "a" (1e-300) is negligible`},
		{"fixed NaN", errOf(NewFixed(nan)), "value is NaN"},
		{"fixed Inf", errOf(NewFixed(-inf)), "value is -Inf"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.err == nil {
				t.Fatalf("no error, want one containing %q", tc.want)
			}
			if !strings.Contains(tc.err.Error(), tc.want) {
				t.Errorf("error %q does not contain %q", tc.err, tc.want)
			}
		})
	}
}
