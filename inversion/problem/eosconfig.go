package problem

import (
	"fmt"
	"sort"
	"strings"

	"plumb/forward"
	"plumb/forward/eos"
)

// EOS kinds and shear laws accepted under a layer's eos key.
const (
	eosBM3   = "bm3"
	eosVinet = "vinet"

	shearFiniteStrain = "finite_strain"
	shearLinear       = "linear_pressure"
)

var unitGPa = unit{"GPa", 1e9}

// eosPlan says how a layer's equation of state is built from a parameter vector.
type eosPlan struct {
	kind          string
	rho0, k0, k0p slot
	shear         string // "" (μ = 0), shearFiniteStrain or shearLinear
	mu0, mu0p     slot
}

// eosKeys are the keys of a layer's eos mapping; shearKeys those of its shear mapping.
var (
	eosKeys   = []string{"kind", "rho0_kg_m3", "k0_gpa", "k0_prime", "shear"}
	shearKeys = []string{"law", "mu0_gpa", "mu0_prime"}
)

func checkKeys(b *builder, key string, m map[string]any, allowed []string) error {
	var bad []string
	for k := range m {
		if !contains(allowed, k) {
			bad = append(bad, k)
		}
	}
	if len(bad) == 0 {
		return nil
	}
	sort.Strings(bad)
	return b.errf(key, "unknown key %q (it takes %s)", strings.Join(bad, ", "), strings.Join(allowed, ", "))
}

// eos interprets a layer's eos mapping: {kind: bm3|vinet, rho0_kg_m3, k0_gpa, k0_prime,
// shear: {law: finite_strain|linear_pressure, mu0_gpa, mu0_prime}}; each number may carry a prior.
// Composition enters through rho0_kg_m3: a prior on the zero-pressure density of the core alloy
// expresses the light-element range (see DEVELOPERS.md).
func (b *builder) eos(key string, v any, pre string) (*eosPlan, error) {
	m, ok := asMap(v)
	if !ok {
		return nil, b.errf(key, "want a mapping {kind: bm3|vinet, rho0_kg_m3:, k0_gpa:, k0_prime:, shear: {…}}")
	}
	if err := checkKeys(b, key, m, eosKeys); err != nil {
		return nil, err
	}
	e := &eosPlan{}
	e.kind, _ = m["kind"].(string)
	if e.kind != eosBM3 && e.kind != eosVinet {
		return nil, b.errf(key+".kind", "%q is not an equation of state (want %s or %s)", fmt.Sprint(m["kind"]), eosBM3, eosVinet)
	}
	var err error
	if e.rho0, _, err = b.quantity(key+".rho0_kg_m3", m["rho0_kg_m3"], pre+"rho0_kg_m3", unitKgM3, true); err != nil {
		return nil, err
	}
	if e.k0, _, err = b.quantity(key+".k0_gpa", m["k0_gpa"], pre+"k0_gpa", unitGPa, true); err != nil {
		return nil, err
	}
	if e.k0p, _, err = b.quantity(key+".k0_prime", m["k0_prime"], pre+"k0_prime", unit{"", 1}, true); err != nil {
		return nil, err
	}
	if m["shear"] == nil {
		return e, nil
	}
	key += ".shear"
	sm, ok := asMap(m["shear"])
	if !ok {
		return nil, b.errf(key, "want a mapping {law: %s|%s, mu0_gpa:, mu0_prime:}", shearFiniteStrain, shearLinear)
	}
	if err := checkKeys(b, key, sm, shearKeys); err != nil {
		return nil, err
	}
	e.shear, _ = sm["law"].(string)
	if e.shear != shearFiniteStrain && e.shear != shearLinear {
		return nil, b.errf(key+".law", "%q is not a shear law (want %s or %s)", fmt.Sprint(sm["law"]), shearFiniteStrain, shearLinear)
	}
	if e.mu0, _, err = b.quantity(key+".mu0_gpa", sm["mu0_gpa"], pre+"mu0_gpa", unitGPa, true); err != nil {
		return nil, err
	}
	if e.mu0p, _, err = b.quantity(key+".mu0_prime", sm["mu0_prime"], pre+"mu0_prime", unit{"", 1}, true); err != nil {
		return nil, err
	}
	return e, nil
}

// build makes the layer's EOS at x; a liquid layer gets no shear modulus. An error means x gives
// parameters outside the EOS's valid range (a non-physical model).
func (e *eosPlan) build(x []float64, liquid bool) (eos.EOS, error) {
	shear := eos.Fluid()
	var err error
	if e.shear != "" && !liquid {
		mu0, mu0p := e.mu0.at(x), e.mu0p.at(x)
		if e.shear == shearLinear {
			shear, err = eos.NewLinearShear(mu0, mu0p)
		} else {
			shear, err = eos.NewFiniteStrainShear(mu0, mu0p)
		}
		if err != nil {
			return nil, err
		}
	}
	rho0, k0, k0p := e.rho0.at(x), e.k0.at(x), e.k0p.at(x)
	if e.kind == eosBM3 {
		return eos.NewBM3(rho0, k0, k0p, shear)
	}
	return eos.NewVinet(rho0, k0, k0p, shear)
}

// hydroModel builds the self-consistent model at x: EOS layers, and layers with a prescribed
// (constant or gradient) density and prescribed velocities, which pressure does not compress.
func (p *Problem) hydroModel(x []float64) (forward.EOSModel, error) {
	r, ok := p.radii(x)
	if !ok {
		return forward.EOSModel{}, ErrConstraint
	}
	m := forward.EOSModel{Layers: make([]forward.EOSLayer, len(p.layers))}
	for i := range p.layers {
		lp := &p.layers[i]
		liquid := lp.isLiquid(x)
		l := forward.EOSLayer{Name: lp.name, Inner: r[i], Outer: r[i+1], Fluid: liquid}
		if lp.hasVisc {
			l.Viscosity = lp.viscosity.at(x)
		}
		var err error
		if lp.eos != nil {
			if l.EOS, err = lp.eos.build(x, liquid); err != nil {
				return forward.EOSModel{}, err
			}
		} else {
			rho := lp.density.poly(x, r[i], r[i+1])
			l.Density = &rho
			vp := lp.vp.poly(x, r[i], r[i+1])
			l.Vp = &vp
			if lp.hasVs && !liquid {
				vs := lp.vs.poly(x, r[i], r[i+1])
				l.Vs = &vs
			}
		}
		m.Layers[i] = l
	}
	return m, nil
}

// planHydro switches the problem to the self-consistent solve when a layer has an EOS; layers
// without one keep their prescribed density (constant or gradient), uncompressed.
func (p *Problem) planHydro() {
	for _, l := range p.layers {
		p.hydro = p.hydro || l.eos != nil
	}
}

// checkShear: tidal observables and seismic picks need the rigidity of every layer that can be
// solid, so an EOS layer that can be solid must then have a shear law (without one its μ would
// be 0: every solid model would be rejected by the tides, and S waves could not cross the layer,
// silently biasing the posterior).
func (p *Problem) checkShear(b *builder) error {
	need := p.seis != nil
	what := "seismic picks are given"
	for _, o := range p.Observations {
		if k := o.Observable.Key; k == "k2" || k == "h2" || k == "tidal_q" {
			need, what = true, "k2/h2 are observed"
		}
	}
	if !need {
		return nil
	}
	for i, l := range p.layers {
		canBeSolid := !l.liquid || l.stateParam >= 0
		if l.eos != nil && l.eos.shear == "" && canBeSolid {
			return b.errf(fmt.Sprintf("layers[%d].eos.shear", i), "missing: layer %q can be solid and %s, so it needs a shear law", l.name, what)
		}
	}
	return nil
}
