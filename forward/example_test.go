package forward_test

import (
	"fmt"

	"plumb/forward"
)

// A two-layer planet: an iron core under a rocky mantle.
func ExampleSolve() {
	m := forward.Model{Layers: []forward.Layer{
		{Name: "core", Inner: 0, Outer: 3480e3, Density: forward.Const(10900), Vp: forward.Const(9000), Fluid: true},
		{Name: "mantle", Inner: 3480e3, Outer: 6371e3,
			Density: forward.Linear(3480e3, 5500, 6371e3, 3400), Vp: forward.Const(11000), Vs: forward.Const(6000)},
	}}
	s, err := forward.Solve(m)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("mass %.4g kg\n", s.Mass)
	fmt.Printf("I/(MR²) %.4f\n", s.MoIFactor())
	fmt.Printf("surface gravity %.3f m/s²\n", s.SurfaceGravity())
	fmt.Printf("pressure at the core-mantle boundary %.1f GPa\n", s.BoundaryPressure[1]/1e9)
	fmt.Printf("central pressure %.1f GPa\n", s.CentralPressure()/1e9)
	// Output:
	// mass 5.778e+24 kg
	// I/(MR²) 0.3310
	// surface gravity 9.501 m/s²
	// pressure at the core-mantle boundary 126.4 GPa
	// central pressure 327.5 GPa
}
