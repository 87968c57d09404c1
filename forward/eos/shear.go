package eos

import (
	"fmt"
	"math"
)

// ShearKind selects the form of a ShearLaw.
type ShearKind uint8

const (
	// ShearNone is a fluid: μ = 0 at every density. It is the zero value of ShearLaw.
	ShearNone ShearKind = iota
	// ShearLinear is linear in pressure: μ = μ0 + μ0′ P(ρ), with P from the host EOS.
	ShearLinear
	// ShearFiniteStrain is the isothermal Eulerian finite-strain law (see ShearLaw).
	ShearFiniteStrain
)

// String returns a short lower-case name of the kind.
func (k ShearKind) String() string {
	switch k {
	case ShearNone:
		return "none"
	case ShearLinear:
		return "linear"
	case ShearFiniteStrain:
		return "finite-strain"
	}
	return fmt.Sprintf("ShearKind(%d)", uint8(k))
}

// ShearLaw gives the shear modulus μ of a BM3 or Vinet material as a function of density. It is a
// small comparable value; its zero value is a fluid (ShearNone). Mu0 is μ at zero pressure (Pa)
// and Mu0p its pressure derivative μ0′ = dμ/dP at zero pressure (dimensionless).
//
// The finite-strain form is the isothermal part (reference temperature, so the thermal term
// −η_S ρ E_th of the source drops out) of the shear modulus of Stixrude & Lithgow-Bertelloni
// (2005, Geophys. J. Int. 162, 610–632; the expression for G in their section on elastic
// moduli; from memory, equation number not verified), which is the third-order Eulerian
// finite-strain result, i.e. the bracket carried to f²:
//
//	μ = (1+2f)^{5/2} [ μ0 + (3K0μ0′ − 5μ0) f + (6K0μ0′ − 24K0 − 14μ0 + (9/2)K0K0′) f² ],
//	f = ½[(ρ/ρ0)^{2/3} − 1],
//
// with ρ0, K0 and K0′ taken from the host EOS (also for Vinet, whose pressure is not a
// finite-strain form: a common pairing, no source). The same source gives every elastic
// modulus as c = (1+2f)^{5/2}[c0 + (3K0c0′ − 5c0)f + (6K0c0′ − 14c0 − (3/2)K0Δ(3K0′ − 16))f²]
// (also from memory), with Δ the isotropic tensor −δijδkl − δilδjk − δjlδik, whose shear and
// bulk parts are Δ = −1 for μ and Δ = −5/3 for K (our contraction). The K case must reproduce
// the analytic BM3 bulk modulus derived from Birch's pressure, an independent check of the
// recalled form that the tests make.
//
// The linear law uses the host's pressure; a negative Mu0p, or the f² term of the finite-strain
// law at large compression, can make μ negative. ShearModulus returns such values unchanged and
// Velocities reports them as an error.
type ShearLaw struct {
	Kind ShearKind
	Mu0  float64 // shear modulus at zero pressure, Pa
	Mu0p float64 // dμ/dP at zero pressure, dimensionless
}

// Fluid returns the shear law of a fluid, μ = 0 (the zero ShearLaw).
func Fluid() ShearLaw { return ShearLaw{} }

// NewLinearShear returns the law μ = mu0 + mu0p·P; an error for mu0 outside [0, MaxModulus] or
// |mu0p| > MaxMu0p or a non-finite number.
func NewLinearShear(mu0, mu0p float64) (ShearLaw, error) {
	s := ShearLaw{Kind: ShearLinear, Mu0: mu0, Mu0p: mu0p}
	return s, s.Validate()
}

// NewFiniteStrainShear returns the finite-strain law (see ShearLaw) with μ0 = mu0 (Pa) and
// μ0′ = mu0p; an error for mu0 outside [0, MaxModulus] or |mu0p| > MaxMu0p or a non-finite number.
func NewFiniteStrainShear(mu0, mu0p float64) (ShearLaw, error) {
	s := ShearLaw{Kind: ShearFiniteStrain, Mu0: mu0, Mu0p: mu0p}
	return s, s.Validate()
}

// Validate checks the law: a known kind; for ShearNone both parameters zero (a fluid given a
// modulus is a mistake, not a fluid); otherwise 0 ≤ Mu0 ≤ MaxModulus and |Mu0p| ≤ MaxMu0p.
func (s ShearLaw) Validate() error {
	switch s.Kind {
	case ShearNone:
		if s.Mu0 != 0 || s.Mu0p != 0 {
			return fmt.Errorf("eos: shear law %v: μ0 = %g Pa and μ0′ = %g must both be 0 for a fluid: %w", s.Kind, s.Mu0, s.Mu0p, ErrParameter)
		}
		return nil
	case ShearLinear, ShearFiniteStrain:
	default:
		return fmt.Errorf("eos: unknown shear law kind %d: %w", uint8(s.Kind), ErrParameter)
	}
	if !(s.Mu0 >= 0 && s.Mu0 <= MaxModulus) {
		return fmt.Errorf("eos: shear law %v: μ0 = %g Pa must be in [0, %g]: %w", s.Kind, s.Mu0, float64(MaxModulus), ErrParameter)
	}
	if !(math.Abs(s.Mu0p) <= MaxMu0p) {
		return fmt.Errorf("eos: shear law %v: μ0′ = %g must be in [−%g, %g]: %w", s.Kind, s.Mu0p, MaxMu0p, MaxMu0p, ErrParameter)
	}
	return nil
}

// finiteStrainModulus is the isotropic third-order Eulerian finite-strain modulus
// c = (1+2f)^{5/2}[c0 + (3K0c0′ − 5c0)f + (6K0c0′ − 14c0 − (3/2)K0Δ(3K0′ − 16))f²]
// (Stixrude & Lithgow-Bertelloni 2005, from memory); delta is −1 for the shear modulus and
// −5/3 for the bulk modulus.
func finiteStrainModulus(c0, c0p, k0, k0p, delta, f float64) float64 {
	u := 1 + 2*f
	b1 := 3*k0*c0p - 5*c0
	b2 := 6*k0*c0p - 14*c0 - 1.5*k0*delta*(3*k0p-16)
	return u * u * math.Sqrt(u) * (c0 + f*(b1+f*b2))
}
