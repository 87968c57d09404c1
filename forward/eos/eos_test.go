package eos

import (
	"math"
	"testing"
)

// approxPow must reach its documented accuracy against math.Pow (a reference implementation).
func TestApproxPow(t *testing.T) {
	for _, b := range []float64{1, 1 + 1e-12, 1.2, 1.41, 1.42, 2, 3.7, 10, 1e3, 1e10, 1e100, 1e300} {
		for _, a := range []float64{-60, -3.3, -1.0 / 60, 0.01, 1.0 / 3, 0.5, 2, 7} {
			want := math.Pow(b, a)
			if math.Abs(a*math.Log(b)) > 690 {
				continue
			}
			if e := relErr(approxPow(b, a), want); !(e < 4e-8*math.Abs(a)+2e-7) {
				t.Errorf("approxPow(%g, %g) = %g, want %g (rel %g)", b, a, approxPow(b, a), want, e)
			}
		}
	}
	if v := approxPow(math.Inf(1), -1); v != 0 {
		t.Errorf("approxPow(Inf, -1) = %g", v)
	}
	if v := approxPow(1e300, -60); !(v > 0) || math.IsInf(v, 0) {
		t.Errorf("approxPow(1e300, -60) = %g, want a clamped positive number", v)
	}
}
