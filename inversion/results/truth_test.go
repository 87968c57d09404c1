package results

import (
	"math"
	"os"
	"path/filepath"
	"plumb/inversion/problem"
	"strings"
	"testing"
)

func TestTruthQuantile(t *testing.T) {
	cases := []struct {
		draws []float64
		v     float64
		want  float64
	}{
		{[]float64{1, 2, 3, 4}, 2.5, 0.5},
		{[]float64{1, 2, 3, 4}, 0, 0},
		{[]float64{1, 2, 3, 4}, 5, 1},
		{[]float64{1, 2, 3, 4}, 2, 0.375}, // 1 below, 1 tie
		{[]float64{7, 7, 7}, 7, 0.5},      // constant column equal to the truth
		{[]float64{3, 1, 2}, 1.5, 1.0 / 3},
	}
	for _, c := range cases {
		if got := TruthQuantile(c.draws, c.v); math.Abs(got-c.want) > 1e-15 {
			t.Errorf("TruthQuantile(%v, %v) = %v, want %v", c.draws, c.v, got, c.want)
		}
	}
	if !math.IsNaN(TruthQuantile(nil, 1)) {
		t.Error("no draws: want NaN")
	}
}

// CompareTruth agrees with the draws read directly: the quantile, the interval and the
// categorical probability, and places a derived layer radius too.
func TestCompareTruth(t *testing.T) {
	dir := t.TempDir()
	cfg := `planet: {name: T, radius_km: 3000}
layers:
  - name: core
    outer_radius_km: {prior: uniform, min: 800, max: 2200}
    density_kg_m3: {prior: uniform, min: 6000, max: 11000}
    vp_km_s: 5
    vs_km_s: 3
    state: {prior: categorical, values: [liquid, solid]}
  - name: mantle
    density_kg_m3: 3300
    vp_km_s: 8
    vs_km_s: 4.5
  - name: crust
    thickness_km: {prior: uniform, min: 10, max: 100}
    density_kg_m3: 2900
    vp_km_s: 6
    vs_km_s: 3.5
observations:
  mass_kg: {value: 3.6e23, sigma: 4e21}
  moi_factor: {value: 0.33, sigma: 0.005}
sampler: {chains: 2, warmup_steps: 200, steps: 400, thin: 1, seed: 5}
output: {checkpoint_every_steps: 600, profiles: {every_draws: 0}}
`
	truth := `planet: {radius_km: 3000}
layers:
  - {name: core, outer_radius_km: 1500, density_kg_m3: 8000, vp_km_s: 5, vs_km_s: 3, state: solid}
  - {name: mantle, density_kg_m3: 3300, vp_km_s: 8, vs_km_s: 4.5}
  - {name: crust, thickness_km: 40, density_kg_m3: 2900, vp_km_s: 6, vs_km_s: 3.5}
`
	tp := filepath.Join(dir, "t.yaml")
	os.WriteFile(tp, []byte(truth), 0o644)
	run := startRun(t, cfg, 1)
	tc, err := CompareTruth(run, tp)
	if err != nil {
		t.Fatal(err)
	}
	b := readSamples(t, run)
	if tc.Draws != b.Len() || b.Len() != 800 {
		t.Fatalf("%d draws compared, %d in the samples, want 800", tc.Draws, b.Len())
	}
	want := map[string]float64{"core_outer_radius_km": 1500, "core_density_kg_m3": 8000, "crust_thickness_km": 40, "mantle_outer_radius_km": 2960}
	if len(tc.Parameters) != len(want) {
		t.Fatalf("%d parameters, want %d: %+v", len(tc.Parameters), len(want), tc.Parameters)
	}
	covered := 0
	for _, tp := range tc.Parameters {
		v, _ := b.Float64(tp.Name)
		if math.Abs(tp.Truth-want[tp.Name]) > 1e-9 {
			t.Errorf("%s: truth %v, want %v", tp.Name, tp.Truth, want[tp.Name])
		}
		below := 0
		for _, d := range v {
			if d < tp.Truth {
				below++
			}
		}
		if q := float64(below) / float64(len(v)); math.Abs(q-tp.Quantile) > 1e-12 {
			t.Errorf("%s: quantile %v, direct count %v", tp.Name, tp.Quantile, q)
		}
		if tp.InCentral90 != (tp.Q05 <= tp.Truth && tp.Truth <= tp.Q95) || tp.Q05 >= tp.Q95 {
			t.Errorf("%s: interval [%v, %v], truth %v, in %v", tp.Name, tp.Q05, tp.Q95, tp.Truth, tp.InCentral90)
		}
		if tp.InCentral90 {
			covered++
		}
		if tp.Derived != (tp.Name == "mantle_outer_radius_km") {
			t.Errorf("%s: derived %v", tp.Name, tp.Derived)
		}
	}
	if covered != tc.Covered {
		t.Errorf("covered %d, counted %d", tc.Covered, covered)
	}
	st, _ := b.String("core_state")
	n := 0
	for _, s := range st {
		if s == problem.StateSolid {
			n++
		}
	}
	if len(tc.Categorical) != 1 || tc.Categorical[0].Truth != problem.StateSolid || tc.Categorical[0].Probability != float64(n)/float64(len(st)) {
		t.Errorf("categorical %+v, want P(solid) = %v", tc.Categorical, float64(n)/float64(len(st)))
	}
	var sb strings.Builder
	if err := tc.WriteText(&sb); err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"core_outer_radius_km", "mantle_outer_radius_km (derived)", "core_state: truth solid"} {
		if !strings.Contains(sb.String(), w) {
			t.Errorf("text lacks %q:\n%s", w, sb.String())
		}
	}
}

// FuzzLoadTruth feeds arbitrary truth files to LoadTruth for the demo problem: it must return a
