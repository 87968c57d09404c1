package priors

import (
	"math"
	"testing"
)

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
