package inversion

import "plumb/forward"

// Observable is a quantity predicted from a solved structure and compared with a measurement.
// Key is the config key and column stem, with its unit in the name; values inside the code are SI.
type Observable struct {
	// Key is the config key, e.g. "mass_kg".
	Key string
	// Unit labels the input/output unit.
	Unit string
	// Eval predicts the value (SI) from a solved structure.
	Eval func(*forward.Structure) float64

	toSI float64
}

// ToSI is the factor from the key's unit to SI.
func (o Observable) ToSI() float64 { return o.toSI }

// Observables lists every observable plumb can invert, in likelihood order. To add one, append it
// here (see DEVELOPERS.md).
func Observables() []Observable {
	return []Observable{
		{Key: "mass_kg", Unit: "kg", toSI: 1, Eval: func(s *forward.Structure) float64 { return s.Mass }},
		{Key: "moi_factor", Unit: "", toSI: 1, Eval: (*forward.Structure).MoIFactor},
		{Key: "mean_density_kg_m3", Unit: "kg/m3", toSI: 1, Eval: (*forward.Structure).MeanDensity},
		{Key: "surface_gravity_m_s2", Unit: "m/s2", toSI: 1, Eval: (*forward.Structure).SurfaceGravity},
		{Key: "radius_km", Unit: "km", toSI: 1e3, Eval: (*forward.Structure).Radius},
	}
}
