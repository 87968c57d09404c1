package problem

import (
	"os"
	"path/filepath"
	"testing"
)

// FuzzLoad feeds arbitrary YAML to the config loader and builder: they must return a config, a
// problem or a *ConfigError — never panic — and a problem that builds must evaluate its log
// density at a prior draw without NaN.
func FuzzLoad(f *testing.F) {
	f.Add(testConfig)
	f.Add(eosConfig)
	f.Add(seismicConfig)
	f.Add("planet: {radius_km: 10}\nlayers: [{name: a, density_kg_m3: 1, vp_km_s: 1, vs_km_s: 0}]\n")
	f.Add("layers:\n  - name: core\n    density_kg_m3: {inner: {prior: normal}, outer: 3}\n")
	f.Add("observations: {mass_kg: {value: x, sigma: [1]}}\n")
	dir := f.TempDir()
	f.Fuzz(func(t *testing.T, text string) {
		path := filepath.Join(dir, "fuzz.yaml")
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		cfg, err := Load(path, nil)
		if err != nil {
			return
		}
		p, err := Build(cfg, path)
		if err != nil {
			return
		}
		x := make([]float64, p.Dim())
		for i, par := range p.Space.Params {
			x[i] = par.Prior.Quantile(0.5)
		}
		der := make([]float64, p.NumDerived())
		if lp := p.LogDensity(x, der); lp != lp {
			t.Fatalf("NaN log density for %q", text)
		}
	})
}
