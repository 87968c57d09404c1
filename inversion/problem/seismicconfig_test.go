package problem

import (
	"math"
	"reflect"
	"strings"
	"testing"

	"plumb/forward/seismic"
)

// seismicConfig has a liquid-or-solid core, one event at an unknown distance and depth with
// differential picks, and one at a known distance with an absolute pick and an unknown origin time.
const seismicConfig = `planet: {name: Testa, radius_km: 3400}
layers:
  - name: core
    outer_radius_km: {prior: uniform, min: 1200, max: 2000}
    density_kg_m3: 7500
    vp_km_s: 5
    vs_km_s: 2.5
    state: {prior: categorical, values: [liquid, solid]}
  - name: mantle
    density_kg_m3: 3600
    vp_km_s: {inner: 9, outer: 7.8}
    vs_km_s: {inner: 5, outer: 4.4}
seismic:
  core_layer: core
  events:
    - name: quake_a
      distance_deg: {prior: uniform, min: 20, max: 90}
      depth_km: {prior: uniform, min: 0, max: 60}
      picks:
        - {phase: S, minus: P, time_s: 180, sigma_s: 2}
        - {phase: ScS, minus: S, time_s: 150, sigma_s: 3}
    - name: quake_b
      distance_deg: 40
      depth_km: 10
      origin_time_s: {prior: uniform, min: -100, max: 100}
      picks:
        - {phase: P, time_s: 300, sigma_s: 1}
        - {phase: pP, time_s: 305, sigma_s: 1, name: quake_b_depth_phase_s}
`

// The predicted picks are differences and sums of the first arrivals of forward/seismic (whose
// physics is checked against analytic solutions and PREM there), for the sampled source of
// each event; the first-arrival cache must not mix events or phases.
func TestSeismicObservables(t *testing.T) {
	p := buildConfig(t, seismicConfig)
	want := "core_outer_radius_km,core_state,quake_a_distance_deg,quake_a_depth_km,quake_b_origin_time_s"
	if got := strings.Join(p.Space.Names(), ","); got != want {
		t.Fatalf("parameters %s, want %s", got, want)
	}
	var keys []string
	for _, o := range p.Observations {
		keys = append(keys, o.Observable.Key)
	}
	if got := strings.Join(keys, ","); got != "quake_a_S_minus_P_s,quake_a_ScS_minus_S_s,quake_b_P_s,quake_b_depth_phase_s" {
		t.Fatalf("observations %s", got)
	}
	deg := math.Pi / 180
	x := []float64{1600e3, 0, 55 * deg, 25e3, 12}
	der := make([]float64, p.NumDerived())
	if lp := p.LogDensity(x, der); math.IsInf(lp, 0) || math.IsNaN(lp) {
		t.Fatalf("log density %g", lp)
	}
	st, err := p.Solve(x)
	if err != nil {
		t.Fatal(err)
	}
	md, err := seismic.NewMedium(st.Model, 1600e3, 0)
	if err != nil {
		t.Fatal(err)
	}
	first := func(name string, dist, depth float64) float64 {
		ph, err := seismic.ParsePhase(name)
		if err != nil {
			t.Fatal(err)
		}
		a, err := md.Arrivals(nil, ph, dist, depth)
		if err != nil || len(a) == 0 {
			t.Fatalf("%s at %g°: %v arrivals, %v", name, dist/deg, len(a), err)
		}
		return a[0].Time
	}
	tP, tS, tScS := first("P", 55*deg, 25e3), first("S", 55*deg, 25e3), first("ScS", 55*deg, 25e3)
	wantPred := []float64{tS - tP, tScS - tS, 12 + first("P", 40*deg, 10e3), 12 + first("pP", 40*deg, 10e3)}
	for i, w := range wantPred {
		if der[2+i] != w {
			t.Errorf("%s predicted %.9g s, forward/seismic gives %.9g s", keys[i], der[2+i], w)
		}
	}
	// The likelihood is the Gaussian of the residuals.
	ll := 0.0
	for i, o := range p.Observations {
		z := (wantPred[i] - o.Value) / o.Sigma
		ll += -0.5*z*z - math.Log(o.Sigma) - 0.5*math.Log(2*math.Pi)
	}
	if math.Abs(der[1]-ll) > 1e-9*math.Abs(ll) {
		t.Errorf("log likelihood %g, want %g", der[1], ll)
	}
}

// Models that cannot explain a pick have zero likelihood — −Inf, never NaN or a panic: direct P
// picked at 170°, inside the shadow of a 1600 km core; a source below the sampled core–mantle
// boundary (allowed by a wide depth prior), which the forward model rejects.
func TestSeismicImpossibleIsRejected(t *testing.T) {
	for _, c := range []struct {
		name, old, new string
		depth          float64
	}{
		{"P in the core shadow", "distance_deg: 40", "distance_deg: 170", 25e3},
		{"source below the mantle", "max: 60}", "max: 3000}", 2500e3},
	} {
		p := buildConfig(t, strings.Replace(seismicConfig, c.old, c.new, 1))
		x := []float64{1600e3, 0, 55 * math.Pi / 180, c.depth, 12}
		der := make([]float64, p.NumDerived())
		if lp := p.LogDensity(x, der); !math.IsInf(lp, -1) {
			t.Errorf("%s: log density %g, want −Inf", c.name, lp)
		}
	}
}

func TestSeismicConfigErrors(t *testing.T) {
	cases := []configEdit{
		{"no core layer", "  core_layer: core\n", "", "seismic.core_layer"},
		{"unknown core layer", "core_layer: core", "core_layer: kern", "seismic.core_layer"},
		{"core layer outermost", "core_layer: core", "core_layer: mantle", "seismic.core_layer"},
		{"inner core above core", "core_layer: core", "core_layer: core\n  inner_core_layer: mantle", "seismic.inner_core_layer"},
		{"unknown phase", "{phase: ScS, minus: S", "{phase: SxS, minus: S", "seismic.events[0].picks[1].phase"},
		{"unknown minus", "minus: P,", "minus: Q,", "seismic.events[0].picks[0].minus"},
		{"phase minus itself", "minus: P,", "minus: S,", "seismic.events[0].picks[0].minus"},
		{"missing sigma", "time_s: 180, sigma_s: 2}", "time_s: 180}", "seismic.events[0].picks[0].sigma_s"},
		{"negative sigma", "time_s: 180, sigma_s: 2}", "time_s: 180, sigma_s: -2}", "seismic.events[0].picks[0].sigma_s"},
		{"missing time", "time_s: 180, ", "", "seismic.events[0].picks[0].time_s"},
		{"distance beyond 180", "distance_deg: 40", "distance_deg: 200", "seismic.events[1].distance_deg"},
		{"unbounded distance prior", "distance_deg: {prior: uniform, min: 20, max: 90}", "distance_deg: {prior: normal, mean: 50, sigma: 10}", "seismic.events[0].distance_deg"},
		{"negative depth", "depth_km: 10", "depth_km: -1", "seismic.events[1].depth_km"},
		{"missing depth", "      depth_km: 10\n", "", "seismic.events[1].depth_km"},
		{"bad event name", "name: quake_a", "name: Quake-A", "seismic.events[0].name"},
		{"event named like a layer", "name: quake_a", "name: mantle", "seismic.events[0].name"},
		{"duplicate event", "name: quake_b", "name: quake_a", "seismic.events[1].name"},
		{"origin without absolute picks", "      depth_km: {prior: uniform, min: 0, max: 60}\n", "      depth_km: {prior: uniform, min: 0, max: 60}\n      origin_time_s: 3\n", "seismic.events[0].origin_time_s"},
		{"no picks", "      picks:\n        - {phase: S, minus: P, time_s: 180, sigma_s: 2}\n        - {phase: ScS, minus: S, time_s: 150, sigma_s: 3}\n", "      picks: []\n", "seismic.events[0].picks"},
		{"case clash", "name: quake_b_depth_phase_s", "name: quake_b_p_s", "seismic.events[1].picks[1]"},
		{"unknown pick key", "sigma_s: 1}", "sigma_s: 1, weight: 2}", "picks"},
	}
	checkEdits(t, seismicConfig, cases)
}

// BenchmarkLogDensitySeismic is one posterior evaluation of the seismic test problem: closed-form
// structure, ray-tracing medium, six first arrivals.
func BenchmarkLogDensitySeismic(b *testing.B) {
	p := buildConfig(b, seismicConfig)
	x := []float64{1600e3, 0, 55 * math.Pi / 180, 25e3, 12}
	der := make([]float64, p.NumDerived())
	b.ReportAllocs()
	for b.Loop() {
		p.LogDensity(x, der)
	}
}

// sampler.event_blocks gives each event with sampled source parameters a block of their indices.
func TestEventBlocks(t *testing.T) {
	p := buildConfig(t, seismicConfig)
	if got := p.EventBlocks(false); got != nil {
		t.Errorf("blocks %v with event_blocks off", got)
	}
	// quake_a: distance (2) and depth (3); quake_b: origin time (4).
	if got := p.EventBlocks(true); !reflect.DeepEqual(got, [][]int{{2, 3}, {4}}) {
		t.Errorf("blocks %v, want [[2 3] [4]]", got)
	}
}
