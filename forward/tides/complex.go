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
	if err := checkCall(s, n, tol); err != nil {
		return nan, nan, nan, err
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

// ccalc holds the complex moduli of the anelastic problem. Complex component
// m of the integrated state is stored as real part at 2m and imaginary part
// at 2m+1.
type ccalc struct {
	*calc
	omega float64 // rad/s
	rh    []Rheology
}

// newCCalc prepares the anelastic problem: the solid state as three complex
// 6-vectors (36 real components), the fluid state as complex (y5, y6).
func newCCalc(s *forward.Structure, n int, tol, omega float64, rh []Rheology) (*response[complex128], error) {
	base, err := newScales(s, n)
	if err != nil {
		return nil, err
	}
	c := &ccalc{calc: base, omega: omega, rh: rh}
	solid, err := ode.NewSolver(36, tol, tol)
	if err != nil {
		return nil, err
	}
	fluid, err := ode.NewSolver(4, fluidTol*tol, fluidTol*tol)
	if err != nil {
		return nil, err
	}
	r := &response[complex128]{calc: base, rh: rh, moduli: c.cparams}
	fSolid, fFluid := ode.Func(c.derivSolid), ode.Func(c.derivFluid)
	var buf [36]float64
	r.integrate = func(isFluid bool, a, b float64) error {
		if isFluid {
			f := [4]float64{real(r.yf[0]), imag(r.yf[0]), real(r.yf[1]), imag(r.yf[1])}
			err := fluid.Integrate(fFluid, a, b, f[:])
			r.yf = [2]complex128{complex(f[0], f[1]), complex(f[2], f[3])}
			return err
		}
		for m, z := range r.y {
			buf[2*m], buf[2*m+1] = real(z), imag(z)
		}
		err := solid.Integrate(fSolid, a, b, buf[:])
		for m := range r.y {
			r.y[m] = complex(buf[2*m], buf[2*m+1])
		}
		return err
	}
	return r, nil
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
