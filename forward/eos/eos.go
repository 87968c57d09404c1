// Package eos holds equations of state for planetary materials: pressure, bulk and shear moduli
// as functions of density (isothermal reference), and their inversion from pressure to density.
// Everything is in SI units (kg/m³, Pa). The package is pure: no randomness, no I/O, no globals.
package eos

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
	Density(p float64) (float64, error)
	// ReferenceDensity is ρ at zero pressure.
	ReferenceDensity() float64
}
