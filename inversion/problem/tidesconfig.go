package problem

import (
	"fmt"

	"plumb/forward"
	"plumb/forward/tides"
)

// Rheologies a layer may name.
const (
	rheologyMaxwell = "maxwell"
	rheologyAndrade = "andrade"
)

// defaultRheology is the rheology of a layer that gives a viscosity and no rheology (in a config,
// a layered model, or a tabulated model, which can express a viscosity only).
const defaultRheology = rheologyMaxwell

// rheologyPlan is a layer's anelastic rheology (used only with a tidal period).
type rheologyPlan struct {
	kind        string // "" (elastic), rheologyMaxwell or rheologyAndrade
	alpha, zeta slot
}

// rheology interprets a layer's rheology keys; it needs the viscosity already parsed.
func (b *builder) rheology(key string, lc LayerConfig, pre string, lp *layerPlan) error {
	kind := lc.Rheology
	switch {
	case kind == "" && lp.hasVisc:
		kind = defaultRheology
	case kind == "":
		if lc.AndradeAlpha != nil || lc.AndradeZeta != nil {
			return b.errf(key+".rheology", "andrade_alpha/andrade_zeta given without rheology: andrade")
		}
		return nil
	case kind != rheologyMaxwell && kind != rheologyAndrade:
		return b.errf(key+".rheology", "%q is not a rheology (want %s or %s)", kind, rheologyMaxwell, rheologyAndrade)
	case !lp.hasVisc:
		return b.errf(key+".viscosity_pa_s", "missing: rheology %s needs a viscosity", kind)
	}
	lp.rheology.kind = kind
	if kind != rheologyAndrade {
		if lc.AndradeAlpha != nil || lc.AndradeZeta != nil {
			return b.errf(key+".rheology", "andrade_alpha/andrade_zeta belong to rheology: andrade, not %s", kind)
		}
		return nil
	}
	var err error
	if lp.rheology.alpha, _, err = b.quantity(key+".andrade_alpha", lc.AndradeAlpha, pre+"andrade_alpha", unit{"", 1}, true); err != nil {
		return err
	}
	lp.rheology.zeta, _, err = b.quantity(key+".andrade_zeta", lc.AndradeZeta, pre+"andrade_zeta", unit{"", 1}, true)
	return err
}

// tidalPeriod interprets tides.period_h (0: static elastic Love numbers).
func (b *builder) tidalPeriod(c TidesConfig) (float64, error) {
	if c.PeriodH == nil {
		return 0, nil
	}
	v, ok := number(c.PeriodH)
	if !ok || !(v > 0) || v != v || v > 1e12 {
		return 0, b.errf("tides.period_h", "%v is not a positive period in hours", c.PeriodH)
	}
	return v * 3600, nil
}

// rheologies gives the tidal rheology of every layer of a solved structure at x. The structure's
// layers may be pieces of the configured layers (self-consistent solves): they carry the
// configured layer's name, by which they are matched.
func (p *Problem) rheologies(st *forward.Structure, x []float64) ([]tides.Rheology, error) {
	rh := make([]tides.Rheology, len(st.Model.Layers))
	for i, l := range st.Model.Layers {
		lp := p.layerNamed(l.Name)
		if lp == nil {
			return nil, fmt.Errorf("structure layer %q matches no configured layer", l.Name)
		}
		rh[i] = lp.rheology.of(l, x)
	}
	return rh, nil
}

// of is the tidal rheology of structure layer l under this plan at x (the zero value: elastic).
func (rp rheologyPlan) of(l forward.Layer, x []float64) tides.Rheology {
	switch rp.kind {
	case rheologyMaxwell:
		return tides.Rheology{Kind: tides.Maxwell, Viscosity: l.Viscosity}
	case rheologyAndrade:
		return tides.Rheology{Kind: tides.Andrade, Viscosity: l.Viscosity, Alpha: rp.alpha.at(x), Zeta: rp.zeta.at(x)}
	}
	return tides.Rheology{}
}

// Rheologies returns the tidal rheology of every layer of st, a structure of this problem solved
// at x (nil for a model with no sampled parameter), as the config's rheology keys give them.
func (p *Problem) Rheologies(st *forward.Structure, x []float64) ([]tides.Rheology, error) {
	return p.rheologies(st, x)
}

// TableRheologies returns the tidal rheology of every layer of a tabulated structure, which
// can give a viscosity but no rheology keys: the default rheology for a layer with a viscosity,
// elastic for the others.
func TableRheologies(st *forward.Structure) []tides.Rheology {
	rh := make([]tides.Rheology, len(st.Model.Layers))
	for i, l := range st.Model.Layers {
		if l.Viscosity > 0 {
			rh[i] = rheologyPlan{kind: defaultRheology}.of(l, nil)
		}
	}
	return rh
}

func (p *Problem) layerNamed(name string) *layerPlan {
	if i := p.layerIndex(name); i >= 0 {
		return &p.layers[i]
	}
	return nil
}

// Tides returns the degree-2 Love numbers k, h, l of a structure solved at x: static and elastic
// without a tidal period, else the complex anelastic response at that period.
func (p *Problem) Tides(st *forward.Structure, x []float64) (k, h, l complex128, err error) {
	if p.period == 0 {
		kr, hr, lr, err := tides.Love(st, 2)
		return complex(kr, 0), complex(hr, 0), complex(lr, 0), err
	}
	rh, err := p.rheologies(st, x)
	if err != nil {
		return 0, 0, 0, err
	}
	return tides.ComplexLove(st, 2, p.period, rh)
}
