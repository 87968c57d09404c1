package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"plumb/internal/testfix"
	"reflect"
	"strings"
	"testing"
	"time"
)

func plumb(t *testing.T, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var o, e bytes.Buffer
	code = runCLI(context.Background(), args, &o, &e)
	return code, o.String(), e.String()
}

func write(t *testing.T, dir, name, text string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// smallConfig is the shared two-layer fixture (testdata/configs/two_layers.yaml).
var smallConfig = testfix.MustRead("two_layers.yaml")

func TestCheckDemo(t *testing.T) {
	for _, file := range []string{"config.yaml", "free_depths.yaml"} {
		code, out, errOut := plumb(t, "check", filepath.Join("..", "..", "runs", "demo", file))
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", file, code, errOut)
		}
		for _, w := range []string{"core_outer_radius_km", "uniform", "mass_kg", "moi_factor", "core_state", "quake_1_distance_deg"} {
			if !strings.Contains(out, w) {
				t.Errorf("%s: check output lacks %q:\n%s", file, w, out)
			}
		}
	}
}

func TestRunSummaryResume(t *testing.T) {
	dir := t.TempDir()
	cfg := write(t, dir, "c.yaml", smallConfig)
	out := filepath.Join(dir, "out")
	code, stdout, stderr := plumb(t, "run", cfg, "--out", out, "--workers", "2")
	if code != 0 {
		t.Fatalf("run: exit %d: %s", code, stderr)
	}
	if !strings.Contains(stdout, "core_outer_radius_km") {
		t.Errorf("run did not print a summary:\n%s", stdout)
	}
	for _, f := range []string{"config.yaml", "checkpoint.json", "summary.json", "samples/part-00000.parquet"} {
		if _, err := os.Stat(filepath.Join(out, f)); err != nil {
			t.Errorf("run folder lacks %s", f)
		}
	}
	code, stdout, _ = plumb(t, "summary", out, "--json")
	if code != 0 {
		t.Fatalf("summary: exit %d", code)
	}
	var s struct {
		Draws      int `json:"draws"`
		Parameters []struct {
			Name string `json:"name"`
		} `json:"parameters"`
	}
	if err := json.Unmarshal([]byte(stdout), &s); err != nil || s.Draws != 600 || len(s.Parameters) != 3 {
		t.Errorf("summary JSON: %v %+v", err, s)
	}
	if code, _, _ := plumb(t, "resume", out); code != 0 {
		t.Errorf("resume of a complete run: exit %d", code)
	}
	// Refuse to overwrite a non-empty run folder: exit 2, nothing lost.
	before, _ := os.ReadFile(filepath.Join(out, "checkpoint.json"))
	code, _, stderr = plumb(t, "run", cfg, "--out", out)
	if code != 2 || !strings.Contains(stderr, "not empty") {
		t.Errorf("run into a non-empty folder: exit %d, %q", code, stderr)
	}
	after, _ := os.ReadFile(filepath.Join(out, "checkpoint.json"))
	if !bytes.Equal(before, after) {
		t.Error("the refused run changed the existing checkpoint")
	}
}

const tableCSV = `radius_km,density_kg_m3,vp_km_s,vs_km_s
0,8000,6,0
1000,8000,6,0
1000,3500,8,4.5
2000,3500,8,4.5
`

// plumb forward on a two-layer uniform table against the closed forms of a layered sphere
// (M = 4π/3 Σ ρ_i (r_i³ − r_{i−1}³); Turcotte & Schubert, Geodynamics, self-gravitating sphere).
func TestForwardJSON(t *testing.T) {
	dir := t.TempDir()
	m := write(t, dir, "m.csv", tableCSV)
	prof := filepath.Join(dir, "profile.csv")
	code, stdout, stderr := plumb(t, "forward", "--model", m, "--json", "--profile", prof)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	r := numbers(t, stdout)
	r1, r2 := 1e6, 2e6
	mass := 4 * math.Pi / 3 * (8000*r1*r1*r1 + 3500*(r2*r2*r2-r1*r1*r1))
	inertia := 8 * math.Pi / 15 * (8000*math.Pow(r1, 5) + 3500*(math.Pow(r2, 5)-math.Pow(r1, 5)))
	for _, c := range []struct {
		key  string
		want float64
	}{
		{"mass_kg", mass},
		{"mean_density_kg_m3", mass / (4 * math.Pi / 3 * r2 * r2 * r2)},
		{"surface_gravity_m_s2", 6.67430e-11 * mass / (r2 * r2)},
		{"moi_factor", inertia / (mass * r2 * r2)},
	} {
		if got, ok := r[c.key]; !ok || math.Abs(got-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("%s = %v, want %v", c.key, got, c.want)
		}
	}
	if _, ok := r["central_pressure_pa"]; !ok {
		t.Error("central_pressure_pa missing")
	}
	// Love numbers of a solid shell over a fluid core: degree 2, and between the rigid limit 0 and
	// the fluid-body limit 3/2 (Love 1911).
	if r["love.degree"] != 2 || !(r["love.k"] > 0 && r["love.k"] < 1.5) || !(r["love.h"] > 0) {
		t.Errorf("love numbers %v %v %v", r["love.degree"], r["love.k"], r["love.h"])
	}
	// The written profile reads back as a model with the same mass.
	code, stdout2, _ := plumb(t, "forward", "--model", prof, "--json")
	if code != 0 || stdout2 != stdout {
		t.Errorf("profile round trip: exit %d\n%s\nvs\n%s", code, stdout2, stdout)
	}
}

// Bad input: one line on stderr naming the file and the key, exit status 2, no panic.
func TestBadInput(t *testing.T) {
	dir := t.TempDir()
	good := write(t, dir, "good.yaml", smallConfig)
	cases := []struct {
		name string
		args []string
		want []string
	}{
		{"missing config", []string{"check", filepath.Join(dir, "nope.yaml")}, []string{"nope.yaml", "no such file"}},
		{"yaml syntax", []string{"check", write(t, dir, "syn.yaml", "planet:\n  name: [x\n")}, []string{"syn.yaml", "line"}},
		{"unknown key", []string{"run", write(t, dir, "uk.yaml", strings.Replace(smallConfig, "vp_km_s: 8", "vp_km_s: 8\n    colour: red", 1))},
			[]string{"uk.yaml", "layers[1]", "colour"}},
		{"unknown prior", []string{"check", write(t, dir, "up.yaml", strings.Replace(smallConfig, "{prior: uniform, min: 3000, max: 4000}", "{prior: wide, min: 3000, max: 4000}", 1))},
			[]string{"up.yaml", "layers[1].density_kg_m3.prior", "wide"}},
		{"min ≥ max", []string{"check", write(t, dir, "mm.yaml", strings.Replace(smallConfig, "min: 3000, max: 4000", "min: 4000, max: 3000", 1))},
			[]string{"mm.yaml", "layers[1].density_kg_m3", "min 4000 ≥ max 3000"}},
		{"sigma ≤ 0", []string{"check", write(t, dir, "sg.yaml", strings.Replace(smallConfig, "sigma: 0.004", "sigma: 0", 1))},
			[]string{"sg.yaml", "observations.moi_factor"}},
		{"radii", []string{"check", write(t, dir, "rad.yaml", strings.Replace(smallConfig, "{prior: uniform, min: 500, max: 2500}", "3100", 1))},
			[]string{"rad.yaml", "not increasing"}},
		{"no sigma", []string{"check", write(t, dir, "ns.yaml", strings.Replace(smallConfig, "{value: 0.36, sigma: 0.004}", "{value: 0.36}", 1))},
			[]string{"ns.yaml", "observations.moi_factor.sigma"}},
		{"csv non-numeric", []string{"forward", "--model", write(t, dir, "nn.csv", strings.Replace(tableCSV, "3500,8,4.5\n2000", "3500,eight,4.5\n2000", 1))},
			[]string{"nn.csv", "line 4", "vp_km_s"}},
		{"csv decreasing radius", []string{"forward", "--model", write(t, dir, "dr.csv", strings.Replace(tableCSV, "2000,3500", "900,3500", 1))},
			[]string{"dr.csv", "line 5", "radius"}},
		{"csv missing", []string{"forward", "--model", filepath.Join(dir, "none.csv")}, []string{"none.csv"}},
		{"no model flag", []string{"forward"}, []string{"--model"}},
		{"unknown phase", []string{"forward", "--model", write(t, dir, "tp.csv", tableCSV), "--phases", "P,PxP", "--distances-deg", "30"}, []string{"PxP"}},
		{"phases without distances", []string{"forward", "--model", write(t, dir, "td.csv", tableCSV), "--phases", "P"}, []string{"--distances-deg"}},
		{"distance beyond 180", []string{"forward", "--model", write(t, dir, "tb.csv", tableCSV), "--phases", "P", "--distances-deg", "200"}, []string{"--distances-deg", "200"}},
		{"source below the mantle", []string{"forward", "--model", write(t, dir, "ts.csv", tableCSV), "--phases", "P", "--distances-deg", "30", "--depth-km", "1500"}, []string{"depth"}},
		{"unknown flag", []string{"run", good, "--sede", "3"}, []string{"sede"}},
		{"missing argument", []string{"run"}, []string{"arg"}},
		{"resume not a run", []string{"resume", dir}, []string{"not a run folder"}},
		{"summary not a run", []string{"summary", dir}, []string{"not a run folder"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			code, _, stderr := plumb(t, tc.args...)
			if code != 2 {
				t.Errorf("exit %d, want 2 (stderr %q)", code, stderr)
			}
			lines := strings.Split(strings.TrimRight(stderr, "\n"), "\n")
			if len(lines) != 1 {
				t.Errorf("stderr has %d lines: %q", len(lines), stderr)
			}
			for _, w := range tc.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("stderr %q lacks %q", stderr, w)
				}
			}
		})
	}
}

// The demo's truth as a layered YAML model (self-consistent EOS solve) and as its tabulated
// profile (runs/demo/truth.csv, written by forward --profile) is the same planet, up to the
// linear interpolation between the profile's rows (< 1e-3 relative; the profile has 9 nodes per
// quartic piece).
func TestForwardYAMLEqualsCSV(t *testing.T) {
	demo := filepath.Join("..", "..", "runs", "demo")
	get := func(file string) map[string]float64 {
		code, out, errOut := plumb(t, "forward", "--model", filepath.Join(demo, file), "--json")
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", file, code, errOut)
		}
		return numbers(t, out)
	}
	y, c := get("truth.yaml"), get("truth.csv")
	for _, k := range []string{"mass_kg", "moi_factor", "central_pressure_pa", "surface_gravity_m_s2", "love.k", "love.h"} {
		if math.Abs(y[k]-c[k]) > 1e-3*math.Abs(c[k]) {
			t.Errorf("%s: YAML %v, CSV %v", k, y[k], c[k])
		}
	}
	dir := t.TempDir()
	// truth.csv is current: forward --profile rewrites it byte for byte.
	prof := filepath.Join(dir, "truth.csv")
	if code, _, errOut := plumb(t, "forward", "--model", filepath.Join(demo, "truth.yaml"), "--profile", prof, "--nodes-per-layer", "9"); code != 0 {
		t.Fatalf("profile: exit %d: %s", code, errOut)
	}
	a, _ := os.ReadFile(prof)
	b, _ := os.ReadFile(filepath.Join(demo, "truth.csv"))
	if !bytes.Equal(a, b) {
		t.Error("runs/demo/truth.csv differs from forward --profile of truth.yaml: regenerate it")
	}
	bad := write(t, dir, "prior.yaml", smallConfig[:strings.Index(smallConfig, "observations:")])
	code, _, stderr := plumb(t, "forward", "--model", bad)
	if code != 2 || !strings.Contains(stderr, "layers[0].outer_radius_km") || !strings.Contains(stderr, "fixed values") {
		t.Errorf("model file with priors: exit %d, %q", code, stderr)
	}
}

// numbers decodes plumb forward's JSON into a flat map; nested keys are joined with a dot.
func numbers(t *testing.T, out string) map[string]float64 {
	t.Helper()
	var raw map[string]any
	if err := json.Unmarshal([]byte(out), &raw); err != nil {
		t.Fatalf("%v in %s", err, out)
	}
	flat := map[string]float64{}
	var walk func(prefix string, m map[string]any)
	walk = func(prefix string, m map[string]any) {
		for k, v := range m {
			switch x := v.(type) {
			case float64:
				flat[prefix+k] = x
			case map[string]any:
				walk(prefix+k+".", x)
			}
		}
	}
	walk("", raw)
	return flat
}

// forward --period-h: a viscous mantle lags the tide (Im k < 0, finite Q > 0, the sign convention
// of forward/tides) and is softer than the elastic body (Re k above the static elastic k); without
// any viscosity there is no dissipation (no q key). The anelastic physics itself is checked
// against the Kelvin–Maxwell formula in forward/tides.
func TestForwardPeriod(t *testing.T) {
	dir := t.TempDir()
	visc := write(t, dir, "v.csv", `radius_km,density_kg_m3,vp_km_s,vs_km_s,viscosity_pa_s
0,8000,6,0,0
1000,8000,6,0,0
1000,3500,8,4.5,1e16
2000,3500,8,4.5,1e16
`)
	code, out, errOut := plumb(t, "forward", "--model", visc, "--json", "--period-h", "24")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	r := numbers(t, out)
	if !(r["love.k_imag"] < 0) || !(r["love.q"] > 0) || !(r["love.k_real"] > r["love.k"]) || r["love.period_h"] != 24 {
		t.Errorf("anelastic k: %v", r)
	}
	code, out, _ = plumb(t, "forward", "--model", write(t, dir, "e.csv", tableCSV), "--json", "--period-h", "24")
	if r := numbers(t, out); code != 0 || r["love.k_imag"] != 0 || strings.Contains(out, `"q"`) {
		t.Errorf("elastic body at a period: exit %d, %v", code, r)
	}
	if code, _, _ := plumb(t, "forward", "--model", visc, "--period-h", "24"); code != 0 {
		t.Errorf("table output with a period: exit %d", code)
	}
}

// plumb forward --phases on the two-layer table (uniform mantle, vp 8 km/s, core radius 1000 km,
// radius 2000 km): direct P rays are chords, T = 2R sin(Δ/2)/v and p = dT/dΔ = R cos(Δ/2)/v, and
// PcP follows the law of cosines, T = 2√(R² + c² − 2Rc cos(Δ/2))/v (elementary geometry of
// straight rays; the ray tracer itself is checked in forward/seismic).
func TestForwardTravelTimes(t *testing.T) {
	dir := t.TempDir()
	m := write(t, dir, "m.csv", tableCSV)
	code, stdout, stderr := plumb(t, "forward", "--model", m, "--json", "--degree", "0",
		"--phases", "P,PcP,S", "--distances-deg", "30,60", "--depth-km", "0")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	var r forwardResult
	if err := json.Unmarshal([]byte(stdout), &r); err != nil {
		t.Fatal(err)
	}
	if r.Core == nil || r.Core.CMBRadiusKm != 1000 || r.Core.ICBRadiusKm != 0 {
		t.Fatalf("core %+v, want the density jump at 1000 km and no inner core", r.Core)
	}
	if len(r.TravelTimes) != 6 {
		t.Fatalf("%d travel-time entries, want 6 (3 phases × 2 distances)", len(r.TravelTimes))
	}
	R, c, vp, vs := 2000e3, 1000e3, 8000.0, 4500.0
	deg := math.Pi / 180
	for _, tt := range r.TravelTimes {
		if tt.SourceDepthKm != 0 || len(tt.Arrivals) == 0 || !tt.Arrivals[0].First {
			t.Fatalf("%+v: want arrivals, the first marked", tt)
		}
		h := tt.DistanceDeg * deg / 2
		var wantT, wantP float64
		switch tt.Phase {
		case "P", "S":
			v := map[string]float64{"P": vp, "S": vs}[tt.Phase]
			wantT, wantP = 2*R*math.Sin(h)/v, R*math.Cos(h)/v*deg
		case "PcP":
			wantT = 2 * math.Sqrt(R*R+c*c-2*R*c*math.Cos(h)) / vp
			wantP = -1 // checked by forward/seismic
		}
		a := tt.Arrivals[0]
		if math.Abs(a.TimeS-wantT) > 1e-9*wantT {
			t.Errorf("%s at %g°: %.9f s, want %.9f s", tt.Phase, tt.DistanceDeg, a.TimeS, wantT)
		}
		if wantP >= 0 && math.Abs(a.RayParameterSPerDeg-wantP) > 1e-7*wantP {
			t.Errorf("%s at %g°: p %.9f s/deg, want %.9f", tt.Phase, tt.DistanceDeg, a.RayParameterSPerDeg, wantP)
		}
	}
}

// A resume uses the run's own config: an override in the environment is ignored with a one-line
// notice naming it (before, it changed the config's hash and the resume was refused), and the
// resumed run ends with the rows of an uninterrupted one.
func TestResumeIgnoresEnvironment(t *testing.T) {
	dir := t.TempDir()
	cfg := write(t, dir, "c.yaml", strings.Replace(smallConfig, "steps: 300", "steps: 3000", 1))
	ref := filepath.Join(dir, "ref")
	if code, _, e := plumb(t, "run", cfg, "--out", ref); code != 0 {
		t.Fatalf("reference run: exit %d: %s", code, e)
	}
	runDir := filepath.Join(dir, "run")
	ctx, cancel := context.WithTimeout(context.Background(), 20*time.Millisecond)
	var o, e bytes.Buffer
	code := runCLI(ctx, []string{"run", cfg, "--out", runDir}, &o, &e)
	cancel()
	if code != exitInterrupted {
		t.Skipf("the run was not interrupted (exit %d); nothing to resume", code)
	}
	t.Setenv("PLUMB_SAMPLER_SEED", "7")
	code, _, errOut := plumb(t, "resume", runDir)
	if code != 0 {
		t.Fatalf("resume with PLUMB_SAMPLER_SEED set: exit %d: %s", code, errOut)
	}
	if !strings.Contains(errOut, "ignoring PLUMB_SAMPLER_SEED") || strings.Count(errOut, "PLUMB_SAMPLER_SEED") != 1 {
		t.Errorf("want one notice naming PLUMB_SAMPLER_SEED, got:\n%s", errOut)
	}
	if !reflect.DeepEqual(rowsOf(t, runDir), rowsOf(t, ref)) {
		t.Error("the resumed run's rows differ from the uninterrupted run's")
	}
}
