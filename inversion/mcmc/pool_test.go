package mcmc

import (
	"math"
	"math/rand/v2"
	"reflect"
	"testing"
)

// PoolWarmup's moments are those of all chains' windows together (law of total covariance),
// checked against the moments of the concatenated samples.
func TestPoolMoments(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	var all [][2]float64
	var as []*AdaptState
	for c, n := range []int{50, 120, 7} {
		a := &AdaptState{Mean: make([]float64, 2), Cov: make([]float64, 4)}
		for range n {
			x := [2]float64{r.NormFloat64() + float64(c), 3*r.NormFloat64() - float64(c*c)}
			x[1] += x[0]
			all = append(all, x)
			// Welford, divisor N, as adaptBlock does.
			a.N++
			k := float64(a.N)
			var dl [2]float64
			for i := range 2 {
				dl[i] = x[i] - a.Mean[i]
				a.Mean[i] += dl[i] / k
			}
			for i := range 2 {
				for j := range 2 {
					a.Cov[i*2+j] += ((k-1)/k*dl[i]*dl[j] - a.Cov[i*2+j]) / k
				}
			}
		}
		as = append(as, a)
	}
	p, err := poolMoments(as)
	if err != nil {
		t.Fatal(err)
	}
	var mu [2]float64
	for _, x := range all {
		mu[0] += x[0] / float64(len(all))
		mu[1] += x[1] / float64(len(all))
	}
	for i := range 2 {
		if math.Abs(p.Mean[i]-mu[i]) > 1e-12*math.Max(1, math.Abs(mu[i])) {
			t.Errorf("mean %d: %g, want %g", i, p.Mean[i], mu[i])
		}
		for j := range 2 {
			c := 0.0
			for _, x := range all {
				c += (x[i] - mu[i]) * (x[j] - mu[j]) / float64(len(all))
			}
			if math.Abs(p.Cov[i*2+j]-c) > 1e-11*math.Max(1, math.Abs(c)) {
				t.Errorf("cov %d%d: %g, want %g", i, j, p.Cov[i*2+j], c)
			}
		}
	}
	if p.N != int64(len(all)) {
		t.Errorf("N = %d, want %d", p.N, len(all))
	}
}

// PoolWarmup pools only chains that are all half-way through warm-up or all at its end; half-way
// it gives them a shared provisional independence proposal (used in the rest of warm-up), at the
// end the final one.
func TestPoolWarmupPoints(t *testing.T) {
	tg := newGauss2([2]float64{0, 0}, [2]float64{1, 1}, 0)
	cfg := Config{Warmup: 200, Steps: 100, Thin: 1, Independence: 0.5,
		Init: func(r *rand.Rand, x []float64) { x[0], x[1] = r.NormFloat64(), r.NormFloat64() }}
	a, _ := NewChain(tg, cfg, 1, 0)
	b, _ := NewChain(tg, cfg, 1, 1)
	a.Advance(100, nil, nil)
	b.Advance(99, nil, nil)
	if err := PoolWarmup([]*Chain{a, b}); err == nil {
		t.Error("pooled chains at sweeps 100 and 99")
	}
	b.Advance(100, nil, nil)
	if err := PoolWarmup([]*Chain{a, b}); err != nil {
		t.Fatal(err)
	}
	shared := func(when string) {
		sa, sb := a.State().Adapt, b.State().Adapt
		if !reflect.DeepEqual(sa.IndChol, sb.IndChol) || len(sa.IndChol) != 4 || sa.PrevN != 0 {
			t.Errorf("%s: pooled chains do not share one independence proposal", when)
		}
	}
	shared("half-way")
	a.Advance(150, nil, nil)
	b.Advance(150, nil, nil)
	if err := PoolWarmup([]*Chain{a, b}); err == nil {
		t.Error("pooled chains at sweep 150, neither half-way nor at the end of warm-up")
	}
	if k := a.State().Counts; k.IndependenceProposed[0] == 0 {
		t.Error("no independence moves in the second half of warm-up after the provisional fit")
	}
	a.Advance(200, nil, nil)
	b.Advance(200, nil, nil)
	if err := PoolWarmup([]*Chain{a, b}); err != nil {
		t.Fatal(err)
	}
	shared("end")
}
