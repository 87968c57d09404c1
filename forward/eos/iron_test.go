package eos

import (
	"math"
	"testing"
)

// Worked example: hcp (ε) iron at 300 K, the Vinet fit of Dewaele, Loubeyre, Occelli, Mezouar,
// Dorogokupets & Torrent (2006, Phys. Rev. Lett. 97, 215504) to quasi-hydrostatic (helium
// medium) diamond-anvil data up to 205 GPa. Parameters from memory:
// V0 = 22.428 Å³ per two-atom hcp cell (11.214 Å³/atom, = 6.7532 cm³/mol), K0 = 163.4 GPa,
// K0′ = 5.38.
const (
	avogadro   = 6.02214076e23 // mol⁻¹, exact since the 2019 SI (BIPM SI Brochure, 9th ed.)
	ironMolar  = 55.845e-3     // kg/mol, standard atomic weight of Fe (IUPAC/CIAAW)
	dewaeleV0  = 22.428e-30    // m³ per 2-atom hcp cell (Dewaele et al. 2006, from memory)
	dewaeleK0  = 163.4e9       // Pa (Dewaele et al. 2006, from memory)
	dewaeleK0p = 5.38          // (Dewaele et al. 2006, from memory)
)

func dewaeleIron(t testing.TB) Vinet {
	t.Helper()
	rho0 := 2 * ironMolar / (avogadro * dewaeleV0)
	v, err := NewVinet(rho0, dewaeleK0, dewaeleK0p, Fluid())
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// vinetVolumeGPa is an independent evaluation of the published Vinet form in the paper's own
// units (V in Å³/cell, P in GPa): bisection on V, sharing no code with the package.
func vinetVolumeGPa(pGPa, v0, k0GPa, k0p float64) float64 {
	lo, hi := 0.2*v0, v0
	for i := 0; i < 200; i++ {
		v := 0.5 * (lo + hi)
		x := math.Pow(v/v0, 1.0/3)
		if 3*k0GPa*(1-x)/(x*x)*math.Exp(1.5*(k0p-1)*(1-x)) > pGPa {
			lo = v
		} else {
			hi = v
		}
	}
	return 0.5 * (lo + hi)
}

func TestDewaeleIron(t *testing.T) {
	iron := dewaeleIron(t)

	// ρ0 = 2M/(N_A V0) = 8269.4 kg/m³. The V0 recalled as "6.75" is per mole (cm³/mol), not per
	// atom: 55.845/6.75 g/cm³ agrees to 0.05 %, whereas 6.75 Å³/atom would give 13.7 g/cm³ at
	// zero pressure, denser than iron at the inner-core boundary.
	checkRel(t, "ρ0 vs 55.845 g/mol / 6.75 cm³/mol", iron.Rho0, 55.845/6.75*1e3, 1e-3)

	// ρ at the inner-core boundary pressure, 330 GPa (PREM ICB pressure ≈ 329 GPa, Dziewonski &
	// Anderson 1981, from memory). Expected: 14.07 g/cm³, V = 13.18 Å³/cell (6.589 Å³/atom),
	// obtained by evaluating the published Vinet form independently (vinetVolumeGPa here, and a
	// separate double-precision bisection while writing this test); it is not a number printed
	// in the paper, which tabulates data only up to 205 GPa.
	const pICB = 330e9
	rho, err := iron.Density(pICB)
	if err != nil {
		t.Fatal(err)
	}
	checkRel(t, "ρ(330 GPa), expected 14.07 g/cm³", rho, 14074, 0.005)
	vIndep := vinetVolumeGPa(330, 22.428, 163.4, 5.38) * 1e-30
	checkRel(t, "ρ(330 GPa) vs independent evaluation in Å³/GPa", rho, 2*ironMolar/(avogadro*vIndep), 1e-12)

	// Cross-checks with two independent fits of hcp iron (parameters from memory), evaluated by
	// this package: they differ from Dewaele et al. by ≈ 2 % at 330 GPa (an extrapolation for
	// both), so the check is at 2.5 %:
	//  - Mao, Wu, Chen, Shu & Jephcoat (1990, J. Geophys. Res. 95, 21737): BM3, V0 = 6.73 cm³/mol,
	//    K0 = 165.3 GPa, K0′ = 5.33 → 13.82 g/cm³;
	//  - Fei, Murphy, Shibazaki, Shahar & Huang (2016, Geophys. Res. Lett. 43, 6837): Vinet,
	//    V0 = 22.468 Å³/cell, K0 = 172.7 GPa, K0′ = 4.79 → 14.37 g/cm³.
	mao, _ := NewBM3(ironMolar/6.73e-6, 165.3e9, 5.33, Fluid())
	fei, _ := NewVinet(2*ironMolar/(avogadro*22.468e-30), 172.7e9, 4.79, Fluid())
	for _, o := range []struct {
		name string
		e    EOS
	}{{"Mao et al. 1990 BM3", mao}, {"Fei et al. 2016 Vinet", fei}} {
		r, err := o.e.Density(pICB)
		if err != nil {
			t.Fatal(err)
		}
		checkRel(t, "ρ(330 GPa): Dewaele et al. 2006 vs "+o.name, rho, r, 0.025)
	}

	// Cold pure iron must be denser than the hot, light-element-bearing inner core at the ICB:
	// PREM gives 12.76 g/cm³ there (Dziewonski & Anderson 1981, table II, from memory).
	if !(rho > 12764) {
		t.Errorf("ρ(330 GPa, 300 K) = %g kg/m³ not above PREM's inner core, 12764 kg/m³", rho)
	}

	// The fit reproduces its own K0′: K at 330 GPa from the analytic form vs finite difference.
	checkRel(t, "K(330 GPa)", iron.BulkModulus(rho), rho*deriv6(iron.Pressure, rho, 1e-3*rho), 1e-8)
}
