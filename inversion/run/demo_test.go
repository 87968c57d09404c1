package run

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"maps"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"time"

	"plumb/inversion/mcmc"
	"plumb/inversion/problem"
	"plumb/inversion/results"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
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
	path := filepath.Join("..", "..", "runs", "demo", "config.yaml")
	cfg, err := problem.Load(path, nil)
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "run")
	if _, err := Start(context.Background(), cfg, path, dir, Options{}); err != nil {
		t.Fatal(err)
	}
	s, err := summarize(dir)
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
	if len(s.Categorical) != 1 || !(s.Categorical[0].Probability[problem.StateLiquid] > 0.95) {
		t.Errorf("core state posterior %+v, want P(liquid) > 0.95", s.Categorical)
	}
	// An independent reader must open what the run wrote and get the same numbers from it.
	t.Run("duckdb", func(t *testing.T) { checkWithDuckDB(t, dir, s) })
}

// requireDuckDBEnv, set to 1 (as .ci/run does), turns a missing node or DuckDB package from a
// skip into a failure, so CI cannot pass without running the DuckDB check.
const requireDuckDBEnv = "PLUMB_REQUIRE_DUCKDB"

// duckDBCheckDir holds the DuckDB check script and its pinned npm dependencies (slash-separated,
// relative to this package's folder, where go test runs).
const duckDBCheckDir = "../../.ci/duckdb"

// checkWithDuckDB runs .ci/duckdb/check.mjs (DuckDB through its Node API) on the run folder dir
// with the values the Go side read and computed: it opens every Parquet file, compares row
// counts, column types, units, quantiles, the core-state probability and the density band of the
// profiles, and runs the documented notebook queries of runs/README.md. It also feeds the script
// deliberately wrong values and requires it to fail, so a check that compares nothing cannot pass.
func checkWithDuckDB(t *testing.T, dir string, s *results.Summary) {
	node, err := exec.LookPath("node")
	if err == nil {
		_, err = os.Stat(filepath.Join(filepath.FromSlash(duckDBCheckDir), "node_modules", "@duckdb", "node-api", "package.json"))
	}
	if err != nil {
		msg := fmt.Sprintf("DuckDB check not run (%v): install Node.js and run `npm ci --prefix .ci/duckdb` (as .ci/run does)", err)
		if os.Getenv(requireDuckDBEnv) == "1" {
			t.Fatalf("%s; %s=1 requires it", msg, requireDuckDBEnv)
		}
		t.Skipf("%s; set %s=1 to make this an error", msg, requireDuckDBEnv)
	}
	want, err := duckDBExpectation(dir, s)
	if err != nil {
		t.Fatal(err)
	}
	out, err := runDuckDBCheck(t, node, dir, want)
	t.Logf("node .ci/duckdb/check.mjs:\n%s", out)
	if err != nil {
		t.Fatalf("DuckDB check failed: %v", err)
	}

	// The same check with wrong Go values must fail, naming each wrong value.
	bad := want
	bad.Samples.Rows++
	bad.Samples.Quantiles = append([]duckDBQuantile(nil), want.Samples.Quantiles...)
	bad.Samples.Quantiles[0].Value *= 1 + 1e-6
	bad.Profiles.Band = append([]duckDBBandRow(nil), want.Profiles.Band...)
	bad.Profiles.Band[len(bad.Profiles.Band)/2].Median += 1
	out, err = runDuckDBCheck(t, node, dir, bad)
	var exit *exec.ExitError
	if !errors.As(err, &exit) || exit.ExitCode() != 1 {
		t.Fatalf("DuckDB check with wrong expectations: %v, want exit status 1; output:\n%s", err, out)
	}
	for _, w := range []string{"Go read", "quantile_cont(" + want.Samples.Quantiles[0].Column, "band row"} {
		if !strings.Contains(out, w) {
			t.Errorf("DuckDB check with wrong expectations does not report %q; output:\n%s", w, out)
		}
	}
}

// duckDBExpect is what the Go side knows about a run folder, passed to check.mjs as JSON
// (--expect); the script documents each field's check.
type duckDBExpect struct {
	PlumbVersion string        `json:"plumb_version"`
	Samples      duckDBSamples `json:"samples"`
	// Profiles is required: the demo writes a profile table (output.profiles.every_draws
	// defaults to 10), and the check must cover it.
	Profiles duckDBProfiles `json:"profiles"`
}

type duckDBColumn struct {
	Name string `json:"name"`
	Kind string `json:"kind"`
	Unit string `json:"unit"`
}

type duckDBQuantile struct {
	Column string  `json:"column"`
	P      float64 `json:"p"`
	Value  float64 `json:"value"`
}

type duckDBSamples struct {
	Rows        int                           `json:"rows"`
	Columns     []duckDBColumn                `json:"columns"`
	Parameters  []string                      `json:"parameters"`
	Categorical map[string]map[string]float64 `json:"categorical"`
	Quantiles   []duckDBQuantile              `json:"quantiles"`
}

type duckDBBandRow struct {
	RadiusKm float64 `json:"radius_km"`
	Lower    float64 `json:"lower"`
	Median   float64 `json:"median"`
	Upper    float64 `json:"upper"`
}

type duckDBProfiles struct {
	Rows    int             `json:"rows"`
	Columns []duckDBColumn  `json:"columns"`
	Band    []duckDBBandRow `json:"band"`
}

func columnsOf(b *store.Batch) []duckDBColumn {
	out := make([]duckDBColumn, len(b.Columns))
	for i, c := range b.Columns {
		out[i] = duckDBColumn{Name: c.Name, Kind: c.Kind.String(), Unit: c.Unit}
	}
	return out
}

// duckDBExpectation collects the Go side's reading of run folder dir: the samples and profiles
// tables as store.ReadParts returns them, the quantiles and category probabilities of the
// summary s, and the 5/50/95 % density band per grid radius computed here with mcmc.Quantile7.
func duckDBExpectation(dir string, s *results.Summary) (duckDBExpect, error) {
	e := duckDBExpect{PlumbVersion: runfolder.Version}
	f, err := runfolder.Open(dir)
	if err != nil {
		return e, err
	}
	p := f.Problem
	sb, _, err := store.ReadParts(filepath.Join(dir, runfolder.SamplesDir))
	if err != nil {
		return e, fmt.Errorf("read samples: %w", err)
	}
	e.Samples = duckDBSamples{Rows: sb.Len(), Columns: columnsOf(sb), Categorical: map[string]map[string]float64{}}
	for _, par := range p.Space.Params {
		if par.Levels() == 0 {
			e.Samples.Parameters = append(e.Samples.Parameters, par.Name)
		}
	}
	for _, c := range s.Categorical {
		e.Samples.Categorical[c.Name] = c.Probability
	}
	for _, ps := range s.Parameters {
		for _, q := range []struct {
			p float64
			v *float64
		}{{0.05, ps.Q05}, {0.5, ps.Q50}, {0.95, ps.Q95}} {
			if q.v != nil {
				e.Samples.Quantiles = append(e.Samples.Quantiles, duckDBQuantile{Column: ps.Name, P: q.p, Value: *q.v})
			}
		}
	}
	if len(e.Samples.Quantiles) == 0 {
		return e, errors.New("the summary has no quantiles to compare")
	}

	pb, _, err := store.ReadParts(filepath.Join(dir, runfolder.ProfilesDir))
	if err != nil {
		return e, fmt.Errorf("read profiles (the demo must write them for the DuckDB check): %w", err)
	}
	e.Profiles = duckDBProfiles{Rows: pb.Len(), Columns: columnsOf(pb)}
	radius, ok1 := pb.Float64(runfolder.ColRadiusKm)
	density, ok2 := pb.Float64(runfolder.ColDensity)
	if !ok1 || !ok2 {
		return e, fmt.Errorf("profile table without float columns %s and %s", runfolder.ColRadiusKm, runfolder.ColDensity)
	}
	byRadius := map[float64][]float64{}
	for i, r := range radius {
		byRadius[r] = append(byRadius[r], density[i])
	}
	for _, r := range slices.Sorted(maps.Keys(byRadius)) {
		d := byRadius[r]
		e.Profiles.Band = append(e.Profiles.Band, duckDBBandRow{RadiusKm: r,
			Lower: mcmc.Quantile7(d, 0.05), Median: mcmc.Quantile7(d, 0.5), Upper: mcmc.Quantile7(d, 0.95)})
	}
	if len(e.Profiles.Band) == 0 {
		return e, errors.New("the profile table has no rows")
	}
	return e, nil
}

// runDuckDBCheck writes want as JSON and runs check.mjs on dir; it returns the combined output
// and the error of the run (an *exec.ExitError for a failed check).
func runDuckDBCheck(t *testing.T, node, dir string, want duckDBExpect) (string, error) {
	data, err := json.Marshal(want)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "expect.json")
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
	// Two minutes is generous: the check takes about a second on the demo.
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, node, filepath.Join(filepath.FromSlash(duckDBCheckDir), "check.mjs"), "--expect", path, dir)
	out, err := cmd.CombinedOutput()
	return string(out), err
}
