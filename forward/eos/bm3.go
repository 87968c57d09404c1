package eos

import (
	"fmt"
	"math"
)

// BM3 is the third-order Birch–Murnaghan equation of state (Birch 1947, Phys. Rev. 71, 809):
//
//	P = (3/2) K0 [η^{7/3} − η^{5/3}] {1 + (3/4)(K0′ − 4)[η^{2/3} − 1]},  η = ρ/ρ0,
//
// equivalently, with the Eulerian strain f = ½(η^{2/3} − 1), P = 3K0 f (1+2f)^{5/2}[1 + (3/2)(K0′−4)f].
// Its analytic bulk modulus is
//
//	K = ρ dP/dρ = K0 (1+2f)^{5/2} [1 + (3K0′ − 5) f + (27/2)(K0′ − 4) f²].
//
// For K0′ ≥ 4 the bracket is positive for all f ≥ 0 and P rises without bound. For K0′ < 4 the
// f² coefficient is negative: K vanishes at a finite strain (the turnover) and P has a maximum
// there, beyond which the formula decreases and is unphysical; see MaxPressure. (For
// K0′ ≥ 5/3 the turnover lies beyond ρ/ρ0 ≈ 1.6; for K0′ = 3.9 at ρ/ρ0 ≈ 37.)
//
// Rho0 is in kg/m³, K0 in Pa, K0p dimensionless; Shear gives μ(ρ) (zero value: fluid).
type BM3 struct {
	Rho0  float64 // reference (zero-pressure) density, kg/m³
	K0    float64 // isothermal bulk modulus at zero pressure, Pa
	K0p   float64 // K0′ = dK/dP at zero pressure
	Shear ShearLaw
}

var _ EOS = BM3{}

// NewBM3 returns a validated BM3: an error unless 0 < rho0 ≤ MaxReferenceDensity,
// 0 < k0 ≤ MaxModulus, 0 < k0p ≤ MaxK0p and shear is valid (see ShearLaw.Validate).
func NewBM3(rho0, k0, k0p float64, shear ShearLaw) (BM3, error) {
	b := BM3{Rho0: rho0, K0: k0, K0p: k0p, Shear: shear}
	return b, b.Validate()
}

// Validate checks the parameters as NewBM3 does.
func (b BM3) Validate() error {
	return checkHost("BM3", b.Rho0, b.K0, b.K0p, b.Shear)
}

// ReferenceDensity returns Rho0.
func (b BM3) ReferenceDensity() float64 { return b.Rho0 }

// pressureF is P as a function of the Eulerian strain f (u = 1 + 2f).
func (b BM3) pressureF(f float64) float64 {
	u := 1 + 2*f
	return 3 * b.K0 * f * u * u * math.Sqrt(u) * (1 + 1.5*(b.K0p-4)*f)
}

// bulkF is K as a function of the Eulerian strain f.
func (b BM3) bulkF(f float64) float64 {
	u := 1 + 2*f
	return b.K0 * u * u * math.Sqrt(u) * (1 + f*((3*b.K0p-5)+f*(13.5*(b.K0p-4))))
}

// Pressure returns P(ρ) in Pa, accurate to a few ulp relative also for ρ close to ρ0; NaN for a
// density that is not finite and positive. Past the turnover (K0′ < 4, ρ above the density
// MaxPressure returns) it returns the decreasing formula.
func (b BM3) Pressure(rho float64) float64 {
	_, f := eulerian(rho, b.Rho0)
	return b.pressureF(f)
}

// BulkModulus returns the analytic K = ρ dP/dρ in Pa; NaN for a density that is not finite and
// positive; negative past the turnover.
func (b BM3) BulkModulus(rho float64) float64 {
	_, f := eulerian(rho, b.Rho0)
	return b.bulkF(f)
}

// ShearModulus returns μ(ρ) in Pa from b.Shear; NaN for a density that is not finite and positive.
func (b BM3) ShearModulus(rho float64) float64 {
	_, f := eulerian(rho, b.Rho0)
	return b.shearF(f)
}

func (b BM3) shearF(f float64) float64 {
	switch b.Shear.Kind {
	case ShearLinear:
		return b.Shear.Mu0 + b.Shear.Mu0p*b.pressureF(f)
	case ShearFiniteStrain:
		return finiteStrainModulus(b.Shear.Mu0, b.Shear.Mu0p, b.K0, b.K0p, -1, f)
	}
	return 0 * f // 0, or NaN for an invalid density
}

// moduli returns K and μ at ρ with one cube root (the fast path of Velocities).
func (b BM3) moduli(rho float64) (k, mu float64) {
	_, f := eulerian(rho, b.Rho0)
	return b.bulkF(f), b.shearF(f)
}

// turnoverU returns u = 1 + 2f* at the turnover, where K = 0, or +Inf when K0′ ≥ 4 (no
// turnover). f* is the positive root of 1 + b1 f + b2 f², b2 = (27/2)(K0′ − 4) < 0, taken in
// the form that avoids cancellation.
func (b BM3) turnoverU() float64 {
	if b.K0p >= 4 {
		return math.Inf(1)
	}
	b1 := 3*b.K0p - 5
	b2 := 13.5 * (b.K0p - 4)
	sq := math.Sqrt(b1*b1 - 4*b2)
	var f float64
	if b1 >= 0 {
		f = (b1 + sq) / (-2 * b2)
	} else {
		f = 2 / (sq - b1)
	}
	return 1 + 2*f
}

// limit returns the largest u Density may return, the pressure there and whether it is the
// turnover: the turnover (K0′ < 4) or the compression limit MaxCompression, whichever comes
// first. At the compression limit maxU^{5/2} = MaxCompression^{5/3} = MaxCompression·maxU, so
// the pressure there needs no square root.
func (b BM3) limit() (u, p float64, turnover bool) {
	if b.K0p < 4 {
		if ut := b.turnoverU(); ut < maxU {
			return ut, b.pressureF(0.5 * (ut - 1)), true
		}
	}
	const fMax = 0.5 * (maxU - 1)
	return maxU, 3 * b.K0 * fMax * (MaxCompression * maxU) * (1 + 1.5*(b.K0p-4)*fMax), false
}

// MaxPressure returns the largest pressure Density accepts (Pa) and the density there (kg/m³):
// the turnover where K = 0 when K0′ < 4 and it comes before ρ/ρ0 = MaxCompression, otherwise
// the pressure at that compression. Density(pmax) returns rhoMax.
func (b BM3) MaxPressure() (pmax, rhoMax float64) {
	u, pmax, turnover := b.limit()
	return pmax, b.limitDensity(u, turnover)
}

func (b BM3) limitDensity(u float64, turnover bool) float64 {
	if turnover {
		return b.Rho0 * u * math.Sqrt(u)
	}
	return MaxCompression * b.Rho0
}

// Density returns the ρ (kg/m³) with P(ρ) = p (Pa) for finite p ≥ 0. It iterates on
// u = (ρ/ρ0)^{2/3} (no cube root per step) from the Murnaghan guess with Halley's method, i.e.
// Newton's method on P/√(dP/du), using the analytic dP/du = (3/2)K/u (the same derivative as
// dP/dρ = K/ρ, by the chain rule) and d²P/du², inside a bracket [1, u_max] that every step
// narrows; a step leaving the bracket is replaced by bisection.
// The result is accurate to ~1e-15 relative where K is not small. Near the turnover (K0′ < 4,
// p → pmax) dρ/dp = ρ/K diverges and only the pressure residual is small (|P(ρ) − p| of the
// order of the rounding of P); at p = pmax the turnover density itself is returned.
// An error for invalid ρ0, K0 or K0′, for p negative, NaN or infinite, and for p above
// MaxPressure (the turnover, or the compression limit MaxCompression).
func (b BM3) Density(p float64) (float64, error) { return b.density(p, 0) }

// DensityNear is Density started from rhoGuess (kg/m³) instead of the Murnaghan guess, e.g. the
// density found for the same shell in the previous pass of an iterative solver; it returns the
// same result to rounding. A guess that is not finite, not above ρ0 or past MaxPressure's
// density is ignored.
func (b BM3) DensityNear(p, rhoGuess float64) (float64, error) { return b.density(p, rhoGuess) }

func (b BM3) density(p, rhoGuess float64) (float64, error) {
	if !refOK(b.Rho0, b.K0, b.K0p) {
		return 0, checkReference("BM3", b.Rho0, b.K0, b.K0p)
	}
	if err := checkPressure("BM3", p); err != nil {
		return 0, err
	}
	if p == 0 {
		return b.Rho0, nil
	}
	hi, pmax, turnover := b.limit()
	if p >= pmax {
		if p == pmax {
			return b.limitDensity(hi, turnover), nil
		}
		if turnover {
			return 0, fmt.Errorf("eos: BM3 density: pressure %g Pa above the maximum %g Pa reached at ρ = %g kg/m³ (K0′ = %g < 4 turns over): %w",
				p, pmax, b.limitDensity(hi, turnover), b.K0p, ErrPressure)
		}
		return 0, fmt.Errorf("eos: BM3 density: pressure %g Pa needs more than the maximum compression ρ/ρ0 = %g (reached at %g Pa): %w",
			p, float64(MaxCompression), pmax, ErrPressure)
	}
	lo := 1.0
	// P(u) = A u^{5/2} g(w), w = u − 1, g = w + ξw², A = (3/2)K0, ξ = (3/4)(K0′ − 4).
	a, xi := 1.5*b.K0, 0.75*(b.K0p-4)
	u := math.NaN()
	if rhoGuess > b.Rho0 && rhoGuess <= math.MaxFloat64 {
		c := math.Cbrt(rhoGuess / b.Rho0)
		u = c * c
	}
	if !(u > lo && u < hi) {
		u = murnaghanRatio(p, b.K0, b.K0p, 2.0/3)
	}
	if !(u > lo && u < hi) {
		u = lo + 0.5*(hi-lo)
	}
	for i := 0; ; i++ {
		if i == maxIter {
			return 0, fmt.Errorf("eos: BM3 density at %g Pa: no convergence after %d steps (bracket ρ/ρ0 in [%g, %g]): %w",
				p, maxIter, lo*math.Sqrt(lo), hi*math.Sqrt(hi), ErrPressure)
		}
		w := u - 1
		g := w * (1 + xi*w)
		g1 := 1 + 2*xi*w
		as := a * math.Sqrt(u)
		r := as*u*u*g - p
		if r == 0 {
			break
		}
		if r < 0 {
			lo = u
		} else {
			hi = u
		}
		// With φ = u^{5/2}: P′ = A(φ′g + φg′), P″ = A(φ″g + 2φ′g′ + φg″),
		// P‴ = A(φ‴g + 3φ″g′ + 3φ′g″); g′ = 1 + 2ξw, g″ = 2ξ.
		d1 := as * u * (2.5*g + u*g1)                   // dP/du = (3/2)K/u
		d2 := as * (3.75*g + u*(5*g1+u*(2*xi)))         // d²P/du²
		d3 := as / u * (1.875*g + u*(11.25*g1+u*15*xi)) // d³P/du³
		un, halley := halleyStep(u, r, d1, d2)
		if un == u {
			break // the step is below the resolution of u
		}
		if !(un > lo && un < hi) {
			un, halley = lo+0.5*(hi-lo), false
		}
		step := math.Abs(un - u)
		u = un
		if converged(u, step, d1, d2, d3, halley) {
			break
		}
	}
	return b.Rho0 * u * math.Sqrt(u), nil
}
