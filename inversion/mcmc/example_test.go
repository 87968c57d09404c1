package mcmc_test

import (
	"fmt"
	"math/rand/v2"

	"plumb/inversion/mcmc"
)

// gaussian is a Target: independent normal coordinates with means mu and standard deviations
// sd, its log density known up to a constant.
type gaussian struct{ mu, sd []float64 }

func (g gaussian) Dim() int        { return len(g.mu) }
func (g gaussian) Levels() []int   { return make([]int, len(g.mu)) } // all continuous
func (g gaussian) NumDerived() int { return 0 }
func (g gaussian) LogDensity(x, _ []float64) float64 {
	lp := 0.0
	for i := range x {
		z := (x[i] - g.mu[i]) / g.sd[i]
		lp -= z * z / 2
	}
	return lp
}

// Four chains of a run sample a 2-D Gaussian; the posterior means and the rank-normalised R̂
// are computed from the kept draws.
func ExampleNewChain() {
	target := gaussian{mu: []float64{1, -2}, sd: []float64{1, 0.5}}
	cfg := mcmc.Config{
		Warmup:       1000,
		Steps:        20000,
		Thin:         1,
		InitialScale: []float64{1, 0.5},
		// Starting points, drawn from each chain's own generator.
		Init: func(r *rand.Rand, x []float64) {
			for i := range x {
				x[i] = 5 * r.NormFloat64()
			}
		},
	}
	const seed, chains = 42, 4
	draws := make([][][]float64, target.Dim()) // draws[coordinate][chain][draw]
	for i := range draws {
		draws[i] = make([][]float64, chains)
	}
	for c := range chains {
		ch, err := mcmc.NewChain(target, cfg, seed, c)
		if err != nil {
			fmt.Println(err)
			return
		}
		ch.Advance(cfg.Total(), nil, func(_ int64, x, _ []float64, _ float64) {
			for i, v := range x {
				draws[i][c] = append(draws[i][c], v)
			}
		})
	}
	for i, d := range draws {
		sum, n := 0.0, 0
		for _, chain := range d {
			for _, v := range chain {
				sum += v
				n++
			}
		}
		fmt.Printf("x%d: %d draws, mean %.1f, R̂ < 1.01: %v\n", i, n, sum/float64(n), mcmc.RankRHat(d) < 1.01)
	}
	// Output:
	// x0: 80000 draws, mean 1.0, R̂ < 1.01: true
	// x1: 80000 draws, mean -2.0, R̂ < 1.01: true
}
