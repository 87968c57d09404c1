package tides

import (
	"fmt"
	"math"
	"math/cmplx"

	"plumb/forward"
)

// num is the scalar type of the tidal problem: float64 for the elastic Love
// numbers (Love), complex128 for the anelastic ones (ComplexLove), whose
// equations are the elastic ones with complex moduli (correspondence
// principle). Everything but the right-hand sides — centre start, interface
// conditions, the walk through the layers and the surface conditions — is
// written once for both, in response.
type num interface{ float64 | complex128 }

// re returns x as a num.
func re[T num](x float64) T {
	var z T
	switch p := any(&z).(type) {
	case *float64:
		*p = x
	case *complex128:
		*p = complex(x, 0)
	}
	return z
}

// mag returns |z|.
func mag[T num](z T) float64 {
	switch v := any(z).(type) {
	case float64:
		return math.Abs(v)
	case complex128:
		return cmplx.Abs(v)
	}
	return math.NaN()
}

// finiteNum reports whether z is finite (both parts, for a complex z).
func finiteNum[T num](z T) bool {
	m := mag(z)
	return !math.IsNaN(m) && !math.IsInf(m, 0)
}

// response walks the layers of a structure for one scalar type. Its y and
// yf hold the three solid solutions and the fluid solution; moduli and
// integrate are what the elastic and anelastic problems supply.
type response[T num] struct {
	*calc
	rh []Rheology // per layer (nil: elastic); segments join equal rheologies only
	y  [18]T      // three solid solutions (y1…y6 each)
	yf [2]T       // the fluid solution (y5, y6)
	// moduli returns the dimensionless ρ, g, λ and μ at x in the current
	// layer (λ = μ = 0 in a fluid).
	moduli func(x float64) (rho, g float64, lam, mu T)
	// integrate advances yf (fluid) or y (solid) from a to b.
	integrate func(fluid bool, a, b float64) error
}

func (c *response[T]) run() (k, h, l T, err error) {
	nan := re[T](math.NaN())
	layers := c.st.Model.Layers
	n := c.fn
	// Start radius: regular solutions grow like x^(n−1) and the irregular ones
	// decay outwards like x^−(n+2), so the part of the leading-order start's
	// error that lies along irregular solutions shrinks by x0^(2n+1) on the
	// way out, and any mix of regular solutions is fine (the surface
	// conditions pick the combination). x0 = min(0.1 x1, 0.01^(2/n)), x1 the
	// top of the smooth central region, puts the start well inside that
	// region and deep enough for that error to be negligible.
	j0 := c.segmentEnd(0, c.rh)
	x1 := layers[j0].Outer / c.R
	x0 := math.Min(0.1*x1, math.Pow(1e-2, 2/n))
	c.enter(0, 0)
	if layers[0].Fluid {
		c.yf = [2]T{re[T](math.Pow(x0, n)), re[T](2 * (n - 1) * math.Pow(x0, n-1))}
	} else {
		c.startSolid(x0)
	}
	x := x0
	// Each pass integrates one segment i..j of layers joined by continuous
	// boundaries (and equal rheologies); only the boundaries between
	// segments need interface conditions (or restart the integrator).
	for i, j := 0, j0; i < len(layers); i = j + 1 {
		if i > 0 {
			j = c.segmentEnd(i, c.rh)
		}
		c.enter(i, j)
		xb := layers[j].Outer / c.R
		if j == len(layers)-1 {
			xb = 1
		}
		if i > 0 {
			prev := layers[i-1].Fluid
			switch {
			case prev && !layers[i].Fluid:
				c.fluidToSolid(x, &layers[i-1])
			case !prev && layers[i].Fluid:
				if err := c.solidToFluid(x); err != nil {
					return nan, nan, nan, fmt.Errorf("tides: layer %d (%q): %w", i, layers[i].Name, err)
				}
			}
		}
		ierr := c.integrate(layers[i].Fluid, x, xb)
		if c.bad != nil {
			return nan, nan, nan, fmt.Errorf("tides: layer %d (%q): %w", c.cur, layers[c.cur].Name, c.bad)
		}
		if ierr != nil {
			return nan, nan, nan, fmt.Errorf("tides: layer %d (%q): %w", c.cur, layers[c.cur].Name, ierr)
		}
		x = xb
	}
	// W(R) = 1 in units of g₀R; g(R) = g₀.
	if layers[len(layers)-1].Fluid {
		y5 := re[T](2*n+1) / c.yf[1] * c.yf[0]
		k, h, l = y5-1, y5, nan
	} else {
		// Solve Σ_j c_j (y2, y4, y6)_j = (0, 0, 2n+1).
		var a [3][3]T
		for j := range 3 {
			a[0][j], a[1][j], a[2][j] = c.y[6*j+1], c.y[6*j+3], c.y[6*j+5]
		}
		cf, ok := solve3(a, [3]T{0, 0, re[T](2*n + 1)})
		if !ok {
			return nan, nan, nan, fmt.Errorf("tides: surface boundary conditions are singular")
		}
		var y1, y3, y5 T
		for j := range 3 {
			y1 += cf[j] * c.y[6*j]
			y3 += cf[j] * c.y[6*j+2]
			y5 += cf[j] * c.y[6*j+4]
		}
		k, h, l = y5-1, y1, y3
	}
	if !finiteNum(k) || !finiteNum(h) {
		return nan, nan, nan, fmt.Errorf("tides: Love numbers not finite (k = %v, h = %v)", k, h)
	}
	return k, h, l, nil
}

// startSolid sets the three regular solid solutions at x0 (see the package
// comment), in the dimensionless variables.
func (c *response[T]) startSolid(x0 float64) {
	rho, _, lam, mu := c.moduli(x0)
	n, L := c.fn, c.L
	den := re[T](4*n+2)*mu + re[T](2*n)*(lam+mu)
	// fill writes U = u0 x^p, V = v0 x^p with the stresses of a homogeneous
	// medium, and P = p0 x^n, into solution j.
	fill := func(j int, p float64, u0, v0 T, p0 float64) {
		xp := re[T](math.Pow(x0, p))
		xp1 := re[T](math.Pow(x0, p-1))
		U, V := u0*xp, v0*xp
		y := c.y[6*j : 6*j+6]
		y[0] = U
		y[1] = (lam*(re[T](p+2)*u0-re[T](L)*v0) + re[T](2*p)*mu*u0) * xp1
		y[2] = V
		y[3] = mu * (re[T](p-1)*v0 + u0) * xp1
		y[4] = re[T](p0 * math.Pow(x0, n))
		y[5] = re[T](p0*(2*n+1)*math.Pow(x0, n-1)) - re[T](3*rho)*U
	}
	fill(0, n-1, re[T](n), 1, 0)
	A := -(2*mu + (lam+mu)*re[T](n+3)) / den
	fill(1, n+1, re[T](n)*A+1, A, 0)
	Ap := re[T](-rho) / den
	fill(2, n+1, re[T](n)*Ap, Ap, 1)
	if c.bad != nil {
		for i := range c.y {
			c.y[i] = re[T](math.NaN())
		}
	}
}

// fluidToSolid replaces the solution of the fluid layer below, which ends at
// x, by the three solid starting solutions (see the package comment).
func (c *response[T]) fluidToSolid(x float64, below *forward.Layer) {
	rhoF := below.Density.At(x*c.R) / c.rhoBar
	g := c.gravity(x)
	s := re[T](1 / math.Max(mag(c.yf[0]), mag(c.yf[1])))
	y5, y6 := s*c.yf[0], s*c.yf[1]
	c.y = [18]T{
		y5 / re[T](g), 0, 0, 0, y5, y6,
		1, re[T](rhoF * g), 0, 0, 0, re[T](-3 * rhoF),
		0, 0, 1, 0, 0, 0,
	}
}

// solidToFluid combines the three solid solutions at x into the single
// fluid solution (see the package comment).
func (c *response[T]) solidToFluid(x float64) error {
	r := x * c.R
	rhoF := re[T](c.layer.Density.At(r) / c.rhoBar)
	g := re[T](c.gravity(x))
	var a, b [3]T
	for j := range 3 {
		y := c.y[6*j : 6*j+6]
		a[j] = y[3]
		b[j] = y[1] - rhoF*(g*y[0]-y[4])
	}
	// Null vector of the 2×3 system: the cross product of its rows (the
	// cross product is bilinear, so this holds for complex rows too).
	cf := [3]T{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
	var y5, y6 T
	for j := range 3 {
		y := c.y[6*j : 6*j+6]
		y5 += cf[j] * y[4]
		y6 += cf[j] * (y[5] - 3*rhoF*(y[4]/g-y[0]))
	}
	m := math.Max(mag(y5), mag(y6))
	if !(m > 0) || math.IsInf(m, 0) {
		return fmt.Errorf("solid–fluid boundary at r = %g m: degenerate interface conditions", r)
	}
	c.yf = [2]T{y5 / re[T](m), y6 / re[T](m)}
	return nil
}

// solve3 solves a·c = b by Gaussian elimination with partial pivoting.
func solve3[T num](a [3][3]T, b [3]T) ([3]T, bool) {
	for col := range 3 {
		p := col
		for r := col + 1; r < 3; r++ {
			if mag(a[r][col]) > mag(a[p][col]) {
				p = r
			}
		}
		if a[p][col] == 0 {
			return [3]T{}, false
		}
		a[col], a[p] = a[p], a[col]
		b[col], b[p] = b[p], b[col]
		for r := col + 1; r < 3; r++ {
			f := a[r][col] / a[col][col]
			for k := col; k < 3; k++ {
				a[r][k] -= f * a[col][k]
			}
			b[r] -= f * b[col]
		}
	}
	var x [3]T
	for r := 2; r >= 0; r-- {
		s := b[r]
		for k := r + 1; k < 3; k++ {
			s -= a[r][k] * x[k]
		}
		x[r] = s / a[r][r]
	}
	return x, true
}
