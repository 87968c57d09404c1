package problem

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"reflect"
	"regexp"
	"strconv"
	"strings"

	"github.com/spf13/viper"

	"plumb/forward"
	"plumb/inversion/modelfile"
	"plumb/priors"
)

// A truth is the interior model behind synthetic data. A layered truth is the planet and layers
// sections of a run config with every value fixed (the format plumb forward --model reads), plus,
// for seismic runs, the true sources of the events:
//
//	seismic:
//	  events:
//	    - {name: quake_1, distance_deg: 38, depth_km: 20}   # origin_time_s optional
//
// It is mapped onto a run's parameter space by config key: each sampled parameter takes its
// value from the same key of the truth, with layers and events matched by name (not by position),
// so a truth may list events the run does not use. A tabulated truth (CSV, the modelfile format)
// is a structure only: it gives predictions of structure observables but no parameter values.

// truthFile is the decoded layered truth file.
type truthFile struct {
	Planet  PlanetConfig  `mapstructure:"planet"`
	Layers  []LayerConfig `mapstructure:"layers"`
	Seismic struct {
		Events []truthEvent `mapstructure:"events"`
	} `mapstructure:"seismic"`
}

// truthEvent is the true source of one seismic event.
type truthEvent struct {
	Name        string `mapstructure:"name"`
	DistanceDeg any    `mapstructure:"distance_deg"`
	DepthKm     any    `mapstructure:"depth_km"`
	OriginTimeS any    `mapstructure:"origin_time_s"`
}

// truthModel is a layered truth, read and checked.
type truthModel struct {
	path  string
	file  truthFile
	model *Problem  // planet and layers built with no sampled parameters
	radii []float64 // its layer boundaries (m), centre to surface
	// events holds each event's source slots (all fixed), by name.
	events  map[string]eventPlan
	eventAt map[string]int // index in file.Seismic.Events
}

// isTabulated reports whether path names a tabulated (CSV) model.
func isTabulated(path string) bool { return strings.EqualFold(filepath.Ext(path), ".csv") }

// readTruth reads and checks a layered truth file (YAML or TOML, strict: unknown keys are errors).
func readTruth(path string) (*truthModel, error) {
	tm := &truthModel{path: path, events: map[string]eventPlan{}, eventAt: map[string]int{}}
	if err := readStrict(viper.New(), path, nil, &tm.file); err != nil {
		return nil, err
	}
	p, err := buildFixed(path, tm.file.Planet, tm.file.Layers, "a truth")
	if err != nil {
		return nil, err
	}
	tm.model = p
	r, _ := p.boundariesFixed() // all fixed, and increasing (checked by Build)
	tm.radii = r
	b := &builder{file: path}
	for i, e := range tm.file.Seismic.Events {
		key := fmt.Sprintf("seismic.events[%d]", i)
		if !layerName.MatchString(e.Name) {
			return nil, b.errf(key+".name", "%q is not a valid event name (lower-case letters, digits, underscores; starting with a letter)", e.Name)
		}
		if _, dup := tm.eventAt[e.Name]; dup {
			return nil, b.errf(key+".name", "event name %q is used twice", e.Name)
		}
		ev := eventPlan{name: e.Name, distance: fixedSlot(math.NaN()), depth: fixedSlot(math.NaN()), origin: fixedSlot(math.NaN())}
		for _, q := range []struct {
			k string
			v any
			u unit
			s *slot
		}{{"distance_deg", e.DistanceDeg, unitDeg, &ev.distance}, {"depth_km", e.DepthKm, unitKm, &ev.depth}, {"origin_time_s", e.OriginTimeS, unitS, &ev.origin}} {
			if q.v == nil {
				continue // optional: needed only if the run samples it
			}
			s, _, err := b.quantity(key+"."+q.k, q.v, "truth", q.u, true)
			if err != nil {
				return nil, err
			}
			if !s.isFixed() {
				return nil, b.errf(key+"."+q.k, "a truth takes fixed values, not priors")
			}
			*q.s = s
		}
		if err := b.within(key+".distance_deg", fixedSlot(nan0(ev.distance.fixed)), 0, math.Pi, unitDeg); err != nil {
			return nil, err
		}
		if err := b.within(key+".depth_km", fixedSlot(nan0(ev.depth.fixed)), 0, math.Inf(1), unitKm); err != nil {
			return nil, err
		}
		tm.events[e.Name], tm.eventAt[e.Name] = ev, i
	}
	return tm, nil
}

// nan0 maps NaN (a source quantity the truth does not give) to 0 for range checks.
func nan0(v float64) float64 {
	if math.IsNaN(v) {
		return 0
	}
	return v
}

// LoadTruth reads the layered truth model at path (YAML or TOML) and returns the point of p's
// parameter space it describes: SI values, categorical parameters as level indices. Every
// sampled parameter takes its value from the same config key in the truth (layers and seismic
// events matched by name); a layer's outer_radius_km or thickness_km the truth does not give is
// taken from the truth's own boundaries, so the two may place boundaries differently. A layer
// without a state is solid, as in plumb forward. The config's model at the returned point must be
// the truth's: the two solved structures are compared, and so are event sources the config fixes
// and the truth also gives; a difference is an error, since the data synthesised from the config
// would then not be the truth's. The truth may lie outside the prior. Errors are
// *ConfigError naming the truth file and the key. A tabulated (CSV) truth has no parameter
// values and is an error here (see TruthPredictions).
func LoadTruth(path string, p *Problem) ([]float64, error) {
	if isTabulated(path) {
		return nil, &ConfigError{File: path, Msg: "a tabulated truth is a structure without parameter values; give a layered truth (the planet and layers sections of a config, every value fixed)"}
	}
	tm, err := readTruth(path)
	if err != nil {
		return nil, err
	}
	x := make([]float64, p.Dim())
	for i, par := range p.Space.Params {
		if x[i], err = tm.value(p, p.keys[i], par); err != nil {
			return nil, err
		}
	}
	if err := tm.sameModel(p, x); err != nil {
		return nil, err
	}
	return x, nil
}

var (
	layerKey = regexp.MustCompile(`^layers\[(\d+)\]\.(.+)$`)
	eventKey = regexp.MustCompile(`^seismic\.events\[(\d+)\]\.(.+)$`)
)

// value returns the truth's value (SI, or a level index) for the parameter par at config key key.
func (tm *truthModel) value(p *Problem, key string, par priors.Param) (float64, error) {
	b := &builder{file: tm.path}
	var raw any
	var tkey string // the key in the truth file
	switch {
	case key == "planet.radius_km":
		raw, tkey = tm.file.Planet.RadiusKm, key
	case layerKey.MatchString(key):
		m := layerKey.FindStringSubmatch(key)
		i, _ := strconv.Atoi(m[1])
		name := p.layers[i].name
		j := tm.layerIndex(name)
		if j < 0 {
			return 0, b.errf("layers", "no layer named %q (the run samples %s, config key %s)", name, par.Name, key)
		}
		tl := tm.file.Layers[j]
		segs := strings.Split(m[2], ".")
		tkey = fmt.Sprintf("layers[%d].%s", j, m[2])
		switch {
		case m[2] == "state":
			return tm.level(tkey, tl.State, par)
		case m[2] == "outer_radius_km" && tl.OuterRadiusKm == nil:
			return tm.radii[j+1], nil // placed by the thickness of the layer above
		case m[2] == "thickness_km" && tl.ThicknessKm == nil:
			return tm.radii[j+1] - tm.radii[j], nil // placed by an outer radius
		}
		if raw, err := navigate(fieldByTag(tl, segs[0]), segs[1:]); err != nil {
			return 0, b.errf(tkey, "%v", err)
		} else {
			return tm.fixed(tkey, raw, par)
		}
	case eventKey.MatchString(key):
		m := eventKey.FindStringSubmatch(key)
		i, _ := strconv.Atoi(m[1])
		name := p.seis.events[i].name
		j, ok := tm.eventAt[name]
		if !ok {
			return 0, b.errf("seismic.events", "no event named %q (the run samples %s, config key %s)", name, par.Name, key)
		}
		tkey = fmt.Sprintf("seismic.events[%d].%s", j, m[2])
		raw = fieldByTag(tm.file.Seismic.Events[j], m[2])
	default:
		// A config key this mapping does not know: a new kind of parameter. Fail loudly rather
		// than guess.
		return 0, b.errf(key, "cannot map parameter %s onto a truth (unknown key form)", par.Name)
	}
	return tm.fixed(tkey, raw, par)
}

// fixed interprets raw as a fixed value in par's unit, through the config builder itself (so a
// number converts to SI exactly as the config's fixed values do).
func (tm *truthModel) fixed(tkey string, raw any, par priors.Param) (float64, error) {
	b := &builder{file: tm.path}
	if raw == nil {
		return 0, b.errf(tkey, "missing: the run samples %s, so the truth must give its value", par.Name)
	}
	s, _, err := b.quantity(tkey, raw, par.Name, unitOf(par), true)
	if err != nil {
		return 0, err
	}
	if !s.isFixed() {
		return 0, b.errf(tkey, "a truth takes fixed values, not priors")
	}
	return s.fixed, nil
}

// level returns the level index of a layer state in a categorical parameter.
func (tm *truthModel) level(tkey string, raw any, par priors.Param) (float64, error) {
	b := &builder{file: tm.path}
	c, ok := par.Prior.(priors.Categorical)
	if !ok {
		return 0, b.errf(tkey, "parameter %s is not categorical", par.Name)
	}
	label := StateSolid // a layer without a state is solid, as in plumb forward
	if raw != nil {
		s, ok := raw.(string)
		if !ok {
			return 0, b.errf(tkey, "%q is not a state (want %s or %s)", fmt.Sprint(raw), StateLiquid, StateSolid)
		}
		label = s
	}
	i, ok := c.Index(label)
	if !ok {
		return 0, b.errf(tkey, "%q is not one of the run's levels %v", label, c.Labels)
	}
	return float64(i), nil
}

// unitOf returns the input unit of a parameter from its unit label; the factor is the one the
// builder used, so fixed and truth values convert identically.
func unitOf(par priors.Param) unit {
	for _, u := range []unit{unitKm, unitKmS, unitKgM3, unitPaS, unitGPa, unitDeg, unitS, {"", 1}} {
		// The label alone is ambiguous in principle; the factor check makes the match safe.
		if u.label == par.Unit && math.Abs(u.toSI*par.ToUnit-1) < 1e-12 {
			return u
		}
	}
	return unit{par.Unit, 1 / par.ToUnit}
}

func (tm *truthModel) layerIndex(name string) int {
	for j, l := range tm.file.Layers {
		if l.Name == name {
			return j
		}
	}
	return -1
}

// fieldByTag returns the field of struct v whose mapstructure tag (or lower-case name) is key,
// nil if none: the truth is navigated by the same key paths as the config.
func fieldByTag(v any, key string) any {
	rv := reflect.ValueOf(v)
	rt := rv.Type()
	for i := 0; i < rt.NumField(); i++ {
		tag, _, _ := strings.Cut(rt.Field(i).Tag.Get("mapstructure"), ",")
		if tag == "" {
			tag = strings.ToLower(rt.Field(i).Name)
		}
		if tag == key {
			return rv.Field(i).Interface()
		}
	}
	return nil
}

// navigate follows the remaining key segments through nested mappings. A single number where
// a gradient end (inner/outer) is asked for is that end's value: a constant property is a
// gradient with equal ends.
func navigate(v any, segs []string) (any, error) {
	for _, s := range segs {
		if v == nil {
			return nil, nil
		}
		if _, isNum := number(v); isNum && (s == "inner" || s == "outer") {
			continue
		}
		m, ok := asMap(v)
		if !ok {
			return nil, fmt.Errorf("%q is not a mapping (looking for %s)", fmt.Sprint(v), s)
		}
		v = m[s]
	}
	return v, nil
}

// sameModel checks that the config's model at x is the truth's: the solved structures agree
// layer by layer (radii, density, velocities, state, viscosity at each layer's ends and middle),
// and event sources fixed in the config equal the truth's where it gives them.
func (tm *truthModel) sameModel(p *Problem, x []float64) error {
	bad := func(format string, a ...any) error {
		return &ConfigError{File: tm.path, Msg: fmt.Sprintf(format, a...)}
	}
	want, err := tm.model.Solve(nil)
	if err != nil {
		return bad("not a physical model: %v", err)
	}
	got, err := p.Solve(x)
	if errors.Is(err, ErrConstraint) {
		return bad("the truth violates a structural constraint of the run (radii not increasing outward, or density decreasing with depth)")
	} else if err != nil {
		return bad("the run's model at the truth's values cannot be solved: %v", err)
	}
	if msg := structureDiff(want, got); msg != "" {
		return bad("the run's model at the truth's parameter values is not the truth (%s): a value the run's config fixes differs from the truth's", msg)
	}
	if p.seis == nil {
		return nil
	}
	for _, ev := range p.seis.events {
		tev, ok := tm.events[ev.name]
		if !ok {
			continue
		}
		j := tm.eventAt[ev.name]
		for _, q := range []struct {
			k       string
			run, tr slot
			u       unit
		}{{"distance_deg", ev.distance, tev.distance, unitDeg}, {"depth_km", ev.depth, tev.depth, unitKm}, {"origin_time_s", ev.origin, tev.origin, unitS}} {
			if !q.run.isFixed() || math.IsNaN(q.tr.fixed) {
				continue
			}
			if !near(q.run.fixed, q.tr.fixed, q.u.toSI) {
				return &ConfigError{File: tm.path, Key: fmt.Sprintf("seismic.events[%d].%s", j, q.k),
					Msg: fmt.Sprintf("%g %s differs from the run's fixed value %g %s", q.tr.fixed/q.u.toSI, q.u.label, q.run.fixed/q.u.toSI, q.u.label)}
			}
		}
	}
	return nil
}

// near compares two values relative to their size, with scale as the smallest size considered.
// The tolerance allows for a boundary given as a thickness in one file and as a radius in the
// other (rounding differences, then amplified a little by a self-consistent solve); any real
// difference in a fixed value is far larger.
func near(a, b, scale float64) bool {
	return math.Abs(a-b) <= 1e-9*math.Max(scale, math.Max(math.Abs(a), math.Abs(b)))
}

// structureDiff describes the first difference between two solved structures, "" if none.
func structureDiff(want, got *forward.Structure) string {
	lw, lg := want.Model.Layers, got.Model.Layers
	if len(lw) != len(lg) {
		return fmt.Sprintf("%d solved layers in the truth, %d in the run", len(lw), len(lg))
	}
	for i := range lw {
		a, b := lw[i], lg[i]
		if a.Name != b.Name {
			return fmt.Sprintf("layer %d is %q in the truth, %q in the run", i, a.Name, b.Name)
		}
		if !near(a.Inner, b.Inner, 1) || !near(a.Outer, b.Outer, 1) {
			return fmt.Sprintf("layer %q spans %g–%g km in the truth, %g–%g km in the run", a.Name, a.Inner/1e3, a.Outer/1e3, b.Inner/1e3, b.Outer/1e3)
		}
		if a.Fluid != b.Fluid {
			return fmt.Sprintf("layer %q is liquid in one and solid in the other", a.Name)
		}
		if !near(a.Viscosity, b.Viscosity, 1) {
			return fmt.Sprintf("layer %q viscosity %g Pa s in the truth, %g in the run", a.Name, a.Viscosity, b.Viscosity)
		}
		for _, r := range []float64{a.Inner, (a.Inner + a.Outer) / 2, a.Outer} {
			for _, q := range []struct {
				name, unit string
				scale      float64
				pw, pg     forward.Poly
			}{{"density", "kg/m3", 1, a.Density, b.Density}, {"vp", "m/s", 1, a.Vp, b.Vp}, {"vs", "m/s", 1, a.Vs, b.Vs}} {
				if q.name == "vs" && a.Fluid {
					continue
				}
				if w, g := q.pw.At(r), q.pg.At(r); !near(w, g, q.scale) {
					return fmt.Sprintf("layer %q %s at %g km: %g %s in the truth, %g in the run", a.Name, q.name, r/1e3, w, q.unit, g)
				}
			}
		}
	}
	return ""
}

// TruthPredictions computes the noise-free value (SI) of every observation of p, in the order of
// p.Observations, for the truth at path. A layered truth is mapped onto p's parameters
// (LoadTruth) and evaluated by p's own forward evaluation — the structure solve and observable
// functions that LogDensity uses — so synthetic data and inversion share their physics. A
// tabulated truth (CSV) is solved as given: structure observables only; seismic picks need the
// events' true sources, which a table does not hold (an error naming the first pick).
func TruthPredictions(path string, p *Problem) ([]float64, error) {
	if !isTabulated(path) {
		x, err := LoadTruth(path, p)
		if err != nil {
			return nil, err
		}
		st, err := p.Solve(x) // succeeded in LoadTruth
		if err != nil {
			return nil, fmt.Errorf("%s: %w", path, err)
		}
		return predict(path, p, st, x)
	}
	if p.seis != nil {
		return nil, &ConfigError{File: path,
			Msg: "the run has seismic picks, but a tabulated truth holds no event sources (distance, depth, origin time) to compute them; give a layered truth with seismic.events"}
	}
	m, err := modelfile.ReadCSVFile(path)
	if err != nil {
		return nil, err
	}
	st, err := forward.Solve(m)
	if err != nil {
		return nil, &ConfigError{File: path, Msg: fmt.Sprintf("not a physical model: %v", err)}
	}
	// No parameter vector: anything an observable would read from it (e.g. an Andrade exponent)
	// is NaN and makes that observation an error rather than a silent value.
	x := make([]float64, p.Dim())
	for i := range x {
		x[i] = math.NaN()
	}
	return predict(path, p, st, x)
}

// predict evaluates every observation of p on the solved structure st at x.
func predict(path string, p *Problem, st *forward.Structure, x []float64) ([]float64, error) {
	ev := &evaluation{shared: &shared{st: st}, p: p, x: x}
	out := make([]float64, len(p.Observations))
	for i, o := range p.Observations {
		v, err := o.Observable.eval(ev)
		if err == nil && (math.IsNaN(v) || math.IsInf(v, 0)) {
			err = fmt.Errorf("not a finite number (%g)", v)
		}
		if err != nil {
			return nil, &ConfigError{File: path, Msg: fmt.Sprintf("observation %s cannot be computed for the truth: %v", o.Observable.Key, err)}
		}
		out[i] = v
	}
	return out, nil
}
