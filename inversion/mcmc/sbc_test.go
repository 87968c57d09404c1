package mcmc

// Simulation-based calibration (SBC) of the generic sampler, after Talts, Betancourt, Simpson,
// Vehtari & Gelman (2018), "Validating Bayesian inference algorithms with simulation-based
// calibration", arXiv:1804.06788 (T18 below).
//
// For n = 1..N: draw θ* from the prior, simulate data y ~ p(y | θ*), sample p(θ | y) with a Chain,
// keep L roughly independent draws and record, per parameter, the rank of θ* among them (the
// number of draws below θ*). Averaged over the simulated data sets, the posterior is the prior, so
// θ* and the L draws are exchangeable and each rank is uniform on {0, …, L} if the sampler targets
// the right posterior (T18 Theorem 1; the converse does not hold in general, so passing is
// evidence, not proof). Uniformity is tested by Pearson's χ² goodness-of-fit test over B equal bins
// of the L+1 rank values (Pearson 1900, Philosophical Magazine 50(302), 157–175; the rule of at
// least ~5 expected counts per bin is Cochran 1952, "The χ² test of goodness of fit", Annals of
// Mathematical Statistics 23(3), 315–345); B divides L+1 so that every bin holds the same number of
// rank values. Theorem and section numbers are from memory.
//
// Thinning. Autocorrelated draws break the exchangeability argument and give ∪-shaped rank
// histograms even for a correct sampler (T18 §4.1), so the chains keep every k-th post-warm-up
// sweep (Config.Thin = k) with k chosen from a pilot run so that k ≥ 2τ, τ the integrated
// autocorrelation time, for every parameter in nearly every replication (see sbcDefaultSetup). The
// test checks the assumption rather than trusting it: the mean lag-1 autocorrelation of the kept
// draws, over all replications, must be small for every parameter (the kept draws are then close
// to independent, ESS ≈ L); the median ESS of the kept draws is logged too.
//
// Discrete parameters tie with θ* with positive probability. Ties are broken at random: the rank
// is (draws below θ*) + U{0, …, draws equal to θ*}. This is the rank of (θ*, u*) among the pairs
// (θᵢ, uᵢ) ordered lexicographically, with the u independent uniform tie-breakers, and those pairs
// are as exchangeable as the θ themselves, so the rank stays uniform on {0, …, L}.
//
// Power. Two deliberately wrong posteriors are run through the same machinery and must fail the
// χ² test for at least one parameter: the same target without the Hastings correction of the
// log-scale proposals, and a likelihood whose noise variance is stated a factor 2 too large.

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"slices"
	"strings"
	"sync"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// sbcModel is a small linear-Gaussian model with one log-normal and one categorical parameter:
//
//	a ~ N(0, 1)                         (continuous, proposed additively)
//	s ~ LogNormal(0, τ²), s > 0         (continuous, proposed on a log scale: Config.Log)
//	k ~ Categorical(w), k ∈ {0, 1, 2}   (discrete, a mixture indicator with offset m_k)
//	y_j = a·t_j + s·u_j + m_k + σ·ε_j,  ε_j ~ N(0, 1) independent, j = 1..n.
//
// Its unnormalised posterior is the prior density times the Gaussian likelihood, written in the
// sampler's coordinates (a, s, k): for s that includes the 1/s of the log-normal density, which the
// sampler's log-scale Hastings correction y/x must then account for.
type sbcModel struct {
	t, u  []float64 // design columns
	m     []float64 // offset of each mixture component
	w     []float64 // prior weights of the components (sum 1)
	tau   float64   // prior standard deviation of log s
	sigma float64   // noise standard deviation of the simulated data
	// aMax, when positive, truncates the prior of a to [−aMax, aMax] (a box the chain sees
	// through Bounded; see sbcBounded).
	aMax float64
}

func newSBCModel() sbcModel {
	return sbcModel{
		t:     []float64{-2, -1, 0, 1, 2},
		u:     []float64{0.2, 0.6, 1.0, 1.4, 1.8},
		m:     []float64{0, 0.7, 1.5},
		w:     []float64{0.5, 0.3, 0.2},
		tau:   1,
		sigma: 1.5,
	}
}

const sbcDim = 3 // a, s, k

var sbcNames = [sbcDim]string{"a", "s (log-scale moves)", "k (categorical)"}

// draw fills theta = (a, s, k) from the prior.
func (m sbcModel) draw(r *rand.Rand, theta []float64) {
	theta[0] = r.NormFloat64()
	for m.aMax > 0 && math.Abs(theta[0]) > m.aMax {
		theta[0] = r.NormFloat64() // truncated normal by rejection
	}
	theta[1] = math.Exp(m.tau * r.NormFloat64())
	u, k := r.Float64(), 0
	for k < len(m.w)-1 && u >= m.w[k] {
		u -= m.w[k]
		k++
	}
	theta[2] = float64(k)
}

// simulate returns data drawn from p(y | theta).
func (m sbcModel) simulate(r *rand.Rand, theta []float64) []float64 {
	y := make([]float64, len(m.t))
	for j := range y {
		y[j] = m.mean(theta, j) + m.sigma*r.NormFloat64()
	}
	return y
}

func (m sbcModel) mean(theta []float64, j int) float64 {
	return theta[0]*m.t[j] + theta[1]*m.u[j] + m.m[int(theta[2])]
}

// sbcPosterior is p(a, s, k | y) up to a constant, with the likelihood's noise standard deviation
// sigmaLik (the model's own sigma for the correct posterior).
type sbcPosterior struct {
	m        sbcModel
	y        []float64
	sigmaLik float64
}

func (p sbcPosterior) Dim() int        { return sbcDim }
func (p sbcPosterior) Levels() []int   { return []int{0, 0, len(p.m.w)} }
func (p sbcPosterior) NumDerived() int { return 0 }
func (p sbcPosterior) LogDensity(x, d []float64) float64 {
	lp, ll := p.LogParts(x, d)
	return lp + ll
}

// LogParts splits the density into prior and likelihood (Split), for the annealed warm-up.
func (p sbcPosterior) LogParts(x, _ []float64) (float64, float64) {
	a, s, k := x[0], x[1], int(x[2])
	if !(s > 0) || (p.m.aMax > 0 && math.Abs(a) > p.m.aMax) {
		return math.Inf(-1), 0
	}
	ls := math.Log(s) / p.m.tau
	lp := -0.5*a*a - math.Log(s) - 0.5*ls*ls + math.Log(p.m.w[k])
	ll := 0.0
	for j, yj := range p.y {
		r := (yj - p.m.mean(x, j)) / p.sigmaLik
		ll -= 0.5 * r * r
	}
	return lp, ll
}

// sbcBounded is the posterior with its box declared (Bounded): a ∈ [−aMax, aMax], s > 0.
type sbcBounded struct{ sbcPosterior }

func (b sbcBounded) Bounds() (lo, hi []float64) {
	return []float64{-b.m.aMax, 0, math.Inf(-1)}, []float64{b.m.aMax, math.Inf(1), math.Inf(1)}
}

// sbcNoHastings multiplies a target by 1/x_i for its log-scale coordinate i. A multiplicative random
// walk accepts with p(y)/p(x)·(y/x); on p(x)/x that is p(y)/p(x), exactly the acceptance of a
// sampler that forgets the Hastings correction. The chain then samples p(x)/x instead of p(x).
type sbcNoHastings struct {
	Target
	i int
}

func (h sbcNoHastings) LogDensity(x, d []float64) float64 {
	return h.Target.LogDensity(x, d) - math.Log(x[h.i])
}

// sbcSetup fixes the size of an SBC run.
type sbcSetup struct {
	reps   int   // replications N
	draws  int   // kept draws L per replication
	bins   int   // χ² bins B; must divide L+1
	thin   int64 // Config.Thin
	warmup int64 // Config.Warmup
	seed   uint64
	// independence is Config.Independence (0: random-walk and categorical moves only).
	independence float64
	// blocks is Config.Blocks.
	blocks [][]int
	// anneal is Config.Anneal.
	anneal float64
	// pool runs two chains per replication, pools their warm-up half-way and at its end
	// (PoolWarmup) and keeps the draws of the first.
	pool bool
}

// sbcResult holds, per parameter, the ranks of θ* and the thinning check.
type sbcResult struct {
	ranks   [sbcDim][]int
	lag1    [sbcDim]float64   // mean lag-1 autocorrelation of the kept draws over replications
	essKept [sbcDim][]float64 // ESS of the kept draws, per replication (NaN if constant)
}

// sbcRun runs the SBC replications, in parallel over GOMAXPROCS workers; replication n uses its own
// simulation stream and chain seed, so the result does not depend on the scheduling.
func sbcRun(t *testing.T, m sbcModel, setup sbcSetup, target func(y []float64) Target) sbcResult {
	t.Helper()
	if (setup.draws+1)%setup.bins != 0 {
		t.Fatalf("%d bins do not divide %d rank values", setup.bins, setup.draws+1)
	}
	cfg := Config{
		Warmup:       setup.warmup,
		Steps:        int64(setup.draws) * setup.thin,
		Thin:         setup.thin,
		InitialScale: []float64{1, m.tau, 0},
		Log:          []bool{false, true, false},
		Init:         func(r *rand.Rand, x []float64) { m.draw(r, x) },
		Independence: setup.independence,
		Blocks:       setup.blocks,
		Anneal:       setup.anneal,
	}
	var res sbcResult
	lag1 := make([][sbcDim]float64, setup.reps)
	for i := range sbcDim {
		res.ranks[i] = make([]int, setup.reps)
		res.essKept[i] = make([]float64, setup.reps)
	}
	errs := make([]error, setup.reps)
	var wg sync.WaitGroup
	next := make(chan int)
	for range runtime.GOMAXPROCS(0) {
		wg.Go(func() {
			for n := range next {
				errs[n] = sbcReplicate(m, cfg, setup, n, target, &res, lag1)
			}
		})
	}
	for n := range setup.reps {
		next <- n
	}
	close(next)
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			t.Fatal(err)
		}
	}
	for i := range sbcDim {
		s, c := 0.0, 0
		for n := range setup.reps {
			if v := lag1[n][i]; !math.IsNaN(v) {
				s += v
				c++
			}
		}
		res.lag1[i] = s / float64(c)
	}
	return res
}

// sbcReplicate runs replication n and writes its entries of res and lag1 (index n only).
func sbcReplicate(m sbcModel, cfg Config, setup sbcSetup, n int, target func([]float64) Target,
	res *sbcResult, lag1 [][sbcDim]float64) error {
	// The simulation stream is hashed from a seed other than the chain's, so the two are unrelated.
	s1, s2 := Seeds(setup.seed^0x5bc, n)
	r := rand.New(rand.NewPCG(s1, s2))
	theta := make([]float64, sbcDim)
	m.draw(r, theta)
	y := m.simulate(r, theta)
	ch, err := NewChain(target(y), cfg, setup.seed, n)
	if err != nil {
		return fmt.Errorf("replication %d: %w", n, err)
	}
	if setup.pool {
		other, err := NewChain(target(y), cfg, setup.seed, n+setup.reps)
		if err != nil {
			return fmt.Errorf("replication %d: %w", n, err)
		}
		for _, at := range []int64{cfg.Warmup / 2, cfg.Warmup} { // as a run does
			ch.Advance(at, nil, nil)
			other.Advance(at, nil, nil)
			if err := PoolWarmup([]*Chain{ch, other}); err != nil {
				return fmt.Errorf("replication %d: %w", n, err)
			}
		}
	}
	var kept [sbcDim][]float64
	ch.Advance(cfg.Total(), nil, func(_ int64, x, _ []float64, _ float64) {
		for i := range sbcDim {
			kept[i] = append(kept[i], x[i])
		}
	})
	if len(kept[0]) != setup.draws {
		return fmt.Errorf("replication %d: %d draws kept, want %d", n, len(kept[0]), setup.draws)
	}
	for i := range sbcDim {
		below, equal := 0, 0
		for _, v := range kept[i] {
			switch {
			case v < theta[i]:
				below++
			case v == theta[i]:
				equal++
			}
		}
		res.ranks[i][n] = below + r.IntN(equal+1)
		lag1[n][i] = Autocorrelation(kept[i])[1]
		res.essKept[i][n] = ESSBasic([][]float64{kept[i]})
	}
	return nil
}

// sbcChi2 returns Pearson's χ² statistic of the ranks (values 0..L) over bins equal bins, its
// p-value under uniformity (χ² with bins−1 degrees of freedom) and the bin counts.
func sbcChi2(ranks []int, draws, bins int) (chi2, p float64, counts []int) {
	counts = make([]int, bins)
	width := (draws + 1) / bins
	for _, r := range ranks {
		counts[r/width]++
	}
	e := float64(len(ranks)) / float64(bins)
	for _, c := range counts {
		d := float64(c) - e
		chi2 += d * d / e
	}
	return chi2, distuv.ChiSquared{K: float64(bins - 1)}.Survival(chi2), counts
}

// sbcReport logs, per parameter, the χ² statistic, its p-value, the rank histogram and the
// thinning check, and returns the p-values.
func sbcReport(t *testing.T, label string, setup sbcSetup, res sbcResult) [sbcDim]float64 {
	t.Helper()
	var ps [sbcDim]float64
	for i := range sbcDim {
		chi2, p, counts := sbcChi2(res.ranks[i], setup.draws, setup.bins)
		ps[i] = p
		hist := make([]string, len(counts))
		for b, c := range counts {
			hist[b] = fmt.Sprint(c)
		}
		ess := slices.DeleteFunc(slices.Clone(res.essKept[i]), math.IsNaN)
		slices.Sort(ess)
		med := math.NaN()
		if len(ess) > 0 {
			med = ess[len(ess)/2]
		}
		t.Logf("%s %-20s χ²(%d) = %6.2f  p = %.3g  ranks [%s]  kept draws: mean lag-1 ρ %+.3f, median ESS %.0f of %d",
			label, sbcNames[i], setup.bins-1, chi2, p, strings.Join(hist, " "), res.lag1[i], med, setup.draws)
	}
	return ps
}

// sbcDefaultSetup: N = 1000, L = 99, B = 20 (50 expected counts per bin). The thinning k = 50 comes
// from a pilot of 200 replications with k = 1 and 999 kept sweeps: the integrated autocorrelation
// time τ = 999/ESS had medians ≈ 10 (a), 12 (s) and 5 (k) and 95th percentiles ≈ 17, 25 and 14, so
// k = 50 ≥ 2τ in nearly every replication; the kept draws then have median ESS ≈ 95 of 99.
func sbcDefaultSetup() sbcSetup {
	return sbcSetup{reps: 1000, draws: 99, bins: 20, thin: 50, warmup: 1000, seed: 20180418}
}

// TestSBC: the sampler, with additive, log-scale and categorical moves, passes SBC on the model
// above: every parameter's rank histogram is uniform at level 0.01.
func TestSBC(t *testing.T) {
	m := newSBCModel()
	setup := sbcDefaultSetup()
	res := sbcRun(t, m, setup, func(y []float64) Target { return sbcPosterior{m: m, y: y, sigmaLik: m.sigma} })
	ps := sbcReport(t, "correct", setup, res)
	for i, p := range ps {
		if !(p > 0.01) {
			t.Errorf("%s: χ² p = %.3g ≤ 0.01, rank histogram not uniform: the sampler does not target the posterior", sbcNames[i], p)
		}
		// Independent kept draws have E[ρ̂₁] ≈ −1/L; 0.1 allows weak residual correlation only.
		if !(math.Abs(res.lag1[i]) < 0.1) {
			t.Errorf("%s: mean lag-1 autocorrelation of the kept draws %.3f: thinning too weak for SBC", sbcNames[i], res.lag1[i])
		}
	}
}

// TestSBCMoveVariants: the same check with the optional moves switched on — half of the
// post-warm-up continuous moves made by the independence proposal (a multivariate t fitted to the
// warm-up, with the log-scale Jacobian in its ratio), and each continuous parameter also moved as
// a block of its own every sweep (Config.Blocks): the rank histograms must be uniform too.
func TestSBCMoveVariants(t *testing.T) {
	m := newSBCModel()
	boxed := m
	boxed.aMax = 0.8 // P(|a| > 0.8) ≈ 0.42 under N(0, 1): the t proposals often leave the box
	for _, c := range []struct {
		name         string
		independence float64
		blocks       [][]int
		anneal       float64
		pool         bool
		model        sbcModel
		target       func(m sbcModel, y []float64) Target
	}{
		{"independence moves", 0.5, nil, 0, false, m, nil},
		{"extra blocks", 0, [][]int{{0}, {1}}, 0, false, m, nil},
		{"annealed warm-up", 0.5, nil, 0.25, false, m, nil},
		{"pooled warm-up", 0.5, nil, 0, true, m, nil},
		{"box: independence proposals restricted", 0.5, nil, 0, false, boxed,
			func(m sbcModel, y []float64) Target { return sbcBounded{sbcPosterior{m: m, y: y, sigmaLik: m.sigma}} }},
	} {
		t.Run(c.name, func(t *testing.T) {
			setup := sbcDefaultSetup()
			setup.independence, setup.blocks, setup.anneal, setup.pool = c.independence, c.blocks, c.anneal, c.pool
			mk := c.target
			if mk == nil {
				mk = func(m sbcModel, y []float64) Target { return sbcPosterior{m: m, y: y, sigmaLik: m.sigma} }
			}
			res := sbcRun(t, c.model, setup, func(y []float64) Target { return mk(c.model, y) })
			for i, p := range sbcReport(t, c.name, setup, res) {
				if !(p > 0.01) {
					t.Errorf("%s: χ² p = %.3g ≤ 0.01 with %s", sbcNames[i], p, c.name)
				}
			}
		})
	}
}

// TestSBCNegativeControl: the check has power. Two wrong posteriors must each fail it for at least
// one parameter.
func TestSBCNegativeControl(t *testing.T) {
	m := newSBCModel()
	setup := sbcDefaultSetup()
	for _, c := range []struct {
		name   string
		target func(y []float64) Target
	}{
		{"no log-scale Hastings correction", func(y []float64) Target {
			return sbcNoHastings{Target: sbcPosterior{m: m, y: y, sigmaLik: m.sigma}, i: 1}
		}},
		{"noise variance stated 2× too large", func(y []float64) Target {
			return sbcPosterior{m: m, y: y, sigmaLik: m.sigma * math.Sqrt2}
		}},
	} {
		t.Run(c.name, func(t *testing.T) {
			ps := sbcReport(t, "wrong", setup, sbcRun(t, m, setup, c.target))
			if minP := slices.Min(ps[:]); !(minP < 0.01) {
				t.Errorf("smallest χ² p = %.3g ≥ 0.01: SBC did not detect a wrong posterior", minP)
			}
		})
	}
}
