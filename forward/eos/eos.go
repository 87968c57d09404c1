package eos

import (
	"errors"
	"fmt"
	"math"
)

// EOS is an equation of state of one material.
type EOS interface {
	// Pressure returns P(ρ) in Pa.
	Pressure(rho float64) float64
	// BulkModulus returns the isothermal bulk modulus K = ρ dP/dρ at ρ, Pa.
	BulkModulus(rho float64) float64
	// ShearModulus returns μ at density ρ, Pa (0 for a fluid or when no shear law is set).
	ShearModulus(rho float64) float64
	// Density inverts Pressure: the ρ with P(ρ) = p, found by Newton's method with a bracketed
	// fallback, to a relative accuracy of 1e-13 or better. An error when p is outside the range
	// the EOS is valid for (e.g. a negative density, or beyond the compression limit).
	// (BM3 and Vinet use Halley's method, Newton's with the analytic second derivative too.
	// Near a BM3 turnover, where dP/dρ → 0, the inversion is ill-conditioned: there the
	// guarantee is on the pressure residual, see BM3.Density.)
	Density(p float64) (float64, error)
	// ReferenceDensity is ρ at zero pressure.
	ReferenceDensity() float64
}

// Sentinel errors; every error of this package wraps exactly one of them, so callers can tell
// bad parameters from an out-of-range request with errors.Is.
var (
	// ErrParameter marks an invalid EOS or shear-law parameter.
	ErrParameter = errors.New("invalid equation-of-state parameter")
	// ErrPressure marks a pressure outside the range an EOS can be inverted on.
	ErrPressure = errors.New("pressure outside the equation of state's range")
	// ErrDensity marks a density that is not finite and positive.
	ErrDensity = errors.New("density not finite and positive")
	// ErrModulus marks elastic moduli that give no real, finite seismic velocity.
	ErrModulus = errors.New("elastic moduli give no finite seismic velocity")
)

// Sanity bounds on reference parameters (common practice, no source). They are far outside any
// planetary material (the densest element, osmium, is 22 590 kg/m³; diamond's K0 is ≈ 0.44 TPa)
// and exist so that the arithmetic can never overflow.
const (
	// MaxReferenceDensity is the largest accepted ρ0, kg/m³.
	MaxReferenceDensity = 1e5
	// MaxModulus is the largest accepted K0 or μ0, Pa.
	MaxModulus = 1e13
	// MaxK0p is the largest accepted K0′ (the lower end, exclusive, is 0).
	MaxK0p = 20.0
	// MaxMu0p is the largest accepted |μ0′|.
	MaxMu0p = 20.0
	// MaxCompression is the largest ρ/ρ0 Density returns; a pressure that needs more is an
	// error. Planetary interiors stay below ≈ 5 (common practice, no source); beyond 100 no
	// fitted EOS means anything, and the bound keeps every iteration in a finite bracket.
	MaxCompression = 100.0

	maxU = 21.544346900318837  // MaxCompression^{2/3}, the BM3 iteration variable's bound
	minX = 0.21544346900318837 // MaxCompression^{−1/3}, the Vinet iteration variable's bound
)

// Velocities returns the seismic velocities vp = √((K + 4μ/3)/ρ) and vs = √(μ/ρ) (m/s) of e at
// density rho (kg/m³). K is the isothermal bulk modulus of the EOS; using it in place of the
// adiabatic one is exact only at the isothermal reference (common practice, no source).
// An error when rho is not finite and positive, when K or μ is not finite (Constant: K = +Inf),
// when μ < 0 (a shear law extrapolated past zero) or when K + 4μ/3 ≤ 0 (BM3 past its turnover).
// A fluid gives vs = 0.
func Velocities(e EOS, rho float64) (vp, vs float64, err error) {
	if !(rho > 0) || math.IsInf(rho, 1) {
		return 0, 0, fmt.Errorf("eos: velocities at density %g kg/m³: %w", rho, ErrDensity)
	}
	var k, mu float64
	if m, ok := e.(interface {
		moduli(float64) (float64, float64)
	}); ok {
		k, mu = m.moduli(rho)
	} else {
		k, mu = e.BulkModulus(rho), e.ShearModulus(rho)
	}
	if !finite(k) || !finite(mu) {
		return 0, 0, fmt.Errorf("eos: velocities at density %g kg/m³: K = %g Pa, μ = %g Pa: %w", rho, k, mu, ErrModulus)
	}
	if mu < 0 {
		return 0, 0, fmt.Errorf("eos: velocities at density %g kg/m³: negative shear modulus %g Pa: %w", rho, mu, ErrModulus)
	}
	m := k + 4*mu/3
	if !(m > 0) {
		return 0, 0, fmt.Errorf("eos: velocities at density %g kg/m³: P-wave modulus K + 4μ/3 = %g Pa is not positive: %w", rho, m, ErrModulus)
	}
	return math.Sqrt(m / rho), math.Sqrt(mu / rho), nil
}

// DensityNear returns the density at pressure p (Pa) like e.Density, but lets the iteration
// start from rhoGuess (kg/m³) when e supports it (every type of this package does), which
// saves most of the work when the guess is close (an iterative hydrostatic solver's previous
// pass). The result is the same as e.Density(p) to rounding; a useless guess is ignored.
func DensityNear(e EOS, p, rhoGuess float64) (float64, error) {
	if w, ok := e.(interface {
		DensityNear(p, rhoGuess float64) (float64, error)
	}); ok {
		return w.DensityNear(p, rhoGuess)
	}
	return e.Density(p)
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// eulerian returns c = (ρ/ρ0)^{1/3} and the Eulerian strain f = ½(c² − 1), or NaNs for a
// density that is not finite and positive. f is computed as ½δ(c + 1)/(c² + c + 1) with
// δ = (ρ − ρ0)/ρ0, an identity (c³ − 1 = (c − 1)(c² + c + 1)) that keeps f accurate to a few
// ulp relative even for ρ close to ρ0, where c² − 1 would cancel.
func eulerian(rho, rho0 float64) (c, f float64) {
	if !(rho > 0) || math.IsInf(rho, 1) {
		return math.NaN(), math.NaN()
	}
	c = math.Cbrt(rho / rho0)
	d := (rho - rho0) / rho0
	return c, 0.5 * d / (c*c + c + 1) * (c + 1)
}

// refOK reports whether the three parameters shared by BM3 and Vinet are valid; it is the
// inlinable fast path of checkReference.
func refOK(rho0, k0, k0p float64) bool {
	return rho0 > 0 && rho0 <= MaxReferenceDensity && k0 > 0 && k0 <= MaxModulus && k0p > 0 && k0p <= MaxK0p
}

// checkReference validates the three parameters shared by BM3 and Vinet; what names the EOS.
func checkReference(what string, rho0, k0, k0p float64) error {
	if !(rho0 > 0 && rho0 <= MaxReferenceDensity) {
		return fmt.Errorf("eos: %s: reference density ρ0 = %g kg/m³ must be in (0, %g]: %w", what, rho0, float64(MaxReferenceDensity), ErrParameter)
	}
	if !(k0 > 0 && k0 <= MaxModulus) {
		return fmt.Errorf("eos: %s: bulk modulus K0 = %g Pa must be in (0, %g]: %w", what, k0, float64(MaxModulus), ErrParameter)
	}
	if !(k0p > 0 && k0p <= MaxK0p) {
		return fmt.Errorf("eos: %s: pressure derivative K0′ = %g must be in (0, %g]: %w", what, k0p, MaxK0p, ErrParameter)
	}
	return nil
}

// checkHost validates the parameters of a BM3 or Vinet EOS: the reference parameters
// (checkReference) and the shear law; what names the EOS.
func checkHost(what string, rho0, k0, k0p float64, shear ShearLaw) error {
	if err := checkReference(what, rho0, k0, k0p); err != nil {
		return err
	}
	if err := shear.Validate(); err != nil {
		return fmt.Errorf("eos: %s: %w", what, err)
	}
	return nil
}

// checkPressure rejects pressures no EOS here can be inverted at; what names the EOS.
func checkPressure(what string, p float64) error {
	if !(p >= 0) || math.IsInf(p, 1) {
		return fmt.Errorf("eos: %s density: pressure %g Pa must be finite and ≥ 0: %w", what, p, ErrPressure)
	}
	return nil
}

// murnaghanRatio returns ≈ (ρ/ρ0)^a from the Murnaghan (1944, Proc. Natl. Acad. Sci. 30, 244)
// relation (ρ/ρ0)^{K0′} = 1 + K0′p/K0, i.e. (1 + K0′p/K0)^{a/K0′}, to approxPow's accuracy.
// BM3 and Vinet share K0 and K0′ with it, so their ln ρ(p) = ∫dp/K agrees with Murnaghan's to
// second order in p (they differ through K0″); that makes it the starting guess of their
// iterations, and the guess needs no more accuracy.
func murnaghanRatio(p, k0, k0p, a float64) float64 {
	return approxPow(1+k0p*p/k0, a/k0p)
}

// approxPow returns ≈ b^a for b ≥ 1 (b = +Inf gives 0 or +Inf) to a relative error below
// 4e-8·|a| + 2e-7 for |a ln b| ≤ 690, and a clamped finite value beyond. It replaces math.Pow
// in the starting guesses, where speed matters and accuracy does not. ln b =
// k ln 2 + ln m with m ∈ [√½, √2) and ln m = 2 atanh s, s = (m − 1)/(m + 1), |s| ≤ 0.172, by
// its series to s⁷ (error ≤ 2|s|⁹/9 ≈ 3.4e-8); then b^a = 2^n e^{t ln 2}, |t| ≤ ½, by a degree-6
// Taylor polynomial (error ≤ (ln 2/2)⁷/7! ≈ 1.2e-7).
func approxPow(b, a float64) float64 {
	if !(b >= 1) {
		return math.NaN()
	}
	if math.IsInf(b, 1) {
		if a < 0 {
			return 0
		}
		return b
	}
	bits := math.Float64bits(b)
	k := int64(bits>>52) - 1023 // b ≥ 1 is normal and positive
	m := math.Float64frombits(bits&(1<<52-1) | 1023<<52)
	if m >= math.Sqrt2 {
		m *= 0.5
		k++
	}
	s := (m - 1) / (m + 1)
	s2 := s * s
	lnm := 2 * s * (1 + s2*(1.0/3+s2*(1.0/5+s2*(1.0/7))))
	y := a * (float64(k) + lnm/math.Ln2) // log2 of the result
	if y > 1000 {
		y = 1000
	} else if y < -1000 {
		y = -1000
	}
	n := math.Floor(y + 0.5)
	z := (y - n) * math.Ln2
	e := 1 + z*(1+z*(1.0/2+z*(1.0/6+z*(1.0/24+z*(1.0/120+z*(1.0/720))))))
	return e * math.Float64frombits(uint64(int64(n)+1023)<<52) // e·2ⁿ, |n| ≤ 1000 is normal
}

// maxIter bounds the safeguarded iterations. Halley from the Murnaghan guess needs a few steps;
// even pure bisection of the finite brackets (u ∈ [1, maxU], x ∈ [minX, 1]) reaches stepTol in
// under 60, so hitting the bound means a bug, reported as an error rather than a hang.
const maxIter = 200

// Stopping rules of the Density iterations (on a variable x of order 1). After a bisection
// or Newton step the iteration stops once the step is below stepTol (relative). After a Halley
// step s the error left is ≈ (c2² − c3)s³ with c_k = P⁽ᵏ⁾/(k! P′) (the cubic error constant of
// Halley's method, e.g. Traub 1964, Iterative Methods for the Solution of Equations; from
// memory, section not verified); the iteration stops when the bound [(P″/P′)² + |P‴/P′|] s³ (≥ 4c2² + 6|c3|, four
// times the true constant or more) is ≤ cubicTol·x, and s ≤ halleyMaxStep·x so that the
// fourth-order remainder (∝ s⁴ ≤ 1e-20) is negligible even where c2 and c3 happen to vanish
// together. The error left is then far below the 1e-13 the interface promises;
// TestDensityAccuracy checks the result against bisection to the last bit.
const (
	stepTol       = 1e-14
	halleyMaxStep = 1e-5
	cubicTol      = 1e-17
)

// halleyStep returns the Halley update of x for residual r = P(x) − p with derivatives d1, d2,
// x − 2r d1/(2d1² − r d2), and true; when that denominator is not positive (far from the root on
// the wrong side of an inflection) it returns the Newton update x − r/d1 and false.
func halleyStep(x, r, d1, d2 float64) (float64, bool) {
	den := 2*d1*d1 - r*d2
	if den > 0 {
		return x - 2*r*d1/den, true
	}
	return x - r/d1, false
}

// converged reports whether the iteration may stop at x after a step of size step (> 0),
// following the stopping rules above; d1, d2, d3 are P′, P″ and P‴ at the point the step was
// taken from.
func converged(x, step, d1, d2, d3 float64, halley bool) bool {
	if step <= stepTol*x {
		return true
	}
	if !halley || step > halleyMaxStep*x {
		return false
	}
	// [(d2/d1)² + |d3/d1|] s³ ≤ cubicTol·x, without a division.
	t := d2 * step
	return (t*t+math.Abs(d3*d1)*step*step)*step <= cubicTol*x*d1*d1
}
