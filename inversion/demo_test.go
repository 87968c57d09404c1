package inversion

import (
	"context"
	"path/filepath"
	"testing"
)

// The demo (runs/demo/config.yaml, with its stated truth in runs/demo/README.md) must recover its
// truth: the core radius of the truth model, 2050 km, lies inside the 90 % credible interval, the
// liquid core is recognised, and
// the chains have converged (rank-normalized split-R̂ < 1.01, bulk-ESS > 400; the R̂ threshold
// follows Vehtari et al. 2021, the ESS one is common practice, no source).
func TestDemoRecoversTruth(t *testing.T) {
	if testing.Short() {
		t.Skip("runs the full demo")
	}
	path := filepath.Join("..", "runs", "demo", "config.yaml")
	cfg, err := Load(path, nil)
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "run")
	if err := Start(context.Background(), cfg, path, dir, Options{}); err != nil {
		t.Fatal(err)
	}
	s, err := Summarize(dir)
	if err != nil {
		t.Fatal(err)
	}
	// The quakes' true distances (runs/demo/README.md) must lie in their 90 % intervals too.
	for _, p := range s.Parameters {
		truth, ok := map[string]float64{"quake_1_distance_deg": 38, "quake_2_distance_deg": 64, "quake_3_distance_deg": 85}[p.Name]
		if !ok {
			continue
		}
		t.Logf("%s: median %.1f°, 90 %% interval [%.1f, %.1f]°, truth %g°", p.Name, *p.Q50, *p.Q05, *p.Q95, truth)
		if !(*p.Q05 < truth && truth < *p.Q95) {
			t.Errorf("%s: truth %g° outside the 90 %% interval [%g, %g]", p.Name, truth, *p.Q05, *p.Q95)
		}
	}
	const truthCoreRadiusKm = 2050
	found := false
	for _, p := range s.Parameters {
		if p.Name != "core_outer_radius_km" {
			continue
		}
		found = true
		t.Logf("core radius: median %.0f km, 90 %% interval [%.0f, %.0f] km, R̂ %.4f, bulk-ESS %.0f",
			*p.Q50, *p.Q05, *p.Q95, *p.RHat, *p.ESSBulk)
		if !(*p.Q05 < truthCoreRadiusKm && truthCoreRadiusKm < *p.Q95) {
			t.Errorf("truth %d km outside the 90 %% interval [%g, %g]", truthCoreRadiusKm, *p.Q05, *p.Q95)
		}
		if *p.RHat >= 1.01 || *p.ESSBulk < 400 {
			t.Errorf("not converged: R̂ %g, bulk-ESS %g", *p.RHat, *p.ESSBulk)
		}
	}
	if !found {
		t.Fatal("no core_outer_radius_km in the summary")
	}
	// The truth core is liquid, and k2 (0.173 ± 0.01; a solid core of the same size gives 0.096)
	// must say so.
	if len(s.Categorical) != 1 || !(s.Categorical[0].Probability[StateLiquid] > 0.95) {
		t.Errorf("core state posterior %+v, want P(liquid) > 0.95", s.Categorical)
	}
}
