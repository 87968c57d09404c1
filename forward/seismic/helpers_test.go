package seismic

import (
	"math"
	"testing"

	"plumb/forward"
	"plumb/internal/prem"
)

const (
	deg = math.Pi / 180 // test readability: degrees → rad
	km  = 1e3           // km → m
)

// premMedium builds the continental PREM medium with the default shells and
// the published core radii (3480 km, 1221.5 km; Dziewonski & Anderson 1981).
func premMedium(t testing.TB) *Medium {
	t.Helper()
	md, err := NewMedium(prem.MustLoadWithoutOcean(t), 3480*km, 1221.5*km)
	if err != nil {
		t.Fatal(err)
	}
	return md
}

func mustPhase(t testing.TB, name string) Phase {
	t.Helper()
	ph, err := ParsePhase(name)
	if err != nil {
		t.Fatal(err)
	}
	return ph
}

// arrivals returns the arrivals of phase name, failing the test on error.
func arrivals(t testing.TB, md *Medium, name string, dist, depth float64) []Arrival {
	t.Helper()
	a, err := md.Arrivals(nil, mustPhase(t, name), dist, depth)
	if err != nil {
		t.Fatalf("%s at %g°, depth %g km: %v", name, dist/deg, depth/km, err)
	}
	return a
}

func relErr(got, want float64) float64 { return math.Abs(got-want) / math.Abs(want) }

// uniform is a one-layer sphere of radius R with constant vp, vs.
func uniform(R, vp, vs float64, fluid bool) forward.Model {
	return forward.Model{Layers: []forward.Layer{{
		Name: "all", Inner: 0, Outer: R,
		Density: forward.Const(3000), Vp: forward.Const(vp), Vs: forward.Const(vs), Fluid: fluid,
	}}}
}

// worst records the largest error seen by a test, for its log.
type worst struct {
	v    float64
	what string
}

func (w *worst) add(e float64, what string) {
	if e > w.v || w.what == "" {
		w.v, w.what = e, what
	}
}
