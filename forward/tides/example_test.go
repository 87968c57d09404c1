package tides_test

import (
	"fmt"
	"math"

	"plumb/forward"
	"plumb/forward/tides"
)

// A uniform, nearly incompressible elastic sphere of Earth's size, and the
// same sphere as a Maxwell body under forcing with a period of one day. Both
// are checked against Kelvin's closed form for a homogeneous incompressible
// sphere, k2 = (3/2)/(1 + 19μ/(2ρgR)) (Love 1911, Some Problems of
// Geodynamics, ch. VII; from memory), with the elastic μ replaced by the
// Maxwell modulus μ̃ = μ/(1 − iμ/(ηω)) for the anelastic case (correspondence
// principle). The anelastic response lags the forcing: Im k2 < 0.
func Example() {
	const R, rho, vs = 6371e3, 5500.0, 5000.0
	s, err := forward.Solve(forward.Model{Layers: []forward.Layer{{
		Name: "all", Outer: R,
		Density: forward.Const(rho), Vp: forward.Const(3e7), Vs: forward.Const(vs),
	}}})
	if err != nil {
		fmt.Println(err)
		return
	}
	k, _, _, err := tides.Love(s, 2)
	if err != nil {
		fmt.Println(err)
		return
	}
	const eta, period = 1e17, 86400.0
	kc, _, _, err := tides.ComplexLove(s, 2, period, []tides.Rheology{{Kind: tides.Maxwell, Viscosity: eta}})
	if err != nil {
		fmt.Println(err)
		return
	}

	mu := rho * vs * vs
	g := s.SurfaceGravity()
	kelvin := func(mu complex128) complex128 { return 1.5 / (1 + 19*mu/complex(2*rho*g*R, 0)) }
	muMaxwell := complex(mu, 0) / complex(1, -mu/(eta*2*math.Pi/period))
	fmt.Printf("elastic: k2 = %.5f, Kelvin %.5f\n", k, real(kelvin(complex(mu, 0))))
	fmt.Printf("Maxwell: k2 = %.5f, Kelvin %.5f\n", kc, kelvin(muMaxwell))
	fmt.Printf("lag %.2f°, Q = %.1f\n", tides.PhaseLag(kc)*180/math.Pi, tides.QualityFactor(kc))
	// Output:
	// elastic: k2 = 0.31215, Kelvin 0.31215
	// Maxwell: k2 = (0.31217-0.00467i), Kelvin (0.31217-0.00467i)
	// lag 0.86°, Q = 66.8
}
