package forward

import (
	"math"
	"sort"
)

// G is the Newtonian constant of gravitation, CODATA 2018, m³ kg⁻¹ s⁻².
const G = 6.67430e-11

// Poly is a polynomial in radius, f(r) = Σ_k C[k]·(r/Scale)^k with r in m.
// Scale must be positive; choosing it close to the radii at which the
// polynomial is evaluated keeps the coefficients well conditioned.
type Poly struct {
	C     []float64
	Scale float64
}

// Const returns the constant polynomial f(r) = v.
func Const(v float64) Poly {
	return Poly{C: []float64{v}, Scale: 1}
}

// Linear returns the straight line through (r0, v0) and (r1, v1); r1 > r0 is
// required (otherwise the coefficients are not finite and Model.Validate
// rejects the layer). Scale is r1 (or 1 if r1 ≤ 0), so that the normalised
// radius is at most 1 on [r0, r1].
func Linear(r0, v0, r1, v1 float64) Poly {
	scale := r1
	if !(scale > 0) {
		scale = 1
	}
	u0, u1 := r0/scale, r1/scale
	slope := (v1 - v0) / (u1 - u0)
	// Intercept written as a weighted mean of v0 and v1 to limit rounding.
	c0 := (v0*u1 - v1*u0) / (u1 - u0)
	return Poly{C: []float64{c0, slope}, Scale: scale}
}

// At evaluates the polynomial at radius r (m).
func (p Poly) At(r float64) float64 {
	return horner(p.C, r/p.Scale)
}

// horner evaluates Σ c[k] u^k.
func horner(c []float64, u float64) float64 {
	v := 0.0
	for k := len(c) - 1; k >= 0; k-- {
		v = v*u + c[k]
	}
	return v
}

// extrema returns the minimum and maximum of p on [lo, hi] (m) and the radius
// where the minimum is reached. The extrema are found among the end points and
// the real roots of p' inside the interval: in closed form up to degree 3 and
// by recursive root isolation above.
func (p Poly) extrema(lo, hi float64) (minV, minR, maxV float64) {
	ua, ub := lo/p.Scale, hi/p.Scale
	c := trimZeros(p.C)
	minV, minR, maxV = math.Inf(1), lo, math.Inf(-1)
	consider := func(u, r float64) {
		v := horner(c, u)
		if math.IsNaN(v) {
			// Make sure a NaN is never hidden by the comparisons below.
			minV, minR, maxV = math.NaN(), r, math.NaN()
			return
		}
		if v < minV {
			minV, minR = v, r
		}
		if v > maxV {
			maxV = v
		}
	}
	consider(ua, lo)
	consider(ub, hi)
	if math.IsNaN(minV) {
		return minV, minR, maxV
	}
	inside := func(u float64) {
		if u > ua && u < ub {
			consider(u, u*p.Scale)
		}
	}
	switch len(c) {
	case 0, 1, 2:
		// Constant or linear: extrema at the end points.
	case 3:
		if c[2] != 0 {
			inside(-c[1] / (2 * c[2]))
		}
	case 4:
		r1, r2, n := quadRoots(3*c[3], 2*c[2], c[1])
		if n > 0 {
			inside(r1)
		}
		if n > 1 {
			inside(r2)
		}
	default:
		for _, u := range rootsIn(derivative(c), ua, ub) {
			inside(u)
		}
	}
	return minV, minR, maxV
}

// trimZeros drops trailing zero coefficients.
func trimZeros(c []float64) []float64 {
	for len(c) > 0 && c[len(c)-1] == 0 {
		c = c[:len(c)-1]
	}
	return c
}

// derivative returns the coefficients of d/du Σ c[k] u^k.
func derivative(c []float64) []float64 {
	if len(c) <= 1 {
		return nil
	}
	d := make([]float64, len(c)-1)
	for k := 1; k < len(c); k++ {
		d[k-1] = float64(k) * c[k]
	}
	return d
}

// quadRoots returns the real roots of a u² + b u + c (n of them, 0 to 2),
// using the cancellation-free form of the quadratic formula.
func quadRoots(a, b, c float64) (r1, r2 float64, n int) {
	if a == 0 {
		if b == 0 {
			return 0, 0, 0
		}
		return -c / b, 0, 1
	}
	disc := b*b - 4*a*c
	if disc < 0 {
		return 0, 0, 0
	}
	q := -0.5 * (b + math.Copysign(math.Sqrt(disc), b))
	if q == 0 {
		return 0, 0, 1 // b = 0 and c = 0: double root at 0
	}
	return q / a, c / q, 2
}

// rootsIn returns the real roots of Σ c[k] u^k in the open interval (lo, hi),
// in ascending order. The roots of the derivative split the interval into
// pieces on which the polynomial is monotone; each piece with a sign change
// holds exactly one root, found by bisection.
func rootsIn(c []float64, lo, hi float64) []float64 {
	c = trimZeros(c)
	var out []float64
	add := func(u float64) {
		if u > lo && u < hi {
			out = append(out, u)
		}
	}
	switch len(c) {
	case 0, 1:
		return nil
	case 2:
		add(-c[0] / c[1])
		return out
	case 3:
		r1, r2, n := quadRoots(c[2], c[1], c[0])
		if n > 0 {
			add(r1)
		}
		if n > 1 {
			add(r2)
		}
		sort.Float64s(out)
		return out
	}
	pts := append([]float64{lo}, rootsIn(derivative(c), lo, hi)...)
	pts = append(pts, hi)
	for i := 0; i+1 < len(pts); i++ {
		a, b := pts[i], pts[i+1]
		fa, fb := horner(c, a), horner(c, b)
		switch {
		case fa == 0:
			add(a)
		case fb == 0:
			// Picked up as the left end of the next piece, or it is hi.
		case (fa < 0) != (fb < 0):
			add(bisect(c, a, b, fa))
		}
	}
	return out
}

// bisect finds the root of a monotone polynomial piece on [a, b] with f(a) = fa
// and a sign change across the interval, to full floating-point resolution.
func bisect(c []float64, a, b, fa float64) float64 {
	for range 200 {
		m := 0.5 * (a + b)
		if m <= a || m >= b {
			break
		}
		fm := horner(c, m)
		if fm == 0 {
			return m
		}
		if (fm < 0) == (fa < 0) {
			a, fa = m, fm
		} else {
			b = m
		}
	}
	return 0.5 * (a + b)
}
