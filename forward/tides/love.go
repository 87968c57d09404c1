package tides

import (
	"fmt"
	"math"

	"plumb/forward"
	"plumb/forward/internal/ode"
)

// DefaultTol is the relative and absolute tolerance of the radial
// integration used by Love and ComplexLove (in the dimensionless variables
// of the package documentation). The local error control of the
// Dormand–Prince pair is conservative here: at DefaultTol the degree-2 Love
// numbers of the test models agree with an integration at 1e-12 to 2e-7
// (TestDefaultTolAccuracy), and halving the tolerance changes k2 by less
// than 1e-7 (TestConvergence) — far below any measured uncertainty of a Love
// number — so a tighter default would cost more for no gain that matters.
const DefaultTol = 1e-6

// Love returns the degree-n (n ≥ 2) static elastic Love numbers k, h and l of
// the solved structure s, integrating at tolerance DefaultTol. If the
// outermost layer is fluid the tangential displacement is undetermined in
// the static limit and l is returned as NaN (k and h are still valid).
func Love(s *forward.Structure, n int) (k, h, l float64, err error) {
	return LoveTol(s, n, DefaultTol)
}

// LoveTol is Love with the integration tolerance tol (relative and absolute,
// in the dimensionless variables), 0 < tol < 1e-2.
func LoveTol(s *forward.Structure, n int, tol float64) (k, h, l float64, err error) {
	nan := math.NaN()
	if err := checkCall(s, n, tol); err != nil {
		return nan, nan, nan, err
	}
	if err := checkModuli(s); err != nil {
		return nan, nan, nan, fmt.Errorf("tides: %w", err)
	}
	c, err := newCalc(s, n, tol)
	if err != nil {
		return nan, nan, nan, err
	}
	return c.run()
}

// checkCall checks the arguments that Love and ComplexLove share: a structure
// with layers, a degree 2 ≤ n ≤ 100 and a tolerance 0 < tol < 1e-2.
func checkCall(s *forward.Structure, n int, tol float64) error {
	if s == nil || len(s.Model.Layers) == 0 {
		return fmt.Errorf("tides: no structure")
	}
	if n < 2 || n > 100 {
		return fmt.Errorf("tides: degree must be 2 ≤ n ≤ 100, got %d", n)
	}
	if !(tol > 0 && tol < 1e-2) {
		return fmt.Errorf("tides: tolerance must be in (0, 1e-2), got %g", tol)
	}
	return nil
}

// checkModuli checks that every solid layer has μ > 0 and a bulk modulus
// K = ρ(vp² − 4vs²/3) > 0 at its ends and at interior sample points (the
// right-hand side checks again at every point it uses). If vp and vs are
// both at most linear in r the ends suffice: vs > 0 at both ends then holds
// throughout, and vp² − 4vs²/3 = (vp − 2vs/√3)(vp + 2vs/√3) is a product of
// two linear factors that are then positive at both ends, hence throughout.
func checkModuli(s *forward.Structure) error {
	const samples = 16
	for i := range s.Model.Layers {
		l := &s.Model.Layers[i]
		if l.Fluid {
			continue
		}
		step := 1
		if len(l.Vp.C) <= 2 && len(l.Vs.C) <= 2 {
			step = samples
		}
		for j := 0; j <= samples; j += step {
			r := l.Inner + (l.Outer-l.Inner)*float64(j)/samples
			if j == samples {
				r = l.Outer
			}
			vp, vs := l.Vp.At(r), l.Vs.At(r)
			if !(vs > 0) || !(vp*vp > 4*vs*vs/3) {
				return fmt.Errorf("solid layer %d (%q) at r = %g m: vs = %g m/s, vp = %g m/s; need vs > 0 and vp² > 4vs²/3",
					i, l.Name, r, vs, vp)
			}
		}
	}
	return nil
}

type calc struct {
	st     *forward.Structure
	n      int
	L, fn  float64
	R      float64        // m
	rhoBar float64        // kg/m³
	g0     float64        // m/s²
	S      float64        // stress unit ρ̄ g₀ R (Pa)
	layer  *forward.Layer // layer containing the current radius: Layers[cur]
	// Gravity in the current layer, g(x)/g₀ = gK/x² + x·Σ_k gb[k] xᵏ for
	// density polynomials of at most len(gb) coefficients (gn ≥ 0), else
	// gn = −1 and the structure is asked (see setGravity).
	gK float64
	gb [8]float64
	gn int
	// cur is the index of layer; during the integration of a segment
	// (consecutive layers lo..hi joined by continuous interfaces) the
	// right-hand side moves it within [lo, hi] to the layer containing x.
	cur, lo, hi int
	// perLayer ends a segment at every layer boundary (tests only: the
	// reference against which the joined integration is checked).
	perLayer bool
	bad      error // first non-physical coefficient met by a right-hand side
}

// newCalc prepares the elastic problem: real moduli, the solid state as
// three real 6-vectors (18 components), the fluid state as (y5, y6).
func newCalc(s *forward.Structure, n int, tol float64) (*response[float64], error) {
	c, err := newScales(s, n)
	if err != nil {
		return nil, err
	}
	solid, err := ode.NewSolver(18, tol, tol)
	if err != nil {
		return nil, err
	}
	fluid, err := ode.NewSolver(2, fluidTol*tol, fluidTol*tol)
	if err != nil {
		return nil, err
	}
	r := &response[float64]{calc: c, moduli: c.params}
	fSolid, fFluid := ode.Func(c.derivSolid), ode.Func(c.derivFluid)
	r.integrate = func(isFluid bool, a, b float64) error {
		if isFluid {
			return fluid.Integrate(fFluid, a, b, r.yf[:])
		}
		return solid.Integrate(fSolid, a, b, r.y[:])
	}
	return r, nil
}

// newScales returns a calc with the degree and the units of the
// dimensionless variables set, but without solvers.
func newScales(s *forward.Structure, n int) (*calc, error) {
	c := &calc{st: s, n: n, fn: float64(n), L: float64(n * (n + 1)), R: s.Radius()}
	c.rhoBar = s.MeanDensity()
	c.g0 = s.SurfaceGravity()
	c.S = c.rhoBar * c.g0 * c.R
	if !(c.R > 0) || !(c.S > 0) || math.IsInf(c.S, 0) {
		return nil, fmt.Errorf("tides: structure has radius %g m, surface gravity %g m/s²", c.R, c.g0)
	}
	return c, nil
}

// fluidTol scales the tolerance of the fluid-layer integration: the
// two-component fluid system costs little per step but is less accurate than
// the solid part at the same tolerance, so it is integrated 100 times
// tighter, which brings it to the accuracy of the solid part.
const fluidTol = 1e-2

// contTol is the relative tolerance within which density, vp and vs must
// agree on both sides of a boundary for it to count as continuous (a linear
// piece evaluated at its end is off by ~1e-12 relative through rounding).
const contTol = 1e-9

// continuous reports whether the boundary between layer a and the layer b
// just above it is continuous: same state (solid or fluid) and density, vp
// and (in solids) vs equal within contTol. The equations can then be
// integrated across it without interface conditions.
func continuous(a, b *forward.Layer) bool {
	if a.Fluid != b.Fluid || a.Outer != b.Inner {
		return false
	}
	r := a.Outer
	return same(a.Density, b.Density, r) && same(a.Vp, b.Vp, r) && (a.Fluid || same(a.Vs, b.Vs, r))
}

// same reports whether p and q agree at r within contTol (relative).
func same(p, q forward.Poly, r float64) bool {
	u, v := p.At(r), q.At(r)
	// Plain comparisons (math.Max's NaN and ±0 handling is not needed: a
	// NaN compares false, i.e. not continuous).
	m := math.Abs(u)
	if a := math.Abs(v); a > m {
		m = a
	}
	return math.Abs(u-v) <= contTol*m
}

// segmentEnd returns the index of the last layer of the segment starting at
// layer i: the layers up to it are joined by continuous boundaries (and, if
// rh is not empty, have equal rheologies).
func (c *calc) segmentEnd(i int, rh []Rheology) int {
	layers := c.st.Model.Layers
	j := i
	if c.perLayer {
		return j
	}
	for j+1 < len(layers) && continuous(&layers[j], &layers[j+1]) && (len(rh) == 0 || rh[j] == rh[j+1]) {
		j++
	}
	return j
}

// enter makes layers lo..hi the current segment, with the cursor at lo.
func (c *calc) enter(lo, hi int) {
	c.lo, c.hi = lo, hi
	c.moveTo(lo)
}

// moveTo puts the cursor on layer i.
func (c *calc) moveTo(i int) {
	c.cur = i
	c.layer = &c.st.Model.Layers[i]
	c.setGravity(i)
}

// setGravity prepares the gravity of layer i from the closed forms of
// forward.Structure: with a_k = C_k (R/Scale)^k the density coefficients in
// x = r/R, the enclosed mass is 4πR³(K + Σ_k a_k x^{k+3}/(k+3)) with
// K = m_i/(4πR³) − Σ_k a_k x_i^{k+3}/(k+3) (m_i the mass below the layer),
// and g = G m/r². Divided by g₀ = G M/R², the coefficients carry a factor
// 4πR³/M = 3/ρ̄. Evaluating this polynomial costs a few multiplications,
// where Structure.Gravity would redo the layer's mass integral at every
// call of the right-hand side.
func (c *calc) setGravity(i int) {
	l := &c.st.Model.Layers[i]
	n := len(l.Density.C)
	if n > len(c.gb) {
		c.gn = -1
		return
	}
	c.gn = n
	f := 3 / c.rhoBar
	scale := c.R / l.Density.Scale
	xi := l.Inner / c.R
	K := c.st.EnclosedMass[i] / c.st.Mass // m_i/M = m_i/(4πR³) · 3/ρ̄
	p, xp := 1.0, xi*xi*xi
	for k, ck := range l.Density.C {
		b := f * ck * p / float64(k+3)
		c.gb[k] = b
		K -= b * xp
		p *= scale
		xp *= xi
	}
	if i == 0 {
		K = 0 // exactly: nothing below the centre
	}
	c.gK = K
}

// gravity returns g(x)/g₀ in the current layer.
func (c *calc) gravity(x float64) float64 {
	if c.gn < 0 {
		return c.st.Gravity(x*c.R) / c.g0
	}
	h := 0.0
	for k := c.gn - 1; k >= 0; k-- {
		h = h*x + c.gb[k]
	}
	return c.gK/(x*x) + x*h
}

// locate moves the cursor to the layer of the current segment containing
// x (the nearest one if x lies outside the segment). Successive calls move
// it by a few layers at most, so the cost is O(1) amortised.
func (c *calc) locate(x float64) {
	r := x * c.R
	layers := c.st.Model.Layers
	i := c.cur
	for i < c.hi && r > layers[i].Outer {
		i++
	}
	for i > c.lo && r < layers[i].Inner {
		i--
	}
	if i != c.cur {
		c.moveTo(i)
	}
}

// params returns the dimensionless ρ, g, λ, μ at x in the current layer.
func (c *calc) params(x float64) (rho, g, lam, mu float64) {
	r := x * c.R
	l := c.layer
	d := l.Density.At(r)
	rho = d / c.rhoBar
	g = c.gravity(x)
	if l.Fluid {
		return rho, g, 0, 0
	}
	vp, vs := l.Vp.At(r), l.Vs.At(r)
	mu = d * vs * vs / c.S
	lam = d * (vp*vp - 2*vs*vs) / c.S
	if !(mu > 0) || !(lam+2*mu/3 > 0) {
		if c.bad == nil {
			c.bad = fmt.Errorf("at r = %g m: shear modulus %g Pa and bulk modulus %g Pa must be > 0",
				r, mu*c.S, (lam+2*mu/3)*c.S)
		}
		mu, lam = math.NaN(), math.NaN()
	}
	return rho, g, lam, mu
}

func (c *calc) derivSolid(x float64, y, dy []float64) {
	c.locate(x)
	rho, g, lam, mu := c.params(x)
	n, L := c.fn, c.L
	beta := lam + 2*mu
	gam := mu * (3*lam + 2*mu) / beta
	ix := 1 / x
	ix2 := ix * ix
	a11, a12, a13 := -2*lam*ix/beta, 1/beta, L*lam*ix/beta
	a21, a22, a23 := 4*gam*ix2-4*rho*g*ix, -4*mu*ix/beta, L*rho*g*ix-2*L*gam*ix2
	a24, a25, a26 := L*ix, (n+1)*rho*ix, -rho
	a41, a42, a43 := rho*g*ix-2*gam*ix2, -lam*ix/beta, ((gam+mu)*L-2*mu)*ix2
	a44, a45 := -3*ix, -rho*ix
	g3 := 3 * rho
	for j := 0; j < 18; j += 6 {
		y1, y2, y3, y4, y5, y6 := y[j], y[j+1], y[j+2], y[j+3], y[j+4], y[j+5]
		dy[j] = a11*y1 + a12*y2 + a13*y3
		dy[j+1] = a21*y1 + a22*y2 + a23*y3 + a24*y4 + a25*y5 + a26*y6
		dy[j+2] = (y3-y1)*ix + y4/mu
		dy[j+3] = a41*y1 + a42*y2 + a43*y3 + a44*y4 + a45*y5
		dy[j+4] = g3*y1 - (n+1)*ix*y5 + y6
		dy[j+5] = g3*((n+1)*y1-L*y3)*ix + (n-1)*ix*y6
	}
}

func (c *calc) derivFluid(x float64, y, dy []float64) {
	c.locate(x)
	rho, g, _, _ := c.params(x)
	n := c.fn
	q := 3 * rho / g
	dy[0] = (q-(n+1)/x)*y[0] + y[1]
	dy[1] = 2*(n-1)/x*q*y[0] + ((n-1)/x-q)*y[1]
}
