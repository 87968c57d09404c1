package eos

import (
	"fmt"
	"math"
)

// Constant is an incompressible material of density Rho (kg/m³), the limit K0 → ∞ of any
// equation of state. Its Density is Rho for every pressure p ≥ 0. Pressure is 0 at Rho, +Inf
// above it (no finite pressure compresses it) and −Inf below; BulkModulus is +Inf and
// ShearModulus 0 (Velocities therefore reports an error: vp is infinite).
type Constant struct {
	Rho float64 // kg/m³
}

var _ EOS = Constant{}

// NewConstant returns an incompressible material; an error unless 0 < rho ≤ MaxReferenceDensity.
func NewConstant(rho float64) (Constant, error) {
	c := Constant{Rho: rho}
	return c, c.Validate()
}

// Validate checks 0 < Rho ≤ MaxReferenceDensity (this also rejects NaN and Inf).
func (c Constant) Validate() error {
	if !(c.Rho > 0 && c.Rho <= MaxReferenceDensity) {
		return fmt.Errorf("eos: constant: density %g kg/m³ must be in (0, %g]: %w", c.Rho, float64(MaxReferenceDensity), ErrParameter)
	}
	return nil
}

// Pressure returns 0 at rho = Rho, +Inf for rho > Rho, −Inf for 0 < rho < Rho and NaN for a
// density that is not finite and positive.
func (c Constant) Pressure(rho float64) float64 {
	switch {
	case !(rho > 0) || math.IsInf(rho, 1):
		return math.NaN()
	case rho > c.Rho:
		return math.Inf(1)
	case rho < c.Rho:
		return math.Inf(-1)
	}
	return 0
}

// BulkModulus returns +Inf (NaN for a density that is not finite and positive).
func (c Constant) BulkModulus(rho float64) float64 {
	if !(rho > 0) || math.IsInf(rho, 1) {
		return math.NaN()
	}
	return math.Inf(1)
}

// ShearModulus returns 0 (NaN for a density that is not finite and positive).
func (c Constant) ShearModulus(rho float64) float64 {
	if !(rho > 0) || math.IsInf(rho, 1) {
		return math.NaN()
	}
	return 0
}

// Density returns Rho for any finite p ≥ 0; an error for a negative, NaN or infinite p, or an
// invalid Rho.
func (c Constant) Density(p float64) (float64, error) {
	if err := c.Validate(); err != nil {
		return 0, err
	}
	if err := checkPressure("constant", p); err != nil {
		return 0, err
	}
	return c.Rho, nil
}

// DensityNear returns Density(p); the guess is not needed (it exists for symmetry with BM3 and
// Vinet, see the package function DensityNear).
func (c Constant) DensityNear(p, rhoGuess float64) (float64, error) { return c.Density(p) }

// ReferenceDensity returns Rho.
func (c Constant) ReferenceDensity() float64 { return c.Rho }
