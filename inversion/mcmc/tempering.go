package mcmc

// Parallel tempering (replica exchange; Swendsen & Wang 1986, Geyer 1991 — from memory): K
// replicas of a target whose log density splits into log prior + log likelihood run at inverse
// temperatures 1 = β₀ > β₁ > … > β_{K−1} = 0, replica k sampling π(x)·L(x)^β_k, and adjacent
// replicas propose to exchange their points after every sweep. Hot replicas cross the barriers
// between modes that a β = 1 chain cannot; exchanges carry those crossings down to β = 1.
//
// Design:
//   - Each replica is an ordinary Chain (its own adaptive block proposal, categorical moves,
//     counters and random stream) on a tempered view of the target whose derived values carry the
//     log prior and log likelihood of the current point after the target's own derived values, so
//     that a change of β or an exchange recomputes a replica's log density without re-evaluating
//     the target.
//   - Random streams: replica k of chain c uses SHA-256("plumb/replica-seed", Seeds(seed, c), k),
//     the exchanges SHA-256("plumb/swap-seed", Seeds(seed, c)); hashing gives unrelated streams
//     (Go's PCG has a fixed increment, see Seeds).
//   - A sweep is: every replica sweeps once (in order k = 0..K−1), then one round of exchange
//     proposals between adjacent pairs, from the hottest pair (K−2, K−1) down to (0, 1), so that a
//     point can travel several rungs in one round; each pair uses one uniform of the swap stream.
//     Each exchange satisfies detailed balance for the product of the tempered densities, so the
//     sequence does too (composition of invariant kernels).
//   - The ladder adapts during warm-up only (Vousden, Farr & Mandel 2016, MNRAS 455, 1919), from
//     the first sweep and alongside the replicas' own proposal adaptation, and is frozen
//     afterwards, so the post-warm-up chain is homogeneous and its log-likelihood statistics
//     belong to one fixed ladder. Each chain adapts its own ladder (so that a chain depends only on
//     its own streams, whatever the worker count): pool the evidence of adapted chains with
//     EvidenceLadders, or with Evidence when the ladder is not adapted.
//   - Support: a point is accepted (and a replica started) only if both its log prior and its log
//     likelihood are finite, at every temperature: the β = 0 replica samples the prior restricted
//     to L > 0, since an exchange with it needs its log likelihood. A zero likelihood is therefore
//     outside the support everywhere (counted as an invalid proposal, as in Chain).
//   - Tempered calls only LogParts, never the target's LogDensity.
import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Ladder-adaptation constants of Vousden, Farr & Mandel (2016): the log temperature gaps
// S_k = log(T_k − T_{k−1}) move by κ(t)·(A_k − A_{k+1}) after the exchange round of sweep t, with
// κ(t) = (1/ν)·t₀/(t + t₀). Their values (from memory: ν = 100, a lag t₀ = 10⁴) suit long runs
// with many walkers per temperature; with one replica per temperature and warm-ups of 10³–10⁴
// sweeps they leave the ladder unconverged. We use ν = 10, t₀ = 300, chosen by measurement on the
// 2-D Gaussian of TestLadderAdaptation: the adjacent acceptance rates then come out more nearly
// equal after warm-ups of that length (see DEVELOPERS.md, "Measurements behind design choices"). The gain still
// decays as 1/t, so the ladder settles; at the end of a warm-up of W sweeps κ ≈ 30/W. A_k is the
// exchange acceptance probability min(1, r) of pair (k−1, k) in that round rather than its 0/1
// outcome (same expectation, less noise; our choice). The log gaps are kept within
// [logGapMin, logGapMax] so that no temperature can overflow.
const (
	ladderNu       = 10.0
	ladderLag      = 300.0
	logGapMin      = -30.0
	logGapMax      = 60.0
	defaultBetaMin = 1e-3
)

// TemperConfig sets parallel tempering.
type TemperConfig struct {
	// Replicas is the number of replicas K ≥ 2; replica 0 has β = 1, replica K−1 has β = 0 (the
	// prior). The ends are fixed.
	Replicas int
	// BetaMin sets the initial ladder: geometric in β between 1 and BetaMin for replicas 1..K−2,
	// β_k = BetaMin^(k/(K−2)). It must lie in (0, 1); 0 means the default 1e-3.
	BetaMin float64
	// AdaptLadder adapts the interior β's during warm-up toward equal adjacent exchange
	// acceptance (Vousden, Farr & Mandel 2016); the ladder is frozen afterwards.
	AdaptLadder bool
}

// Validate reports a tempering configuration that cannot run.
func (tc TemperConfig) Validate() error {
	switch {
	case tc.Replicas < 2:
		return fmt.Errorf("tempering: %d replicas, need at least 2", tc.Replicas)
	case math.IsNaN(tc.BetaMin) || tc.BetaMin < 0 || tc.BetaMin >= 1:
		return fmt.Errorf("tempering: smallest initial β %g not in (0, 1)", tc.BetaMin)
	}
	return nil
}

func (tc TemperConfig) betaMin() float64 {
	if tc.BetaMin == 0 {
		return defaultBetaMin
	}
	return tc.BetaMin
}

// temperedView is the density logPrior + β·logLik of a Split target. Its derived values are the
// target's followed by logPrior and logLik. A point is valid only if both parts are finite: the
// β = 0 replica needs a finite log likelihood too, or an exchange with it would be undefined.
type temperedView struct {
	t    Split
	n    int // the target's number of derived values
	beta float64
}

// Bounds passes the target's box through (Bounded), so that tempered replicas use it too.
func (v *temperedView) Bounds() (lo, hi []float64) {
	if b, ok := v.t.(Bounded); ok {
		return b.Bounds()
	}
	return nil, nil
}

func (v *temperedView) Dim() int        { return v.t.Dim() }
func (v *temperedView) Levels() []int   { return v.t.Levels() }
func (v *temperedView) NumDerived() int { return v.n + 2 }
func (v *temperedView) LogDensity(x, d []float64) float64 {
	lp, ll := v.t.LogParts(x, d[:v.n])
	d[v.n], d[v.n+1] = lp, ll
	if !finite(lp) || !finite(ll) {
		return math.Inf(-1)
	}
	return lp + v.beta*ll
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// TemperedState is everything a tempered chain needs to continue exactly where it stopped. It
// round-trips through encoding/json.
type TemperedState struct {
	// Chain is the chain index.
	Chain int `json:"chain"`
	// Iter is the number of completed sweeps (warm-up included).
	Iter int64 `json:"iter"`
	// Draws is the number of emitted draws.
	Draws int64 `json:"draws"`
	// Replicas are the states of the replicas' chains; replica k's derived values end with its
	// current log prior and log likelihood.
	Replicas []State `json:"replicas"`
	// Betas is the current ladder, 1 = Betas[0] > … > Betas[K−1] = 0.
	Betas []float64 `json:"betas"`
	// LogGaps is the ladder-adaptation state: log(T_k − T_{k−1}) for the interior replicas
	// k = 1..K−2 (T = 1/β).
	LogGaps []float64 `json:"log_gaps"`
	// SwapProposed and SwapAccepted count exchanges of each adjacent pair (k, k+1);
	// [0] is warm-up, [1] sampling.
	SwapProposed [][2]int64 `json:"swap_proposed"`
	SwapAccepted [][2]int64 `json:"swap_accepted"`
	// LogLik accumulates each replica's log likelihood over the post-warm-up sweeps.
	LogLik []LogLikStat `json:"log_lik"`
	// RNG is the marshalled PCG state of the exchange stream.
	RNG []byte `json:"rng"`
}

// Tempered is one tempered chain: K replicas of the target at inverse temperatures
// 1 = β₀ > … > β_{K−1} = 0, each moved by the ordinary adaptive sweep (continuous block +
// categorical moves) of density logPrior + β·logLik, followed by a round of exchange proposals
// between adjacent replicas. Only replica 0's points are emitted as draws.
type Tempered struct {
	t     Split
	cfg   Config
	tc    TemperConfig
	n     int
	views []*temperedView
	reps  []*Chain
	pcg   *rand.PCG
	rng   *rand.Rand
	st    TemperedState // Replicas and RNG are kept in reps and pcg
	acc   []float64     // exchange acceptance probabilities of the last round, per pair
	prior PriorSampler  // the target as a PriorSampler (moves the β = 0 replica), or nil
}

// replicaSeeds derives the PCG seed words of replica k from the chain's seed words.
func replicaSeeds(s1, s2 uint64, k int) (uint64, uint64) {
	return HashSeeds("plumb/replica-seed", s1, s2, uint64(k))
}

// swapSeeds derives the PCG seed words of the exchange stream from the chain's seed words.
func swapSeeds(s1, s2 uint64) (uint64, uint64) {
	return HashSeeds("plumb/swap-seed", s1, s2)
}

// initialLadder returns the geometric ladder β_k = βmin^(k/(K−2)) for k = 1..K−2 with β₀ = 1,
// β_{K−1} = 0, and its log gaps.
func initialLadder(K int, bmin float64) (betas, gaps []float64) {
	betas = make([]float64, K)
	betas[0] = 1
	for k := 1; k < K-1; k++ {
		betas[k] = math.Pow(bmin, float64(k)/float64(K-2))
	}
	gaps = make([]float64, K-2)
	for k := 1; k < K-1; k++ {
		gaps[k-1] = math.Log(1/betas[k] - 1/betas[k-1])
	}
	return betas, gaps
}

// NewTempered starts tempered chain c of a run with the given seed; every replica starts at its
// own valid point drawn by cfg.Init from its own stream.
func NewTempered(t Split, cfg Config, tc TemperConfig, seed uint64, c int) (*Tempered, error) {
	if err := cfg.Validate(); err != nil {
		return nil, fmt.Errorf("tempered chain %d: %w", c, err)
	}
	if err := tc.Validate(); err != nil {
		return nil, fmt.Errorf("tempered chain %d: %w", c, err)
	}
	K := tc.Replicas
	betas, gaps := initialLadder(K, tc.betaMin())
	tp := newTempered(t, cfg, tc)
	s1, s2 := Seeds(seed, c)
	for k := range K {
		v := &temperedView{t: t, n: tp.n, beta: betas[k]}
		r1, r2 := replicaSeeds(s1, s2, k)
		ch, err := startChain(v, cfg, rand.NewPCG(r1, r2), c)
		if err != nil {
			return nil, fmt.Errorf("tempered chain %d, replica %d (β = %g): %w", c, k, betas[k], err)
		}
		tp.views = append(tp.views, v)
		tp.reps = append(tp.reps, ch)
	}
	w1, w2 := swapSeeds(s1, s2)
	tp.pcg = rand.NewPCG(w1, w2)
	tp.rng = rand.New(tp.pcg)
	tp.st = TemperedState{
		Chain:        c,
		Betas:        betas,
		LogGaps:      gaps,
		SwapProposed: make([][2]int64, K-1),
		SwapAccepted: make([][2]int64, K-1),
		LogLik:       make([]LogLikStat, K),
	}
	for k := range tp.st.LogLik {
		tp.st.LogLik[k].BatchSize = 1
	}
	return tp, nil
}

func newTempered(t Split, cfg Config, tc TemperConfig) *Tempered {
	prior, _ := t.(PriorSampler)
	return &Tempered{t: t, cfg: cfg, tc: tc, n: t.NumDerived(), acc: make([]float64, tc.Replicas-1), prior: prior}
}

// RestoreTempered rebuilds a tempered chain from a saved state; the target and both configs must
// be the ones it ran with.
func RestoreTempered(t Split, cfg Config, tc TemperConfig, st TemperedState) (*Tempered, error) {
	if err := cfg.Validate(); err != nil {
		return nil, fmt.Errorf("tempered chain %d: %w", st.Chain, err)
	}
	if err := tc.Validate(); err != nil {
		return nil, fmt.Errorf("tempered chain %d: %w", st.Chain, err)
	}
	K := tc.Replicas
	switch {
	case len(st.Replicas) != K || len(st.Betas) != K || len(st.LogGaps) != K-2 ||
		len(st.SwapProposed) != K-1 || len(st.SwapAccepted) != K-1 || len(st.LogLik) != K:
		return nil, fmt.Errorf("tempered chain %d: state does not describe %d replicas", st.Chain, K)
	case st.Betas[0] != 1 || st.Betas[K-1] != 0:
		return nil, fmt.Errorf("tempered chain %d: ladder runs from %g to %g, not from 1 to 0", st.Chain, st.Betas[0], st.Betas[K-1])
	}
	for k := 1; k < K; k++ {
		if !(st.Betas[k] < st.Betas[k-1]) {
			return nil, fmt.Errorf("tempered chain %d: ladder not decreasing at replica %d", st.Chain, k)
		}
	}
	tp := newTempered(t, cfg, tc)
	for k := range K {
		rs := st.Replicas[k]
		if rs.Iter != st.Iter {
			return nil, fmt.Errorf("tempered chain %d: replica %d at sweep %d, chain at %d", st.Chain, k, rs.Iter, st.Iter)
		}
		v := &temperedView{t: t, n: tp.n, beta: st.Betas[k]}
		ch, err := Restore(v, cfg, rs)
		if err != nil {
			return nil, fmt.Errorf("tempered chain %d, replica %d: %w", st.Chain, k, err)
		}
		tp.views = append(tp.views, v)
		tp.reps = append(tp.reps, ch)
	}
	tp.pcg = &rand.PCG{}
	if err := tp.pcg.UnmarshalBinary(st.RNG); err != nil {
		return nil, fmt.Errorf("tempered chain %d: exchange random-generator state: %w", st.Chain, err)
	}
	tp.rng = rand.New(tp.pcg)
	tp.st = cloneTemperedState(st)
	tp.st.Replicas, tp.st.RNG = nil, nil
	return tp, nil
}

func cloneTemperedState(s TemperedState) TemperedState {
	c := s
	c.Replicas = nil
	for _, r := range s.Replicas {
		c.Replicas = append(c.Replicas, cloneState(r))
	}
	c.Betas = append([]float64(nil), s.Betas...)
	c.LogGaps = append([]float64(nil), s.LogGaps...)
	c.SwapProposed = append([][2]int64(nil), s.SwapProposed...)
	c.SwapAccepted = append([][2]int64(nil), s.SwapAccepted...)
	c.LogLik = nil
	for _, l := range s.LogLik {
		c.LogLik = append(c.LogLik, l.clone())
	}
	c.RNG = append([]byte(nil), s.RNG...)
	return c
}

// State returns a deep copy of the tempered chain's state, including all generator states.
func (tp *Tempered) State() TemperedState {
	s := cloneTemperedState(tp.st)
	s.Replicas = make([]State, len(tp.reps))
	for k, ch := range tp.reps {
		s.Replicas[k] = ch.State()
	}
	b, err := tp.pcg.MarshalBinary()
	if err != nil { // PCG.MarshalBinary cannot fail; keep the contract explicit.
		panic(fmt.Sprintf("mcmc: marshal PCG: %v", err))
	}
	s.RNG = b
	return s
}

// Iter is the number of completed sweeps.
func (tp *Tempered) Iter() int64 { return tp.st.Iter }

// Done reports whether the chain has run all its sweeps.
func (tp *Tempered) Done() bool { return tp.st.Iter >= tp.cfg.Total() }

// Counts returns replica 0's move counters.
func (tp *Tempered) Counts() Counters { return tp.reps[0].Counts() }

// ReplicaCounts returns replica k's move counters.
func (tp *Tempered) ReplicaCounts(k int) Counters { return tp.reps[k].Counts() }

// Betas returns a copy of the current ladder.
func (tp *Tempered) Betas() []float64 { return append([]float64(nil), tp.st.Betas...) }

// SwapCounts returns copies of the exchange counters per adjacent pair (k, k+1); [0] is warm-up,
// [1] sampling.
func (tp *Tempered) SwapCounts() (proposed, accepted [][2]int64) {
	return append([][2]int64(nil), tp.st.SwapProposed...), append([][2]int64(nil), tp.st.SwapAccepted...)
}

// LogLikStats returns copies of the per-replica log-likelihood statistics over the post-warm-up
// sweeps (input to Evidence).
func (tp *Tempered) LogLikStats() []LogLikStat {
	out := make([]LogLikStat, len(tp.st.LogLik))
	for k, s := range tp.st.LogLik {
		out[k] = s.clone()
	}
	return out
}

// Advance runs sweeps until the chain has completed until sweeps (or all of them), or stop returns
// true (checked before every sweep; nil means never). A sweep is one sweep of every replica plus
// one exchange round. Replica 0's kept draws go to emit, with the target's derived values and log
// density (logPrior + logLik). It returns the number of sweeps run.
func (tp *Tempered) Advance(until int64, stop func() bool, emit Emit) int64 {
	return advance(tp.cfg, &tp.st.Iter, &tp.st.Draws, until, stop, tp.sweep, func() {
		if emit != nil {
			r := &tp.reps[0].st
			emit(tp.st.Draws, r.X, r.Derived[:tp.n], r.LogDensity)
		}
	})
}

func (tp *Tempered) sweep() {
	warm := tp.st.Iter < tp.cfg.Warmup
	phase := 1
	if warm {
		phase = 0
	}
	for k, ch := range tp.reps {
		if k == len(tp.reps)-1 && tp.prior != nil && tp.st.Betas[k] == 0 {
			ch.priorSweep(tp.prior)
		} else {
			ch.sweep()
		}
	}
	tp.exchange(phase)
	if warm && tp.tc.AdaptLadder && len(tp.reps) > 2 {
		tp.adaptLadder()
	}
	if !warm {
		for k, ch := range tp.reps {
			tp.st.LogLik[k].add(ch.st.Derived[tp.n+1])
		}
	}
	tp.st.Iter++
}

// exchange proposes to swap the points of each adjacent pair, hottest pair first, accepting with
// probability min(1, exp((β_k − β_{k+1})(ℓ_{k+1} − ℓ_k))), ℓ the log likelihoods (the prior
// factors cancel).
func (tp *Tempered) exchange(phase int) {
	b := tp.st.Betas
	for p := len(tp.reps) - 2; p >= 0; p-- {
		lo, hi := &tp.reps[p].st, &tp.reps[p+1].st
		la, lb := lo.Derived[tp.n+1], hi.Derived[tp.n+1]
		logr := (b[p] - b[p+1]) * (lb - la)
		u := tp.rng.Float64()
		tp.acc[p] = 1
		if logr < 0 {
			tp.acc[p] = math.Exp(logr)
		}
		tp.st.SwapProposed[p][phase]++
		if math.Log(u) < logr {
			tp.st.SwapAccepted[p][phase]++
			lo.X, hi.X = hi.X, lo.X
			lo.Derived, hi.Derived = hi.Derived, lo.Derived
			tp.relog(p)
			tp.relog(p + 1)
		}
	}
}

// relog recomputes replica k's log density from its stored log prior and log likelihood.
func (tp *Tempered) relog(k int) {
	s := &tp.reps[k].st
	s.LogDensity = s.Derived[tp.n] + tp.st.Betas[k]*s.Derived[tp.n+1]
}

// adaptLadder moves the log temperature gaps S_k = log(T_k − T_{k−1}), k = 1..K−2, by
// κ(t)·(A_k − A_{k+1}), A_k the acceptance probability of pair (k−1, k) in this round (Vousden,
// Farr & Mandel 2016), and recomputes the interior β's and their replicas' log densities. T₀ = 1
// and T_{K−1} = ∞ stay fixed; T_k = 1 + Σ_{j≤k} exp(S_j) keeps 1 > β₁ > … > β_{K−2} > 0.
func (tp *Tempered) adaptLadder() {
	kappa := ladderLag / (float64(tp.st.Iter) + ladderLag) / ladderNu
	g := tp.st.LogGaps
	for k := 1; k < len(tp.reps)-1; k++ {
		g[k-1] = min(max(g[k-1]+kappa*(tp.acc[k-1]-tp.acc[k]), logGapMin), logGapMax)
	}
	temp := 1.0
	for k := 1; k < len(tp.reps)-1; k++ {
		temp += math.Exp(g[k-1])
		bk := 1 / temp
		if !(bk < tp.st.Betas[k-1]) { // only if the gaps are at their floor and T is huge
			bk = math.Nextafter(tp.st.Betas[k-1], 0)
		}
		tp.st.Betas[k] = bk
		tp.views[k].beta = tp.st.Betas[k]
		tp.relog(k)
	}
}
