package mcmc

import (
	"encoding/json"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// mvn is a normalised multivariate normal density of dimension ≤ 8, by its lower Cholesky factor.
type mvn struct {
	d       int
	mu      []float64
	l       []float64 // row-major lower factor of the covariance
	logNorm float64   // −(d/2) log 2π − Σ log L_ii
}

func newMVN(mu, cov []float64) mvn {
	d := len(mu)
	l := append([]float64(nil), cov...)
	if !cholesky(l, d) {
		panic("covariance not positive definite")
	}
	m := mvn{d: d, mu: append([]float64(nil), mu...), l: l, logNorm: -0.5 * float64(d) * math.Log(2*math.Pi)}
	for i := range d {
		m.logNorm -= math.Log(l[i*d+i])
	}
	return m
}

func (m mvn) logPdf(x []float64) float64 {
	var z [8]float64
	q := 0.0
	for i := range m.d {
		v := x[i] - m.mu[i]
		for j := range i {
			v -= m.l[i*m.d+j] * z[j]
		}
		z[i] = v / m.l[i*m.d+i]
		q += z[i] * z[i]
	}
	return m.logNorm - 0.5*q
}

// gaussSplit has prior N(μ0, Σ0) and likelihood N(y; x, Σ), both normalised; one derived value
// (x0).
type gaussSplit struct{ prior, lik mvn }

func (g gaussSplit) Dim() int        { return g.prior.d }
func (g gaussSplit) Levels() []int   { return make([]int, g.prior.d) }
func (g gaussSplit) NumDerived() int { return 1 }
func (g gaussSplit) LogParts(x, d []float64) (float64, float64) {
	d[0] = x[0]
	return g.prior.logPdf(x), g.lik.logPdf(x) // N(y; x, Σ) = N(x; y, Σ)
}
func (g gaussSplit) LogDensity(x, d []float64) float64 {
	lp, ll := g.LogParts(x, d)
	return lp + ll
}

// runTempered runs nc tempered chains and returns the β = 1 draws [coord][chain][draw], the final
// ladders and the log-likelihood statistics [chain][replica].
func runTempered(t testing.TB, tg Split, cfg Config, tc TemperConfig, seed uint64, nc int) ([][][]float64, [][]float64, [][]LogLikStat, []*Tempered) {
	t.Helper()
	draws := make([][][]float64, tg.Dim())
	for i := range draws {
		draws[i] = make([][]float64, nc)
	}
	var ladders [][]float64
	var stats [][]LogLikStat
	var tps []*Tempered
	for c := range nc {
		tp, err := NewTempered(tg, cfg, tc, seed, c)
		if err != nil {
			t.Fatal(err)
		}
		tp.Advance(cfg.Total(), nil, func(_ int64, x, _ []float64, _ float64) {
			for i := range x {
				draws[i][c] = append(draws[i][c], x[i])
			}
		})
		ladders = append(ladders, tp.Betas())
		stats = append(stats, tp.LogLikStats())
		tps = append(tps, tp)
	}
	return draws, ladders, stats, tps
}

func symDense(d int, v []float64) *mat.SymDense {
	return mat.NewSymDense(d, append([]float64(nil), v...))
}

// Check 1. Gaussian prior × Gaussian likelihood: the evidence is the Gaussian marginal
// log Z = log N(y; μ0, Σ0 + Σ) and the posterior is N(m, P⁻¹) with P = Σ0⁻¹ + Σ⁻¹,
// m = P⁻¹(Σ0⁻¹μ0 + Σ⁻¹y) (definitions of the Gaussian marginal and of the conjugate normal
// posterior, e.g. Bishop 2006, eqs. 2.115–2.117, from memory). Thermodynamic integration must
// agree within 2 of its own error bars, the bar must be below 0.1 (measured 0.015–0.036, see the
// log), and the β = 1 replica's means and variances must match within 4 MCSE. The 3-D case uses
// 12 replicas: with 8, the adapted ladder's smallest positive β was 0.0053, above the β ≈ 0.003 where
// the likelihood of x0 (sd 0.3 against a prior sd of 5) takes over, and the last interval's
// discretisation error estimate grew to 0.20 (actual error 0.07) — correct, but not a useful bar.
// Adapted ladders differ per chain, so those cases use EvidenceLadders; the fixed-ladder case uses
// Evidence.
// gaussSplitPrior is gaussSplit with exact prior draws (PriorSampler); the prior's covariance
// must be diagonal.
type gaussSplitPrior struct {
	gaussSplit
	mu, cov []float64
}

func (g gaussSplitPrior) SamplePrior(r *rand.Rand, x []float64) {
	d := len(g.mu)
	for i := range x {
		x[i] = g.mu[i] + math.Sqrt(g.cov[i*d+i])*r.NormFloat64()
	}
}

func TestTemperedGaussianEvidence(t *testing.T) {
	cases := []struct {
		name            string
		mu0, cov0, y, s []float64
		adapt           bool
		K               int
		priorDraws      bool // the target is a PriorSampler: the β = 0 replica draws from the prior
	}{
		{"1D", []float64{1}, []float64{9}, []float64{-2}, []float64{0.25}, true, 8, false},
		{"2D correlated likelihood, fixed ladder", []float64{0, 2}, []float64{16, 0, 0, 4}, []float64{1.5, -1}, []float64{0.5, 0.3, 0.3, 0.4}, false, 8, false},
		{"3D", []float64{0, 0, 5}, []float64{25, 0, 0, 0, 1, 0, 0, 0, 4}, []float64{3, 0.5, 2}, []float64{0.09, 0, 0, 0, 0.5, 0, 0, 0, 0.2}, true, 12, false},
		{"3D, prior draws at β = 0", []float64{0, 0, 5}, []float64{25, 0, 0, 0, 1, 0, 0, 0, 4}, []float64{3, 0.5, 2}, []float64{0.09, 0, 0, 0, 0.5, 0, 0, 0, 0.2}, true, 12, true},
	}
	for ci, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			d := len(tc.mu0)
			var tg Split = gaussSplit{prior: newMVN(tc.mu0, tc.cov0), lik: newMVN(tc.y, tc.s)}
			if tc.priorDraws {
				tg = gaussSplitPrior{gaussSplit: tg.(gaussSplit), mu: tc.mu0, cov: tc.cov0}
			}
			sum := make([]float64, d*d)
			for i := range sum {
				sum[i] = tc.cov0[i] + tc.s[i]
			}
			exact := newMVN(tc.mu0, sum).logPdf(tc.y)

			// Analytic posterior.
			var p0, p1 mat.Cholesky
			p0.Factorize(symDense(d, tc.cov0))
			p1.Factorize(symDense(d, tc.s))
			var i0, i1 mat.SymDense
			if err := p0.InverseTo(&i0); err != nil {
				t.Fatal(err)
			}
			if err := p1.InverseTo(&i1); err != nil {
				t.Fatal(err)
			}
			var prec mat.SymDense
			prec.AddSym(&i0, &i1)
			var pc mat.Cholesky
			pc.Factorize(&prec)
			var pcov mat.SymDense
			if err := pc.InverseTo(&pcov); err != nil {
				t.Fatal(err)
			}
			var rhs, a, b, pmean mat.VecDense
			a.MulVec(&i0, mat.NewVecDense(d, append([]float64(nil), tc.mu0...)))
			b.MulVec(&i1, mat.NewVecDense(d, append([]float64(nil), tc.y...)))
			rhs.AddVec(&a, &b)
			pmean.MulVec(&pcov, &rhs)

			init := func(r *rand.Rand, x []float64) {
				for i := range x {
					x[i] = tc.mu0[i] + math.Sqrt(tc.cov0[i*d+i])*r.NormFloat64()
				}
			}
			scale := make([]float64, d)
			for i := range scale {
				scale[i] = math.Sqrt(tc.cov0[i*d+i])
			}
			cfg := Config{Warmup: 2000, Steps: 20000, Thin: 1, InitialScale: scale, Init: init}
			draws, ladders, stats, _ := runTempered(t, tg, cfg, TemperConfig{Replicas: tc.K, AdaptLadder: tc.adapt}, uint64(100+ci), 4)
			var logZ, se float64
			var err error
			if tc.adapt { // every chain has its own ladder
				logZ, se, err = EvidenceLadders(ladders, stats)
			} else {
				logZ, se, err = Evidence(ladders[0], stats)
			}
			if err != nil {
				t.Fatal(err)
			}
			t.Logf("log Z = %.4f ± %.4f, exact %.4f (z = %.2f); ladder %.4g", logZ, se, exact, (logZ-exact)/se, ladders[0])
			if math.Abs(logZ-exact) > 2*se {
				t.Errorf("log Z = %.4f ± %.4f, exact %.4f: more than 2 standard errors apart", logZ, se, exact)
			}
			if se > 0.1 {
				t.Errorf("evidence standard error %.3g too large to be useful", se)
			}
			for i := range d {
				m := pmean.AtVec(i)
				v := pcov.At(i, i)
				sq := make([][]float64, len(draws[i]))
				for c, ch := range draws[i] {
					for _, x := range ch {
						sq[c] = append(sq[c], (x-m)*(x-m))
					}
				}
				gm, _, _ := pooled(draws[i])
				gv, _, _ := pooled(sq)
				em, ev := MCSEMean(draws[i]), MCSEMean(sq)
				t.Logf("x%d: mean %.4f (want %.4f, MCSE %.2g), var %.4f (want %.4f, MCSE %.2g)", i, gm, m, em, gv, v, ev)
				if math.Abs(gm-m) > 4*em || math.Abs(gv-v) > 4*ev {
					t.Errorf("x%d: mean %.4f var %.4f, want %.4f %.4f within 4 MCSE (%.2g, %.2g)", i, gm, gv, m, v, em, ev)
				}
			}
		})
	}
}

// mixture is a flat prior on [−20, 20]^d times a likelihood that is a two-component Gaussian
// mixture w·N(−m·1, s²I) + (1−w)·N(m·1, s²I); the posterior mode weights are w and 1−w up to the
// truncation at ±20 (negligible: > 28 sd away).
type mixture struct {
	d       int
	w, m, s float64
}

func (m mixture) Dim() int        { return m.d }
func (m mixture) Levels() []int   { return make([]int, m.d) }
func (m mixture) NumDerived() int { return 0 }
func (m mixture) LogParts(x, _ []float64) (float64, float64) {
	qa, qb := 0.0, 0.0
	for _, v := range x {
		if v < -20 || v > 20 {
			return math.Inf(-1), 0
		}
		a := (v + m.m) / m.s
		b := (v - m.m) / m.s
		qa += a * a
		qb += b * b
	}
	la := math.Log(m.w) - 0.5*qa
	lb := math.Log(1-m.w) - 0.5*qb
	hi := math.Max(la, lb)
	return -float64(m.d) * math.Log(40), hi + math.Log(math.Exp(la-hi)+math.Exp(lb-hi)) - float64(m.d)*math.Log(m.s*math.Sqrt(2*math.Pi))
}
func (m mixture) LogDensity(x, d []float64) float64 {
	lp, ll := m.LogParts(x, d)
	return lp + ll
}

// indicatorMCSE returns the pooled fraction of draws with f true, its MCSE √(p(1−p)/ESS_bulk)
// (ESSBulk of the indicator; Vehtari et al. 2021) and the per-chain fractions.
func indicatorMCSE(draws [][]float64, f func(float64) bool) (p, mcse float64, per []float64) {
	ind := make([][]float64, len(draws))
	for c, ch := range draws {
		n := 0.0
		for _, x := range ch {
			v := 0.0
			if f(x) {
				v = 1
				n++
			}
			ind[c] = append(ind[c], v)
		}
		per = append(per, n/float64(len(ch)))
	}
	p, _, _ = pooled(ind)
	return p, math.Sqrt(p * (1 - p) / ESSBulk(ind)), per
}

// Check 2. Two modes at ±(3.54, 3.54) (sd 0.5, 10 apart; a barrier of ≈ e⁻⁵⁰) with weights
// 0.3/0.7: with tempering the β = 1 fraction in the upper mode is 0.7 within 3 MCSE (MCSE of an
// indicator from its bulk ESS; Vehtari et al. 2021). Plain adaptive Metropolis with the same number
// of target evaluations (K × sweeps) never leaves the mode it starts in (the expected failure; the
// mixture weights are the target's definition). In one dimension (±5, sd 0.5) plain adaptive
// Metropolis does cross: its warm-up covariance spans both modes and the proposal jumps the
// barrier; measured, hence two dimensions here.
func TestTemperedBimodal(t *testing.T) {
	tg := mixture{d: 2, w: 0.3, m: 5 / math.Sqrt2, s: 0.5}
	init := func(r *rand.Rand, x []float64) { x[0], x[1] = -20+40*r.Float64(), -20+40*r.Float64() }
	const K, nc = 8, 4
	cfg := Config{Warmup: 2000, Steps: 20000, Thin: 1, InitialScale: []float64{2, 2}, Init: init}
	draws, _, _, tps := runTempered(t, tg, cfg, TemperConfig{Replicas: K, AdaptLadder: true}, 11, nc)
	right := func(x float64) bool { return x > 0 }
	p, mcse, per := indicatorMCSE(draws[0], right)
	for c := range draws[0] { // x0 and x1 must agree on the mode in every draw
		for i, x := range draws[0][c] {
			if right(x) != right(draws[1][c][i]) {
				t.Fatalf("chain %d draw %d: (%g, %g) between the modes", c, i, x, draws[1][c][i])
			}
		}
	}
	prop, acc := tps[0].SwapCounts()
	t.Logf("tempered: P(x > 0) = %.4f ± %.4f (want 0.7; per chain %.3f), ladder %.3g, swaps accepted %v of %v", p, mcse, per, tps[0].Betas(), acc, prop)
	if math.Abs(p-0.7) > 3*mcse {
		t.Errorf("tempered: P(x > 0) = %.4f, want 0.7 ± 3·%.4f", p, mcse)
	}
	if mcse > 0.05 {
		t.Errorf("tempered: MCSE %.3g too large for a meaningful check", mcse)
	}

	pcfg := Config{Warmup: K * cfg.Warmup, Steps: K * cfg.Steps, Thin: K, InitialScale: []float64{2, 2}, Init: init}
	plain := runChains(t, tg, pcfg, 11, nc)
	pp, pm, pper := indicatorMCSE(plain[0], right)
	t.Logf("plain Metropolis, same target evaluations: P(x > 0) = %.4f ± %.4g (per chain %.3f)", pp, pm, pper)
	for c, f := range pper {
		if f != 0 && f != 1 {
			t.Errorf("plain chain %d visited both modes (fraction %.4f): the test no longer shows what tempering adds", c, f)
		}
	}
}

// discreteSplit has a categorical coordinate k (2 levels, flat prior) and x with a flat prior on
// [−20, 20]; the likelihood is w_k·N(x; m_k, s²). The posterior of k is w (truncation negligible),
// but at β = 1 moving k at fixed x, or x at fixed k, across the gap of 16 sd is hopeless.
type discreteSplit struct{ w, m [2]float64 }

func (d discreteSplit) Dim() int        { return 2 }
func (d discreteSplit) Levels() []int   { return []int{0, 2} }
func (d discreteSplit) NumDerived() int { return 2 }
func (d discreteSplit) LogParts(x, der []float64) (float64, float64) {
	k := int(x[1])
	der[0], der[1] = float64(k), x[0]*x[0]
	if x[0] < -20 || x[0] > 20 {
		return math.Inf(-1), 0
	}
	z := (x[0] - d.m[k]) / 0.5
	return -math.Log(40) - math.Log(2), math.Log(d.w[k]) - 0.5*z*z - math.Log(0.5*math.Sqrt(2*math.Pi))
}
func (d discreteSplit) LogDensity(x, der []float64) float64 {
	lp, ll := d.LogParts(x, der)
	return lp + ll
}

func discreteInit(r *rand.Rand, x []float64) { x[0] = -20 + 40*r.Float64(); x[1] = float64(r.IntN(2)) }

// Check 3. Categorical moves under tempering: level 0 → x ~ N(−4, 0.5²), level 1 → x ~ N(4, 0.5²),
// weights 0.4/0.6 (target definition). With tempering the β = 1 level frequencies match within
// 3 MCSE (bulk-ESS MCSE of the indicator); a plain chain with the same target evaluations keeps
// its starting level.
func TestTemperedDiscreteLevels(t *testing.T) {
	tg := discreteSplit{w: [2]float64{0.4, 0.6}, m: [2]float64{-4, 4}}
	const K, nc = 8, 4
	cfg := Config{Warmup: 2000, Steps: 20000, Thin: 1, InitialScale: []float64{2, 0}, Init: discreteInit}
	draws, _, _, tps := runTempered(t, tg, cfg, TemperConfig{Replicas: K, AdaptLadder: true}, 23, nc)
	one := func(v float64) bool { return v == 1 }
	p, mcse, per := indicatorMCSE(draws[1], one)
	c0 := tps[0].Counts()
	t.Logf("tempered: P(k = 1) = %.4f ± %.4f (want 0.6; per chain %.3f); replica 0 discrete moves accepted %d of %d; hottest replica %d of %d",
		p, mcse, per, c0.DiscreteAccepted[1], c0.DiscreteProposed[1], tps[0].ReplicaCounts(K - 1).DiscreteAccepted[1], tps[0].ReplicaCounts(K - 1).DiscreteProposed[1])
	if math.Abs(p-0.6) > 3*mcse {
		t.Errorf("tempered: P(k = 1) = %.4f, want 0.6 ± 3·%.4f", p, mcse)
	}
	if mcse > 0.05 {
		t.Errorf("tempered: MCSE %.3g too large for a meaningful check", mcse)
	}
	// x given k: the sign of x must follow the level in every β = 1 draw.
	for c := range draws[0] {
		for i, x := range draws[0][c] {
			if (x > 0) != (draws[1][c][i] == 1) {
				t.Fatalf("chain %d draw %d: x = %g with level %g", c, i, x, draws[1][c][i])
			}
		}
	}
	pcfg := Config{Warmup: K * cfg.Warmup, Steps: K * cfg.Steps, Thin: K, InitialScale: []float64{2, 0}, Init: discreteInit}
	plain := runChains(t, tg, pcfg, 23, nc)
	pp, _, pper := indicatorMCSE(plain[1], one)
	t.Logf("plain Metropolis: P(k = 1) = %.4f (per chain %.3f)", pp, pper)
	for c, f := range pper {
		if f != 0 && f != 1 {
			t.Errorf("plain chain %d switched levels (fraction %.4f): the barrier is too weak for this test", c, f)
		}
	}
}

// Check 4. A tempered chain stopped after any number of sweeps (including mid-warm-up while the
// ladder adapts, and at the warm-up boundary), serialised to JSON, restored and continued must emit
// exactly the draws of an uninterrupted chain and end in the same state, bit for bit (the rule of
// DEVELOPERS.md, "Determinism and exact resume"). Two runs with one seed must agree; another seed
// must differ.
func TestTemperedResumeEqualsUninterrupted(t *testing.T) {
	tg := discreteSplit{w: [2]float64{0.4, 0.6}, m: [2]float64{-1, 1}}
	cfg := Config{Warmup: 300, Steps: 700, Thin: 3, InitialScale: []float64{2, 0}, Init: discreteInit}
	tc := TemperConfig{Replicas: 4, BetaMin: 0.01, AdaptLadder: true}
	type row struct {
		draw int64
		x    []float64
		der  []float64
		lp   float64
	}
	collect := func(rows *[]row) Emit {
		return func(d int64, x, der []float64, lp float64) {
			*rows = append(*rows, row{d, append([]float64(nil), x...), append([]float64(nil), der...), lp})
		}
	}
	run := func(seed uint64) ([]row, TemperedState) {
		var rows []row
		tp, err := NewTempered(tg, cfg, tc, seed, 1)
		if err != nil {
			t.Fatal(err)
		}
		tp.Advance(cfg.Total(), nil, collect(&rows))
		return rows, tp.State()
	}
	want, wantState := run(99)
	again, againState := run(99)
	if !reflect.DeepEqual(want, again) || !reflect.DeepEqual(wantState, againState) {
		t.Fatal("two runs with the same seed differ")
	}
	other, _ := run(100)
	if reflect.DeepEqual(want, other) {
		t.Fatal("runs with different seeds agree")
	}
	if int64(len(want)) != cfg.Kept() {
		t.Errorf("emitted %d draws, want %d", len(want), cfg.Kept())
	}
	if len(want[0].der) != tg.NumDerived() {
		t.Errorf("emitted %d derived values, want the target's %d", len(want[0].der), tg.NumDerived())
	}
	if wantState.Betas[1] == math.Pow(0.01, 0.5) {
		t.Error("the ladder did not adapt: the resume test would not exercise its state")
	}

	for _, cuts := range [][]int64{{1}, {2, 3, 77, 150}, {299, 300, 301}, {10, 151, 500, 999}} {
		var got []row
		tp, err := NewTempered(tg, cfg, tc, 99, 1)
		if err != nil {
			t.Fatal(err)
		}
		for _, cut := range append(cuts, cfg.Total()) {
			tp.Advance(cut, nil, collect(&got))
			b, err := json.Marshal(tp.State())
			if err != nil {
				t.Fatal(err)
			}
			var st TemperedState
			if err := json.Unmarshal(b, &st); err != nil {
				t.Fatal(err)
			}
			if tp, err = RestoreTempered(tg, cfg, tc, st); err != nil {
				t.Fatal(err)
			}
		}
		if !reflect.DeepEqual(got, want) {
			t.Errorf("cuts %v: resumed draws differ from uninterrupted ones", cuts)
		}
		if st := tp.State(); !reflect.DeepEqual(st, wantState) {
			t.Errorf("cuts %v: final state differs", cuts)
		}
	}

	// State is a deep copy.
	tp, err := NewTempered(tg, cfg, tc, 99, 1)
	if err != nil {
		t.Fatal(err)
	}
	tp.Advance(400, nil, nil)
	s := tp.State()
	s.Betas[1], s.Replicas[0].X[0], s.LogLik[0].Batches[0] = -1, -1, -1
	if s2 := tp.State(); s2.Betas[1] == -1 || s2.Replicas[0].X[0] == -1 || s2.LogLik[0].Batches[0] == -1 {
		t.Error("State shares memory with the chain")
	}
}

// Check 5. Ladder adaptation (Vousden, Farr & Mandel 2016) equalises the adjacent exchange
// acceptance rates: on a 2-D Gaussian (prior sd 10, likelihood sd 0.2 — a prior-to-posterior volume
// ratio of 2500) the post-warm-up rates after adaptation must satisfy max/min < 1.5 (bound set with
// margin above the measured spread, see the log), and the spread must be smaller than that of the
// fixed geometric ladder.
func TestLadderAdaptation(t *testing.T) {
	tg := gaussSplit{prior: newMVN([]float64{0, 0}, []float64{100, 0, 0, 100}), lik: newMVN([]float64{1, -1}, []float64{0.04, 0, 0, 0.04})}
	init := func(r *rand.Rand, x []float64) { x[0], x[1] = 10*r.NormFloat64(), 10*r.NormFloat64() }
	cfg := Config{Warmup: 4000, Steps: 8000, Thin: 1, InitialScale: []float64{10, 10}, Init: init}
	spread := func(adapt bool) (float64, []float64, []float64) {
		tc := TemperConfig{Replicas: 6, BetaMin: 1e-4, AdaptLadder: adapt}
		_, ladders, _, tps := runTempered(t, tg, cfg, tc, 5, 4)
		rates := make([]float64, tc.Replicas-1)
		for _, tp := range tps {
			prop, acc := tp.SwapCounts()
			for p := range rates {
				rates[p] += float64(acc[p][1]) / float64(prop[p][1]) / float64(len(tps))
			}
		}
		lo, hi := math.Inf(1), 0.0
		for _, r := range rates {
			lo, hi = math.Min(lo, r), math.Max(hi, r)
		}
		return hi / lo, rates, ladders[0]
	}
	sa, ra, la := spread(true)
	sf, rf, lf := spread(false)
	t.Logf("adapted: rates %.3f, max/min %.3f, ladder %.4g", ra, sa, la)
	t.Logf("fixed geometric: rates %.3f, max/min %.3f, ladder %.4g", rf, sf, lf)
	if !(sa < 1.5) {
		t.Errorf("adapted ladder: exchange acceptance max/min = %.3f, want < 1.5", sa)
	}
	if !(sa < sf) {
		t.Errorf("adaptation did not reduce the spread: %.3f vs %.3f", sa, sf)
	}
}

// halfLik has a flat prior on [−5, 5] and a likelihood that is zero (log −Inf) for x < 0: no
// replica, not even the β = 0 one, may ever hold a point with a non-finite log likelihood.
type halfLik struct{}

func (halfLik) Dim() int        { return 1 }
func (halfLik) Levels() []int   { return []int{0} }
func (halfLik) NumDerived() int { return 0 }
func (halfLik) LogParts(x, _ []float64) (float64, float64) {
	if x[0] < -5 || x[0] > 5 {
		return math.Inf(-1), 0
	}
	if x[0] < 0 {
		return -math.Log(10), math.Inf(-1)
	}
	return -math.Log(10), -x[0]
}
func (h halfLik) LogDensity(x, d []float64) float64 {
	lp, ll := h.LogParts(x, d)
	return lp + ll
}

// A zero likelihood is outside the support at every temperature (design rule, no source).
func TestTemperedNonFiniteLikelihood(t *testing.T) {
	cfg := Config{Warmup: 200, Steps: 2000, Thin: 1, InitialScale: []float64{3},
		Init: func(r *rand.Rand, x []float64) { x[0] = -5 + 10*r.Float64() }}
	tp, err := NewTempered(halfLik{}, cfg, TemperConfig{Replicas: 3, AdaptLadder: true}, 3, 0)
	if err != nil {
		t.Fatal(err)
	}
	for !tp.Done() {
		tp.Advance(tp.Iter()+1, nil, nil)
		for k, r := range tp.State().Replicas {
			if r.X[0] < 0 || !finite(r.Derived[1]) || !finite(r.LogDensity) {
				t.Fatalf("sweep %d replica %d holds x = %g, log lik %g", tp.Iter(), k, r.X[0], r.Derived[1])
			}
		}
	}
	var inv int64
	for k := range 3 {
		c := tp.ReplicaCounts(k)
		inv += c.Invalid[0] + c.Invalid[1]
	}
	if inv == 0 {
		t.Error("no invalid proposals: the test did not exercise the zero-likelihood region")
	}
	// Mean log likelihood at β = 0: x ~ U(0, 5) → E[−x] = −2.5 (flat prior restricted to the support
	// of L; definition of the uniform).
	s := tp.LogLikStats()[2]
	if math.Abs(s.Mean+2.5) > 5*s.MCSE() {
		t.Errorf("β = 0 replica: mean log lik %.3f, want −2.5 ± 5·%.3f", s.Mean, s.MCSE())
	}
}

// Advance honours stop (checked before each sweep) and until; counters split warm-up and
// sampling; a state restored under another replica count is refused (API contract, no source).
func TestTemperedStopAndCounts(t *testing.T) {
	tg := discreteSplit{w: [2]float64{0.5, 0.5}, m: [2]float64{-1, 1}}
	cfg := Config{Warmup: 100, Steps: 300, Thin: 7, InitialScale: []float64{1, 0}, Init: discreteInit}
	tc := TemperConfig{Replicas: 3, AdaptLadder: true}
	tp, err := NewTempered(tg, cfg, tc, 4, 2)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	if ran := tp.Advance(cfg.Total(), func() bool { n++; return n > 50 }, nil); ran != 50 || tp.Iter() != 50 {
		t.Fatalf("stop after 50 sweeps: ran %d, iter %d", ran, tp.Iter())
	}
	if ran := tp.Advance(70, nil, nil); ran != 20 || tp.Done() {
		t.Fatalf("advance to 70: ran %d, done %v", ran, tp.Done())
	}
	draws := 0
	tp.Advance(cfg.Total()+5, nil, func(int64, []float64, []float64, float64) { draws++ })
	if !tp.Done() || tp.Iter() != cfg.Total() || int64(draws) != cfg.Kept() {
		t.Errorf("done %v iter %d draws %d, want %d sweeps and %d draws", tp.Done(), tp.Iter(), draws, cfg.Total(), cfg.Kept())
	}
	c := tp.Counts()
	if c.Proposed != [2]int64{100, 300} || c.DiscreteProposed != [2]int64{100, 300} {
		t.Errorf("replica 0 counters %+v", c)
	}
	prop, acc := tp.SwapCounts()
	for p := range prop {
		if prop[p] != [2]int64{100, 300} || acc[p][0] > 100 || acc[p][1] > 300 || acc[p][1] == 0 {
			t.Errorf("pair %d: proposed %v accepted %v", p, prop[p], acc[p])
		}
	}
	for k, s := range tp.LogLikStats() {
		if s.N != cfg.Steps {
			t.Errorf("replica %d: log-likelihood statistics over %d sweeps, want the %d post-warm-up ones", k, s.N, cfg.Steps)
		}
	}
	if _, err := RestoreTempered(tg, cfg, TemperConfig{Replicas: 4}, tp.State()); err == nil {
		t.Error("restore with 4 replicas from a 3-replica state: want an error")
	}
	st := tp.State()
	st.Betas[1] = 2
	if _, err := RestoreTempered(tg, cfg, tc, st); err == nil {
		t.Error("restore with a non-decreasing ladder: want an error")
	}
}

func TestTemperConfigValidate(t *testing.T) {
	for _, tc := range []TemperConfig{{Replicas: 1}, {Replicas: 4, BetaMin: 1}, {Replicas: 4, BetaMin: -0.1}, {Replicas: 4, BetaMin: math.NaN()}} {
		if tc.Validate() == nil {
			t.Errorf("%+v: want an error", tc)
		}
	}
	if err := (TemperConfig{Replicas: 2}).Validate(); err != nil {
		t.Errorf("two replicas: %v", err)
	}
	b, g := initialLadder(5, 1e-3)
	want := []float64{1, math.Pow(1e-3, 1.0/3), math.Pow(1e-3, 2.0/3), 1e-3, 0}
	for k := range b {
		if math.Abs(b[k]-want[k]) > 1e-15 {
			t.Errorf("initial ladder %v, want %v", b, want)
		}
	}
	if len(g) != 3 {
		t.Errorf("%d log gaps, want 3", len(g))
	}
	// Two replicas: nothing to adapt; the ladder is {1, 0}.
	tp, err := NewTempered(mixture{d: 1, w: 0.5, m: 1, s: 1}, Config{Warmup: 10, Steps: 10, Thin: 1,
		Init: func(r *rand.Rand, x []float64) { x[0] = r.NormFloat64() }}, TemperConfig{Replicas: 2, AdaptLadder: true}, 1, 0)
	if err != nil {
		t.Fatal(err)
	}
	tp.Advance(20, nil, nil)
	if !reflect.DeepEqual(tp.Betas(), []float64{1, 0}) || !tp.Done() {
		t.Errorf("two replicas: ladder %v, done %v", tp.Betas(), tp.Done())
	}
}

// zeroSplit is a cheap Split (a standard normal likelihood in x0, flat prior) for the benchmark.
type zeroSplit struct{ d int }

func (z zeroSplit) Dim() int        { return z.d }
func (z zeroSplit) Levels() []int   { return make([]int, z.d) }
func (z zeroSplit) NumDerived() int { return 2 }
func (z zeroSplit) LogParts(x, d []float64) (float64, float64) {
	return 0, -0.5 * x[0] * x[0]
}
func (z zeroSplit) LogDensity(x, d []float64) float64 { return -0.5 * x[0] * x[0] }

// BenchmarkTemperedSweep reports the sampler's overhead per tempered sweep (8 parameters, 4
// replicas) and per parameter per replica-sweep (the project target is ≤ 2 µs per parameter per
// step, forward model excluded).
func BenchmarkTemperedSweep(b *testing.B) {
	const d, K = 8, 4
	cfg := Config{Warmup: 0, Steps: int64(b.N) + 1, Thin: 1, Init: func(r *rand.Rand, x []float64) {}}
	tp, err := NewTempered(zeroSplit{d: d}, cfg, TemperConfig{Replicas: K}, 1, 0)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	b.ResetTimer()
	tp.Advance(int64(b.N), nil, func(int64, []float64, []float64, float64) {})
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/(d*K), "ns/param/replica-sweep")
}
