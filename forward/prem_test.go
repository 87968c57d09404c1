package forward

import (
	"math"
	"testing"
)

// Checks of the polynomial PREM against published values. PREM: Dziewonski &
// Anderson (1981), Physics of the Earth and Planetary Interiors 25, 297–356.
// The reference values below are the model's tabulated values (their Table II
// and the text), all quoted from memory.
func TestPREMBulk(t *testing.T) {
	s, err := Solve(loadPREM(t))
	if err != nil {
		t.Fatal(err)
	}
	const (
		rICB = 1221.5e3
		rCMB = 3480e3
	)
	layer := func(name string) int {
		for i, l := range s.Model.Layers {
			if l.Name == name {
				return i
			}
		}
		t.Fatalf("no layer %q", name)
		return -1
	}
	oc := layer("outer_core")
	checks := []struct {
		what      string
		got, want float64
		tol       float64
	}{
		// Earth mass 5.972e24 kg (PREM 5.974e24 kg), from memory.
		{"mass (kg)", s.Mass, 5.972e24, 1e-3},
		// Surface radius 6371 km (PREM), from memory.
		{"radius (m)", s.Radius(), 6371e3, 0},
		// Surface gravity about 9.82 m/s² (PREM g at the surface 9.8156), from memory.
		{"surface gravity (m/s²)", s.SurfaceGravity(), 9.82, 5e-3},
		// Central pressure 363.85 GPa (PREM Table II), from memory.
		{"central pressure (Pa)", s.CentralPressure(), 363.85e9, 1e-2},
		// Pressure at the core–mantle boundary 135.75 GPa (PREM Table II), from memory.
		{"CMB pressure (Pa)", s.BoundaryPressure[oc+1], 135.75e9, 1e-2},
		// Pressure at the inner-core boundary 328.85 GPa (PREM Table II), from memory.
		{"ICB pressure (Pa)", s.BoundaryPressure[oc], 328.85e9, 1e-2},
		// Gravity at the CMB 10.68 m/s² (PREM Table II), from memory.
		{"CMB gravity (m/s²)", s.Gravity(rCMB), 10.68, 5e-3},
		// Mean density 5514 kg/m³ (Earth), from memory.
		{"mean density (kg/m³)", s.MeanDensity(), 5514, 2e-3},
	}
	for _, c := range checks {
		checkRel(t, c.what, c.got, c.want, c.tol)
	}
	// I/(MR²) = 0.3308 for PREM (Dziewonski & Anderson 1981, from memory).
	if got := s.MoIFactor(); math.Abs(got-0.3308) > 0.0005 {
		t.Errorf("I/(MR²) = %.5f, want 0.3308 ± 0.0005", got)
	}
	if s.Boundary[oc] != rICB || s.Boundary[oc+1] != rCMB {
		t.Errorf("outer core spans [%g, %g] m, want [%g, %g]", s.Boundary[oc], s.Boundary[oc+1], rICB, rCMB)
	}
}

// Spot values at discontinuities, from PREM Table II (Dziewonski & Anderson
// 1981), quoted from memory to the digits given.
func TestPREMSpotValues(t *testing.T) {
	s, err := Solve(loadPREM(t))
	if err != nil {
		t.Fatal(err)
	}
	at := func(r float64, above bool, prop string) float64 {
		l := s.Model.Layers[s.LayerAt(r, above)]
		switch prop {
		case "rho":
			return l.Density.At(r) / 1000
		case "vp":
			return l.Vp.At(r) / 1000
		case "vs":
			if l.Fluid {
				return 0
			}
			return l.Vs.At(r) / 1000
		}
		panic(prop)
	}
	cases := []struct {
		rKm   float64
		above bool
		prop  string
		want  float64 // g/cm³ or km/s
	}{
		{0, false, "rho", 13.0885},
		{0, false, "vp", 11.2622},
		{0, false, "vs", 3.6678},
		{1221.5, false, "rho", 12.7636},
		{1221.5, true, "rho", 12.1663},
		{1221.5, true, "vs", 0},
		{3480, false, "rho", 9.9035},
		{3480, false, "vp", 8.0648},
		{3480, true, "rho", 5.5665},
		{3480, true, "vp", 13.7166},
		{3480, true, "vs", 7.2647},
		{5701, false, "rho", 4.3807},
		{5701, true, "rho", 3.9921},
		{5701, false, "vp", 10.7513},
		{5701, true, "vp", 10.2662},
		{5971, false, "rho", 3.7235},
		{5971, true, "rho", 3.5432},
		{6151, false, "rho", 3.4358},
		{6151, true, "rho", 3.3594},
		{6346.6, false, "vp", 8.1106},
		{6346.6, true, "vp", 6.8},
		{6371, false, "rho", 1.02},
		{6371, false, "vp", 1.45},
	}
	for _, c := range cases {
		got := at(c.rKm*1000, c.above, c.prop)
		if math.Abs(got-c.want) > 1.5e-3 {
			t.Errorf("%s at %g km (above=%v) = %.5f, want %.4f", c.prop, c.rKm, c.above, got, c.want)
		}
	}
}
