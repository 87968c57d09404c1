package problem

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"plumb/priors"
)

// slot is a model quantity in SI units: a fixed value, or coordinate param of the sampled vector.
type slot struct {
	fixed float64
	param int // −1 when fixed
}

func fixedSlot(v float64) slot { return slot{fixed: v, param: -1} }

func (s slot) at(x []float64) float64 {
	if s.param < 0 {
		return s.fixed
	}
	return x[s.param]
}

func (s slot) isFixed() bool { return s.param < 0 }

// unit describes how an input quantity converts to SI: si = value·toSI.
type unit struct {
	label string  // for tables, e.g. "km"
	toSI  float64 // km → m: 1000
}

var (
	unitKm   = unit{"km", 1e3}
	unitKmS  = unit{"km/s", 1e3}
	unitKgM3 = unit{"kg/m3", 1}
	unitPaS  = unit{"Pa s", 1}
)

// builder collects parameters while a config is interpreted; file names the config for errors.
type builder struct {
	file  string
	space priors.Space
	keys  []string // config key of each parameter
}

func (b *builder) errf(key, format string, a ...any) error {
	return &ConfigError{File: b.file, Key: key, Msg: fmt.Sprintf(format, a...)}
}

// number reads a plain number (YAML/TOML integers and floats, or a numeric string from an
// environment override).
func number(v any) (float64, bool) {
	switch t := v.(type) {
	case float64:
		return t, true
	case float32:
		return float64(t), true
	case int:
		return float64(t), true
	case int64:
		return float64(t), true
	case int32:
		return float64(t), true
	case uint64:
		return float64(t), true
	case uint32:
		return float64(t), true
	}
	return 0, false
}

// priorKeys lists, per prior kind, the keys it takes (besides "prior").
var priorKeys = map[string][]string{
	"uniform":          {"min", "max"},
	"log_uniform":      {"min", "max"},
	"normal":           {"mean", "sigma"},
	"truncated_normal": {"mean", "sigma", "min", "max"},
	"fixed":            {"value"},
	"categorical":      {"values", "weights"},
}

func priorKinds() string {
	k := make([]string, 0, len(priorKeys))
	for n := range priorKeys {
		k = append(k, n)
	}
	sort.Strings(k)
	return strings.Join(k, ", ")
}

// asMap returns v as a string-keyed mapping (YAML and TOML decoders differ in map types).
func asMap(v any) (map[string]any, bool) {
	switch t := v.(type) {
	case map[string]any:
		return t, true
	case map[any]any:
		m := make(map[string]any, len(t))
		for k, x := range t {
			m[fmt.Sprint(k)] = x
		}
		return m, true
	}
	return nil, false
}

// quantity interprets a continuous quantity at key: a number (fixed) or a prior mapping. name is
// the parameter (column) name it gets if sampled; required says whether it may be absent.
func (b *builder) quantity(key string, v any, name string, u unit, required bool) (slot, bool, error) {
	if v == nil {
		if required {
			return slot{}, false, b.errf(key, "missing (give a number or a prior)")
		}
		return slot{}, false, nil
	}
	if x, ok := number(v); ok {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return slot{}, false, b.errf(key, "%v is not a finite number", x)
		}
		return fixedSlot(x * u.toSI), true, nil
	}
	m, ok := asMap(v)
	if !ok {
		return slot{}, false, b.errf(key, "%q is neither a number nor a prior mapping", fmt.Sprint(v))
	}
	kind, err := b.priorKind(key, m)
	if err != nil {
		return slot{}, false, err
	}
	if kind == "categorical" {
		return slot{}, false, b.errf(key, "a categorical prior is only for a layer state")
	}
	num := func(k string) (float64, error) {
		x, ok := number(m[k])
		if !ok {
			if m[k] == nil {
				return 0, b.errf(key+"."+k, "missing (the %s prior needs %s)", kind, strings.Join(priorKeys[kind], ", "))
			}
			return 0, b.errf(key+"."+k, "%q is not a number", fmt.Sprint(m[k]))
		}
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return 0, b.errf(key+"."+k, "%v is not a finite number", x)
		}
		return x, nil
	}
	vals := map[string]float64{}
	for _, k := range priorKeys[kind] {
		x, err := num(k)
		if err != nil {
			return slot{}, false, err
		}
		vals[k] = x
	}
	s := u.toSI
	var d priors.Dist
	switch kind {
	case "fixed":
		return fixedSlot(vals["value"] * s), true, nil
	case "uniform":
		if vals["min"] >= vals["max"] {
			return slot{}, false, b.errf(key, "min %g ≥ max %g", vals["min"], vals["max"])
		}
		d, err = priors.NewUniform(vals["min"]*s, vals["max"]*s)
	case "log_uniform":
		if vals["min"] >= vals["max"] {
			return slot{}, false, b.errf(key, "min %g ≥ max %g", vals["min"], vals["max"])
		}
		d, err = priors.NewLogUniform(vals["min"]*s, vals["max"]*s)
	case "normal":
		if vals["sigma"] <= 0 {
			return slot{}, false, b.errf(key+".sigma", "sigma %g ≤ 0", vals["sigma"])
		}
		d, err = priors.NewNormal(vals["mean"]*s, vals["sigma"]*s)
	case "truncated_normal":
		if vals["sigma"] <= 0 {
			return slot{}, false, b.errf(key+".sigma", "sigma %g ≤ 0", vals["sigma"])
		}
		if vals["min"] >= vals["max"] {
			return slot{}, false, b.errf(key, "min %g ≥ max %g", vals["min"], vals["max"])
		}
		d, err = priors.NewTruncNormal(vals["mean"]*s, vals["sigma"]*s, vals["min"]*s, vals["max"]*s)
	}
	if err != nil {
		return slot{}, false, b.errf(key, "%v", err)
	}
	return b.add(key, priors.Param{Name: name, Unit: u.label, ToUnit: 1 / s, Prior: d})
}

func (b *builder) add(key string, p priors.Param) (slot, bool, error) {
	if b.space.Index(p.Name) >= 0 {
		return slot{}, false, b.errf(key, "parameter name %q is used twice (rename a layer)", p.Name)
	}
	b.space.Params = append(b.space.Params, p)
	b.keys = append(b.keys, key)
	return slot{param: len(b.space.Params) - 1}, true, nil
}

// priorKind checks a prior mapping's keys and returns its kind.
func (b *builder) priorKind(key string, m map[string]any) (string, error) {
	kv, ok := m["prior"]
	if !ok {
		return "", b.errf(key, "a mapping here needs a \"prior\" key (one of %s)", priorKinds())
	}
	kind, _ := kv.(string)
	allowed, ok := priorKeys[kind]
	if !ok {
		return "", b.errf(key+".prior", "unknown prior kind %q (want one of %s)", fmt.Sprint(kv), priorKinds())
	}
	var bad []string
	for k := range m {
		if k != "prior" && !contains(allowed, k) {
			bad = append(bad, k)
		}
	}
	if len(bad) > 0 {
		sort.Strings(bad)
		return "", b.errf(key, "unknown key %q for a %s prior (it takes %s)", strings.Join(bad, ", "), kind, strings.Join(allowed, ", "))
	}
	return kind, nil
}

func contains(s []string, x string) bool {
	for _, y := range s {
		if y == x {
			return true
		}
	}
	return false
}

// profile is a layer property: constant, or linear in radius between the layer's bottom (inner)
// and top (outer).
type profile struct {
	inner, outer slot
	gradient     bool
}

// property interprets a layer property: a number, a prior mapping, or {inner:, outer:}.
func (b *builder) property(key string, v any, prefix, stem string, u unit, suffix string, required bool) (profile, bool, error) {
	if m, ok := asMap(v); ok {
		if _, isPrior := m["prior"]; !isPrior {
			var bad []string
			for k := range m {
				if k != "inner" && k != "outer" {
					bad = append(bad, k)
				}
			}
			if len(bad) > 0 {
				sort.Strings(bad)
				return profile{}, false, b.errf(key, "unknown key %q (give a number, a prior mapping, or a gradient {inner:, outer:})", strings.Join(bad, ", "))
			}
			in, _, err := b.quantity(key+".inner", m["inner"], prefix+stem+"_inner_"+suffix, u, true)
			if err != nil {
				return profile{}, false, err
			}
			out, _, err := b.quantity(key+".outer", m["outer"], prefix+stem+"_outer_"+suffix, u, true)
			if err != nil {
				return profile{}, false, err
			}
			return profile{inner: in, outer: out, gradient: true}, true, nil
		}
	}
	s, ok, err := b.quantity(key, v, prefix+stem+"_"+suffix, u, required)
	return profile{inner: s, outer: s}, ok, err
}
