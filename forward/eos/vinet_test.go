package eos

import (
	"fmt"
	"math"
	"testing"
)

// Vinet et al. (1989, J. Phys.: Condens. Matter 1, 1941) linearise their form through the
// "universal" function H(x) = P x²/[3(1 − x)]: ln H = ln K0 + η(1 − x), η = (3/2)(K0′ − 1).
// Our P, written differently (through the Eulerian strain), must satisfy it.
func TestVinetUniversalLinearisation(t *testing.T) {
	for _, c := range fitCases {
		v, err := NewVinet(c.rho0, c.k0, c.k0p, Fluid())
		if err != nil {
			t.Fatal(err)
		}
		for _, eta := range compressions()[1:] {
			rho := eta * c.rho0
			x := math.Cbrt(c.rho0 / rho)
			lnH := math.Log(v.Pressure(rho) * x * x / (3 * (1 - x)))
			want := math.Log(c.k0) + 1.5*(c.k0p-1)*(1-x)
			if d := math.Abs(lnH - want); d > 1e-13 {
				t.Errorf("%s: ln H(η=%.2f) = %.16g, want %.16g (diff %.3g)", c.name, eta, lnH, want, d)
			}
		}
	}
}

// Vinet K is positive for all compressions and any K0′ in range (analytic: the bracket
// 2 − x + ηx(1 − x) ≥ 5/8 for η > −3/2, Vinet et al. 1989 form), so Density's only limit is
// the compression bound MaxCompression; check extreme pressures below it and the bound itself.
func TestVinetCompressionLimit(t *testing.T) {
	for _, k0p := range []float64{0.1, 1, 4, 20} {
		v, _ := NewVinet(5000, 100e9, k0p, Fluid())
		pmax, rmax := v.MaxPressure()
		if rmax != MaxCompression*v.Rho0 {
			t.Errorf("K0′=%g: MaxPressure density %g, want %g", k0p, rmax, MaxCompression*v.Rho0)
		}
		checkRel(t, fmt.Sprintf("K0′=%g: MaxPressure", k0p), pmax, v.Pressure(rmax), 1e-14)
		for _, p := range []float64{1e12, 1e15, 1e20} {
			if p > pmax {
				continue
			}
			rho, err := v.Density(p)
			if err != nil {
				t.Errorf("K0′=%g: Density(%g Pa): %v", k0p, p, err)
				continue
			}
			checkResidual(t, fmt.Sprintf("K0′=%g: P(Density(%g))", k0p, p), v, rho, p, 1e-14)
		}
		checkCompressionLimit(t, v, pmax, rmax)
	}
}
