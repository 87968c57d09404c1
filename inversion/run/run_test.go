package run

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"
	"time"

	"plumb/inversion/problem"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
)

func TestRunEndToEnd(t *testing.T) {
	dir := startRun(t, testConfig, 2)
	b := readSamples(t, dir)
	// 2 chains × 600 steps / thin 2.
	if b.Len() != 600 {
		t.Fatalf("%d rows, want 600", b.Len())
	}
	names := map[string]bool{}
	for _, c := range b.Columns {
		names[c.Name] = true
	}
	for _, n := range []string{"chain", "draw", "log_prior", "log_likelihood", "log_posterior", "core_outer_radius_km",
		"core_state", "mantle_density_inner_kg_m3", "crust_thickness_km", "pred_mass_kg", "pred_moi_factor", "mantle_outer_radius_km"} {
		if !names[n] {
			t.Errorf("column %s missing", n)
		}
	}
	st, _ := b.String("core_state")
	for _, s := range st {
		if s != "liquid" && s != "solid" {
			t.Fatalf("core_state %q", s)
		}
	}
	lpo, _ := b.Float64("log_posterior")
	lpr, _ := b.Float64("log_prior")
	ll, _ := b.Float64("log_likelihood")
	for i := range lpo {
		if math.IsNaN(lpo[i]) || math.IsInf(lpo[i], 0) || lpo[i] != lpr[i]+ll[i] {
			t.Fatalf("row %d: log posterior %g ≠ %g + %g", i, lpo[i], lpr[i], ll[i])
		}
	}
	draw, _ := b.Int64("draw")
	chain, _ := b.Int64("chain")
	for c := int64(0); c < 2; c++ {
		var want int64
		for i := range draw {
			if chain[i] == c {
				if draw[i] != want {
					t.Fatalf("chain %d: draw %d at position %d", c, draw[i], want)
				}
				want++
			}
		}
	}
	part, meta, err := store.ReadPart(filepath.Join(dir, runfolder.SamplesDir, store.PartName(0)))
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range []string{"plumb.version", "plumb.config_sha256", "plumb.seed", "plumb.schema_version", "plumb.config", "plumb.caution"} {
		if meta[k] == "" {
			t.Errorf("metadata %s missing", k)
		}
	}
	units := map[string]string{}
	for _, c := range part.Columns {
		units[c.Name] = c.Unit
	}
	if units["core_outer_radius_km"] != "km" || units["pred_mass_kg"] != "kg" || units["mantle_density_inner_kg_m3"] != "kg/m3" {
		t.Errorf("column units %v", units)
	}
	s, err := summarize(dir)
	if err != nil {
		t.Fatal(err)
	}
	if !s.Complete || s.Draws != 600 || len(s.Categorical) != 1 || len(s.Parameters) != 5 {
		t.Errorf("summary: %+v", s)
	}
	var sb strings.Builder
	if err := s.WriteText(&sb); err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"core_outer_radius_km", "P(liquid)", "Caution"} {
		if !strings.Contains(sb.String(), w) {
			t.Errorf("summary text lacks %q", w)
		}
	}
	if _, err := Start(context.Background(), mustLoad(t, testConfig), "c.yaml", dir, Options{}); !errors.Is(err, ErrRunDirNotEmpty) {
		t.Errorf("second run into the same folder: %v, want ErrRunDirNotEmpty", err)
	}
}

// The Parquet files of a run are byte-identical for 1 and 4 workers.
func TestWorkerCountIndependence(t *testing.T) {
	text := strings.Replace(testConfig, "chains: 2", "chains: 4", 1)
	a, b := startRun(t, text, 1), startRun(t, text, 4)
	for i := 0; ; i++ {
		pa := filepath.Join(a, runfolder.SamplesDir, store.PartName(i))
		ba, err := os.ReadFile(pa)
		if errors.Is(err, os.ErrNotExist) {
			if i == 0 {
				t.Fatal("no parts")
			}
			break
		}
		if err != nil {
			t.Fatal(err)
		}
		bb, err := os.ReadFile(filepath.Join(b, runfolder.SamplesDir, store.PartName(i)))
		if err != nil {
			t.Fatal(err)
		}
		if string(ba) != string(bb) {
			t.Errorf("part %d differs between 1 and 4 workers", i)
		}
	}
}

// sortedRows returns every column of a batch as rows keyed by (chain, draw), for comparing runs
// whose part files are split differently.
func sortedRows(t *testing.T, b *store.Batch) map[[2]int64][]any {
	t.Helper()
	chain, _ := b.Int64(runfolder.ColChain)
	draw, _ := b.Int64(runfolder.ColDraw)
	out := map[[2]int64][]any{}
	for i := range chain {
		var row []any
		for j := range b.Columns {
			switch d := b.Data[j].(type) {
			case []float64:
				row = append(row, math.Float64bits(d[i]))
			case []int64:
				row = append(row, d[i])
			case []string:
				row = append(row, d[i])
			}
		}
		k := [2]int64{chain[i], draw[i]}
		if _, dup := out[k]; dup {
			t.Fatalf("duplicate row chain %d draw %d", k[0], k[1])
		}
		out[k] = row
	}
	return out
}

// A run interrupted many times (at arbitrary moments, mid-interval included) and resumed, and one
// whose last checkpoint was lost after a part was written (a crash between the two), yields rows
// bit-identical to an uninterrupted run with the same seed, and stops at the configured total.
func TestResumeEqualsUninterrupted(t *testing.T) {
	text := strings.Replace(strings.Replace(testConfig, "steps: 600", "steps: 6000", 1), "warmup_steps: 200", "warmup_steps: 1000", 1)
	checkResumeEquals(t, text)
}

// With a stopping rule the run ends at the first checkpoint where every parameter has converged;
// the rule sees exactly the draws written so far (rebuilt from the parts on resume), so an
// interrupted and resumed run stops at the same checkpoint with the same rows.
func TestStopRuleResumeEquals(t *testing.T) {
	text := strings.Replace(strings.Replace(testConfig, "steps: 600", "steps: 20000", 1), "warmup_steps: 200", "warmup_steps: 1000", 1)
	text = strings.Replace(text, "  seed: 11\n", "  seed: 11\n  stop: {rhat_below: 1.05, ess_above: 150}\n", 1)
	dir := startRun(t, text, 2)
	cp, err := runfolder.ReadCheckpoint(dir)
	if err != nil {
		t.Fatal(err)
	}
	n := readSamples(t, dir).Len()
	if !cp.Complete || !cp.Converged || n >= 20000 {
		t.Fatalf("complete %v, converged %v, %d rows of 20000 possible: the rule did not stop the run", cp.Complete, cp.Converged, n)
	}
	s, err := summarize(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range s.Parameters {
		if p.RHat != nil && p.ESSBulk != nil && strings.HasSuffix(p.Name, "_km") && p.Name != "mantle_outer_radius_km" {
			if *p.RHat >= 1.05 || *p.ESSBulk <= 150 {
				t.Errorf("%s: R̂ %.3f, bulk-ESS %.0f at the stop", p.Name, *p.RHat, *p.ESSBulk)
			}
		}
	}
	t.Logf("stopped after %d rows", n)
	if got := checkResumeEquals(t, text); got != n {
		t.Errorf("interrupted run kept %d rows, uninterrupted %d", got, n)
	}
}

// checkResumeEquals runs text uninterrupted and again with repeated interruptions (and one lost
// checkpoint) and requires identical rows; it returns the row count.
func checkResumeEquals(t *testing.T, text string) int {
	t.Helper()
	want := sortedRows(t, readSamples(t, startRun(t, text, 2)))

	path := writeConfig(t, "c.yaml", text)
	cfg, err := problem.Load(path, nil)
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "run")
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Millisecond)
	_, err = Start(ctx, cfg, path, dir, Options{Workers: 2})
	cancel()
	interruptions := 0
	for delay := 3 * time.Millisecond; errors.Is(err, ErrInterrupted); delay += 2 * time.Millisecond {
		interruptions++
		if interruptions == 3 {
			// Simulate a crash after a part was renamed into place but before the checkpoint:
			// keep the old checkpoint, let a resume write more, then put the old one back.
			old, rerr := os.ReadFile(filepath.Join(dir, runfolder.CheckpointFile))
			if rerr != nil {
				t.Fatal(rerr)
			}
			ctx, cancel = context.WithTimeout(context.Background(), delay)
			err = resume(ctx, dir, Options{Workers: 1})
			cancel()
			if werr := os.WriteFile(filepath.Join(dir, runfolder.CheckpointFile), old, 0o644); werr != nil {
				t.Fatal(werr)
			}
			if err == nil {
				err = ErrInterrupted
			}
			continue
		}
		ctx, cancel = context.WithTimeout(context.Background(), delay)
		err = resume(ctx, dir, Options{Workers: 1 + interruptions%2})
		cancel()
	}
	if err != nil {
		t.Fatal(err)
	}
	if interruptions < 3 {
		t.Fatalf("only %d interruptions: the test did not exercise resume", interruptions)
	}
	t.Logf("%d interruptions", interruptions)
	got := sortedRows(t, readSamples(t, dir))
	if len(got) != len(want) {
		t.Fatalf("%d rows after resumes, want %d", len(got), len(want))
	}
	if !reflect.DeepEqual(got, want) {
		t.Fatal("resumed rows differ from the uninterrupted run's")
	}
	// Resuming a complete run adds nothing.
	if err := resume(context.Background(), dir, Options{}); err != nil {
		t.Fatal(err)
	}
	if n := readSamples(t, dir).Len(); n != len(want) {
		t.Errorf("resume of a complete run changed the row count to %d", n)
	}
	return len(want)
}

func TestResumeRefusesChangedConfig(t *testing.T) {
	dir := startRun(t, testConfig, 1)
	path := filepath.Join(dir, runfolder.ConfigFile)
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	changed := strings.Replace(string(b), "seed: 11", "seed: 12", 1)
	if changed == string(b) {
		t.Fatal("test edit did not apply")
	}
	if err := os.WriteFile(path, []byte(changed), 0o644); err != nil {
		t.Fatal(err)
	}
	var ce *problem.ConfigError
	if err := resume(context.Background(), dir, Options{}); !errors.As(err, &ce) || !strings.Contains(err.Error(), "changed") {
		t.Errorf("resume with a changed config: %v", err)
	}
}

// Prior-only mode samples the prior: with the likelihood off, the core radius (uniform on
// [500, 2500] km) and the crust thickness (log-uniform on [10, 100] km, mean 90/ln 10 km) have
// their prior means within 4 Monte Carlo standard errors (closed forms of the two
// distributions); the log likelihood is still recorded, as the prior predictive's. The summary's
// MCSEs are checked against their asymptotic sizes: sd/√ESS for the mean, and
// √(p(1−p)/ESS)/f(q_p) for the quantile q_p, f the prior density there (the variance of a sample
// quantile, e.g. Serfling 1980 §2.3.3, from memory), within a factor 4 because the indicator's
// ESS differs from the bulk ESS.
func TestPriorOnly(t *testing.T) {
	text := strings.Replace(strings.Replace(testConfig, "steps: 600", "steps: 20000", 1), "  seed: 11\n", "  seed: 11\n  prior_only: true\n", 1)
	dir := startRun(t, text, 2)
	s, err := summarize(dir)
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]float64{"core_outer_radius_km": 1500, "crust_thickness_km": 90 / math.Ln10}
	density := map[string]func(x float64) float64{
		"core_outer_radius_km": func(float64) float64 { return 1.0 / 2000 },
		"crust_thickness_km":   func(x float64) float64 { return 1 / (x * math.Ln10) },
	}
	for _, p := range s.Parameters {
		w, ok := want[p.Name]
		if !ok {
			continue
		}
		mcse := *p.SD / math.Sqrt(*p.ESSBulk)
		for _, c := range []struct {
			prob     float64
			q, mcse  *float64
			expected float64
		}{
			{0, nil, p.MCSEMean, mcse},
			{0.05, p.Q05, p.MCSEQ05, 0},
			{0.5, p.Q50, p.MCSEQ50, 0},
			{0.95, p.Q95, p.MCSEQ95, 0},
		} {
			e := c.expected
			if c.q != nil {
				e = math.Sqrt(c.prob*(1-c.prob)/(*p.ESSBulk)) / density[p.Name](*c.q)
			}
			if c.mcse == nil || !(*c.mcse > 0.25*e && *c.mcse < 4*e) {
				t.Errorf("%s: summary MCSE (p = %g) %v, expected about %.3g (ESS bulk %.0f)", p.Name, c.prob, deref(c.mcse), e, *p.ESSBulk)
			}
		}
		if math.Abs(*p.Mean-w) > 4*mcse {
			t.Errorf("%s: mean %.2f, prior mean %.2f (MCSE %.2f)", p.Name, *p.Mean, w, mcse)
		}
		delete(want, p.Name)
	}
	if len(want) > 0 {
		t.Fatalf("parameters missing from the summary: %v", want)
	}
	b := readSamples(t, dir)
	ll, _ := b.Float64(runfolder.ColLogLikelihood)
	lpost, _ := b.Float64(runfolder.ColLogPosterior)
	lprior, _ := b.Float64(runfolder.ColLogPrior)
	for i := range ll {
		if math.IsNaN(ll[i]) || math.IsInf(ll[i], 0) || lpost[i] != lprior[i] {
			t.Fatalf("row %d: log likelihood %g, log posterior %g, log prior %g: want a finite likelihood and posterior = prior", i, ll[i], lpost[i], lprior[i])
		}
	}
}

// A tempered run writes only the β = 1 replica's draws, a sample_stats part per checkpoint (one
// row per chain and replica; ladder from β = 1 to β = 0, non-decreasing cumulative counts), and
// its summary reports a finite evidence with a positive error and exchange acceptances in (0, 1].
// Interrupted and resumed, it gives the same rows (the tempered state is in the checkpoint).
func TestTemperedRun(t *testing.T) {
	text := strings.Replace(testConfig, "  seed: 11\n", "  seed: 11\n  tempering: {replicas: 4}\n", 1)
	dir := startRun(t, text, 2)
	if n := readSamples(t, dir).Len(); n != 600 {
		t.Fatalf("%d sample rows, want 600 (2 chains × 600 steps / thin 2, β = 1 only)", n)
	}
	st, _, err := store.ReadParts(filepath.Join(dir, runfolder.StatsDir))
	if err != nil {
		t.Fatal(err)
	}
	parts, _ := store.ListParts(filepath.Join(dir, runfolder.StatsDir))
	if want := len(parts) * 2 * 4; st.Len() != want {
		t.Fatalf("%d sample_stats rows in %d parts, want %d", st.Len(), len(parts), want)
	}
	beta, _ := st.Float64(runfolder.ColBeta)
	rep, _ := st.Int64(runfolder.ColReplica)
	for i := range beta {
		if (rep[i] == 0 && beta[i] != 1) || (rep[i] == 3 && beta[i] != 0) || !(beta[i] >= 0 && beta[i] <= 1) {
			t.Fatalf("row %d: replica %d has β = %g", i, rep[i], beta[i])
		}
	}
	s, err := summarize(dir)
	if err != nil {
		t.Fatal(err)
	}
	e := s.Evidence
	if e == nil || e.LogZ == nil || !(*e.StdErr > 0) || len(e.ExchangeAcceptance) != 3 {
		t.Fatalf("evidence summary %+v", e)
	}
	for k, a := range e.ExchangeAcceptance {
		if a == nil || !(*a > 0 && *a <= 1) {
			t.Errorf("exchange acceptance of pair %d: %v", k, a)
		}
	}
	t.Logf("log evidence %.3f ± %.3f", *e.LogZ, *e.StdErr)
	long := strings.Replace(strings.Replace(text, "steps: 600", "steps: 3000", 1), "warmup_steps: 200", "warmup_steps: 600", 1)
	checkResumeEquals(t, long)
}

// deref formats an optional value for messages.
func deref(v *float64) any {
	if v == nil {
		return "none"
	}
	return *v
}
