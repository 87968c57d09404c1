package eos_test

import (
	"fmt"

	"plumb/forward/eos"
)

// Compress hcp iron to the pressure of Earth's inner-core boundary with the 300 K Vinet fit of
// Dewaele et al. (2006, Phys. Rev. Lett. 97, 215504; parameters from memory:
// V0 = 22.428 Å³ per two-atom cell, K0 = 163.4 GPa, K0′ = 5.38).
func ExampleVinet() {
	const (
		avogadro  = 6.02214076e23 // mol⁻¹
		ironMolar = 55.845e-3     // kg/mol
		v0Cell    = 22.428e-30    // m³ per 2-atom cell
	)
	rho0 := 2 * ironMolar / (avogadro * v0Cell)
	iron, err := eos.NewVinet(rho0, 163.4e9, 5.38, eos.Fluid())
	if err != nil {
		fmt.Println(err)
		return
	}
	rho, err := iron.Density(330e9)
	if err != nil {
		fmt.Println(err)
		return
	}
	vp, vs, err := eos.Velocities(iron, rho)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("rho0 = %.1f kg/m³\n", rho0)
	fmt.Printf("rho(330 GPa) = %.1f kg/m³, compression %.4f\n", rho, rho/rho0)
	fmt.Printf("K = %.1f GPa, bulk sound speed %.0f m/s, vs = %g m/s\n", iron.BulkModulus(rho)/1e9, vp, vs)
	// Output:
	// rho0 = 8269.4 kg/m³
	// rho(330 GPa) = 14074.1 kg/m³, compression 1.7020
	// K = 1392.5 GPa, bulk sound speed 9947 m/s, vs = 0 m/s
}
