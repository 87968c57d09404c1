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
func (m Model) Radius() float64 { return outerRadius(m.Layers) }

// Validate checks that the model is physically usable: at least one layer;
// layers contiguous from r = 0 with Inner < Outer; all numbers finite;
// polynomial scales positive; density > 0 and vp > 0 everywhere in each layer
// and vs ≥ 0 in solid layers (the extrema of each polynomial on
// [Inner, Outer] are checked, not only its end values); viscosity ≥ 0.
// The error names the offending layer by index and name.
func (m Model) Validate() error { return validateLayers(m.Layers) }

// shellLayer is a pointer to a layer of a Model or an EOSModel (L is Layer
// or EOSLayer): a named shell Inner ≤ r ≤ Outer with a viscosity and a
// material. Both models get their radius and validation from outerRadius and
// validateLayers through it.
type shellLayer[L Layer | EOSLayer] interface {
	*L
	// geometry returns the layer's name, radii (m) and viscosity (Pa·s).
	geometry() (name string, inner, outer, viscosity float64)
	// checkMaterial checks the layer's material on [Inner, Outer]; the
	// geometry has been checked already.
	checkMaterial() error
}

// geometry and checkMaterial make *Layer a shellLayer.
func (l *Layer) geometry() (name string, inner, outer, viscosity float64) {
	return l.Name, l.Inner, l.Outer, l.Viscosity
}

func (l *Layer) checkMaterial() error {
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

// outerRadius returns the outer radius of the last of layers (m), or 0 if
// there are none.
func outerRadius[L Layer | EOSLayer, P shellLayer[L]](layers []L) float64 {
	if len(layers) == 0 {
		return 0
	}
	_, _, outer, _ := P(&layers[len(layers)-1]).geometry()
	return outer
}

// validateLayers checks that there is at least one layer and then, for each
// layer from the centre out, its geometry and viscosity (checkShell) and its
// material (checkMaterial). The error names the offending layer by index and
// name.
func validateLayers[L Layer | EOSLayer, P shellLayer[L]](layers []L) error {
	if len(layers) == 0 {
		return fmt.Errorf("model has no layers")
	}
	below := 0.0
	for i := range layers {
		l := P(&layers[i])
		name, inner, outer, viscosity := l.geometry()
		err := checkShell(i, inner, outer, below, viscosity)
		if err == nil {
			err = l.checkMaterial()
		}
		if err != nil {
			return fmt.Errorf("layer %d (%q): %w", i, name, err)
		}
		below = outer
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
// (ignored for i = 0), and its viscosity.
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
