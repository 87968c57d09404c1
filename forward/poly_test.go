package forward

import (
	"math"
	"math/rand/v2"
	"testing"
)

// The extrema search must agree with dense sampling for polynomials of every
// degree (closed forms up to cubic, root isolation above).
func TestExtremaAgainstSampling(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for trial := range 400 {
		deg := trial % 8
		c := make([]float64, deg+1)
		for k := range c {
			c[k] = rng.NormFloat64()
		}
		p := Poly{C: c, Scale: 2}
		lo := 4 * rng.Float64()
		hi := lo + 0.1 + 4*rng.Float64()
		minV, minR, maxV := p.extrema(lo, hi)
		sMin, sMax := math.Inf(1), math.Inf(-1)
		const N = 20000
		for i := 0; i <= N; i++ {
			v := p.At(lo + (hi-lo)*float64(i)/N)
			sMin, sMax = min(sMin, v), max(sMax, v)
		}
		scale := math.Max(math.Abs(sMin), math.Abs(sMax)) + 1
		// Sampling can only miss extremes, so the true min ≤ sampled min.
		if minV > sMin+1e-12*scale || sMin-minV > 1e-6*scale {
			t.Errorf("deg %d: min %g, sampled %g", deg, minV, sMin)
		}
		if maxV < sMax-1e-12*scale || maxV-sMax > 1e-6*scale {
			t.Errorf("deg %d: max %g, sampled %g", deg, maxV, sMax)
		}
		if v := p.At(minR); math.Abs(v-minV) > 1e-12*scale {
			t.Errorf("deg %d: value at argmin %g != min %g", deg, v, minV)
		}
	}
}

func TestPolyHelpers(t *testing.T) {
	if v := Const(4.5).At(1e9); v != 4.5 {
		t.Errorf("Const(4.5).At = %g", v)
	}
	cases := []struct{ r0, v0, r1, v1 float64 }{
		{0, 13000, 1221.5e3, 12760},
		{6368e3, 1020, 6371e3, 1020},
		{6346.6e3, 3300, 6356e3, 2900},
		{3480e3, 5566, 3630e3, 5500},
	}
	for _, c := range cases {
		p := Linear(c.r0, c.v0, c.r1, c.v1)
		// Thin layers amplify rounding by r1/(r1−r0), hence the tolerance.
		tol := 1e-15 * c.r1 / (c.r1 - c.r0) * 10
		checkRel(t, "Linear at r0", p.At(c.r0), c.v0, tol)
		checkRel(t, "Linear at r1", p.At(c.r1), c.v1, tol)
		mid := 0.5 * (c.r0 + c.r1)
		checkRel(t, "Linear at midpoint", p.At(mid), 0.5*(c.v0+c.v1), tol)
	}
}
