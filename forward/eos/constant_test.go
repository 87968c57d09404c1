package eos

import (
	"errors"
	"math"
	"testing"
)

// An incompressible material is, by definition, the K0 → ∞ limit of any EOS (common practice,
// no source): the same density at every pressure, infinite bulk modulus, P = ±∞ off Rho.
func TestConstant(t *testing.T) {
	c, err := NewConstant(3300)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range []float64{0, math.Copysign(0, -1), 1, 1e9, 3.6e11, 1e300} {
		rho, err := c.Density(p)
		if err != nil || rho != 3300 {
			t.Errorf("Density(%g) = %g, %v; want 3300, nil", p, rho, err)
		}
	}
	if p := c.Pressure(3300); p != 0 {
		t.Errorf("P(Rho) = %g, want 0", p)
	}
	if p := c.Pressure(3301); !math.IsInf(p, 1) {
		t.Errorf("P(Rho+1) = %g, want +Inf", p)
	}
	if p := c.Pressure(3299); !math.IsInf(p, -1) {
		t.Errorf("P(Rho−1) = %g, want −Inf", p)
	}
	if k := c.BulkModulus(3300); !math.IsInf(k, 1) {
		t.Errorf("K = %g, want +Inf", k)
	}
	if mu := c.ShearModulus(3300); mu != 0 {
		t.Errorf("μ = %g, want 0", mu)
	}
	if _, _, err := Velocities(c, 3300); !errors.Is(err, ErrModulus) {
		t.Errorf("Velocities of an incompressible material: err = %v, want ErrModulus (vp infinite)", err)
	}
	if c.ReferenceDensity() != 3300 {
		t.Errorf("ReferenceDensity = %g", c.ReferenceDensity())
	}
}
