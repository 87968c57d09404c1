package priors

import (
	"math"
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

// FuzzCategoricalLogProb checks that LogProb accepts exactly the integer
// level indices and never returns NaN or +Inf.
func FuzzCategoricalLogProb(f *testing.F) {
	f.Add(1.0, 2.0, 3.0, 1.0)
	f.Add(1e-300, 1e300, 1.0, 2.0000000001)
	f.Add(1.0, 1.0, 1.0, math.NaN())
	f.Fuzz(func(t *testing.T, w0, w1, w2, x float64) {
		c, err := NewCategorical([]string{"a", "b", "c"}, []float64{w0, w1, w2})
		if err != nil {
			return
		}
		lp := c.LogProb(x)
		isLevel := x == 0 || x == 1 || x == 2
		switch {
		case math.IsNaN(lp) || math.IsInf(lp, 1):
			t.Fatalf("LogProb(%v) = %v", x, lp)
		case isLevel && math.IsInf(lp, -1):
			t.Fatalf("LogProb(level %v) = -Inf with weight %v", x, c.Weights[int(x)])
		case !isLevel && !math.IsInf(lp, -1):
			t.Fatalf("LogProb(%v) = %v for a non-level", x, lp)
		}
	})
}
