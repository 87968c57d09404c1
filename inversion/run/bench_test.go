package run

import (
	"fmt"
	"math"
	"math/rand/v2"
	"path/filepath"
	"sync"
	"testing"

	"plumb/inversion/mcmc"
	"plumb/inversion/problem"
)

// BenchmarkLogDensity times one posterior evaluation of the demo problem (prior, model build,
// self-consistent structure, mass, moment of inertia, k2 and six seismic picks): the sampler's
// hot path.
func BenchmarkLogDensity(b *testing.B) {
	path := filepath.Join("..", "..", "runs", "demo", "config.yaml")
	cfg, err := problem.Load(path, nil)
	if err != nil {
		b.Fatal(err)
	}
	p, err := problem.Build(cfg, path)
	if err != nil {
		b.Fatal(err)
	}
	x := make([]float64, p.Dim())
	for i, par := range p.Space.Params {
		x[i] = par.Prior.Quantile(0.5)
	}
	der := make([]float64, p.NumDerived())
	b.ReportAllocs()
	for b.Loop() {
		p.LogDensity(x, der)
	}
}

// countingTarget counts forward-model evaluations: calls whose prior is finite (a point outside
// the prior's support is rejected before any physics runs).
type countingTarget struct {
	mcmc.Split
	n int64
}

func (c *countingTarget) LogDensity(x, d []float64) float64 {
	lp, ll := c.LogParts(x, d)
	return lp + ll
}

func (c *countingTarget) LogParts(x, d []float64) (float64, float64) {
	lp, ll := c.Split.LogParts(x, d)
	if !math.IsInf(lp, -1) {
		c.n++
	}
	return lp, ll
}

func (c *countingTarget) Bounds() (lo, hi []float64) { return c.Split.(mcmc.Bounded).Bounds() }

func (c *countingTarget) SamplePrior(r *rand.Rand, x []float64) {
	c.Split.(mcmc.PriorSampler).SamplePrior(r, x)
}

// BenchmarkDemoESSPerEvaluation runs the demo's sampler (its config: 4 chains, warm-up and steps
// as configured, every post-warm-up sweep kept) without and with parallel tempering and reports
// the bulk-ESS of the core radius per forward-model evaluation — warm-up included, all replicas
// included — the sampler's efficiency on a real posterior. Run it alone (≈ 1–4 min per case):
//
//	go test ./inversion -run '^$' -bench DemoESSPerEvaluation -benchtime 1x
func BenchmarkDemoESSPerEvaluation(b *testing.B) {
	path := filepath.Join("..", "..", "runs", "demo", "config.yaml")
	cfg, err := problem.Load(path, nil)
	if err != nil {
		b.Fatal(err)
	}
	p, err := problem.Build(cfg, path)
	if err != nil {
		b.Fatal(err)
	}
	mc := chainConfig(cfg, p)
	mc.Thin = 1
	core := p.Space.Index("core_outer_radius_km")
	for _, reps := range []int{0, 3, 4} {
		name := "plain"
		if reps > 0 {
			name = fmt.Sprintf("tempered-%d", reps)
		}
		b.Run(name, func(b *testing.B) {
			for b.Loop() {
				nc := cfg.Sampler.Chains
				draws := make([][]float64, nc)
				targets := make([]*countingTarget, nc)
				samplers := make([]interface {
					Advance(int64, func() bool, mcmc.Emit) int64
				}, nc)
				plain := make([]*mcmc.Chain, nc)
				tempered := make([]*mcmc.Tempered, nc)
				for c := range nc {
					targets[c] = &countingTarget{Split: p.ChainTarget()}
					var err error
					if reps > 0 {
						tempered[c], err = mcmc.NewTempered(targets[c], mc, mcmc.TemperConfig{Replicas: reps, AdaptLadder: true}, cfg.Sampler.Seed, c)
						samplers[c] = tempered[c]
					} else {
						plain[c], err = mcmc.NewChain(targets[c], mc, cfg.Sampler.Seed, c)
						samplers[c] = plain[c]
					}
					if err != nil {
						b.Fatal(err)
					}
				}
				// As a run does: all chains to half-way through warm-up and to its end, pooling the
				// warm-up at both, then sample.
				for _, until := range []int64{mc.Warmup / 2, mc.Warmup, mc.Total()} {
					var wg sync.WaitGroup
					for c := range nc {
						wg.Go(func() {
							samplers[c].Advance(until, nil, func(_ int64, x, _ []float64, _ float64) {
								draws[c] = append(draws[c], x[core])
							})
						})
					}
					wg.Wait()
					if until < mc.Total() && cfg.Sampler.PoolWarmup {
						var err error
						if reps > 0 {
							err = mcmc.PoolTemperedWarmup(tempered)
						} else {
							err = mcmc.PoolWarmup(plain)
						}
						if err != nil {
							b.Fatal(err)
						}
					}
				}
				evals := int64(0)
				for c := range nc {
					evals += targets[c].n
				}
				ess := mcmc.ESSBulk(draws)
				b.ReportMetric(ess, "ess")
				b.ReportMetric(float64(evals), "evals")
				b.ReportMetric(ess/float64(evals), "ess/eval")
				b.ReportMetric(mcmc.RankRHat(draws), "rhat")
			}
		})
	}
}
