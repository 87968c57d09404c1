package forward

import (
	"fmt"
	"math"
)

// Layer is a spherical shell Inner ≤ r ≤ Outer (m) whose properties are
// polynomials in radius.
type Layer struct {
	Name         string
	Inner, Outer float64 // m
	Density      Poly    // kg/m³
	Vp, Vs       Poly    // m/s
	Fluid        bool    // liquid: shear modulus zero, Vs is ignored (treated as 0)
	Viscosity    float64 // Pa·s; 0 = not given
}

// Model is a layered planet, layers ordered from the centre out:
// Layers[0].Inner == 0 and Layers[i].Inner == Layers[i-1].Outer.
type Model struct {
	Layers []Layer
}

// Radius returns the outer radius of the model (m), or 0 for a model without
// layers.
func (m Model) Radius() float64 {
	if len(m.Layers) == 0 {
		return 0
	}
	return m.Layers[len(m.Layers)-1].Outer
}

// Validate checks that the model is physically usable: at least one layer;
// layers contiguous from r = 0 with Inner < Outer; all numbers finite;
// polynomial scales positive; density > 0 and vp > 0 everywhere in each layer
// and vs ≥ 0 in solid layers (the extrema of each polynomial on
// [Inner, Outer] are checked, not only its end values); viscosity ≥ 0.
// The error names the offending layer by index and name.
func (m Model) Validate() error {
	if len(m.Layers) == 0 {
		return fmt.Errorf("model has no layers")
	}
	for i := range m.Layers {
		if err := m.validateLayer(i); err != nil {
			return fmt.Errorf("layer %d (%q): %w", i, m.Layers[i].Name, err)
		}
	}
	return nil
}

func (m Model) validateLayer(i int) error {
	l := &m.Layers[i]
	below := 0.0
	if i > 0 {
		below = m.Layers[i-1].Outer
	}
	if err := checkShell(i, l.Inner, l.Outer, below, l.Viscosity); err != nil {
		return err
	}
	if err := checkPoly(l.Density, l.Inner, l.Outer, "density", "kg/m³", false); err != nil {
		return err
	}
	if err := checkPoly(l.Vp, l.Inner, l.Outer, "vp", "m/s", false); err != nil {
		return err
	}
	if !l.Fluid {
		if err := checkPoly(l.Vs, l.Inner, l.Outer, "vs", "m/s", true); err != nil {
			return err
		}
	}
	return nil
}

// checkPoly checks that p has a finite positive scale, finite coefficients and
// finite values on [lo, hi] that are > 0 (or ≥ 0 if zeroOK).
func checkPoly(p Poly, lo, hi float64, what, unit string, zeroOK bool) error {
	if !finite(p.Scale) || !(p.Scale > 0) {
		return fmt.Errorf("%s polynomial scale must be finite and > 0, got %g", what, p.Scale)
	}
	if len(p.C) == 0 {
		return fmt.Errorf("%s polynomial has no coefficients", what)
	}
	for k, c := range p.C {
		if !finite(c) {
			return fmt.Errorf("%s polynomial coefficient %d is %g", what, k, c)
		}
	}
	minV, minR, maxV := p.extrema(lo, hi)
	if !finite(minV) || !finite(maxV) {
		return fmt.Errorf("%s is not finite everywhere on [%g, %g] m", what, lo, hi)
	}
	if minV < 0 || (minV == 0 && !zeroOK) {
		rel := "> 0"
		if zeroOK {
			rel = "≥ 0"
		}
		return fmt.Errorf("%s must be %s everywhere, but is %g %s at r = %g m", what, rel, minV, unit, minR)
	}
	return nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// checkShell checks the geometry of layer i, Inner ≤ r ≤ Outer, whose layer below ends at below
// (ignored for i = 0), and its viscosity: shared by Model and EOSModel.
func checkShell(i int, inner, outer, below, viscosity float64) error {
	if !finite(inner) || !finite(outer) {
		return fmt.Errorf("radii must be finite, got inner %g m, outer %g m", inner, outer)
	}
	if i == 0 && inner != 0 {
		return fmt.Errorf("innermost layer must start at r = 0, starts at %g m", inner)
	}
	if i > 0 && inner != below {
		return fmt.Errorf("inner radius %g m does not match outer radius %g m of the layer below", inner, below)
	}
	if !(inner < outer) {
		return fmt.Errorf("inner radius %g m must be less than outer radius %g m", inner, outer)
	}
	if !finite(viscosity) || viscosity < 0 {
		return fmt.Errorf("viscosity must be finite and ≥ 0, got %g Pa s", viscosity)
	}
	return nil
}
