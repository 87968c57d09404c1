package problem

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"plumb/internal/testfix"
	"strings"
	"testing"
)

// testConfig is a small valid config; tests edit it with strings.Replace.
// testConfig is the shared three-layer fixture (testdata/configs/three_layers.yaml).
var testConfig = testfix.MustRead("three_layers.yaml")

func writeConfig(t testing.TB, name, text string) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// buildConfig writes, loads and builds a config text.
func buildConfig(t testing.TB, text string) *Problem {
	t.Helper()
	path := writeConfig(t, "c.yaml", text)
	cfg, err := Load(path, nil)
	if err != nil {
		t.Fatal(err)
	}
	p, err := Build(cfg, path)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func TestBuildValid(t *testing.T) {
	p := buildConfig(t, testConfig)
	want := []string{"core_outer_radius_km", "core_density_kg_m3", "core_state", "mantle_density_inner_kg_m3", "crust_thickness_km"}
	var got []string
	for _, par := range p.Space.Params {
		got = append(got, par.Name)
	}
	if strings.Join(got, ",") != strings.Join(want, ",") {
		t.Errorf("parameters %v, want %v", got, want)
	}
	if len(p.Observations) != 2 || p.Observations[0].Observable.Key != "mass_kg" {
		t.Errorf("observations %+v", p.Observations)
	}
	// A model in the middle of the priors: radii placed from the thickness down, SI units.
	x := []float64{1500e3, 8000, 0, 3600, 50e3}
	m, ok := p.Model(x)
	if !ok {
		t.Fatal("valid point rejected")
	}
	if r := m.Layers[0].Outer; r != 1500e3 {
		t.Errorf("core radius %g m", r)
	}
	if r := m.Layers[1].Outer; r != 2950e3 {
		t.Errorf("mantle top %g m, want 2950e3 (3000 km − 50 km crust)", r)
	}
	if !m.Layers[0].Fluid || m.Layers[0].Vs.At(0) != 0 {
		t.Error("core state level 0 is liquid: want a fluid layer with vs = 0")
	}
	if d := m.Layers[1].Density; math.Abs(d.At(1500e3)-3600) > 1e-9 || math.Abs(d.At(2950e3)-3300) > 1e-9 {
		t.Errorf("mantle gradient %g … %g", d.At(1500e3), d.At(2950e3))
	}
	der := make([]float64, p.NumDerived())
	lp := p.LogDensity(x, der)
	if math.IsInf(lp, 0) || math.IsNaN(lp) || lp != der[0]+der[1] {
		t.Errorf("log density %g, derived %v", lp, der)
	}
	if der[len(der)-1] != 2950e3 {
		t.Errorf("derived mantle outer radius %g", der[len(der)-1])
	}
	// Crossing radii (core above the mantle top) and a density inversion are prior zero, not errors.
	for _, bad := range [][]float64{{2960e3, 8000, 0, 3600, 50e3}, {1500e3, 3000, 1, 3600, 50e3}} {
		if lp := p.LogDensity(bad, der); !math.IsInf(lp, -1) {
			t.Errorf("x = %v: log density %g, want −Inf", bad, lp)
		}
	}
}

func TestConfigHashStable(t *testing.T) {
	path := writeConfig(t, "c.yaml", testConfig)
	a, err := Load(path, nil)
	if err != nil {
		t.Fatal(err)
	}
	y, err := a.YAML()
	if err != nil {
		t.Fatal(err)
	}
	b, err := Load(writeConfig(t, "resolved.yaml", string(y)), nil)
	if err != nil {
		t.Fatal(err)
	}
	if a.Hash() != b.Hash() {
		t.Error("the resolved config re-read hashes differently")
	}
	w, err := Load(path, map[string]any{"sampler.workers": 7})
	if err != nil {
		t.Fatal(err)
	}
	if w.Hash() != a.Hash() {
		t.Error("worker count changed the hash")
	}
	s, err := Load(path, map[string]any{"sampler.seed": 12})
	if err != nil {
		t.Fatal(err)
	}
	if s.Hash() == a.Hash() {
		t.Error("seed did not change the hash")
	}
}

// The package never reads the environment: a PLUMB_ variable changes nothing, overrides do
// (also given as text, as the command line passes environment variables on).
func TestLoadIgnoresEnvironment(t *testing.T) {
	t.Setenv("PLUMB_SAMPLER_SEED", "4242")
	cfg, err := Load(writeConfig(t, "c.yaml", testConfig), nil)
	if err != nil {
		t.Fatal(err)
	}
	if cfg.Sampler.Seed != 11 {
		t.Errorf("seed %d, want the file's 11 (the environment must not reach Load)", cfg.Sampler.Seed)
	}
	for _, ov := range []any{uint64(5), "5"} {
		cfg, err = Load(writeConfig(t, "c.yaml", testConfig), map[string]any{"sampler.seed": ov})
		if err != nil {
			t.Fatal(err)
		}
		if cfg.Sampler.Seed != 5 {
			t.Errorf("override %#v: seed %d, want 5", ov, cfg.Sampler.Seed)
		}
	}
}

func TestTOML(t *testing.T) {
	toml := `[planet]
name = "Testa"
radius_km = 3000
[[layers]]
name = "core"
outer_radius_km = { prior = "uniform", min = 500, max = 2500 }
density_kg_m3 = 8000
vp_km_s = 5
state = "liquid"
[[layers]]
name = "mantle"
density_kg_m3 = 3500
vp_km_s = 8
vs_km_s = 4.5
[observations]
mass_kg = { value = 3.0e23, sigma = 3e20 }
`
	path := writeConfig(t, "c.toml", toml)
	cfg, err := Load(path, nil)
	if err != nil {
		t.Fatal(err)
	}
	p, err := Build(cfg, path)
	if err != nil {
		t.Fatal(err)
	}
	if p.Dim() != 1 || p.Space.Params[0].Name != "core_outer_radius_km" {
		t.Errorf("TOML config: %d parameters", p.Dim())
	}
}

// Every bad input is a *ConfigError whose one-line message names the file, the key and the
// problem.
func TestConfigErrors(t *testing.T) {
	cases := []struct {
		name      string
		edit      func(string) string
		file      string
		wantParts []string
	}{
		{"missing file", nil, "absent.yaml", []string{"absent.yaml", "no such file"}},
		{"yaml syntax", func(s string) string { return strings.Replace(s, "  name: Testa", "  name: Testa\n bad: : x", 1) },
			"", []string{"line"}},
		{"unknown key", func(s string) string { return strings.Replace(s, "    vp_km_s: 8", "    vp_km_s: 8\n    densty: 3", 1) },
			"", []string{"layers[1]", `unknown key "densty"`}},
		{"unknown top-level key", func(s string) string { return s + "extras: 1\n" }, "", []string{`unknown key "extras"`}},
		{"unknown sampler key", func(s string) string { return strings.Replace(s, "  seed: 11", "  seed: 11\n  sede: 3", 1) },
			"", []string{"sampler", `"sede"`}},
		{"stop R̂ not above 1", func(s string) string {
			return strings.Replace(s, "  seed: 11", "  seed: 11\n  stop: {rhat_below: 0.99, ess_above: 400}", 1)
		}, "", []string{"sampler.stop.rhat_below", "0.99"}},
		{"stop ESS not positive", func(s string) string {
			return strings.Replace(s, "  seed: 11", "  seed: 11\n  stop: {rhat_below: 1.01}", 1)
		}, "", []string{"sampler.stop.ess_above"}},
		{"unknown prior kind", func(s string) string { return strings.Replace(s, "prior: log_uniform", "prior: loguniformish", 1) },
			"", []string{"layers[2].thickness_km.prior", "unknown prior kind", "loguniformish"}},
		{"unknown prior key", func(s string) string {
			return strings.Replace(s, "{prior: uniform, min: 500, max: 2500}", "{prior: uniform, min: 500, max: 2500, mean: 3}", 1)
		}, "", []string{"layers[0].outer_radius_km", `"mean"`}},
		{"min ≥ max", func(s string) string { return strings.Replace(s, "min: 5000, max: 11000", "min: 11000, max: 5000", 1) },
			"", []string{"layers[0].density_kg_m3", "min 11000 ≥ max 5000"}},
		{"sigma ≤ 0", func(s string) string { return strings.Replace(s, "sigma: 100", "sigma: 0", 1) },
			"", []string{"layers[1].density_kg_m3.inner.sigma", "sigma 0 ≤ 0"}},
		{"radii not increasing", func(s string) string {
			return strings.Replace(s, "{prior: uniform, min: 500, max: 2500}", "3500", 1)
		}, "", []string{"radii are not increasing"}},
		{"radii not increasing (thickness)", func(s string) string {
			return strings.Replace(strings.Replace(s, "{prior: uniform, min: 500, max: 2500}", "2990", 1),
				"{prior: log_uniform, min: 10, max: 100}", "20", 1)
		}, "", []string{"layers[1]", "radii are not increasing"}},
		{"observation without sigma", func(s string) string {
			return strings.Replace(s, "{value: 0.36, sigma: 0.004}", "{value: 0.36}", 1)
		}, "", []string{"observations.moi_factor.sigma", "missing"}},
		{"observation sigma negative", func(s string) string { return strings.Replace(s, "sigma: 0.004", "sigma: -1", 1) },
			"", []string{"observations.moi_factor", "positive"}},
		{"unknown observable", func(s string) string { return strings.Replace(s, "moi_factor:", "moi:", 1) },
			"", []string{"observations.moi", "unknown observable"}},
		{"non-number", func(s string) string { return strings.Replace(s, "vp_km_s: 8", "vp_km_s: fast", 1) },
			"", []string{"layers[1].vp_km_s", `"fast"`}},
		{"bad state", func(s string) string {
			return strings.Replace(s, "{prior: categorical, values: [liquid, solid]}", "molten", 1)
		}, "", []string{"layers[0].state", `"molten"`}},
		{"categorical weight not positive", func(s string) string {
			return strings.Replace(s, "values: [liquid, solid]}", "values: [liquid, solid], weights: [1, 0]}", 1)
		}, "", []string{"layers[0].state"}},
		{"both radius and thickness", func(s string) string {
			return strings.Replace(s, "    thickness_km:", "    outer_radius_km: 10\n    thickness_km:", 1)
		}, "", []string{"layers[2]"}},
		{"unplaced boundary", func(s string) string {
			return strings.Replace(s, "    thickness_km: {prior: log_uniform, min: 10, max: 100}\n", "", 1)
		}, "", []string{"layers[1]", "not placed"}},
		{"duplicate layer", func(s string) string { return strings.Replace(s, "name: crust", "name: mantle", 1) },
			"", []string{"layers[2].name", "used twice"}},
		{"no layers", func(s string) string { return s[:strings.Index(s, "layers:")] + s[strings.Index(s, "observations:"):] },
			"", []string{"layers", "no layers"}},
		{"chains < 1", func(s string) string { return strings.Replace(s, "chains: 2", "chains: 0", 1) },
			"", []string{"sampler.chains"}},
		{"bad seed type", func(s string) string { return strings.Replace(s, "seed: 11", "seed: eleven", 1) },
			"", []string{"sampler.seed"}},
		{"anneal beyond warm-up", func(s string) string { return strings.Replace(s, "  seed: 11", "  seed: 11\n  anneal: 1.5", 1) },
			"", []string{"sampler.anneal", "1.5"}},
		{"pool_warmup not a switch", func(s string) string { return strings.Replace(s, "  seed: 11", "  seed: 11\n  pool_warmup: often", 1) },
			"", []string{"sampler", "pool_warmup"}},
		{"profile every negative", func(s string) string { return s + "  profiles: {every_draws: -1}\n" },
			"", []string{"output.profiles.every_draws", "-1"}},
		{"profile step negative", func(s string) string { return s + "  profiles: {radius_step_km: -5}\n" },
			"", []string{"output.profiles.radius_step_km", "-5"}},
		{"bad format", nil, "c.json", []string{"c.json", "unknown file format"}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var path string
			switch {
			case tc.edit != nil:
				path = writeConfig(t, "bad.yaml", tc.edit(testConfig))
			case tc.name == "missing file":
				path = filepath.Join(t.TempDir(), tc.file)
			default:
				path = writeConfig(t, tc.file, testConfig)
			}
			cfg, err := Load(path, nil)
			if err == nil {
				_, err = Build(cfg, path)
			}
			if err == nil {
				t.Fatal("no error")
			}
			var ce *ConfigError
			if !errors.As(err, &ce) {
				t.Fatalf("error %q is a %T, want *ConfigError", err, err)
			}
			msg := err.Error()
			if strings.Contains(msg, "\n") {
				t.Errorf("message spans lines: %q", msg)
			}
			if !strings.HasPrefix(msg, path) {
				t.Errorf("message %q does not start with the file name", msg)
			}
			for _, w := range tc.wantParts {
				if !strings.Contains(msg, w) {
					t.Errorf("message %q lacks %q", msg, w)
				}
			}
		})
	}
}

func TestTemperingConfigErrors(t *testing.T) {
	cases := []configEdit{
		{"one replica", "  seed: 11\n", "  seed: 11\n  tempering: {replicas: 1}\n", "sampler.tempering.replicas"},
		{"beta_min out of range", "  seed: 11\n", "  seed: 11\n  tempering: {replicas: 4, beta_min: 2}\n", "sampler.tempering.beta_min"},
		{"with prior_only", "  seed: 11\n", "  seed: 11\n  prior_only: true\n  tempering: {replicas: 4}\n", "sampler.tempering"},
		{"unknown key", "  seed: 11\n", "  seed: 11\n  tempering: {replicas: 4, rungs: 3}\n", "rungs"},
	}
	checkEdits(t, testConfig, cases)
}
