package problem

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The demo's truth maps onto the demo's parameters with the values of runs/demo/truth.yaml and
// README.md (SI inside): the crust's thickness comes from its thickness_km, the mantle's derived
// top from the truth's own boundaries.
func TestLoadTruthDemo(t *testing.T) {
	_, p, _ := loadDemo(t)
	x, err := LoadTruth(demoTruth(t), p)
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]float64{
		"core_outer_radius_km": 2050e3, "core_rho0_kg_m3": 6900, "core_state": 0, // liquid is level 0
		"mantle_rho0_kg_m3": 3400, "crust_thickness_km": 45e3,
		"quake_1_distance_deg": 38 * math.Pi / 180, "quake_2_distance_deg": 64 * math.Pi / 180, "quake_3_distance_deg": 85 * math.Pi / 180,
	}
	if len(x) != len(want) {
		t.Fatalf("%d parameters, want %d", len(x), len(want))
	}
	for i, par := range p.Space.Params {
		w, ok := want[par.Name]
		if !ok {
			t.Errorf("unexpected parameter %s", par.Name)
			continue
		}
		if math.Abs(x[i]-w) > 1e-12*math.Abs(w) {
			t.Errorf("%s = %v, want %v", par.Name, x[i], w)
		}
	}
	// Inside the prior, the predictions are those LogParts records, bit for bit: synth uses the
	// inversion's own evaluation.
	pred, err := TruthPredictions(demoTruth(t), p)
	if err != nil {
		t.Fatal(err)
	}
	der := make([]float64, p.NumDerived())
	if lp, _ := p.LogParts(x, der); math.IsInf(lp, -1) {
		t.Fatal("truth outside the demo's prior")
	}
	for i := range pred {
		if pred[i] != der[2+i] {
			t.Errorf("%s: synth %v, LogParts %v", p.Observations[i].Observable.Key, pred[i], der[2+i])
		}
	}
}

// Bad truths give a *ConfigError naming the truth file and the key (or what is wrong).
func TestLoadTruthErrors(t *testing.T) {
	base, err := os.ReadFile(filepath.Join("..", "..", "runs", "demo", "truth.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	truth := string(base)
	events := truth[strings.Index(truth, "seismic:"):]
	base = []byte(strings.TrimSuffix(truth, events)) // the model alone
	_, p, _ := loadDemo(t)
	cases := []struct {
		name, file, text string
		want             []string // substrings of the message
	}{
		{"missing event", "t.yaml", string(base), []string{`seismic.events: no event named "quake_1"`, "quake_1_distance_deg"}},
		{"missing event key", "t.yaml", strings.Replace(truth, "distance_deg: 64, ", "", 1),
			[]string{"seismic.events[1].distance_deg: missing", "quake_2_distance_deg"}},
		{"missing layer", "t.yaml", strings.Replace(truth, "name: crust", "name: crusty", 1), []string{`layers: no layer named "crust"`}},
		{"missing eos key", "t.yaml", strings.Replace(truth, "      rho0_kg_m3: 3400\n", "", 1), []string{"layers[1].eos.rho0_kg_m3: missing"}},
		{"prior in truth", "t.yaml", strings.Replace(truth, "outer_radius_km: 2050", "outer_radius_km: {prior: uniform, min: 1, max: 3}", 1),
			[]string{"layers[0].outer_radius_km", "fixed values, not priors"}},
		{"prior in event", "t.yaml", strings.Replace(truth, "distance_deg: 38", "distance_deg: {prior: uniform, min: 30, max: 40}", 1),
			[]string{"seismic.events[0].distance_deg", "fixed values, not priors"}},
		{"state not a level", "t.yaml", strings.Replace(truth, "state: liquid", "state: slushy", 1), []string{"layers[0].state", "slushy"}},
		{"fixed value differs", "t.yaml", strings.Replace(truth, "k0_gpa: 130", "k0_gpa: 140", 1), []string{"is not the truth", "density at", "a value the run's config fixes differs"}},
		{"fixed depth differs", "t.yaml", strings.Replace(truth, "depth_km: 45}", "depth_km: 50}", 1), []string{"seismic.events[1].depth_km: 50 km differs from the run's fixed value 45 km"}},
		{"unknown key", "t.yaml", truth + "tides: {period_h: 10}\n", []string{"unknown key", "tides"}},
		{"duplicate event", "t.yaml", truth + "    - {name: quake_1, distance_deg: 1, depth_km: 1}\n", []string{"seismic.events[3].name", "used twice"}},
		{"distance out of range", "t.yaml", strings.Replace(truth, "distance_deg: 85", "distance_deg: 200", 1), []string{"seismic.events[2].distance_deg", "outside"}},
		{"not yaml", "t.yaml", "layers: [\n", []string{"t.yaml"}},
		{"wrong extension", "t.txt", truth, []string{"t.txt", "unknown file format"}},
		{"tabulated", "t.csv", "radius_km,density_kg_m3,vp_km_s,vs_km_s\n0,1,1,1\n1,1,1,1\n", []string{"t.csv", "tabulated truth", "parameter values"}},
		{"constraint violated", "t.yaml", strings.Replace(truth, "rho0_kg_m3: 6900", "rho0_kg_m3: 3000", 1), []string{"violates a structural constraint"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), c.file)
			if err := os.WriteFile(path, []byte(c.text), 0o644); err != nil {
				t.Fatal(err)
			}
			_, err := LoadTruth(path, p)
			var ce *ConfigError
			if !errors.As(err, &ce) {
				t.Fatalf("error %v (%T), want a *ConfigError", err, err)
			}
			msg := err.Error()
			if !strings.HasPrefix(msg, path+":") || strings.Contains(msg, "\n") {
				t.Errorf("%q: want one line starting with the truth file", msg)
			}
			for _, w := range c.want {
				if !strings.Contains(msg, w) {
					t.Errorf("%q lacks %q", msg, w)
				}
			}
		})
	}
	if _, err := LoadTruth(filepath.Join(t.TempDir(), "none.yaml"), p); err == nil || !strings.Contains(err.Error(), "no such file") {
		t.Errorf("missing file: %v", err)
	}
}

// A truth may parameterise the structure differently from the run (a boundary given as a
// thickness instead of an outer radius, a constant density where the run has a gradient), and
// the run's boundaries are then taken from the truth's structure.
func TestLoadTruthOtherParameterisation(t *testing.T) {
	dir := t.TempDir()
	cfg := `planet: {name: T, radius_km: 3000}
layers:
  - name: core
    outer_radius_km: {prior: uniform, min: 800, max: 2200}
    density_kg_m3: {inner: {prior: uniform, min: 6000, max: 12000}, outer: {prior: uniform, min: 6000, max: 12000}}
    vp_km_s: 5
    state: liquid
  - name: mantle
    density_kg_m3: 3300
    vp_km_s: 8
    vs_km_s: 4.5
observations:
  mass_kg: {value: 1, sigma: 4e21}
`
	truth := `planet: {radius_km: 3000}
layers:
  - {name: core, density_kg_m3: 8000, vp_km_s: 5, state: liquid}
  - {name: mantle, thickness_km: 1500, density_kg_m3: 3300, vp_km_s: 8, vs_km_s: 4.5}
`
	cp := filepath.Join(dir, "c.yaml")
	tp := filepath.Join(dir, "t.yaml")
	os.WriteFile(cp, []byte(cfg), 0o644)
	os.WriteFile(tp, []byte(truth), 0o644)
	c, err := Load(cp, nil)
	if err != nil {
		t.Fatal(err)
	}
	p, err := Build(c, cp)
	if err != nil {
		t.Fatal(err)
	}
	x, err := LoadTruth(tp, p)
	if err != nil {
		t.Fatal(err)
	}
	if want := []float64{1500e3, 8000, 8000}; x[0] != want[0] || x[1] != want[1] || x[2] != want[2] {
		t.Errorf("x = %v, want %v", x, want)
	}
	pred, err := TruthPredictions(tp, p)
	if err != nil {
		t.Fatal(err)
	}
	// Closed form: M = 4π/3 (ρc rc³ + ρm (R³ − rc³)).
	m := 4 * math.Pi / 3 * (8000*math.Pow(1500e3, 3) + 3300*(math.Pow(3000e3, 3)-math.Pow(1500e3, 3)))
	if math.Abs(pred[0]-m) > 1e-12*m {
		t.Errorf("mass %v, closed form %v", pred[0], m)
	}
}

// A tabulated truth gives structure observables (here within the interpolation error of the
// demo's profile, runs/demo/truth.csv, < 1e-3 relative as TestForwardYAMLEqualsCSV finds), and
// refuses seismic picks.
func TestTruthPredictionsTabulated(t *testing.T) {
	cfg, p, path := loadDemo(t)
	csv := filepath.Join("..", "..", "runs", "demo", "truth.csv")
	if _, err := TruthPredictions(csv, p); err == nil || !strings.Contains(err.Error(), "no event sources") {
		t.Errorf("seismic run with a tabulated truth: %v", err)
	}
	cfg.Seismic = SeismicConfig{}
	q, err := Build(cfg, path)
	if err != nil {
		t.Fatal(err)
	}
	tab, err := TruthPredictions(csv, q)
	if err != nil {
		t.Fatal(err)
	}
	lay, err := TruthPredictions(demoTruth(t), q)
	if err != nil {
		t.Fatal(err)
	}
	for i, o := range q.Observations {
		if math.Abs(tab[i]-lay[i]) > 1e-3*math.Abs(lay[i]) {
			t.Errorf("%s: tabulated %v, layered %v", o.Observable.Key, tab[i], lay[i])
		}
	}
}

// vector of the problem's dimension with finite values or a *ConfigError — never panic.
func FuzzLoadTruth(f *testing.F) {
	base, err := os.ReadFile(filepath.Join("..", "..", "runs", "demo", "truth.yaml"))
	if err != nil {
		f.Fatal(err)
	}
	f.Add(string(base))
	f.Add(string(base))
	f.Add(strings.Replace(string(base), "state: liquid", "state: [1]", 1))
	f.Add("planet: {radius_km: 10}\nlayers: [{name: core, outer_radius_km: 5, eos: 3}]\nseismic: {events: [{name: q}]}\n")
	f.Add("layers:\n  - name: crust\n    thickness_km: {inner: 3}\n")
	f.Add("seismic: {events: [{name: quake_1, distance_deg: {prior: fixed, value: 38}}]}\n")
	_, p, _ := loadDemo(f)
	dir := f.TempDir()
	f.Fuzz(func(t *testing.T, text string) {
		path := filepath.Join(dir, "fuzz.yaml")
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		x, err := LoadTruth(path, p)
		if err != nil {
			var ce *ConfigError
			if !errors.As(err, &ce) {
				t.Fatalf("error %v (%T) is not a *ConfigError", err, err)
			}
			return
		}
		if len(x) != p.Dim() {
			t.Fatalf("%d values for %d parameters", len(x), p.Dim())
		}
		for i, v := range x {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("%s = %v", p.Space.Params[i].Name, v)
			}
		}
	})
}
