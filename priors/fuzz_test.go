package priors

import (
	"math"
	"testing"
)

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
