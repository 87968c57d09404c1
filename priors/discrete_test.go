package priors

import (
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

func TestCategoricalLogProb(t *testing.T) {
	c := mustDist(NewCategorical([]string{"fe", "fes", "fesi", "feo"}, []float64{1, 2, 3, 4}))
	// P(k) = w_k / Σw with Σw = 10.
	tests := []struct {
		x    float64
		want float64
	}{
		{0, math.Log(0.1)}, {1, math.Log(0.2)}, {2, math.Log(0.3)}, {3, math.Log(0.4)},
		{math.Copysign(0, -1), math.Log(0.1)},
		{-1, math.Inf(-1)}, {4, math.Inf(-1)}, {0.5, math.Inf(-1)}, {2.0000001, math.Inf(-1)},
		{math.NaN(), math.Inf(-1)}, {math.Inf(1), math.Inf(-1)}, {1e300, math.Inf(-1)},
	}
	for _, tc := range tests {
		got := c.LogProb(tc.x)
		if math.IsInf(tc.want, -1) {
			if !math.IsInf(got, -1) {
				t.Errorf("LogProb(%v) = %v, want -Inf", tc.x, got)
			}
			continue
		}
		checkClose(t, "LogProb", got, tc.want, 1e-14, 1)
	}
	// Probabilities sum to 1.
	sum := 0.0
	for k := range c.NumLevels() {
		sum += math.Exp(c.LogProb(float64(k)))
	}
	checkClose(t, "Σ P(k)", sum, 1, 1e-14, 1)
}

func TestCategoricalQuantileCDF(t *testing.T) {
	c := mustDist(NewCategorical([]string{"a", "b", "c", "d"}, []float64{1, 2, 3, 4}))
	// CDF: 0.1, 0.3, 0.6, 1.0.
	wantCDF := []float64{0.1, 0.3, 0.6, 1.0}
	for k, w := range wantCDF {
		checkClose(t, "CDF", c.CDF(float64(k)), w, 1e-14, 1)
		if q := c.Quantile(c.CDF(float64(k))); q != float64(k) {
			t.Errorf("Quantile(CDF(%d)) = %v", k, q)
		}
	}
	if c.CDF(-0.5) != 0 || c.CDF(2.5) != c.CDF(2) {
		t.Errorf("CDF between levels is not a step function")
	}
	// Median: smallest k with CDF(k) ≥ 0.5 is 2.
	if q := c.Quantile(0.5); q != 2 {
		t.Errorf("Quantile(0.5) = %v, want 2", q)
	}
	if q := c.Quantile(0); q != 0 {
		t.Errorf("Quantile(0) = %v, want 0", q)
	}
	if q := c.Quantile(1); q != 3 {
		t.Errorf("Quantile(1) = %v, want 3", q)
	}
	if q := c.Quantile(1.5); !math.IsNaN(q) {
		t.Errorf("Quantile(1.5) = %v, want NaN", q)
	}
	// Mean Σ k w = 2, variance Σ k² w − 4 = 1.
	checkClose(t, "Mean", c.Mean(), 2, 1e-14, 1)
	checkClose(t, "StdDev", c.StdDev(), 1, 1e-14, 1)
	if lo, hi := c.Support(); lo != 0 || hi != 3 {
		t.Errorf("Support = [%v, %v], want [0, 3]", lo, hi)
	}
}

func TestCategoricalFrequencies(t *testing.T) {
	const n = 100_000
	w := []float64{0.5, 2, 1, 3, 0.25}
	c := mustDist(NewCategorical([]string{"a", "b", "c", "d", "e"}, w))
	r := newRand(7, 11)
	counts := make([]float64, len(w))
	for range n {
		x := c.Rand(r)
		k, ok := c.level(x)
		if !ok {
			t.Fatalf("draw %v is not a level index", x)
		}
		counts[k]++
	}
	sumW := 0.0
	for _, v := range w {
		sumW += v
	}
	chi2 := 0.0
	for k := range w {
		e := n * w[k] / sumW
		chi2 += (counts[k] - e) * (counts[k] - e) / e
	}
	// Pearson's χ² statistic has K−1 degrees of freedom; the bound is the
	// 0.9999 quantile.
	bound := distuv.ChiSquared{K: float64(len(w) - 1), Src: newRand(0, 0)}.Quantile(0.9999)
	if chi2 > bound {
		t.Errorf("χ² = %.2f over %d levels exceeds the 0.9999 bound %.2f (counts %v)", chi2, len(w), bound, counts)
	}
}

func TestCategoricalLabelsAndNormalisation(t *testing.T) {
	labels := []string{"perovskite", "postperovskite"}
	weights := []float64{3, 1}
	c := mustDist(NewCategorical(labels, weights))
	labels[0], weights[0] = "changed", 100 // the constructor copied its inputs
	if c.NumLevels() != 2 || c.Labels[0] != "perovskite" {
		t.Fatalf("labels not copied: %v", c.Labels)
	}
	checkClose(t, "normalised weight", c.Weights[0], 0.75, 1e-15, 1)
	checkClose(t, "normalised weight", c.Weights[1], 0.25, 1e-15, 1)
	if i, ok := c.Index("postperovskite"); !ok || i != 1 {
		t.Errorf("Index(postperovskite) = %d, %v", i, ok)
	}
	if _, ok := c.Index("olivine"); ok {
		t.Errorf("Index of a missing label reported found")
	}
	if l, ok := c.Label(1); !ok || l != "postperovskite" {
		t.Errorf("Label(1) = %q, %v", l, ok)
	}
	if _, ok := c.Label(1.5); ok {
		t.Errorf("Label(1.5) reported found")
	}
	if s := c.String(); s != "categorical(perovskite=0.75, postperovskite=0.25)" {
		t.Errorf("String = %q", s)
	}
	e := mustDist(NewCategoricalEqual([]string{"x", "y", "z"}))
	checkClose(t, "equal weight", math.Exp(e.LogProb(2)), 1.0/3, 1e-15, 1)
}

func TestFixed(t *testing.T) {
	f := mustDist(NewFixed(3.5))
	if f.LogProb(3.5) != 0 {
		t.Errorf("LogProb(Value) = %v, want 0", f.LogProb(3.5))
	}
	for _, x := range []float64{3.4999999, 3.5000001, math.NaN(), math.Inf(1)} {
		if !math.IsInf(f.LogProb(x), -1) {
			t.Errorf("LogProb(%v) = %v, want -Inf", x, f.LogProb(x))
		}
	}
	r := newRand(1, 1)
	if f.Rand(r) != 3.5 || f.Quantile(0.3) != 3.5 || f.StdDev() != 0 || f.Mean() != 3.5 {
		t.Errorf("point mass draws/quantile/spread wrong")
	}
	if lo, hi := f.Support(); lo != 3.5 || hi != 3.5 {
		t.Errorf("Support = [%v, %v]", lo, hi)
	}
	if f.CDF(3.4) != 0 || f.CDF(3.5) != 1 {
		t.Errorf("CDF not a unit step at Value")
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

// errOf keeps the error of a constructor result.
func errOf[D any](_ D, err error) error { return err }

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
