package eos

import (
	"fmt"
	"math"
)

// Vinet is the universal equation of state of Vinet, Ferrante, Rose & Smith (1987, J. Geophys.
// Res. 92, 9319) and Vinet et al. (1989, J. Phys.: Condens. Matter 1, 1941):
//
//	P = 3K0 (1 − x)/x² · exp[η(1 − x)],  x = (ρ0/ρ)^{1/3},  η = (3/2)(K0′ − 1),
//
// with the analytic bulk modulus (K = −V dP/dV = −(x/3) dP/dx)
//
//	K = K0 x^{−2} exp[η(1 − x)] [2 − x + η x (1 − x)].
//
// For every K0′ > 0 (η > −3/2) the bracket is ≥ (2 − x) − (3/2)·x(1 − x) ≥ 1 − 3/8 > 0 on
// 0 < x ≤ 1, so P rises monotonically without bound under compression; Density's only upper
// limit is MaxCompression.
//
// Rho0 is in kg/m³, K0 in Pa, K0p dimensionless; Shear gives μ(ρ) (zero value: fluid). The
// finite-strain shear law uses Rho0, K0 and K0p of the Vinet fit.
type Vinet struct {
	Rho0  float64 // reference (zero-pressure) density, kg/m³
	K0    float64 // isothermal bulk modulus at zero pressure, Pa
	K0p   float64 // K0′ = dK/dP at zero pressure
	Shear ShearLaw
}

var _ EOS = Vinet{}

// NewVinet returns a validated Vinet EOS: an error unless 0 < rho0 ≤ MaxReferenceDensity,
// 0 < k0 ≤ MaxModulus, 0 < k0p ≤ MaxK0p and shear is valid (see ShearLaw.Validate).
func NewVinet(rho0, k0, k0p float64, shear ShearLaw) (Vinet, error) {
	v := Vinet{Rho0: rho0, K0: k0, K0p: k0p, Shear: shear}
	return v, v.Validate()
}

// Validate checks the parameters as NewVinet does.
func (v Vinet) Validate() error {
	return checkHost("Vinet", v.Rho0, v.K0, v.K0p, v.Shear)
}

// ReferenceDensity returns Rho0.
func (v Vinet) ReferenceDensity() float64 { return v.Rho0 }

// pressureC is P as a function of c = (ρ/ρ0)^{1/3} = 1/x and f = ½(c² − 1), using
// 1 − x = 2f/(c(c + 1)), accurate also for ρ close to ρ0.
func (v Vinet) pressureC(c, f float64) float64 {
	omx := 2 * f / (c * (c + 1))
	return 3 * v.K0 * omx * c * c * math.Exp(1.5*(v.K0p-1)*omx)
}

func (v Vinet) bulkC(c, f float64) float64 {
	x := 1 / c
	omx := 2 * f / (c * (c + 1))
	eta := 1.5 * (v.K0p - 1)
	return v.K0 * c * c * math.Exp(eta*omx) * (2 - x + eta*x*omx)
}

// Pressure returns P(ρ) in Pa, accurate to a few ulp relative also for ρ close to ρ0; NaN for a
// density that is not finite and positive.
func (v Vinet) Pressure(rho float64) float64 { return v.pressureC(eulerian(rho, v.Rho0)) }

// BulkModulus returns the analytic K = ρ dP/dρ in Pa; NaN for a density that is not finite and
// positive.
func (v Vinet) BulkModulus(rho float64) float64 { return v.bulkC(eulerian(rho, v.Rho0)) }

// ShearModulus returns μ(ρ) in Pa from v.Shear; NaN for a density that is not finite and positive.
func (v Vinet) ShearModulus(rho float64) float64 { return v.shearC(eulerian(rho, v.Rho0)) }

func (v Vinet) shearC(c, f float64) float64 {
	switch v.Shear.Kind {
	case ShearLinear:
		return v.Shear.Mu0 + v.Shear.Mu0p*v.pressureC(c, f)
	case ShearFiniteStrain:
		return finiteStrainModulus(v.Shear.Mu0, v.Shear.Mu0p, v.K0, v.K0p, -1, f)
	}
	return 0 * f // 0, or NaN for an invalid density
}

// moduli returns K and μ at ρ with one cube root (the fast path of Velocities).
func (v Vinet) moduli(rho float64) (k, mu float64) {
	c, f := eulerian(rho, v.Rho0)
	return v.bulkC(c, f), v.shearC(c, f)
}

// Density returns the ρ (kg/m³) with P(ρ) = p (Pa) for finite p ≥ 0. It iterates on
// x = (ρ0/ρ)^{1/3} (no cube root per step) from the Murnaghan guess with Halley's method, i.e.
// Newton's method on P/√|dP/dx| using the analytic dP/dx = −3K/x (the same derivative as
// dP/dρ = K/ρ, by the chain rule) and d²P/dx², inside the bracket 0 < x ≤ 1 that every step
// narrows; a step leaving it is replaced by bisection. Accurate to
// ~1e-15 relative. An error for invalid ρ0, K0 or K0′, for p negative, NaN or infinite, and
// for p above MaxPressure (the compression limit MaxCompression).
func (v Vinet) Density(p float64) (float64, error) { return v.density(p, 0) }

// MaxPressure returns the largest pressure Density accepts (Pa), the pressure at the
// compression limit ρ/ρ0 = MaxCompression, and that density (kg/m³).
// Density(pmax) returns rhoMax.
func (v Vinet) MaxPressure() (pmax, rhoMax float64) {
	return v.limitPressure(), MaxCompression * v.Rho0
}

// limitPressure is P at x = minX (ρ/ρ0 = MaxCompression).
func (v Vinet) limitPressure() float64 {
	const y = 1 - minX
	return 3 * v.K0 * y / (minX * minX) * math.Exp(1.5*(v.K0p-1)*y)
}

// DensityNear is Density started from rhoGuess (kg/m³) instead of the Murnaghan guess, e.g. the
// density found for the same shell in the previous pass of an iterative solver; it returns the
// same result to rounding. A guess that is not finite or not above ρ0 is ignored.
func (v Vinet) DensityNear(p, rhoGuess float64) (float64, error) { return v.density(p, rhoGuess) }

func (v Vinet) density(p, rhoGuess float64) (float64, error) {
	if !refOK(v.Rho0, v.K0, v.K0p) {
		return 0, checkReference("Vinet", v.Rho0, v.K0, v.K0p)
	}
	if err := checkPressure("Vinet", p); err != nil {
		return 0, err
	}
	if p == 0 {
		return v.Rho0, nil
	}
	k3, eta := 3*v.K0, 1.5*(v.K0p-1)
	// The compression limit x = minX: a bound on P there costs no exponential
	// (e^z ≥ 1 + z, and e^z ≥ e^{−(3/2)(1−minX)} > 0.3 for η > −3/2); only a pressure above
	// the bound, tens of K0 and more, needs the exact P(minX).
	bound := 1 + eta*(1-minX)
	if bound < 0.3 {
		bound = 0.3
	}
	if p > k3*(1-minX)/(minX*minX)*bound {
		if pmax := v.limitPressure(); p >= pmax {
			if p == pmax {
				return MaxCompression * v.Rho0, nil
			}
			return 0, fmt.Errorf("eos: Vinet density: pressure %g Pa needs more than the maximum compression ρ/ρ0 = %g (reached at %g Pa): %w",
				p, float64(MaxCompression), pmax, ErrPressure)
		}
	}
	lo, hi := minX, 1.0 // P(lo) ≥ p > 0 = P(hi)
	x := math.NaN()
	if rhoGuess > v.Rho0 && rhoGuess <= math.MaxFloat64 {
		x = math.Cbrt(v.Rho0 / rhoGuess)
	}
	if !(x > lo && x < hi) {
		x = murnaghanRatio(p, v.K0, v.K0p, -1.0/3)
	}
	if !(x > lo && x < hi) {
		x = 0.5 * (lo + hi)
	}
	e := math.Exp(eta * (1 - x)) // E = e^{η(1−x)}, carried along the iteration
	for i := 0; ; i++ {
		if i == maxIter {
			return 0, fmt.Errorf("eos: Vinet density at %g Pa: no convergence after %d steps (bracket x in [%g, %g]): %w",
				p, maxIter, lo, hi, ErrPressure)
		}
		// P = 3K0 y x⁻² E, y = 1 − x;
		// dP/dx = −3K0 E x⁻³ h, h = 2 − x + ηxy (= −3K/x);
		// d²P/dx² = −3K0 E x⁻³ m, m = h′ − ηh − 3h/x, h′ = η − 1 − 2ηx;
		// d³P/dx³ = −3K0 E x⁻³ [m′ − (η + 3/x) m], m′ = −2η − ηh′ − 3h′/x + 3h/x².
		y := 1 - x
		ix := 1 / x
		q := k3 * e * ix * ix // 3K0 E x⁻²
		r := q*y - p
		if r == 0 {
			break
		}
		if r > 0 {
			lo = x
		} else {
			hi = x
		}
		h := 2 - x + eta*x*y
		h1 := eta - 1 - 2*eta*x
		m := h1 - eta*h - 3*h*ix
		qx := q * ix
		d1 := -qx * h
		d2 := -qx * m
		d3 := -qx * ((-2*eta - eta*h1 - 3*h1*ix + 3*h*ix*ix) - (eta+3*ix)*m)
		xn, halley := halleyStep(x, r, d1, d2)
		if xn == x {
			break // the step is below the resolution of x
		}
		if !(xn > lo && xn < hi) {
			xn, halley = lo+0.5*(hi-lo), false
		}
		step := xn - x
		x = xn
		if converged(x, math.Abs(step), d1, d2, d3, halley) {
			break
		}
		// Update E: for a small change of the exponent z = −η·step a degree-5 Taylor
		// polynomial of e^z is exact to |z|⁶/720 ≤ 2e-21 and saves an exponential.
		if z := -eta * step; math.Abs(z) <= 1e-3 {
			e *= 1 + z*(1+z*(1.0/2+z*(1.0/6+z*(1.0/24+z*(1.0/120)))))
		} else {
			e = math.Exp(eta * (1 - x))
		}
	}
	return v.Rho0 / (x * x * x), nil
}
