package main

import (
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"plumb/forward"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
)

// A run whose structure is fixed (only a quake's distance is sampled) writes, for every profiled
// draw, exactly the profile plumb forward --profile --radius-step-km writes for that structure:
// the same grid radii, layers, density, vp, vs, g and P. The two tables share the structure solve
// and ProfileAt; they differ only in units (the CSV writes SI values with a decimal shift to km,
// the Parquet table divides by 10³ or 10⁹), so values are compared in SI to 4 ulp.
func TestProfileTableEqualsForward(t *testing.T) {
	dir := t.TempDir()
	truth, err := os.ReadFile(filepath.Join("..", "..", "runs", "demo", "truth.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	model := string(truth)
	model = model[:strings.Index(model, "seismic:")] // the planet and layers only
	modelPath := write(t, dir, "model.yaml", model)
	cfg := write(t, dir, "run.yaml", model+`
seismic:
  core_layer: core
  events:
    - name: q
      distance_deg: {prior: uniform, min: 30, max: 50}
      depth_km: 10
      picks:
        - {phase: S, minus: P, time_s: 250, sigma_s: 2}
sampler: {chains: 2, warmup_steps: 100, steps: 200, thin: 2, seed: 3}
output: {checkpoint_every_steps: 100, profiles: {every_draws: 10, radius_step_km: 50}}
`)
	runDir := filepath.Join(dir, "run")
	if code, _, e := plumb(t, "run", cfg, "--out", runDir); code != 0 {
		t.Fatalf("run: exit %d: %s", code, e)
	}
	csvPath := filepath.Join(dir, "p.csv")
	if code, _, e := plumb(t, "forward", "--model", modelPath, "--profile", csvPath, "--radius-step-km", "50"); code != 0 {
		t.Fatalf("forward: exit %d: %s", code, e)
	}
	want := readProfileCSV(t, csvPath)
	if n := len(want.Radius); n != 85 { // 0, 50, …, 4200 km
		t.Fatalf("forward profile has %d radii, want 85", n)
	}
	b, _, err := store.ReadParts(filepath.Join(runDir, runfolder.ProfilesDir))
	if err != nil {
		t.Fatal(err)
	}
	col := func(name string) []float64 {
		v, ok := b.Float64(name)
		if !ok {
			t.Fatalf("profile table lacks %s", name)
		}
		return v
	}
	chain, _ := b.Int64(runfolder.ColChain)
	draw, _ := b.Int64(runfolder.ColDraw)
	layer, _ := b.String(runfolder.ColLayer)
	r, rho, vp, vs, g, p := col(runfolder.ColRadiusKm), col(runfolder.ColDensity), col(runfolder.ColVp),
		col(runfolder.ColVs), col(runfolder.ColGravity), col(runfolder.ColPressureGPa)
	// 2 chains × 100 kept draws, every 10th profiled: 20 draws × 85 radii.
	if b.Len() != 20*85 {
		t.Fatalf("profile table has %d rows, want %d", b.Len(), 20*85)
	}
	same := func(a, w float64) bool { return math.Abs(a-w) <= 4*0x1p-52*math.Abs(w) }
	for i := range b.Len() {
		k := i % 85
		if draw[i]%10 != 0 || chain[i] < 0 || chain[i] > 1 {
			t.Fatalf("row %d: chain %d draw %d is not a profiled draw", i, chain[i], draw[i])
		}
		wantLayer := "core"
		if want.Radius[k] > 2050e3 {
			wantLayer = "mantle"
			if want.Radius[k] > 4155e3 {
				wantLayer = "crust"
			}
		}
		if !same(r[i]*1e3, want.Radius[k]) || !same(rho[i], want.Density[k]) || !same(vp[i]*1e3, want.Vp[k]) ||
			!same(vs[i]*1e3, want.Vs[k]) || !same(g[i], want.Gravity[k]) || !same(p[i]*1e9, want.Pressure[k]) || layer[i] != wantLayer {
			t.Fatalf("row %d (r = %g km, %s): run %v, forward %v", i, r[i], layer[i],
				[]float64{r[i] * 1e3, rho[i], vp[i] * 1e3, vs[i] * 1e3, g[i], p[i] * 1e9},
				[]float64{want.Radius[k], want.Density[k], want.Vp[k], want.Vs[k], want.Gravity[k], want.Pressure[k]})
		}
	}
}

// readProfileCSV reads a profile written by forward --profile (header radius_km, density_kg_m3,
// vp_km_s, vs_km_s, gravity_m_s2, pressure_pa) into SI units.
func readProfileCSV(t *testing.T, path string) forward.Profile {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(rows[0], ","); got != "radius_km,density_kg_m3,vp_km_s,vs_km_s,gravity_m_s2,pressure_pa" {
		t.Fatalf("profile header %q", got)
	}
	var p forward.Profile
	cols := []*[]float64{&p.Radius, &p.Density, &p.Vp, &p.Vs, &p.Gravity, &p.Pressure}
	scale := []float64{1e3, 1, 1e3, 1e3, 1, 1}
	for _, row := range rows[1:] {
		for j, c := range cols {
			v, err := strconv.ParseFloat(row[j], 64)
			if err != nil {
				t.Fatal(err)
			}
			*c = append(*c, v*scale[j])
		}
	}
	return p
}
