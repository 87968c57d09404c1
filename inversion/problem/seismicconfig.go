package problem

import (
	"fmt"
	"math"
	"strings"

	"plumb/forward"
	"plumb/forward/seismic"
)

// SeismicConfig holds seismic events and their travel-time picks. Each event has its own
// epicentral distance, source depth and origin time — fixed, or nuisance parameters with priors,
// sampled with the structure.
type SeismicConfig struct {
	// CoreLayer names the layer whose top is the core–mantle boundary (c reflections, K legs below
	// it); required when there are events.
	CoreLayer string `mapstructure:"core_layer" json:"core_layer,omitempty" yaml:"core_layer,omitempty"`
	// InnerCoreLayer optionally names the layer whose top is the inner-core boundary (I legs);
	// without it PKIKP has no arrival.
	InnerCoreLayer string `mapstructure:"inner_core_layer" json:"inner_core_layer,omitempty" yaml:"inner_core_layer,omitempty"`
	// Events are the sources, each with its picks.
	Events []EventConfig `mapstructure:"events" json:"events,omitempty" yaml:"events,omitempty"`
}

// EventConfig is one seismic source seen by the station.
type EventConfig struct {
	// Name is column-safe (like a layer name); it prefixes the event's parameters and picks.
	Name string `mapstructure:"name" json:"name" yaml:"name"`
	// DistanceDeg is the epicentral distance (degrees, 0–180): a number or a prior.
	DistanceDeg any `mapstructure:"distance_deg" json:"distance_deg" yaml:"distance_deg"`
	// DepthKm is the source depth below the surface: a number or a prior.
	DepthKm any `mapstructure:"depth_km" json:"depth_km" yaml:"depth_km"`
	// OriginTimeS is the origin time on the clock of the picks' time_s (default 0: absolute pick
	// times are then travel times). Only events with absolute picks may give it.
	OriginTimeS any `mapstructure:"origin_time_s" json:"origin_time_s,omitempty" yaml:"origin_time_s,omitempty"`
	// Picks are the measured times.
	Picks []PickConfig `mapstructure:"picks" json:"picks" yaml:"picks"`
}

// PickConfig is one measured time: the first arrival of Phase at time_s (absolute: origin time +
// travel time), or with Minus the difference between the first arrivals of Phase and of Minus
// (e.g. S minus P), which does not depend on the origin time.
type PickConfig struct {
	// Phase is an IASPEI phase name (P, S, PP, SS, PcP, ScS, ScP, PcS, SKS, SKKS, PKP, PKIKP, pP, sS).
	Phase string `mapstructure:"phase" json:"phase" yaml:"phase"`
	// Minus, when set, makes the pick the differential time Phase − Minus.
	Minus string `mapstructure:"minus" json:"minus,omitempty" yaml:"minus,omitempty"`
	// TimeS is the measured time (s) and SigmaS its 1σ uncertainty (s, > 0).
	TimeS  any `mapstructure:"time_s" json:"time_s" yaml:"time_s"`
	SigmaS any `mapstructure:"sigma_s" json:"sigma_s" yaml:"sigma_s"`
	// Name optionally replaces the pick's column stem (default <event>_<Phase>_s or
	// <event>_<Phase>_minus_<Minus>_s).
	Name string `mapstructure:"name" json:"name,omitempty" yaml:"name,omitempty"`
}

var (
	unitDeg = unit{"deg", math.Pi / 180}
	unitS   = unit{"s", 1}
)

// seismicPlan is the seismic part of a problem.
type seismicPlan struct {
	coreLayer, innerLayer string
	events                []eventPlan
	// phases is the number of distinct (event, phase) pairs: the size of an evaluation's cache of
	// first-arrival times.
	phases int
}

// eventPlan is one event: its source slots and the distinct phases its picks use.
type eventPlan struct {
	name                    string
	distance, depth, origin slot
	phases                  []seismic.Phase // distinct, in order of first use
	base                    int             // cache index of phases[0]
}

// phaseIndex returns the cache index of ph for the event, adding it if new.
func (ev *eventPlan) phaseIndex(ph seismic.Phase) int {
	for i, q := range ev.phases {
		if q == ph {
			return i
		}
	}
	ev.phases = append(ev.phases, ph)
	return len(ev.phases) - 1
}

// seismicObservations interprets the seismic section: one Observation per pick, appended after
// the other observations (so the likelihood order follows the config order of events and picks).
func (p *Problem) seismicObservations(b *builder, c SeismicConfig) error {
	if len(c.Events) == 0 {
		if c.CoreLayer != "" || c.InnerCoreLayer != "" {
			return b.errf("seismic.events", "missing: core_layer is set but there are no events")
		}
		return nil
	}
	sp := &seismicPlan{coreLayer: c.CoreLayer, innerLayer: c.InnerCoreLayer}
	core := p.layerIndex(c.CoreLayer)
	switch {
	case c.CoreLayer == "":
		return b.errf("seismic.core_layer", "missing: name the layer whose top is the core–mantle boundary")
	case core < 0:
		return b.errf("seismic.core_layer", "%q is not a layer", c.CoreLayer)
	case core == len(p.layers)-1:
		return b.errf("seismic.core_layer", "%q is the outermost layer; the core must lie beneath a mantle", c.CoreLayer)
	}
	if c.InnerCoreLayer != "" {
		if ic := p.layerIndex(c.InnerCoreLayer); ic < 0 {
			return b.errf("seismic.inner_core_layer", "%q is not a layer", c.InnerCoreLayer)
		} else if ic >= core {
			return b.errf("seismic.inner_core_layer", "%q must lie below the core layer %q", c.InnerCoreLayer, c.CoreLayer)
		}
	}
	// Column stems must differ ignoring case: notebook tools (DuckDB, SQL) fold identifier case,
	// and IASPEI names such as pP and PP differ only in case.
	stems := map[string]string{}
	for _, par := range b.space.Params {
		stems[strings.ToLower(par.Name)] = "parameter " + par.Name
	}
	for i, ec := range c.Events {
		key := fmt.Sprintf("seismic.events[%d]", i)
		ev, err := p.event(b, key, ec, sp)
		if err != nil {
			return err
		}
		ev.base = sp.phases
		hasAbsolute := false
		for j, pc := range ec.Picks {
			pkey := fmt.Sprintf("%s.picks[%d]", key, j)
			obs, err := pickObservation(b, pkey, pc, &ev, len(sp.events))
			if err != nil {
				return err
			}
			low := strings.ToLower(obs.Observable.Key)
			if prev, ok := stems[low]; ok {
				return b.errf(pkey, "column %q clashes with %s (column names must differ ignoring case): give the pick a name", obs.Observable.Key, prev)
			}
			stems[low] = "pick " + obs.Observable.Key
			hasAbsolute = hasAbsolute || pc.Minus == ""
			p.Observations = append(p.Observations, obs)
		}
		if len(ec.Picks) == 0 {
			return b.errf(key+".picks", "missing: an event needs at least one pick")
		}
		if ec.OriginTimeS != nil && !hasAbsolute {
			return b.errf(key+".origin_time_s", "has no effect: the event has only differential picks (remove it)")
		}
		sp.phases += len(ev.phases)
		sp.events = append(sp.events, ev)
	}
	p.seis = sp
	return nil
}

// event interprets one event's name and source quantities.
func (p *Problem) event(b *builder, key string, ec EventConfig, sp *seismicPlan) (eventPlan, error) {
	ev := eventPlan{name: ec.Name}
	if !layerName.MatchString(ec.Name) {
		return ev, b.errf(key+".name", "%q is not a valid event name (lower-case letters, digits, underscores; starting with a letter)", ec.Name)
	}
	if p.layerIndex(ec.Name) >= 0 {
		return ev, b.errf(key+".name", "%q is also a layer name; give the event its own", ec.Name)
	}
	for _, other := range sp.events {
		if other.name == ec.Name {
			return ev, b.errf(key+".name", "event name %q is used twice", ec.Name)
		}
	}
	pre := ec.Name + "_"
	var err error
	if ev.distance, _, err = b.quantity(key+".distance_deg", ec.DistanceDeg, pre+"distance_deg", unitDeg, true); err != nil {
		return ev, err
	}
	if err := b.within(key+".distance_deg", ev.distance, 0, math.Pi, unitDeg); err != nil {
		return ev, err
	}
	if ev.depth, _, err = b.quantity(key+".depth_km", ec.DepthKm, pre+"depth_km", unitKm, true); err != nil {
		return ev, err
	}
	if err := b.within(key+".depth_km", ev.depth, 0, math.Inf(1), unitKm); err != nil {
		return ev, err
	}
	ev.origin = fixedSlot(0)
	if ec.OriginTimeS != nil {
		if ev.origin, _, err = b.quantity(key+".origin_time_s", ec.OriginTimeS, pre+"origin_time_s", unitS, true); err != nil {
			return ev, err
		}
	}
	return ev, nil
}

// within checks that a fixed value, or the support of a prior, lies in [lo, hi] (SI).
func (b *builder) within(key string, s slot, lo, hi float64, u unit) error {
	a, z := s.fixed, s.fixed
	what := "value"
	if !s.isFixed() {
		a, z = b.space.Params[s.param].Prior.Support()
		what = "prior support"
	}
	if a < lo || z > hi {
		return b.errf(key, "%s [%g, %g] %s lies outside [%g, %g] %s (use a bounded prior: uniform or truncated_normal)",
			what, a/u.toSI, z/u.toSI, u.label, lo/u.toSI, hi/u.toSI, u.label)
	}
	return nil
}

// pickObservation interprets one pick of event ev (index evIdx in the plan).
func pickObservation(b *builder, key string, pc PickConfig, ev *eventPlan, evIdx int) (Observation, error) {
	parse := func(k, name string) (seismic.Phase, error) {
		if name == "" {
			return seismic.Phase{}, b.errf(key+"."+k, "missing (an IASPEI phase name such as P, S, ScS)")
		}
		ph, err := seismic.ParsePhase(name)
		if err != nil {
			return seismic.Phase{}, b.errf(key+"."+k, "%v", err)
		}
		return ph, nil
	}
	ph, err := parse("phase", pc.Phase)
	if err != nil {
		return Observation{}, err
	}
	i := ev.phaseIndex(ph)
	j := -1
	stem := fmt.Sprintf("%s_%s_s", ev.name, ph)
	if pc.Minus != "" {
		ref, err := parse("minus", pc.Minus)
		if err != nil {
			return Observation{}, err
		}
		if ref == ph {
			return Observation{}, b.errf(key+".minus", "%s minus itself is always 0", ph)
		}
		j = ev.phaseIndex(ref)
		stem = fmt.Sprintf("%s_%s_minus_%s_s", ev.name, ph, ref)
	}
	if pc.Name != "" {
		if !layerName.MatchString(pc.Name) {
			return Observation{}, b.errf(key+".name", "%q is not a valid column name (lower-case letters, digits, underscores; starting with a letter)", pc.Name)
		}
		stem = pc.Name
	}
	v, ok := number(pc.TimeS)
	if !ok || math.IsNaN(v) || math.IsInf(v, 0) {
		return Observation{}, b.errf(key+".time_s", "missing or not a finite number (%v)", pc.TimeS)
	}
	s, ok := number(pc.SigmaS)
	if !ok || !(s > 0) || math.IsInf(s, 0) {
		return Observation{}, b.errf(key+".sigma_s", "missing or not a positive finite number (%v): every pick needs its 1σ uncertainty", pc.SigmaS)
	}
	origin := ev.origin
	eval := func(e *evaluation) (float64, error) {
		t, err := e.firstArrival(evIdx, i)
		if err != nil {
			return math.NaN(), err
		}
		if j < 0 {
			return origin.at(e.x) + t, nil
		}
		t0, err := e.firstArrival(evIdx, j)
		if err != nil {
			return math.NaN(), err
		}
		return t - t0, nil
	}
	return Observation{Observable: Observable{Key: stem, Unit: "s", toSI: 1, eval: eval}, Value: v, Sigma: s}, nil
}

// layerIndex returns the index of the configured layer called name, or −1.
func (p *Problem) layerIndex(name string) int {
	for i := range p.layers {
		if p.layers[i].name == name {
			return i
		}
	}
	return -1
}

// topOf returns the outer radius of the configured layer name in a solved structure (whose
// layers may be several pieces of it, carrying its name); 0 if absent.
func topOf(m forward.Model, name string) float64 {
	r := 0.0
	for _, l := range m.Layers {
		if l.Name == name {
			r = math.Max(r, l.Outer)
		}
	}
	return r
}

// Medium prepares the solved structure st for ray tracing, with the core boundaries of the
// seismic section; nil without seismic events.
func (p *Problem) Medium(st *forward.Structure) (*seismic.Medium, error) {
	if p.seis == nil {
		return nil, nil
	}
	icb := 0.0
	if p.seis.innerLayer != "" {
		icb = topOf(st.Model, p.seis.innerLayer)
	}
	return seismic.NewMedium(st.Model, topOf(st.Model, p.seis.coreLayer), icb)
}

// firstArrival returns the first-arrival travel time (s) of phase i of event ev for the
// evaluation's model and source, computed at most once per evaluation. A phase that has no
// arrival (shadow zone, S leg in a liquid) is an error: the model cannot explain the pick.
func (e *evaluation) firstArrival(ev, i int) (float64, error) {
	sp := e.p.seis
	if e.arrival == nil {
		e.arrival = make([]float64, sp.phases)
		for k := range e.arrival {
			e.arrival[k] = math.NaN()
		}
	}
	if !e.mediumOK {
		e.medium, e.mediumErr = e.p.Medium(e.st)
		e.mediumOK = true
	}
	if e.mediumErr != nil {
		return math.NaN(), e.mediumErr
	}
	evp := &sp.events[ev]
	k := evp.base + i
	if !math.IsNaN(e.arrival[k]) {
		return e.arrival[k], nil
	}
	ph := evp.phases[i]
	var err error
	e.arrBuf, err = e.medium.Arrivals(e.arrBuf[:0], ph, evp.distance.at(e.x), evp.depth.at(e.x))
	if err != nil {
		return math.NaN(), fmt.Errorf("event %s, %s: %w", evp.name, ph, err)
	}
	if len(e.arrBuf) == 0 {
		return math.NaN(), fmt.Errorf("event %s: no %s arrival at %.4g°", evp.name, ph, evp.distance.at(e.x)*180/math.Pi)
	}
	e.arrival[k] = e.arrBuf[0].Time
	return e.arrival[k], nil
}

// EventBlocks returns, when on, one block per seismic event of the indices of its sampled source
// parameters (mcmc.Config.Blocks); events whose source is fixed have none.
func (p *Problem) EventBlocks(on bool) [][]int {
	if !on || p.seis == nil {
		return nil
	}
	var out [][]int
	for _, ev := range p.seis.events {
		var b []int
		for _, s := range []slot{ev.distance, ev.depth, ev.origin} {
			if !s.isFixed() {
				b = append(b, s.param)
			}
		}
		if len(b) > 0 {
			out = append(out, b)
		}
	}
	return out
}

// structuralParams lists the parameters that are not seismic events' source parameters.
func (p *Problem) structuralParams() []int {
	event := map[int]bool{}
	for _, b := range p.EventBlocks(true) {
		for _, i := range b {
			event[i] = true
		}
	}
	var out []int
	for i := range p.Space.Params {
		if !event[i] {
			out = append(out, i)
		}
	}
	return out
}
