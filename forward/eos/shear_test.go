package eos

import (
	"errors"
	"fmt"
	"math"
	"testing"
)

func shearHosts(t *testing.T, sh ShearLaw) []EOS {
	t.Helper()
	return eosFor(t, fitCase{"MgSiO3-like", 4108, 253e9, 3.9}, sh)
}

// μ(ρ0) = μ0 for both laws and both hosts: P = 0 and f = 0 at ρ0 (definition of μ0, Stixrude &
// Lithgow-Bertelloni 2005).
func TestShearAtReference(t *testing.T) {
	lin, _ := NewLinearShear(172.9e9, 1.69)
	fs, _ := NewFiniteStrainShear(172.9e9, 1.69)
	for _, sh := range []ShearLaw{lin, fs} {
		for _, e := range shearHosts(t, sh) {
			if mu := e.ShearModulus(e.ReferenceDensity()); mu != sh.Mu0 {
				t.Errorf("%s %v: μ(ρ0) = %.17g, want μ0 = %g", eosName(e), sh.Kind, mu, sh.Mu0)
			}
		}
	}
}

// dμ/dP at ρ0 equals μ0′ for the finite-strain law (its first-order coefficient 3K0μ0′ − 5μ0 is
// built for that; Stixrude & Lithgow-Bertelloni 2005, from memory), by finite differences.
func TestFiniteStrainShearSlope(t *testing.T) {
	for _, mu0p := range []float64{-0.5, 0, 1.69, 2.5} {
		fs, err := NewFiniteStrainShear(172.9e9, mu0p)
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range shearHosts(t, fs) {
			r0 := e.ReferenceDensity()
			h := 1e-3 * r0
			slope := deriv6(e.ShearModulus, r0, h) / deriv6(e.Pressure, r0, h)
			if math.Abs(slope-mu0p) > 1e-6*math.Max(1, math.Abs(mu0p)) {
				t.Errorf("%s: dμ/dP at ρ0 = %.12g, want μ0′ = %g", eosName(e), slope, mu0p)
			}
		}
	}
}

// The linear law is exactly μ0 + μ0′ P(ρ) (its definition), to the last bit.
func TestLinearShearExact(t *testing.T) {
	lin, _ := NewLinearShear(80e9, 1.4)
	for _, e := range shearHosts(t, lin) {
		for _, eta := range compressions() {
			rho := eta * e.ReferenceDensity()
			if got, want := e.ShearModulus(rho), lin.Mu0+lin.Mu0p*e.Pressure(rho); got != want {
				t.Errorf("%s: μ(η=%.2f) = %.17g, want %.17g", eosName(e), eta, got, want)
			}
		}
	}
}

// Stixrude & Lithgow-Bertelloni (2005; from memory) give every isotropic modulus as
// c = (1+2f)^{5/2}[c0 + (3K0c0′ − 5c0)f + (6K0c0′ − 14c0 − (3/2)K0Δ(3K0′ − 16))f²].
// With c = K, Δ = −5/3 it must reproduce the analytic BM3 bulk modulus
// K0(1+2f)^{5/2}[1 + (3K0′−5)f + (27/2)(K0′−4)f²] derived from Birch (1947); with Δ = −1 it
// must be the shear form μ0 + (3K0μ0′ − 5μ0)f + (6K0μ0′ − 24K0 − 14μ0 + (9/2)K0K0′)f².
func TestFiniteStrainGeneralForm(t *testing.T) {
	for _, c := range fitCases {
		b, _ := NewBM3(c.rho0, c.k0, c.k0p, Fluid())
		for _, f := range []float64{0, 0.01, 0.05, 0.1, 0.2, 0.3} {
			got := finiteStrainModulus(c.k0, c.k0p, c.k0, c.k0p, -5.0/3, f)
			checkRel(t, fmt.Sprintf("%s: bulk form at f=%g", c.name, f), got, b.bulkF(f), 1e-13)

			mu0, mu0p := 0.6*c.k0, 1.7
			u := 1 + 2*f
			want := math.Pow(u, 2.5) * (mu0 + (3*c.k0*mu0p-5*mu0)*f + (6*c.k0*mu0p-24*c.k0-14*mu0+4.5*c.k0*c.k0p)*f*f)
			checkRel(t, fmt.Sprintf("%s: shear form at f=%g", c.name, f), finiteStrainModulus(mu0, mu0p, c.k0, c.k0p, -1, f), want, 1e-13)
		}
	}
}

// A fluid has μ = 0 and vs = 0 at every density, and vp = √(K/ρ) (definition of the
// P-wave modulus, e.g. Poirier 2000, ch. 2).
func TestFluid(t *testing.T) {
	for _, e := range shearHosts(t, Fluid()) {
		for _, eta := range compressions() {
			rho := eta * e.ReferenceDensity()
			if !below(e, rho) {
				continue
			}
			if mu := e.ShearModulus(rho); mu != 0 {
				t.Errorf("%s: fluid μ(η=%.2f) = %g", eosName(e), eta, mu)
			}
			vp, vs, err := Velocities(e, rho)
			if err != nil {
				t.Fatalf("%s: %v", eosName(e), err)
			}
			if vs != 0 {
				t.Errorf("%s: fluid vs = %g", eosName(e), vs)
			}
			checkRel(t, eosName(e)+": fluid vp", vp, math.Sqrt(e.BulkModulus(rho)/rho), 1e-15)
		}
	}
}

// vp = √((K + 4μ/3)/ρ), vs = √(μ/ρ) (Poirier 2000, ch. 2): at ρ0 with K0, μ0.
func TestVelocitiesAtReference(t *testing.T) {
	fs, _ := NewFiniteStrainShear(172.9e9, 1.69)
	for _, e := range shearHosts(t, fs) {
		r0 := e.ReferenceDensity()
		vp, vs, err := Velocities(e, r0)
		if err != nil {
			t.Fatal(err)
		}
		checkRel(t, eosName(e)+": vp(ρ0)", vp, math.Sqrt((253e9+4*172.9e9/3)/r0), 1e-15)
		checkRel(t, eosName(e)+": vs(ρ0)", vs, math.Sqrt(172.9e9/r0), 1e-15)
	}
}

func TestShearLawValidate(t *testing.T) {
	nan := math.NaN()
	bad := []ShearLaw{
		{Kind: ShearNone, Mu0: 1},
		{Kind: ShearNone, Mu0p: 1},
		{Kind: ShearLinear, Mu0: -1},
		{Kind: ShearLinear, Mu0: nan},
		{Kind: ShearLinear, Mu0: math.Inf(1)},
		{Kind: ShearFiniteStrain, Mu0: 1e9, Mu0p: nan},
		{Kind: ShearFiniteStrain, Mu0: 1e9, Mu0p: 21},
		{Kind: ShearFiniteStrain, Mu0: 2e13},
		{Kind: 7, Mu0: 1e9},
	}
	for _, s := range bad {
		if err := s.Validate(); !errors.Is(err, ErrParameter) {
			t.Errorf("%+v: Validate = %v, want ErrParameter", s, err)
		}
		if _, err := NewBM3(3000, 1e11, 4, s); !errors.Is(err, ErrParameter) {
			t.Errorf("%+v: NewBM3 = %v, want ErrParameter", s, err)
		}
	}
	for _, s := range []ShearLaw{Fluid(), {Kind: ShearLinear, Mu0: 0, Mu0p: 1}, {Kind: ShearFiniteStrain, Mu0: 1e11, Mu0p: -2}} {
		if err := s.Validate(); err != nil {
			t.Errorf("%+v: %v", s, err)
		}
	}
}

// A linear law with μ0′ < 0 goes negative under enough compression; Velocities must say so
// rather than return NaN.
func TestNegativeShearIsAnError(t *testing.T) {
	lin, _ := NewLinearShear(50e9, -1)
	v, _ := NewVinet(4000, 200e9, 4, lin)
	rho, err := v.Density(100e9) // μ = 50 − 100 GPa < 0
	if err != nil {
		t.Fatal(err)
	}
	if _, _, err := Velocities(v, rho); !errors.Is(err, ErrModulus) {
		t.Errorf("negative μ: Velocities err = %v, want ErrModulus", err)
	}
}

// Velocities (which evaluates K and μ together) agrees with the definitions
// vp = √((K + 4μ/3)/ρ), vs = √(μ/ρ) (Poirier 2000, ch. 2) built from the public methods, for
// both laws and hosts over compressions 1.0–2.5.
func TestVelocitiesMatchModuli(t *testing.T) {
	lin, _ := NewLinearShear(80e9, 1.4)
	fs, _ := NewFiniteStrainShear(172.9e9, 1.69)
	for _, sh := range []ShearLaw{lin, fs} {
		for _, e := range shearHosts(t, sh) {
			for _, eta := range compressions() {
				rho := eta * e.ReferenceDensity()
				vp, vs, err := Velocities(e, rho)
				if err != nil {
					t.Fatalf("%s %v at η=%.2f: %v", eosName(e), sh.Kind, eta, err)
				}
				k, mu := e.BulkModulus(rho), e.ShearModulus(rho)
				name := fmt.Sprintf("%s %v η=%.2f", eosName(e), sh.Kind, eta)
				checkRel(t, name+": vp", vp, math.Sqrt((k+4*mu/3)/rho), 1e-15)
				checkRel(t, name+": vs", vs, math.Sqrt(mu/rho), 1e-15)
			}
		}
	}
}
