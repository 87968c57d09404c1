package problem

import (
	"fmt"
	"math"
	"regexp"
	"sort"
	"strings"

	"plumb/priors"
)

// States of a layer. A liquid layer has zero shear modulus.
const (
	StateSolid  = "solid"
	StateLiquid = "liquid"
)

// layerPlan says how one layer of the model is built from a parameter vector.
type layerPlan struct {
	name      string
	outer     *slot // the layer's top radius, when given directly
	thickness *slot // the layer's thickness, when given
	density   profile
	vp, vs    profile
	hasVs     bool
	// state: fixed liquid/solid, or a categorical coordinate with these labels.
	stateParam  int // −1 when fixed
	stateLabels []string
	liquid      bool // when fixed
	viscosity   slot
	hasVisc     bool
	// eos, when set, replaces density/vp/vs: the layer is compressed by the hydrostatic pressure.
	eos *eosPlan
	// rheology is the layer's anelastic response at the tidal period.
	rheology rheologyPlan
	// outerColumn is set when the top radius is derived (from thicknesses or the planet radius
	// parameter) and recorded as a derived column.
	outerColumn bool
}

// Problem is a planet inversion: a parameter space, a recipe that turns a parameter vector into a
// forward.Model, and observations. It implements mcmc.Target; its LogDensity is safe for
// concurrent use.
type Problem struct {
	// Name is the planet's name.
	Name string
	// Space is the sampled parameter space.
	Space priors.Space
	// Observations are the data, in likelihood order.
	Observations []Observation

	radius     slot
	layers     []layerPlan
	monotone   bool
	derivedCol []string // names of derived outer-radius columns, in layer order
	levels     []int
	keys       []string // config key of each parameter, for messages
	// hydro is set when some layer has an equation of state: the structure is then solved
	// self-consistently (forward.SolveHydrostatic) instead of in closed form.
	hydro bool
	// period is the tidal forcing period (s); 0 for static elastic Love numbers.
	period float64
	// seis holds the seismic events and picks (nil without them).
	seis *seismicPlan
	// priorOnly drops the likelihood from LogDensity (sampler.prior_only).
	priorOnly bool
	// structIdx lists the structural parameters: all but the seismic events' source parameters
	// (the key of a chain's structCache).
	structIdx []int
}

// Observation is one datum with its Gaussian error, SI units.
type Observation struct {
	// Observable computes the predicted value.
	Observable Observable
	// Value and Sigma are the measurement and its 1σ uncertainty (SI).
	Value, Sigma float64
}

var layerName = regexp.MustCompile(`^[a-z][a-z0-9_]*$`)

// Build interprets a config as an inversion problem. file names the config in errors.
func Build(c *Config, file string) (*Problem, error) {
	b := &builder{file: file}
	p := &Problem{Name: c.Planet.Name}
	var err error
	if p.radius, _, err = b.quantity("planet.radius_km", c.Planet.RadiusKm, "planet_radius_km", unitKm, true); err != nil {
		return nil, err
	}
	if len(c.Layers) == 0 {
		return nil, b.errf("layers", "no layers given (list them from the centre outward)")
	}
	seen := map[string]bool{}
	for i, lc := range c.Layers {
		key := fmt.Sprintf("layers[%d]", i)
		if !layerName.MatchString(lc.Name) {
			return nil, b.errf(key+".name", "%q is not a valid layer name (lower-case letters, digits, underscores; starting with a letter)", lc.Name)
		}
		if seen[lc.Name] {
			return nil, b.errf(key+".name", "layer name %q is used twice", lc.Name)
		}
		seen[lc.Name] = true
		lp, err := b.layer(key, lc, i == len(c.Layers)-1)
		if err != nil {
			return nil, err
		}
		p.layers = append(p.layers, lp)
	}
	if err := p.planBoundaries(b); err != nil {
		return nil, err
	}
	p.planHydro()
	p.monotone = c.Constraints.DensityIncreasesWithDepth
	if p.period, err = b.tidalPeriod(c.Tides); err != nil {
		return nil, err
	}
	if err := p.observations(b, c.Observations); err != nil {
		return nil, err
	}
	if err := p.seismicObservations(b, c.Seismic); err != nil {
		return nil, err
	}
	if err := p.checkShear(b); err != nil {
		return nil, err
	}
	p.Space, p.keys = b.space, b.keys
	if err := p.Space.Validate(); err != nil {
		return nil, &ConfigError{File: file, Msg: err.Error()}
	}
	p.levels = p.Space.Levels()
	if err := validateSampler(file, c); err != nil {
		return nil, err
	}
	p.priorOnly = c.Sampler.PriorOnly
	p.structIdx = p.structuralParams()
	return p, nil
}

func (b *builder) layer(key string, lc LayerConfig, top bool) (layerPlan, error) {
	lp := layerPlan{name: lc.Name, stateParam: -1}
	pre := lc.Name + "_"
	if lc.OuterRadiusKm != nil && lc.ThicknessKm != nil {
		return lp, b.errf(key, "give outer_radius_km or thickness_km, not both")
	}
	if lc.OuterRadiusKm != nil {
		if top {
			return lp, b.errf(key+".outer_radius_km", "the outermost layer ends at planet.radius_km; give its thickness_km or nothing")
		}
		s, _, err := b.quantity(key+".outer_radius_km", lc.OuterRadiusKm, pre+"outer_radius_km", unitKm, true)
		if err != nil {
			return lp, err
		}
		lp.outer = &s
	}
	if lc.ThicknessKm != nil {
		s, _, err := b.quantity(key+".thickness_km", lc.ThicknessKm, pre+"thickness_km", unitKm, true)
		if err != nil {
			return lp, err
		}
		lp.thickness = &s
	}
	var err error
	if lc.EOS != nil {
		for k, v := range map[string]any{"density_kg_m3": lc.DensityKgM3, "vp_km_s": lc.VpKmS, "vs_km_s": lc.VsKmS} {
			if v != nil {
				return lp, b.errf(key+"."+k, "a layer with an eos takes its density and velocities from it; remove %s", k)
			}
		}
		if lp.eos, err = b.eos(key+".eos", lc.EOS, pre); err != nil {
			return lp, err
		}
		if lp.viscosity, lp.hasVisc, err = b.quantity(key+".viscosity_pa_s", lc.ViscosityPaS, pre+"viscosity_pa_s", unitPaS, false); err != nil {
			return lp, err
		}
		if err := b.rheology(key, lc, pre, &lp); err != nil {
			return lp, err
		}
		return lp, b.state(key, lc.State, pre, &lp)
	}
	if lp.density, _, err = b.property(key+".density_kg_m3", lc.DensityKgM3, pre, "density", unitKgM3, "kg_m3", true); err != nil {
		return lp, err
	}
	if lp.vp, _, err = b.property(key+".vp_km_s", lc.VpKmS, pre, "vp", unitKmS, "km_s", true); err != nil {
		return lp, err
	}
	// vs may be omitted for a layer that is always liquid.
	needVs := lc.State != StateLiquid
	if lp.vs, lp.hasVs, err = b.property(key+".vs_km_s", lc.VsKmS, pre, "vs", unitKmS, "km_s", needVs); err != nil {
		return lp, err
	}
	if lp.viscosity, lp.hasVisc, err = b.quantity(key+".viscosity_pa_s", lc.ViscosityPaS, pre+"viscosity_pa_s", unitPaS, false); err != nil {
		return lp, err
	}
	if err := b.rheology(key, lc, pre, &lp); err != nil {
		return lp, err
	}
	return lp, b.state(key, lc.State, pre, &lp)
}

func (b *builder) state(key string, v any, pre string, lp *layerPlan) error {
	key += ".state"
	switch t := v.(type) {
	case nil:
		return nil
	case string:
		switch t {
		case StateSolid:
		case StateLiquid:
			lp.liquid = true
		default:
			return b.errf(key, "%q is not a state (want %s or %s, or a categorical prior)", t, StateLiquid, StateSolid)
		}
		return nil
	}
	m, ok := asMap(v)
	if !ok {
		return b.errf(key, "%q is not a state (want %s or %s, or a categorical prior)", fmt.Sprint(v), StateLiquid, StateSolid)
	}
	kind, err := b.priorKind(key, m)
	if err != nil {
		return err
	}
	if kind != "categorical" {
		return b.errf(key+".prior", "a state takes a categorical prior, not %s", kind)
	}
	labels, err := stringList(m["values"])
	if err != nil {
		return b.errf(key+".values", "%v", err)
	}
	for _, l := range labels {
		if l != StateLiquid && l != StateSolid {
			return b.errf(key+".values", "%q is not a state (want %s or %s)", l, StateLiquid, StateSolid)
		}
	}
	var weights []float64
	if m["weights"] == nil {
		for range labels {
			weights = append(weights, 1)
		}
	} else if weights, err = numberList(m["weights"]); err != nil {
		return b.errf(key+".weights", "%v", err)
	}
	d, err := priors.NewCategorical(labels, weights)
	if err != nil {
		return b.errf(key, "%v", err)
	}
	s, _, err := b.add(key, priors.Param{Name: pre + "state", Unit: "", ToUnit: 1, Prior: d})
	if err != nil {
		return err
	}
	lp.stateParam = s.param
	lp.stateLabels = labels
	return nil
}

func stringList(v any) ([]string, error) {
	l, ok := v.([]any)
	if !ok {
		return nil, fmt.Errorf("want a list of values")
	}
	out := make([]string, len(l))
	for i, x := range l {
		s, ok := x.(string)
		if !ok {
			return nil, fmt.Errorf("entry %d (%v) is not a string", i, x)
		}
		out[i] = s
	}
	return out, nil
}

func numberList(v any) ([]float64, error) {
	l, ok := v.([]any)
	if !ok {
		return nil, fmt.Errorf("want a list of numbers")
	}
	out := make([]float64, len(l))
	for i, x := range l {
		f, ok := number(x)
		if !ok {
			return nil, fmt.Errorf("entry %d (%v) is not a number", i, x)
		}
		out[i] = f
	}
	return out, nil
}

// planBoundaries checks that every internal boundary is placed exactly once — by the outer radius
// of the layer below or by the thickness of the layer above — and that fixed radii increase.
func (p *Problem) planBoundaries(b *builder) error {
	n := len(p.layers)
	if p.layers[0].thickness != nil && n > 0 {
		return b.errf("layers[0].thickness_km", "the innermost layer starts at the centre; give its outer_radius_km")
	}
	for i := 0; i+1 < n; i++ {
		below, above := p.layers[i], p.layers[i+1]
		switch {
		case below.outer == nil && above.thickness == nil:
			return b.errf(fmt.Sprintf("layers[%d]", i), "its top is not placed: give its outer_radius_km, or thickness_km for layer %q above it", above.name)
		case below.outer != nil && above.thickness != nil:
			return b.errf(fmt.Sprintf("layers[%d].thickness_km", i+1), "the boundary below layer %q is placed twice (by this thickness and by layer %q's outer_radius_km)", above.name, below.name)
		}
		p.layers[i].outerColumn = below.outer == nil
	}
	for i := range p.layers[:n-1] {
		if p.layers[i].outerColumn {
			p.derivedCol = append(p.derivedCol, p.layers[i].name+"_outer_radius_km")
		}
	}
	// Fixed radii must increase: a config error, not merely a zero prior.
	r, fixed := p.boundariesFixed()
	prev := 0.0
	for i := 1; i < len(r); i++ {
		if !fixed[i] {
			continue
		}
		if r[i] <= prev {
			key := fmt.Sprintf("layers[%d]", i-1)
			if i == len(r)-1 {
				key = "planet.radius_km"
			}
			return b.errf(key, "radii are not increasing outward: %g km ≤ %g km", r[i]/1e3, prev/1e3)
		}
		prev = r[i]
	}
	return nil
}

// boundariesFixed evaluates the boundaries that depend on fixed values only.
func (p *Problem) boundariesFixed() ([]float64, []bool) {
	n := len(p.layers)
	r := make([]float64, n+1)
	fixed := make([]bool, n+1)
	fixed[0] = true
	r[n], fixed[n] = p.radius.fixed, p.radius.isFixed()
	for i := n - 1; i >= 1; i-- {
		if o := p.layers[i-1].outer; o != nil {
			r[i], fixed[i] = o.fixed, o.isFixed()
		} else {
			t := p.layers[i].thickness
			r[i], fixed[i] = r[i+1]-t.fixed, fixed[i+1] && t.isFixed()
		}
	}
	return r, fixed
}

func validateSampler(file string, c *Config) error {
	s, o := c.Sampler, c.Output
	bad := func(key, format string, a ...any) error {
		return &ConfigError{File: file, Key: key, Msg: fmt.Sprintf(format, a...)}
	}
	switch {
	case s.Chains < 1:
		return bad("sampler.chains", "%d < 1", s.Chains)
	case s.WarmupSteps < 0:
		return bad("sampler.warmup_steps", "%d < 0", s.WarmupSteps)
	case s.Steps < 1:
		return bad("sampler.steps", "%d < 1", s.Steps)
	case s.Thin < 1:
		return bad("sampler.thin", "%d < 1", s.Thin)
	case s.Steps < s.Thin:
		return bad("sampler.steps", "%d steps thinned by %d keep no draws", s.Steps, s.Thin)
	case s.Workers < 0:
		return bad("sampler.workers", "%d < 0 (0 means one per core)", s.Workers)
	case !(s.Independence >= 0 && s.Independence < 1):
		return bad("sampler.independence", "%g: want a probability in [0, 1)", s.Independence)
	case !(s.Anneal >= 0 && s.Anneal <= 1):
		return bad("sampler.anneal", "%g: want a fraction of warm-up in [0, 1]", s.Anneal)
	case o.CheckpointEverySteps < 1:
		return bad("output.checkpoint_every_steps", "%d < 1", o.CheckpointEverySteps)
	case !(o.LogEverySeconds > 0):
		return bad("output.log_every_s", "%g ≤ 0", o.LogEverySeconds)
	case o.Profiles.EveryDraws < 0:
		return bad("output.profiles.every_draws", "%d < 0 (0 switches the profile table off)", o.Profiles.EveryDraws)
	case !(o.Profiles.RadiusStepKm >= 0) || math.IsInf(o.Profiles.RadiusStepKm, 0):
		return bad("output.profiles.radius_step_km", "%g: want a step > 0 km (or 0 for automatic)", o.Profiles.RadiusStepKm)
	}
	if tp := s.Tempering; tp != nil {
		switch {
		case tp.Replicas < 2:
			return bad("sampler.tempering.replicas", "%d: want at least 2 (β = 1 and the prior, β = 0)", tp.Replicas)
		case tp.BetaMin != 0 && !(tp.BetaMin > 0 && tp.BetaMin < 1):
			return bad("sampler.tempering.beta_min", "%g: want a number in (0, 1)", tp.BetaMin)
		case s.PriorOnly:
			return bad("sampler.tempering", "prior_only samples the prior directly: tempering has nothing to temper (remove one of them)")
		}
	}
	if st := s.Stop; st != nil {
		switch {
		case !(st.RHatBelow > 1) || math.IsInf(st.RHatBelow, 0):
			return bad("sampler.stop.rhat_below", "%g: want a threshold > 1 (e.g. 1.01)", st.RHatBelow)
		case !(st.ESSAbove > 0) || math.IsInf(st.ESSAbove, 0):
			return bad("sampler.stop.ess_above", "%g: want a positive bulk-ESS (e.g. 400)", st.ESSAbove)
		}
	}
	return nil
}

func (p *Problem) observations(b *builder, obs map[string]ObservationConfig) error {
	keys := make([]string, 0, len(obs))
	for k := range obs {
		keys = append(keys, k)
	}
	// Likelihood order is the registry order, so sums are reproducible bit for bit.
	reg := Observables()
	sort.Slice(keys, func(i, j int) bool { return observableIndex(reg, keys[i]) < observableIndex(reg, keys[j]) })
	for _, k := range keys {
		key := "observations." + k
		i := observableIndex(reg, k)
		if i == len(reg) {
			names := make([]string, len(reg))
			for j, o := range reg {
				names[j] = o.Key
			}
			return b.errf(key, "unknown observable (known: %s)", strings.Join(names, ", "))
		}
		o := obs[k]
		v, ok := number(o.Value)
		if !ok {
			if o.Value == nil {
				return b.errf(key+".value", "missing")
			}
			return b.errf(key+".value", "%q is not a number", fmt.Sprint(o.Value))
		}
		if o.Sigma == nil {
			return b.errf(key+".sigma", "missing: every observation needs its 1σ uncertainty")
		}
		s, ok := number(o.Sigma)
		if !ok {
			return b.errf(key+".sigma", "%q is not a number", fmt.Sprint(o.Sigma))
		}
		if !(s > 0) || math.IsInf(s, 0) || math.IsNaN(v) || math.IsInf(v, 0) {
			return b.errf(key, "sigma %g must be positive and finite, value %g finite", s, v)
		}
		if reg[i].Key == "tidal_q" && p.period == 0 {
			return b.errf(key, "tidal_q needs a forcing period: set tides.period_h")
		}
		if reg[i].Key == "radius_km" && p.radius.isFixed() {
			return b.errf(key, "planet.radius_km is fixed; observe the radius only when it is a parameter")
		}
		p.Observations = append(p.Observations, Observation{Observable: reg[i], Value: v * reg[i].toSI, Sigma: s * reg[i].toSI})
	}
	return nil
}

func observableIndex(reg []Observable, key string) int {
	for i, o := range reg {
		if o.Key == key {
			return i
		}
	}
	return len(reg)
}
