package problem

import (
	"fmt"
	"math"

	"plumb/forward"
	"plumb/forward/seismic"
	"plumb/forward/tides"
)

// Observable is a quantity predicted from a solved structure and compared with a measurement.
// Key is the config key and column stem, with its unit in the name; values inside the code are SI.
type Observable struct {
	// Key is the config key, e.g. "mass_kg".
	Key string
	// Unit labels the input/output unit.
	Unit string

	toSI float64
	eval func(*evaluation) (float64, error)
	// structural is set for observables of the structure alone (no problem needed: no tidal
	// rheology, no seismic event).
	structural bool
}

// ToSI is the factor from the key's unit to SI.
func (o Observable) ToSI() float64 { return o.toSI }

// Predict computes the observable (SI) for the structure p solved at x.
func (o Observable) Predict(p *Problem, st *forward.Structure, x []float64) (float64, error) {
	return o.eval(&evaluation{shared: &shared{st: st}, p: p, x: x})
}

// shared holds what depends on the structural parameters alone — the solved structure, the Love
// numbers, the ray-tracing medium — each computed at most once. A chain's structCache keeps it
// across evaluations that change only the seismic events' source parameters.
type shared struct {
	st      *forward.Structure
	love    [3]complex128
	loveErr error
	loveOK  bool
	// The medium of the seismic picks.
	medium    *seismic.Medium
	mediumErr error
	mediumOK  bool
}

// evaluation is one model's structure with the results that several observables share (the
// Love numbers serve k2, h2 and tidal_q; a phase's first arrival serves every pick of its event
// that uses it), computed at most once.
type evaluation struct {
	*shared
	p *Problem
	x []float64
	// The first-arrival time of each (event, phase), NaN until computed.
	arrival []float64
	arrBuf  []seismic.Arrival
}

// love2 returns the degree-2 Love numbers k, h, l (complex at a tidal period).
func (e *evaluation) love2() ([3]complex128, error) {
	if !e.loveOK {
		k, h, l, err := e.p.Tides(e.st, e.x)
		e.love, e.loveErr, e.loveOK = [3]complex128{k, h, l}, err, true
	}
	return e.love, e.loveErr
}

func bulk(f func(*forward.Structure) float64) func(*evaluation) (float64, error) {
	return func(e *evaluation) (float64, error) { return f(e.st), nil }
}

func realPart(c complex128) float64 { return real(c) }

// loveNumber gives f of Love number i (0 k, 1 h, 2 l).
func loveNumber(i int, name string, f func(complex128) float64) func(*evaluation) (float64, error) {
	return func(e *evaluation) (float64, error) {
		l, err := e.love2()
		if err != nil {
			return math.NaN(), fmt.Errorf("%s: %w", name, err)
		}
		return f(l[i]), nil
	}
}

// Observables lists every observable plumb can invert, in likelihood order. To add one, append it
// here (see DEVELOPERS.md).
func Observables() []Observable {
	return []Observable{
		{Key: "mass_kg", Unit: "kg", toSI: 1, structural: true, eval: bulk(func(s *forward.Structure) float64 { return s.Mass })},
		{Key: "moi_factor", Unit: "", toSI: 1, structural: true, eval: bulk((*forward.Structure).MoIFactor)},
		{Key: "mean_density_kg_m3", Unit: "kg/m3", toSI: 1, structural: true, eval: bulk((*forward.Structure).MeanDensity)},
		{Key: "surface_gravity_m_s2", Unit: "m/s2", toSI: 1, structural: true, eval: bulk((*forward.Structure).SurfaceGravity)},
		{Key: "radius_km", Unit: "km", toSI: 1e3, structural: true, eval: bulk((*forward.Structure).Radius)},
		// Degree-2 tidal Love numbers: static and elastic, or the real parts of the anelastic
		// response at tides.period_h; tidal_q = |k2|/|Im k2| needs the period.
		{Key: "k2", Unit: "", toSI: 1, eval: loveNumber(0, "k2", realPart)},
		{Key: "h2", Unit: "", toSI: 1, eval: loveNumber(1, "h2", realPart)},
		{Key: "tidal_q", Unit: "", toSI: 1, eval: loveNumber(0, "tidal_q", tides.QualityFactor)},
	}
}

// Value is an observable evaluated on a structure, in SI and in the key's unit.
type Value struct {
	// Key and Unit are the observable's.
	Key, Unit string
	// SI is the value in SI units; Output in the key's unit.
	SI, Output float64
}

// StructureValues evaluates on st every registry observable that depends on the structure alone
// (mass, moment of inertia factor, mean density, surface gravity, radius), in registry order: the
// numbers plumb forward prints for a model, computed by the same code as an inversion's.
func StructureValues(st *forward.Structure) ([]Value, error) {
	ev := &evaluation{shared: &shared{st: st}}
	var out []Value
	for _, o := range Observables() {
		if !o.structural {
			continue
		}
		v, err := o.eval(ev)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", o.Key, err)
		}
		out = append(out, Value{Key: o.Key, Unit: o.Unit, SI: v, Output: v / o.toSI})
	}
	return out, nil
}
