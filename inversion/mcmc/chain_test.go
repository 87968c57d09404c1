package mcmc

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"
)

// gauss2 is a correlated bivariate normal target with one derived value (x0·x1).
type gauss2 struct {
	mu  [2]float64
	inv [2][2]float64 // inverse covariance
}

func newGauss2(mu [2]float64, sd [2]float64, rho float64) gauss2 {
	c := [2][2]float64{{sd[0] * sd[0], rho * sd[0] * sd[1]}, {rho * sd[0] * sd[1], sd[1] * sd[1]}}
	det := c[0][0]*c[1][1] - c[0][1]*c[1][0]
	return gauss2{mu: mu, inv: [2][2]float64{{c[1][1] / det, -c[0][1] / det}, {-c[1][0] / det, c[0][0] / det}}}
}

func (g gauss2) Dim() int        { return 2 }
func (g gauss2) Levels() []int   { return []int{0, 0} }
func (g gauss2) NumDerived() int { return 1 }
func (g gauss2) LogDensity(x, d []float64) float64 {
	a, b := x[0]-g.mu[0], x[1]-g.mu[1]
	d[0] = x[0] * x[1]
	return -0.5 * (a*a*g.inv[0][0] + 2*a*b*g.inv[0][1] + b*b*g.inv[1][1])
}

func runChains(t *testing.T, tg Target, cfg Config, seed uint64, k int) [][][]float64 {
	t.Helper()
	out := make([][][]float64, tg.Dim())
	for i := range out {
		out[i] = make([][]float64, k)
	}
	for c := range k {
		ch, err := NewChain(tg, cfg, seed, c)
		if err != nil {
			t.Fatal(err)
		}
		ch.Advance(cfg.Total(), nil, func(_ int64, x, _ []float64, _ float64) {
			for i := range x {
				out[i][c] = append(out[i][c], x[i])
			}
		})
	}
	return out
}

// The sampler must recover the mean and covariance of a strongly correlated Gaussian (ρ = 0.95,
// scales differing by 10³) within 4 Monte Carlo standard errors. MCSE = sd(f)/√ESS(f) for each
// f ∈ {x0, x1, (x0−μ0)², (x1−μ1)², (x0−μ0)(x1−μ1)}; the closed forms are the target's own
// parameters (definition of the bivariate normal).
func TestCorrelatedGaussian(t *testing.T) {
	mu := [2]float64{3, -2000}
	sd := [2]float64{1, 1000}
	rho := 0.95
	tg := newGauss2(mu, sd, rho)
	cfg := Config{
		Warmup: 5000, Steps: 40000, Thin: 1,
		InitialScale: []float64{5, 5},
		Init:         func(r *rand.Rand, x []float64) { x[0], x[1] = r.NormFloat64()*3, r.NormFloat64()*3 },
	}
	draws := runChains(t, tg, cfg, 42, 4)
	f := func(g func(a, b float64) float64) [][]float64 {
		o := make([][]float64, len(draws[0]))
		for c := range o {
			o[c] = make([]float64, len(draws[0][c]))
			for i := range o[c] {
				o[c][i] = g(draws[0][c][i], draws[1][c][i])
			}
		}
		return o
	}
	cases := []struct {
		name string
		g    func(a, b float64) float64
		want float64
	}{
		{"mean x0", func(a, b float64) float64 { return a }, mu[0]},
		{"mean x1", func(a, b float64) float64 { return b }, mu[1]},
		{"var x0", func(a, b float64) float64 { return (a - mu[0]) * (a - mu[0]) }, sd[0] * sd[0]},
		{"var x1", func(a, b float64) float64 { return (b - mu[1]) * (b - mu[1]) }, sd[1] * sd[1]},
		{"cov", func(a, b float64) float64 { return (a - mu[0]) * (b - mu[1]) }, rho * sd[0] * sd[1]},
	}
	for _, tc := range cases {
		v := f(tc.g)
		mean, s, n := pooled(v)
		ess := ESSBasic(v)
		mcse := s / math.Sqrt(ess)
		t.Logf("%s: %.6g (want %.6g), MCSE %.3g, ESS %.0f of %d", tc.name, mean, tc.want, mcse, ess, n)
		if math.Abs(mean-tc.want) > 4*mcse {
			t.Errorf("%s = %g, want %g ± 4·%g", tc.name, mean, tc.want, mcse)
		}
		if ess < 1000 {
			t.Errorf("%s: ESS %.0f too small for a meaningful check", tc.name, ess)
		}
	}
}

func pooled(v [][]float64) (mean, sd float64, n int) {
	var s, ss float64
	for _, c := range v {
		for _, x := range c {
			s += x
			n++
		}
	}
	mean = s / float64(n)
	for _, c := range v {
		for _, x := range c {
			ss += (x - mean) * (x - mean)
		}
	}
	return mean, math.Sqrt(ss / float64(n-1)), n
}

// mixed has a continuous coordinate whose mean depends on a 3-level discrete coordinate with
// prior weights w: p(k, x) = w_k N(x; m_k, 1). The marginal of k is w (exact by construction).
type mixed struct{ w, m []float64 }

func (m mixed) Dim() int        { return 2 }
func (m mixed) Levels() []int   { return []int{0, len(m.w)} }
func (m mixed) NumDerived() int { return 0 }
func (m mixed) LogDensity(x, _ []float64) float64 {
	k := int(x[1])
	if x[0] < -50 { // a hard wall: exercises the invalid-proposal path
		return math.Inf(-1)
	}
	d := x[0] - m.m[k]
	return math.Log(m.w[k]) - 0.5*d*d
}

// LogParts splits the density as log prior log w_k and log likelihood −d²/2 (Split), for the
// annealed warm-up.
func (m mixed) LogParts(x, d []float64) (float64, float64) {
	lp := m.LogDensity(x, d)
	if math.IsInf(lp, -1) {
		return lp, 0
	}
	w := math.Log(m.w[int(x[1])])
	return w, lp - w
}

// The level probabilities of a discrete coordinate (mixture weights; the marginal of the mixture
// of unit Gaussians is exactly w) are recovered within 4 MCSE, by the categorical moves and, with
// independence moves, by the joint independence proposal that replaces them after warm-up.
func TestDiscreteMarginal(t *testing.T) {
	for _, ind := range []float64{0, 0.5} {
		t.Run(fmt.Sprintf("independence %g", ind), func(t *testing.T) { checkDiscreteMarginal(t, ind) })
	}
}

func checkDiscreteMarginal(t *testing.T, independence float64) {
	tg := mixed{w: []float64{0.2, 0.5, 0.3}, m: []float64{0, 0.5, 1}}
	cfg := Config{Warmup: 2000, Steps: 60000, Thin: 1, InitialScale: []float64{1, 0}, Independence: independence,
		Init: func(r *rand.Rand, x []float64) { x[0] = r.NormFloat64(); x[1] = float64(r.IntN(3)) }}
	draws := runChains(t, tg, cfg, 7, 4)
	for k, w := range tg.w {
		ind := make([][]float64, len(draws[1]))
		for c := range ind {
			for _, v := range draws[1][c] {
				b := 0.0
				if int(v) == k {
					b = 1
				}
				ind[c] = append(ind[c], b)
			}
		}
		p, s, _ := pooled(ind)
		mcse := s / math.Sqrt(ESSBasic(ind))
		if math.Abs(p-w) > 4*mcse {
			t.Errorf("P(k=%d) = %.4f, want %.4f ± 4·%.4f", k, p, w, mcse)
		}
	}
}

// A chain stopped after any number of sweeps, serialised to JSON, restored and continued must
// emit exactly the draws of an uninterrupted chain, bit for bit.
func TestResumeEqualsUninterrupted(t *testing.T) {
	for _, c := range []struct {
		ind, anneal float64
		blocks      [][]int
	}{{0, 0, nil}, {0.5, 0, nil}, {0.5, 0, [][]int{{0}}}, {0.5, 0.5, nil}} {
		checkChainResume(t, c.ind, c.anneal, c.blocks)
	}
}

// checkChainResume cuts a chain (independence-move probability ind, annealed fraction of warm-up,
// extra blocks) at awkward points — inside and at the end of the annealing (sweep 150 with
// anneal 0.5), around the end of warm-up, where the independence proposal is fitted — and requires
// the draws and the final state of an uninterrupted chain.
func checkChainResume(t *testing.T, ind, anneal float64, blocks [][]int) {
	tg := mixed{w: []float64{0.2, 0.5, 0.3}, m: []float64{0, 0.5, 1}}
	cfg := Config{Warmup: 300, Steps: 700, Thin: 3, InitialScale: []float64{1, 0}, Independence: ind, Blocks: blocks, Anneal: anneal,
		Init: func(r *rand.Rand, x []float64) { x[0] = r.NormFloat64(); x[1] = float64(r.IntN(3)) }}
	type row struct {
		draw int64
		x    []float64
		lp   float64
	}
	collect := func(rows *[]row) Emit {
		return func(d int64, x, _ []float64, lp float64) {
			*rows = append(*rows, row{d, append([]float64(nil), x...), lp})
		}
	}
	var want []row
	ch, err := NewChain(tg, cfg, 99, 1)
	if err != nil {
		t.Fatal(err)
	}
	ch.Advance(cfg.Total(), nil, collect(&want))
	wantState := ch.State()

	for _, cuts := range [][]int64{{1}, {299, 300, 301}, {10, 150, 151, 500, 999}} {
		var got []row
		ch, err := NewChain(tg, cfg, 99, 1)
		if err != nil {
			t.Fatal(err)
		}
		for _, cut := range append(cuts, cfg.Total()) {
			ch.Advance(cut, nil, collect(&got))
			b, err := json.Marshal(ch.State())
			if err != nil {
				t.Fatal(err)
			}
			var st State
			if err := json.Unmarshal(b, &st); err != nil {
				t.Fatal(err)
			}
			if ch, err = Restore(tg, cfg, st); err != nil {
				t.Fatal(err)
			}
		}
		if !reflect.DeepEqual(got, want) {
			t.Errorf("independence %g, cuts %v: resumed draws differ from uninterrupted ones", ind, cuts)
		}
		if st := ch.State(); !reflect.DeepEqual(st, wantState) {
			t.Errorf("independence %g, cuts %v: final state differs", ind, cuts)
		}
	}
	if int64(len(want)) != cfg.Kept() {
		t.Errorf("emitted %d draws, want %d", len(want), cfg.Kept())
	}
	if k := wantState.Counts; ind > 0 && !(k.IndependenceProposed[1] > 0 && k.IndependenceAccepted[1] > 0) {
		t.Errorf("independence %g: %d independence moves proposed, %d accepted", ind, k.IndependenceProposed[1], k.IndependenceAccepted[1])
	}
}

func TestStopAndCounts(t *testing.T) {
	tg := mixed{w: []float64{0.5, 0.5}, m: []float64{-49, 0}}
	cfg := Config{Warmup: 100, Steps: 1000, Thin: 1, InitialScale: []float64{30, 0},
		Init: func(r *rand.Rand, x []float64) { x[0] = -49.5; x[1] = 0 }}
	ch, err := NewChain(tg, cfg, 1, 0)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	ran := ch.Advance(cfg.Total(), func() bool { n++; return n > 50 }, nil)
	if ran != 50 || ch.Iter() != 50 {
		t.Fatalf("stop after 50 sweeps: ran %d, iter %d", ran, ch.Iter())
	}
	ch.Advance(cfg.Total(), nil, nil)
	c := ch.Counts()
	if c.Proposed[0] != 100 || c.Proposed[1] != 1000 || c.DiscreteProposed[1] != 1000 {
		t.Errorf("counters %+v", c)
	}
	if c.Invalid[0]+c.Invalid[1] == 0 {
		t.Errorf("the wall at x = −50 was never hit: invalid counter not exercised")
	}
	if !ch.Done() {
		t.Error("chain not done after its total")
	}
}

func TestNoValidStart(t *testing.T) {
	cfg := Config{Warmup: 1, Steps: 1, Thin: 1, MaxInitTries: 20,
		Init: func(r *rand.Rand, x []float64) { x[0] = -100 }}
	if _, err := NewChain(mixed{w: []float64{1}, m: []float64{0}}, cfg, 1, 0); err == nil {
		t.Fatal("want an error when no valid starting point exists")
	}
}

func TestSeedsDistinct(t *testing.T) {
	seen := map[[2]uint64]bool{}
	for s := range uint64(10) {
		for c := range 10 {
			a, b := Seeds(s, c)
			if seen[[2]uint64{a, b}] {
				t.Fatalf("seed collision at seed %d chain %d", s, c)
			}
			seen[[2]uint64{a, b}] = true
		}
	}
}

// zero is a target with a trivial density, so the benchmark measures the sampler's own overhead.
type zero struct{ d int }

func (z zero) Dim() int                          { return z.d }
func (z zero) Levels() []int                     { return make([]int, z.d) }
func (z zero) NumDerived() int                   { return 2 }
func (z zero) LogDensity(x, d []float64) float64 { return -0.5 * x[0] * x[0] }

// BenchmarkSweep reports the sampler's overhead per sweep for an 8-parameter continuous block
// (divide ns/op by 8 for the per-parameter figure).
func BenchmarkSweep(b *testing.B) {
	tg := zero{d: 8}
	cfg := Config{Warmup: 0, Steps: int64(b.N) + 1, Thin: 1,
		Init: func(r *rand.Rand, x []float64) {}}
	ch, err := NewChain(tg, cfg, 1, 0)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	ch.Advance(int64(b.N), nil, func(int64, []float64, []float64, float64) {})
}

// lognormal is the density of x > 0 with log x ~ N(mu, sigma²), written in x (with its 1/x
// Jacobian), so a sampler that forgets the Hastings correction of its log-scale proposals is biased.
type lognormal struct{ mu, sigma float64 }

func (l lognormal) Dim() int        { return 1 }
func (l lognormal) Levels() []int   { return []int{0} }
func (l lognormal) NumDerived() int { return 0 }
func (l lognormal) LogDensity(x, _ []float64) float64 {
	if x[0] <= 0 {
		return math.Inf(-1)
	}
	z := (math.Log(x[0]) - l.mu) / l.sigma
	return -math.Log(x[0]) - 0.5*z*z
}

// Log-scale proposals: E[log x] = mu and Var[log x] = sigma² (definition of the log-normal),
// within 4 MCSE.
func TestLogCoordinates(t *testing.T) {
	tg := lognormal{mu: 8, sigma: 1.5}
	cfg := Config{Warmup: 2000, Steps: 40000, Thin: 1, InitialScale: []float64{0.5}, Log: []bool{true},
		Init: func(r *rand.Rand, x []float64) { x[0] = math.Exp(8 + r.NormFloat64()) }}
	draws := runChains(t, tg, cfg, 5, 4)
	for _, c := range []struct {
		name string
		f    func(float64) float64
		want float64
	}{
		{"E log x", math.Log, tg.mu},
		{"Var log x", func(x float64) float64 { d := math.Log(x) - tg.mu; return d * d }, tg.sigma * tg.sigma},
	} {
		v := make([][]float64, len(draws[0]))
		for i, ch := range draws[0] {
			for _, x := range ch {
				v[i] = append(v[i], c.f(x))
			}
		}
		m, s, _ := pooled(v)
		mcse := s / math.Sqrt(ESSBasic(v))
		if math.Abs(m-c.want) > 4*mcse {
			t.Errorf("%s = %g, want %g ± 4·%g", c.name, m, c.want, mcse)
		}
	}
}

// Independence moves pay off where the posterior is close to its Gaussian fit: on the strongly
// correlated Gaussian of TestCorrelatedGaussian, making half of the post-warm-up moves
// independence moves raises the bulk-ESS of both coordinates more than twofold at the same number
// of density evaluations (measured while writing the test: ≈ 2.9×; the mean and covariance are
// still checked by TestSBCMoveVariants and by the 4-MCSE check below).
func TestIndependenceMovesRaiseESS(t *testing.T) {
	tg := newGauss2([2]float64{3, -2000}, [2]float64{1, 1000}, 0.95)
	ess := func(ind float64) ([2]float64, [][][]float64) {
		cfg := Config{Warmup: 2000, Steps: 20000, Thin: 1, InitialScale: []float64{0.5, 500}, Independence: ind,
			Init: func(r *rand.Rand, x []float64) { x[0] = 3 + r.NormFloat64(); x[1] = -2000 + 1000*r.NormFloat64() }}
		d := runChains(t, tg, cfg, 3, 4)
		return [2]float64{ESSBulk(d[0]), ESSBulk(d[1])}, d
	}
	plain, _ := ess(0)
	mixed, d := ess(0.5)
	for i := range 2 {
		if !(mixed[i] > 2*plain[i]) {
			t.Errorf("x%d: bulk-ESS %.0f with independence moves, %.0f without: want more than twice", i, mixed[i], plain[i])
		}
		m, s, _ := pooled(d[i])
		if mcse := s / math.Sqrt(mixed[i]); math.Abs(m-tg.mu[i]) > 4*mcse {
			t.Errorf("x%d: mean %g, want %g ± 4·%g", i, m, tg.mu[i], mcse)
		}
	}
	t.Logf("bulk-ESS without / with independence moves: %.0f / %.0f and %.0f / %.0f", plain[0], mixed[0], plain[1], mixed[1])
}

// Extra blocks must name distinct continuous coordinates.
func TestBlocksInvalid(t *testing.T) {
	tg := mixed{w: []float64{0.2, 0.5, 0.3}, m: []float64{0, 0.5, 1}}
	for _, blocks := range [][][]int{{{1}}, {{0, 0}}, {{}}, {{5}}} {
		cfg := Config{Warmup: 10, Steps: 10, Thin: 1, Blocks: blocks,
			Init: func(r *rand.Rand, x []float64) { x[0] = r.NormFloat64(); x[1] = float64(r.IntN(3)) }}
		if _, err := NewChain(tg, cfg, 1, 0); err == nil {
			t.Errorf("blocks %v: no error", blocks)
		}
	}
}

// The annealed warm-up reaches the posterior's main basin from a start in a local trap, where a
// plain random walk stays: the target is a narrow Gaussian likelihood at x = 0 plus a shallow,
// far narrower trap at x = 8 (log likelihood −40 there, a local maximum), under a flat-ish prior
// N(0, 10²). Every chain starts in the trap. Without annealing the trap holds the chains through
// warm-up; with it (β from 10⁻⁶) the chains see the prior first and settle in the main basin.
func TestAnnealEscapesTrap(t *testing.T) {
	tg := trapTarget{}
	for _, c := range []struct {
		anneal  float64
		escaped bool
	}{{0, false}, {0.5, true}} {
		cfg := Config{Warmup: 2000, Steps: 1000, Thin: 10, InitialScale: []float64{0.05}, Anneal: c.anneal,
			Init: func(_ *rand.Rand, x []float64) { x[0] = 8 }}
		for seed := range uint64(4) {
			ch, err := NewChain(tg, cfg, seed, 0)
			if err != nil {
				t.Fatal(err)
			}
			ch.Advance(cfg.Warmup, nil, nil)
			if got := math.Abs(ch.State().X[0]) < 2; got != c.escaped {
				t.Errorf("anneal %g, seed %d: at the end of warm-up x = %.3g; want it in the main basin: %v",
					c.anneal, seed, ch.State().X[0], c.escaped)
			}
		}
	}
}

// trapTarget: prior N(0, 10²); log likelihood max(−x²/2·100, −40 − (x−8)²/2·10⁴), i.e. a narrow
// main basin at 0 (sd 0.1) and a trap at 8 (sd 0.01) 40 nats lower.
type trapTarget struct{}

func (trapTarget) Dim() int        { return 1 }
func (trapTarget) Levels() []int   { return []int{0} }
func (trapTarget) NumDerived() int { return 0 }
func (g trapTarget) LogDensity(x, d []float64) float64 {
	lp, ll := g.LogParts(x, d)
	return lp + ll
}
func (trapTarget) LogParts(x, _ []float64) (float64, float64) {
	main := -0.5 * x[0] * x[0] * 100
	trap := -40 - 0.5*(x[0]-8)*(x[0]-8)*1e4
	return -0.5 * x[0] * x[0] / 100, math.Max(main, trap)
}

// levelProposal: the warm-up's level frequencies, with a tenth spread uniformly (every level keeps
// a chance); no counts give the uniform distribution.
func TestLevelProposal(t *testing.T) {
	for _, c := range []struct{ counts, want []float64 }{
		{[]float64{30, 10, 0, 60}, []float64{0.025 + 0.27, 0.025 + 0.09, 0.025, 0.025 + 0.54}},
		{[]float64{0, 0}, []float64{0.5, 0.5}},
		{[]float64{5, 0}, []float64{0.95, 0.05}},
	} {
		got := levelProposal(c.counts)
		sum := 0.0
		for l := range got {
			sum += got[l]
			if math.Abs(got[l]-c.want[l]) > 1e-15 {
				t.Errorf("levelProposal(%v) = %v, want %v", c.counts, got, c.want)
				break
			}
		}
		if math.Abs(sum-1) > 1e-15 {
			t.Errorf("levelProposal(%v) sums to %v", c.counts, sum)
		}
	}
}

// catOnly is a target with one discrete coordinate and nothing else.
type catOnly struct{ w []float64 }

func (c catOnly) Dim() int                          { return 1 }
func (c catOnly) Levels() []int                     { return []int{len(c.w)} }
func (c catOnly) NumDerived() int                   { return 0 }
func (c catOnly) LogDensity(x, _ []float64) float64 { return math.Log(c.w[int(x[0])]) }

// Without continuous coordinates there is no independence move, so the categorical moves must
// go on after warm-up even with Config.Independence set: the level frequencies still match the
// weights (within 5 binomial-ESS standard errors).
func TestDiscreteOnlyKeepsMoving(t *testing.T) {
	tg := catOnly{w: []float64{0.1, 0.6, 0.3}}
	cfg := Config{Warmup: 500, Steps: 30000, Thin: 1, Independence: 0.5,
		Init: func(r *rand.Rand, x []float64) { x[0] = float64(r.IntN(3)) }}
	draws := runChains(t, tg, cfg, 3, 2)
	for k, w := range tg.w {
		ind := make([][]float64, len(draws[0]))
		for c := range ind {
			for _, v := range draws[0][c] {
				ind[c] = append(ind[c], map[bool]float64{true: 1, false: 0}[int(v) == k])
			}
		}
		p, s, _ := pooled(ind)
		if mcse := s / math.Sqrt(ESSBasic(ind)); math.Abs(p-w) > 5*mcse {
			t.Errorf("P(k=%d) = %.4f, want %.4f ± 5·%.4f", k, p, w, mcse)
		}
	}
}
