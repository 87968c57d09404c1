package run

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"sync"
	"testing"
	"time"

	"plumb/inversion/mcmc"
	"plumb/inversion/problem"
	"plumb/inversion/results"
	"plumb/inversion/runfolder"
)

// coverageConfig is a small, cheap inversion: a liquid core of uniform density under a mantle of
// fixed density, seen through mass and moment of inertia factor (closed-form structure, a few
// microseconds per model). The observation values are placeholders that synth replaces.
const coverageConfig = `planet: {name: Coverage, radius_km: 3000}
layers:
  - name: core
    outer_radius_km: {prior: uniform, min: 800, max: 2200}
    density_kg_m3: {prior: uniform, min: 6000, max: 11000}
    vp_km_s: 5
    state: liquid
  - name: mantle
    density_kg_m3: 3300
    vp_km_s: 8
    vs_km_s: 4.5
observations:
  mass_kg: {value: 0, sigma: 4e21}      # about 1 %
  moi_factor: {value: 0, sigma: 0.005}
sampler: {chains: 4, warmup_steps: 1500, steps: 2000, thin: 2, seed: 1}
output: {checkpoint_every_steps: 3500, profiles: {every_draws: 0}}   # no profile table: not needed here
`

// coverageTruth is a truth for coverageConfig; the two numbers are the sampled ones.
const coverageTruth = `planet: {name: Coverage truth, radius_km: 3000}
layers:
  - {name: core, outer_radius_km: %s, density_kg_m3: %s, vp_km_s: 5, state: liquid}
  - {name: mantle, density_kg_m3: 3300, vp_km_s: 8, vs_km_s: 4.5}
`

// TestCoverage checks the calibration of the whole pipeline — truth file, synth, run, summary —
// by the frequency with which the 90 % central credible interval of the core radius contains the
// truth, over many synthetic datasets.
//
// Why the expected coverage is exactly 90 %: each truth θ is drawn from the prior and each dataset
// y from the likelihood given θ (synth's noise is N(0, σ²), the likelihood's model), so (θ, y)
// is a draw from the joint distribution p(θ) p(y | θ) = p(y) p(θ | y). Given y, θ is then a draw
// from the posterior p(θ | y), so the posterior CDF evaluated at θ is uniform on (0, 1) and θ lies
// in the central 90 % interval with probability 0.9 exactly — for every prior and model, averaged
// over datasets (Cook, Gelman & Rubin 2006, J. Comput. Graph. Stat. 15:675; Talts et al. 2018,
// arXiv:1804.06788). Departures come from the finite number of datasets (binomial: sd
// √(0.9·0.1/n), 4.7 % for n = 40) and from the sampler (MCMC error, or a bug). The priors are
// independent uniforms with no constraint cutting them (the fixed mantle is lighter than any
// core, the core is inside the planet), so Space.Sample draws from the actual prior.
//
// The band 80–97 % for n = 40 fails by chance with probability about 10 % for an exact sampler
// (binomial: P(≤ 31 of 40) ≈ 1.5 %, P(≥ 39 of 40) ≈ 8 %); the seeds are fixed, so the test is
// deterministic. PLUMB_COVERAGE_SEED=N reruns it with another base seed; measured over 11 base
// seeds (default, 1–10): 32–39 of 40, pooled 398 of 440 = 90.5 % (binomial sd 1.4 %). (An earlier
// version seeded the noise with base + i, so that base seeds 1–10 shared most of their noise
// streams; it gave 87.0 %. A separate check of 240 datasets then gave 220/240 = 91.7 % and
// posterior quantiles of the truth uniform over deciles, χ²(9) = 13.2.)
func TestCoverage(t *testing.T) {
	if testing.Short() {
		t.Skip("runs 40 short inversions")
	}
	const datasets = 40
	base := uint64(20261207)
	if s := os.Getenv("PLUMB_COVERAGE_SEED"); s != "" {
		var err error
		if base, err = strconv.ParseUint(s, 10, 64); err != nil {
			t.Fatalf("PLUMB_COVERAGE_SEED: %v", err)
		}
	}
	start := time.Now()
	dir := t.TempDir()
	cfgPath := filepath.Join(dir, "coverage.yaml")
	if err := os.WriteFile(cfgPath, []byte(coverageConfig), 0o644); err != nil {
		t.Fatal(err)
	}
	cfg, err := problem.Load(cfgPath, nil)
	if err != nil {
		t.Fatal(err)
	}
	p, err := problem.Build(cfg, cfgPath)
	if err != nil {
		t.Fatal(err)
	}
	// Datasets run two at a time (one worker each): a run this small waits on its fsyncs more
	// than it computes. Results are collected per dataset, so the outcome does not depend on
	// scheduling.
	type result struct {
		covered   bool
		rhat, ess float64
	}
	res := make([]result, datasets)
	errs := make([]error, datasets)
	sem := make(chan struct{}, 2)
	var wg sync.WaitGroup
	for i := range datasets {
		wg.Add(1)
		sem <- struct{}{}
		go func() {
			defer func() { <-sem; wg.Done() }()
			res[i].covered, res[i].rhat, res[i].ess, errs[i] = coverageDataset(p, dir, cfgPath, base, i)
		}()
	}
	wg.Wait()
	covered, worstRHat, leastESS := 0, 0.0, 1e300
	for i, r := range res {
		if errs[i] != nil {
			t.Fatalf("dataset %d: %v", i, errs[i])
		}
		worstRHat, leastESS = max(worstRHat, r.rhat), min(leastESS, r.ess)
		// Adequate for 90 % intervals: R̂ < 1.05 and bulk-ESS > 200 for every parameter (common
		// practice, no source; the stricter R̂ < 1.01 of Vehtari et al. 2021 is for final results).
		if r.rhat >= 1.05 || r.ess < 200 {
			t.Errorf("dataset %d not converged (worst R̂ %.3f, least bulk-ESS %.0f)", i, r.rhat, r.ess)
		}
		if r.covered {
			covered++
		}
	}
	frac := float64(covered) / datasets
	t.Logf("coverage of the 90 %% interval of the core radius: %d of %d = %.1f %% (base seed %d; worst R̂ %.4f, least bulk-ESS %.0f; %.1f s)",
		covered, datasets, 100*frac, base, worstRHat, leastESS, time.Since(start).Seconds())
	if frac < 0.80 || frac > 0.97 {
		t.Errorf("coverage %.1f %% outside 80–97 %%", 100*frac)
	}
}

// coverageDataset draws truth i from the prior, synthesises its data through synth's code path
// (TruthPredictions, AddNoise, ReplaceObservations), inverts them through the real run path
// (Start into dir) and reports whether the 90 % interval of the core radius holds the truth, with
// the worst R̂ and least bulk-ESS over the parameters.
func coverageDataset(p *problem.Problem, dir, cfgPath string, base uint64, i int) (covered bool, rhat, ess float64, err error) {
	// The truth: a prior draw from its own hashed stream.
	x := make([]float64, p.Dim())
	p.Space.Sample(rand.New(rand.NewPCG(mcmc.Seeds(base, i))), x)
	val := func(name string) string {
		j := p.Space.Index(name)
		return strconv.FormatFloat(x[j]*p.Space.Params[j].ToUnit, 'g', -1, 64)
	}
	truthPath := filepath.Join(dir, fmt.Sprintf("truth-%02d.yaml", i))
	truth := fmt.Sprintf(coverageTruth, val("core_outer_radius_km"), val("core_density_kg_m3"))
	if err := os.WriteFile(truthPath, []byte(truth), 0o644); err != nil {
		return false, 0, 0, err
	}
	pred, err := problem.TruthPredictions(truthPath, p)
	if err != nil {
		return false, 0, 0, err
	}
	seed := base*1000 + uint64(i) // the noise and chain seeds of different base seeds never coincide
	text, err := problem.ReplaceObservations([]byte(coverageConfig), cfgPath, p, problem.AddNoise(p, pred, problem.SynthRand(seed)))
	if err != nil {
		return false, 0, 0, err
	}
	synthPath := filepath.Join(dir, fmt.Sprintf("synth-%02d.yaml", i))
	if err := os.WriteFile(synthPath, text, 0o644); err != nil {
		return false, 0, 0, err
	}
	c, err := problem.Load(synthPath, map[string]any{"sampler.seed": seed})
	if err != nil {
		return false, 0, 0, err
	}
	run := filepath.Join(dir, fmt.Sprintf("run-%02d", i))
	if _, err := Start(context.Background(), c, synthPath, run, Options{Workers: 1}); err != nil {
		return false, 0, 0, err
	}
	s, err := summarize(run)
	if err != nil {
		return false, 0, 0, err
	}
	rhat, ess = 0, math.Inf(1)
	for _, ps := range s.Parameters {
		if ps.RHat == nil || ps.ESSBulk == nil {
			return false, 0, 0, fmt.Errorf("%s has no R̂ or ESS", ps.Name)
		}
		rhat, ess = max(rhat, *ps.RHat), min(ess, *ps.ESSBulk)
	}
	f, err := runfolder.Open(run)
	if err != nil {
		return false, 0, 0, err
	}
	tc, err := results.CompareTruth(f, truthPath)
	if err != nil {
		return false, 0, 0, err
	}
	for _, tp := range tc.Parameters {
		if tp.Name == "core_outer_radius_km" {
			return tp.InCentral90, rhat, ess, nil
		}
	}
	return false, 0, 0, fmt.Errorf("no core_outer_radius_km in the truth comparison")
}
