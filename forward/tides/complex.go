package tides

import (
	"fmt"
	"math"
	"math/cmplx"

	"plumb/forward"
	"plumb/forward/internal/ode"
)

// Anelastic response. By the correspondence principle (e.g. Peltier 1974,
// Rev. Geophys. Space Phys. 12, 649–669; Efroimsky 2012, Celest. Mech. Dyn.
// Astron. 112, 283–330; both from memory) the tidal response of a linear
// viscoelastic body to forcing ∝ exp(iωt) is the elastic response with each
// solid layer's shear modulus μ replaced by the complex modulus μ̃(ω); the
// bulk modulus K = λ + 2μ/3 stays real and elastic, so λ̃ = K − 2μ̃/3, and
// fluid layers are unchanged (static). With the exp(iωt) convention
//
//	Maxwell: J̃ = 1/μ − i/(ηω),                                  μ̃ = 1/J̃ = μ/(1 − iμ/(ηω))
//	Andrade: J̃ = 1/μ − i/(ηω) + (1/μ) Γ(1+α) (iωτ_A)^(−α),      τ_A = ζη/μ
//
// (Maxwell: Peltier 1974; Andrade: Efroimsky 2012, eq. for the Andrade
// compliance, and Castillo-Rogez et al. 2011, J. Geophys. Res. 116, E09008;
// from memory). A dissipative μ̃ has Im μ̃ > 0, and the response then lags
// the forcing: Im k < 0. PhaseLag returns the lag δ = −arg k (> 0 for a
// dissipative body) and QualityFactor Q = |k|/|Im k| = 1/sin δ.
//
// The complex equations are those of the package comment with complex λ̃ and
// μ̃; each complex component is integrated as its real and imaginary parts
// with the real ode.Solver (state dimension doubled).

// RheologyKind selects the constitutive law of a solid layer.
type RheologyKind int

const (
	// Elastic keeps the layer's elastic shear modulus ρ vs² (the zero value).
	Elastic RheologyKind = iota
	// Maxwell is a spring and a dashpot in series (parameter Viscosity).
	Maxwell
	// Andrade adds the transient Andrade creep to Maxwell (parameters
	// Viscosity, Alpha and Zeta).
	Andrade
)

// String returns the lower-case name of the rheology kind.
func (k RheologyKind) String() string {
	switch k {
	case Elastic:
		return "elastic"
	case Maxwell:
		return "maxwell"
	case Andrade:
		return "andrade"
	}
	return fmt.Sprintf("RheologyKind(%d)", int(k))
}

// Rheology is the constitutive law of one layer. The unrelaxed shear modulus
// is always the layer's elastic ρ vs².
type Rheology struct {
	Kind RheologyKind
	// Viscosity η (Pa s) of the steady-state creep; > 0 and finite for
	// Maxwell and Andrade.
	Viscosity float64
	// Alpha is the Andrade exponent, 0 < α < 1 (typically 0.2–0.4).
	Alpha float64
	// Zeta is the Andrade time in units of the Maxwell time,
	// τ_A = ζ η/μ, ζ > 0 and finite.
	Zeta float64
}

// validate checks the parameters needed by the kind.
func (r Rheology) validate() error {
	switch r.Kind {
	case Elastic:
		return nil
	case Maxwell, Andrade:
	default:
		return fmt.Errorf("unknown rheology kind %d", int(r.Kind))
	}
	if !(r.Viscosity > 0) || math.IsInf(r.Viscosity, 0) {
		return fmt.Errorf("%v viscosity must be finite and > 0, got %g Pa s", r.Kind, r.Viscosity)
	}
	if r.Kind == Andrade {
		if !(r.Alpha > 0 && r.Alpha < 1) {
			return fmt.Errorf("andrade exponent must be in (0, 1), got %g", r.Alpha)
		}
		if !(r.Zeta > 0) || math.IsInf(r.Zeta, 0) {
			return fmt.Errorf("andrade ζ must be finite and > 0, got %g", r.Zeta)
		}
	}
	return nil
}

// ComplexLove returns the degree-n (n ≥ 2) complex Love numbers k, h and l
// of the solved structure s for tidal forcing of period period (s, > 0 and
// finite), with rh[i] the rheology of s.Model.Layers[i] (rh nil or empty:
// all layers elastic; the rheology of fluid layers is checked but not used).
// The sign convention is forcing ∝ exp(iωt), ω = 2π/period, so a lag gives
// Im k < 0 (see PhaseLag). It integrates at tolerance DefaultTol. As for
// Love, l is NaN if the outermost layer is fluid.
func ComplexLove(s *forward.Structure, n int, period float64, rh []Rheology) (k, h, l complex128, err error) {
	return ComplexLoveTol(s, n, period, rh, DefaultTol)
}

// ComplexLoveTol is ComplexLove with the integration tolerance tol (relative
// and absolute, in the dimensionless variables), 0 < tol < 1e-2.
func ComplexLoveTol(s *forward.Structure, n int, period float64, rh []Rheology, tol float64) (k, h, l complex128, err error) {
	nan := cmplx.NaN()
	if s == nil || len(s.Model.Layers) == 0 {
		return nan, nan, nan, fmt.Errorf("tides: no structure")
	}
	if n < 2 || n > 100 {
		return nan, nan, nan, fmt.Errorf("tides: degree must be 2 ≤ n ≤ 100, got %d", n)
	}
	if !(tol > 0 && tol < 1e-2) {
		return nan, nan, nan, fmt.Errorf("tides: tolerance must be in (0, 1e-2), got %g", tol)
	}
	if !(period > 0) || math.IsInf(period, 0) {
		return nan, nan, nan, fmt.Errorf("tides: forcing period must be finite and > 0, got %g s", period)
	}
	layers := s.Model.Layers
	if len(rh) != 0 && len(rh) != len(layers) {
		return nan, nan, nan, fmt.Errorf("tides: %d rheologies for %d layers", len(rh), len(layers))
	}
	for i := range rh {
		if err := rh[i].validate(); err != nil {
			return nan, nan, nan, fmt.Errorf("tides: layer %d (%q): %w", i, layers[i].Name, err)
		}
	}
	if err := checkModuli(s); err != nil {
		return nan, nan, nan, fmt.Errorf("tides: %w", err)
	}
	c, err := newCCalc(s, n, tol, 2*math.Pi/period, rh)
	if err != nil {
		return nan, nan, nan, err
	}
	return c.run()
}

// PhaseLag returns the tidal phase lag δ = −arg k (rad) of the complex Love
// number k under the exp(iωt) convention of ComplexLove: δ > 0 when the
// response lags the forcing.
func PhaseLag(k complex128) float64 { return -cmplx.Phase(k) }

// QualityFactor returns Q = |k|/|Im k| (= 1/|sin δ|) of the complex Love
// number k; +Inf for a purely elastic (real) response.
func QualityFactor(k complex128) float64 { return cmplx.Abs(k) / math.Abs(imag(k)) }

// ccalc is the complex counterpart of calc. Complex component m of the state
// is stored as real part at 2m and imaginary part at 2m+1.
type ccalc struct {
	*calc
	omega  float64 // rad/s
	rh     []Rheology
	solid  *ode.Solver // 36 components: three complex 6-vectors
	fluid  *ode.Solver // 4 components: one complex 2-vector
	y      [18]complex128
	yf     [2]complex128
	buf    [36]float64
	fSolid ode.Func
	fFluid ode.Func
}

func newCCalc(s *forward.Structure, n int, tol, omega float64, rh []Rheology) (*ccalc, error) {
	base, err := newScales(s, n)
	if err != nil {
		return nil, err
	}
	c := &ccalc{calc: base, omega: omega, rh: rh}
	if c.solid, err = ode.NewSolver(36, tol, tol); err != nil {
		return nil, err
	}
	if c.fluid, err = ode.NewSolver(4, fluidTol*tol, fluidTol*tol); err != nil {
		return nil, err
	}
	c.fSolid = c.derivSolid
	c.fFluid = c.derivFluid
	return c, nil
}

// modulus returns the dimensionless complex shear modulus of the current
// layer for the dimensionless elastic modulus mu.
func (c *ccalc) modulus(mu float64) complex128 {
	if len(c.rh) == 0 {
		return complex(mu, 0)
	}
	r := c.rh[c.cur]
	switch r.Kind {
	case Maxwell:
		ew := r.Viscosity * c.omega / c.S // ηω in units of ρ̄g₀R
		return complex(mu, 0) / complex(1, -mu/ew)
	case Andrade:
		ew := r.Viscosity * c.omega / c.S
		wt := r.Zeta * ew / mu // ω τ_A
		tr := cmplx.Pow(complex(0, wt), complex(-r.Alpha, 0)) * complex(math.Gamma(1+r.Alpha)/mu, 0)
		return 1 / (complex(1/mu, -1/ew) + tr)
	}
	return complex(mu, 0)
}

// cparams returns the dimensionless ρ, g, λ̃, μ̃ at x in the current layer.
func (c *ccalc) cparams(x float64) (rho, g float64, lam, mu complex128) {
	rho, g, l, m := c.params(x)
	if c.layer.Fluid {
		return rho, g, 0, 0
	}
	mu = c.modulus(m)
	lam = complex(l+2*m/3, 0) - 2*mu/3
	return rho, g, lam, mu
}

func (c *ccalc) derivSolid(x float64, yr, dyr []float64) {
	c.locate(x)
	rho, g, lam, mu := c.cparams(x)
	n, L := c.fn, c.L
	beta := lam + 2*mu
	gam := mu * (3*lam + 2*mu) / beta
	ix := 1 / x
	ix2 := ix * ix
	cx, cx2 := complex(ix, 0), complex(ix2, 0)
	cL := complex(L, 0)
	rg := complex(rho*g, 0)
	a11, a12, a13 := -2*lam*cx/beta, 1/beta, cL*lam*cx/beta
	a21, a22, a23 := 4*gam*cx2-4*rg*cx, -4*mu*cx/beta, cL*rg*cx-2*cL*gam*cx2
	a24, a25, a26 := L*ix, (n+1)*rho*ix, -rho
	a41, a42, a43 := rg*cx-2*gam*cx2, -lam*cx/beta, ((gam+mu)*cL-2*mu)*cx2
	a44, a45 := -3*ix, -rho*ix
	imu := 1 / mu
	g3 := 3 * rho
	for j := 0; j < 36; j += 12 {
		v := yr[j : j+12 : j+12]
		y1, y2, y3 := complex(v[0], v[1]), complex(v[2], v[3]), complex(v[4], v[5])
		y4, y5, y6 := complex(v[6], v[7]), complex(v[8], v[9]), complex(v[10], v[11])
		d1 := a11*y1 + a12*y2 + a13*y3
		d2 := a21*y1 + a22*y2 + a23*y3 + cmul(a24, y4) + cmul(a25, y5) + cmul(a26, y6)
		d3 := cmul(ix, y3-y1) + y4*imu
		d4 := a41*y1 + a42*y2 + a43*y3 + cmul(a44, y4) + cmul(a45, y5)
		d5 := cmul(g3, y1) - cmul((n+1)*ix, y5) + y6
		d6 := cmul(g3*ix, cmul(n+1, y1)-cmul(L, y3)) + cmul((n-1)*ix, y6)
		d := dyr[j : j+12 : j+12]
		d[0], d[1], d[2], d[3] = real(d1), imag(d1), real(d2), imag(d2)
		d[4], d[5], d[6], d[7] = real(d3), imag(d3), real(d4), imag(d4)
		d[8], d[9], d[10], d[11] = real(d5), imag(d5), real(d6), imag(d6)
	}
}

// cmul multiplies a complex number by a real one.
func cmul(a float64, z complex128) complex128 { return complex(a*real(z), a*imag(z)) }

func (c *ccalc) derivFluid(x float64, y, dy []float64) {
	c.locate(x)
	rho, g, _, _ := c.params(x)
	n := c.fn
	q := 3 * rho / g
	a, b := q-(n+1)/x, 2*(n-1)/x*q
	d := (n-1)/x - q
	for p := range 2 { // real, imaginary part
		y5, y6 := y[p], y[2+p]
		dy[p] = a*y5 + y6
		dy[2+p] = b*y5 + d*y6
	}
}

func (c *ccalc) packSolid() {
	for m, z := range c.y {
		c.buf[2*m], c.buf[2*m+1] = real(z), imag(z)
	}
}

func (c *ccalc) unpackSolid() {
	for m := range c.y {
		c.y[m] = complex(c.buf[2*m], c.buf[2*m+1])
	}
}

func (c *ccalc) run() (k, h, l complex128, err error) {
	nan := cmplx.NaN()
	layers := c.st.Model.Layers
	n := c.fn
	// Start radius as in calc.run.
	x1 := layers[0].Outer / c.R
	x0 := math.Min(0.1*x1, math.Pow(1e-3, 2/n))
	c.enter(0, 0)
	if layers[0].Fluid {
		c.yf = [2]complex128{complex(math.Pow(x0, n), 0), complex(2*(n-1)*math.Pow(x0, n-1), 0)}
	} else {
		c.startSolid(x0)
	}
	x := x0
	// Segments of layers joined by continuous boundaries, as in calc.run
	// (with equal rheologies).
	for i, j := 0, 0; i < len(layers); i = j + 1 {
		j = c.segmentEnd(i, c.rh)
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
		var ierr error
		if layers[i].Fluid {
			f := [4]float64{real(c.yf[0]), imag(c.yf[0]), real(c.yf[1]), imag(c.yf[1])}
			ierr = c.fluid.Integrate(c.fFluid, x, xb, f[:])
			c.yf = [2]complex128{complex(f[0], f[1]), complex(f[2], f[3])}
		} else {
			c.packSolid()
			ierr = c.solid.Integrate(c.fSolid, x, xb, c.buf[:])
			c.unpackSolid()
		}
		if c.bad != nil {
			return nan, nan, nan, fmt.Errorf("tides: layer %d (%q): %w", c.cur, layers[c.cur].Name, c.bad)
		}
		if ierr != nil {
			return nan, nan, nan, fmt.Errorf("tides: layer %d (%q): %w", c.cur, layers[c.cur].Name, ierr)
		}
		x = xb
	}
	if layers[len(layers)-1].Fluid {
		y5 := complex(2*n+1, 0) / c.yf[1] * c.yf[0]
		k, h, l = y5-1, y5, nan
	} else {
		var a [3][3]complex128
		for j := range 3 {
			a[0][j], a[1][j], a[2][j] = c.y[6*j+1], c.y[6*j+3], c.y[6*j+5]
		}
		cf, ok := solve3c(a, [3]complex128{0, 0, complex(2*n+1, 0)})
		if !ok {
			return nan, nan, nan, fmt.Errorf("tides: surface boundary conditions are singular")
		}
		var y1, y3, y5 complex128
		for j := range 3 {
			y1 += cf[j] * c.y[6*j]
			y3 += cf[j] * c.y[6*j+2]
			y5 += cf[j] * c.y[6*j+4]
		}
		k, h, l = y5-1, y1, y3
	}
	if cmplx.IsNaN(k) || cmplx.IsInf(k) || cmplx.IsNaN(h) || cmplx.IsInf(h) {
		return nan, nan, nan, fmt.Errorf("tides: Love numbers not finite (k = %g, h = %g)", k, h)
	}
	return k, h, l, nil
}

// startSolid sets the three regular solid solutions at x0 (calc.startSolid
// with complex moduli).
func (c *ccalc) startSolid(x0 float64) {
	rho, _, lam, mu := c.cparams(x0)
	n, L := c.fn, c.L
	cn, cL := complex(n, 0), complex(L, 0)
	den := complex(4*n+2, 0)*mu + complex(2*n, 0)*(lam+mu)
	fill := func(j int, p float64, u0, v0 complex128, p0 float64) {
		xp := complex(math.Pow(x0, p), 0)
		xp1 := complex(math.Pow(x0, p-1), 0)
		cp := complex(p, 0)
		U, V := u0*xp, v0*xp
		y := c.y[6*j : 6*j+6]
		y[0] = U
		y[1] = (lam*((cp+2)*u0-cL*v0) + 2*mu*cp*u0) * xp1
		y[2] = V
		y[3] = mu * ((cp-1)*v0 + u0) * xp1
		y[4] = complex(p0*math.Pow(x0, n), 0)
		y[5] = complex(p0*(2*n+1)*math.Pow(x0, n-1), 0) - cmul(3*rho, U)
	}
	fill(0, n-1, cn, 1, 0)
	A := -(2*mu + (lam+mu)*complex(n+3, 0)) / den
	fill(1, n+1, cn*A+1, A, 0)
	Ap := complex(-rho, 0) / den
	fill(2, n+1, cn*Ap, Ap, 1)
	if c.bad != nil {
		for i := range c.y {
			c.y[i] = cmplx.NaN()
		}
	}
}

// fluidToSolid replaces the fluid solution ending at x by the three solid
// starting solutions (calc.fluidToSolid).
func (c *ccalc) fluidToSolid(x float64, below *forward.Layer) {
	r := x * c.R
	rhoF := below.Density.At(r) / c.rhoBar
	g := c.gravity(x)
	s := complex(1/math.Max(cmplx.Abs(c.yf[0]), cmplx.Abs(c.yf[1])), 0)
	y5, y6 := s*c.yf[0], s*c.yf[1]
	c.y = [18]complex128{
		y5 / complex(g, 0), 0, 0, 0, y5, y6,
		1, complex(rhoF*g, 0), 0, 0, 0, complex(-3*rhoF, 0),
		0, 0, 1, 0, 0, 0,
	}
}

// solidToFluid combines the three solid solutions at x into the fluid
// solution (calc.solidToFluid; the cross product is bilinear, so it is still
// a null vector of the complex 2×3 system).
func (c *ccalc) solidToFluid(x float64) error {
	r := x * c.R
	rhoF := complex(c.layer.Density.At(r)/c.rhoBar, 0)
	g := complex(c.gravity(x), 0)
	var a, b [3]complex128
	for j := range 3 {
		y := c.y[6*j : 6*j+6]
		a[j] = y[3]
		b[j] = y[1] - rhoF*(g*y[0]-y[4])
	}
	cf := [3]complex128{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
	var y5, y6 complex128
	for j := range 3 {
		y := c.y[6*j : 6*j+6]
		y5 += cf[j] * y[4]
		y6 += cf[j] * (y[5] - 3*rhoF*(y[4]/g-y[0]))
	}
	m := math.Max(cmplx.Abs(y5), cmplx.Abs(y6))
	if !(m > 0) || math.IsInf(m, 0) {
		return fmt.Errorf("solid–fluid boundary at r = %g m: degenerate interface conditions", r)
	}
	c.yf = [2]complex128{y5 / complex(m, 0), y6 / complex(m, 0)}
	return nil
}

// solve3c solves the complex system a·c = b by Gaussian elimination with
// partial pivoting.
func solve3c(a [3][3]complex128, b [3]complex128) ([3]complex128, bool) {
	for col := range 3 {
		p := col
		for r := col + 1; r < 3; r++ {
			if cmplx.Abs(a[r][col]) > cmplx.Abs(a[p][col]) {
				p = r
			}
		}
		if a[p][col] == 0 {
			return [3]complex128{}, false
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
	var x [3]complex128
	for r := 2; r >= 0; r-- {
		s := b[r]
		for k := r + 1; k < 3; k++ {
			s -= a[r][k] * x[k]
		}
		x[r] = s / a[r][r]
	}
	return x, true
}
