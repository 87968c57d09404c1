// Package mcmc is plumb's generic Markov chain Monte Carlo core. It samples any log density over a
// vector whose coordinates are either continuous or discrete (categorical levels 0..K−1) and knows
// nothing of planets: the same code samples a Gaussian in a test and an interior model in a run.
//
// A chain is a value with one serialisable State (position, log density, recorded derived values,
// random-generator state, adaptation state and counters), so a run can be checkpointed at any step
// and resumed bit for bit.
package mcmc

import (
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
)

// Target is a log density known up to a constant.
type Target interface {
	// Dim is the number of coordinates.
	Dim() int
	// Levels gives, per coordinate, the number of discrete levels (values 0..n−1), or 0 for a
	// continuous coordinate.
	Levels() []int
	// NumDerived is the number of derived values the target computes with each point (for example
	// the log prior, the log likelihood and predicted observables), recorded with every draw.
	NumDerived() int
	// LogDensity returns log p(x) up to a constant and fills derived (length NumDerived).
	// −Inf (or NaN, treated alike) marks a point outside the support: it is rejected and counted.
	LogDensity(x, derived []float64) float64
}

// Bounded is an optional interface of a Target whose density is zero outside a box (for example
// the support of uniform priors). A chain then rejects a proposal outside the box without
// evaluating the density (counted as invalid, like any proposal outside the support) and draws
// its independence proposals from their restriction to the box (see independenceMove). Bounds
// returns the lower and upper ends per coordinate (±Inf where unbounded; discrete coordinates are
// ignored); nil slices mean no box.
type Bounded interface {
	Bounds() (lo, hi []float64)
}

// Config sets the length and starting point of a chain.
type Config struct {
	// Warmup is the number of adaptation sweeps; their draws are not emitted.
	Warmup int64
	// Steps is the number of sweeps after warm-up.
	Steps int64
	// Thin keeps every Thin-th post-warm-up sweep as a draw (1 keeps all).
	Thin int64
	// InitialScale is the initial proposal standard deviation of each coordinate (ignored for
	// discrete coordinates), in the coordinate's working scale: for a Log coordinate it is a
	// standard deviation of log x. Zero or missing entries default to 1.
	InitialScale []float64
	// Log marks positive coordinates that are proposed on a logarithmic scale (a multiplicative
	// random walk, Dellaportas & Roberts 2003), with the Hastings correction y/x. Products such as
	// density × radius³ that the data constrain become linear there, which turns curved ridges of
	// the posterior into nearly straight ones that the adapted covariance can follow.
	Log []bool
	// Init draws a starting point (for example from the prior). Points with −Inf log density
	// are redrawn up to MaxInitTries times.
	Init func(r *rand.Rand, x []float64)
	// MaxInitTries bounds the search for a valid starting point (default 10000).
	MaxInitTries int
	// Blocks are extra groups of continuous coordinates (indices of the target's coordinates),
	// each moved every sweep, after the move of all continuous coordinates together, by its own
	// adaptive Metropolis proposal. A group of coordinates that are nearly independent of the
	// rest given the rest (say, one event's location) then mixes at its own scale, which the
	// joint move — whose scale is set by the most constrained direction — cannot. Each block
	// costs one density evaluation per sweep.
	Blocks [][]int
	// Independence is the probability, in [0, 1), that a post-warm-up sweep moves the continuous
	// block by an independence proposal instead of the random walk (0: never; see
	// independenceMove). It needs a warm-up to fit the proposal.
	Independence float64
	// Anneal is the fraction of warm-up, in [0, 1], over which the likelihood of a Split target is
	// switched on gradually (ignored for other targets, and so for tempered replicas, whose
	// ladder does that job): sweep t < Anneal·Warmup samples prior × likelihood^β(t), β rising
	// geometrically from annealBetaMin to 1. See annealBeta.
	Anneal float64
}

// Validate reports a configuration that cannot run.
func (c Config) Validate() error {
	switch {
	case c.Warmup < 0:
		return fmt.Errorf("warm-up steps %d < 0", c.Warmup)
	case c.Steps < 1:
		return fmt.Errorf("steps %d < 1", c.Steps)
	case c.Thin < 1:
		return fmt.Errorf("thin %d < 1", c.Thin)
	case c.Init == nil:
		return errors.New("no initial-point function")
	case !(c.Independence >= 0 && c.Independence < 1):
		return fmt.Errorf("independence-move probability %g not in [0, 1)", c.Independence)
	case !(c.Anneal >= 0 && c.Anneal <= 1):
		return fmt.Errorf("annealed fraction of warm-up %g not in [0, 1]", c.Anneal)
	}
	return nil
}

// Kept is the number of draws a chain emits in total.
func (c Config) Kept() int64 { return c.Steps / c.Thin }

// Total is the number of sweeps a chain runs in total.
func (c Config) Total() int64 { return c.Warmup + c.Steps }

// Adaptation constants. The continuous block uses the adaptive Metropolis proposal of Haario,
// Saksman & Tamminen (2001), N(x, s·(2.38²/d)·(C + εD)), with C the running covariance of the chain,
// D the diagonal of the initial scales squared (so ε is relative to each coordinate's own scale:
// plumb's coordinates differ by many orders of magnitude in SI units) and s a global scale tuned by a
// Robbins–Monro recursion towards acceptance rate 0.234 (Andrieu & Thoms 2008, "global adaptive
// scaling"). The running moments are restarted at 1/4 and 1/2 of warm-up so that the far-from-mode
// start does not pollute them (windowed adaptation: common practice, no source). Everything adapts
// only during warm-up and is frozen afterwards, so the post-warm-up chain is a homogeneous Markov
// chain with the posterior as its invariant distribution.
const (
	targetAccept   = 0.234
	covEpsilon     = 1e-8
	cholEvery      = 50
	robbinsMonroEx = 0.6
)

// AdaptState is the adaptation state of the continuous block.
type AdaptState struct {
	// N is the number of sweeps in the running moments.
	N int64 `json:"n"`
	// Mean and Cov (row-major, d×d over the continuous coordinates) are the running moments.
	Mean []float64 `json:"mean"`
	Cov  []float64 `json:"cov"`
	// LogScale is the log of the global proposal scale s.
	LogScale float64 `json:"log_scale"`
	// Chol is the lower Cholesky factor (row-major) of the current proposal covariance, without s.
	Chol []float64 `json:"chol"`
	// IndMean and IndChol are the centre and the lower Cholesky factor of the scale matrix of the
	// independence proposal (working coordinates), fitted at the end of warm-up; empty before,
	// or when Config.Independence is 0.
	IndMean []float64 `json:"ind_mean,omitempty"`
	IndChol []float64 `json:"ind_chol,omitempty"`
	// PrevN, PrevMean and PrevCov keep the moments of the window that closed half-way through
	// warm-up, for PoolWarmup's provisional fit there (cleared when used).
	PrevN    int64     `json:"prev_n,omitempty"`
	PrevMean []float64 `json:"prev_mean,omitempty"`
	PrevCov  []float64 `json:"prev_cov,omitempty"`
	// LevelCounts counts, per discrete coordinate (in index order) and level, the sweeps of the
	// current window spent there (joint block only); PrevLevelCounts are those of the window that
	// closed half-way through warm-up. IndLevels are the independence proposal's level
	// probabilities per discrete coordinate (see independenceMove).
	LevelCounts     [][]float64 `json:"level_counts,omitempty"`
	PrevLevelCounts [][]float64 `json:"prev_level_counts,omitempty"`
	IndLevels       [][]float64 `json:"ind_levels,omitempty"`
}

// Counters count moves. Index 0 is warm-up, 1 is sampling.
type Counters struct {
	// Proposed and Accepted count continuous-block moves.
	Proposed [2]int64 `json:"proposed"`
	Accepted [2]int64 `json:"accepted"`
	// DiscreteProposed and DiscreteAccepted count moves of discrete coordinates.
	DiscreteProposed [2]int64 `json:"discrete_proposed"`
	DiscreteAccepted [2]int64 `json:"discrete_accepted"`
	// Invalid counts proposals whose log density was −Inf or NaN (for example a non-physical
	// model), all moves together.
	Invalid [2]int64 `json:"invalid"`
	// BlockProposed and BlockAccepted count the moves of the extra blocks, all blocks together.
	BlockProposed [2]int64 `json:"block_proposed,omitempty"`
	BlockAccepted [2]int64 `json:"block_accepted,omitempty"`
	// IndependenceProposed and IndependenceAccepted count independence moves of the continuous
	// block (post-warm-up only; they are not in Proposed/Accepted).
	IndependenceProposed [2]int64 `json:"independence_proposed,omitempty"`
	IndependenceAccepted [2]int64 `json:"independence_accepted,omitempty"`
}

// State is everything a chain needs to continue exactly where it stopped.
type State struct {
	// Chain is the chain index.
	Chain int `json:"chain"`
	// Iter is the number of completed sweeps (warm-up included).
	Iter int64 `json:"iter"`
	// Draws is the number of emitted draws.
	Draws int64 `json:"draws"`
	// X, LogDensity and Derived describe the current point.
	X          []float64 `json:"x"`
	LogDensity float64   `json:"log_density"`
	Derived    []float64 `json:"derived"`
	// RNG is the marshalled PCG state.
	RNG []byte `json:"rng"`
	// Adapt is the proposal adaptation state of the joint move of all continuous coordinates.
	Adapt AdaptState `json:"adapt"`
	// Blocks holds the adaptation state of each extra block (Config.Blocks), in order.
	Blocks []AdaptState `json:"blocks,omitempty"`
	// Counts are the move counters.
	Counts Counters `json:"counts"`
	// LogParts are the log prior and log likelihood of the current point while the warm-up is
	// annealed (Config.Anneal), when LogDensity is their β-weighted sum.
	LogParts [2]float64 `json:"log_parts,omitzero"`
}

// Chain is one Markov chain.
type Chain struct {
	t    Target
	cfg  Config
	pcg  *rand.PCG
	rng  *rand.Rand
	st   State
	cont []int   // indices of continuous coordinates
	logc []bool  // per continuous coordinate: proposed on a log scale
	all  []int   // positions 0..dc−1 in cont: the joint block
	blk  [][]int // positions in cont of each extra block
	disc []int   // indices of discrete coordinates
	lev  []int
	d0   []float64 // initial proposal variances of the continuous block
	// lo and hi are the target's box (Bounded), nil without one.
	lo, hi []float64
	// split is the target as a Split when the warm-up is annealed, else nil; annealEnd is the
	// first sweep at β = 1 and beta the current β.
	split     Split
	annealEnd int64
	beta      float64

	// scratch
	y, dy, z []float64
	yDer     []float64
	delta    []float64
}

// Seeds derives the two PCG seed words of chain c from the run seed. Go's PCG has a fixed
// increment, so NewPCG(seed, c) would give chains offsets in one stream; hashing (seed, c) gives
// unrelated streams.
func Seeds(seed uint64, c int) (uint64, uint64) {
	return HashSeeds("plumb/chain-seed", seed, uint64(c))
}

// HashSeeds derives two PCG seed words from a tag and some words: the first 16 bytes of the
// SHA-256 of the tag's bytes followed by each word in little-endian order. Distinct tags keep the
// streams of chains, replicas, exchanges and synthetic noise unrelated even from one seed.
func HashSeeds(tag string, words ...uint64) (uint64, uint64) {
	b := make([]byte, len(tag), len(tag)+8*len(words))
	copy(b, tag)
	for _, w := range words {
		b = binary.LittleEndian.AppendUint64(b, w)
	}
	h := sha256.Sum256(b)
	return binary.LittleEndian.Uint64(h[:8]), binary.LittleEndian.Uint64(h[8:16])
}

// NewChain starts chain c of a run with the given seed at a valid point drawn by cfg.Init.
func NewChain(t Target, cfg Config, seed uint64, c int) (*Chain, error) {
	if err := cfg.Validate(); err != nil {
		return nil, err
	}
	s1, s2 := Seeds(seed, c)
	return startChain(t, cfg, rand.NewPCG(s1, s2), c)
}

// startChain starts chain c on the generator pcg at a valid point drawn by cfg.Init; cfg must be
// valid. NewChain seeds pcg from (seed, c); tempered replicas seed it per replica.
func startChain(t Target, cfg Config, pcg *rand.PCG, c int) (*Chain, error) {
	ch := newChain(t, cfg, pcg)
	ch.st.Chain = c
	if err := ch.setBlocks(); err != nil {
		return nil, fmt.Errorf("chain %d: %w", c, err)
	}
	tries := cfg.MaxInitTries
	if tries <= 0 {
		tries = 10000
	}
	x := make([]float64, t.Dim())
	der := make([]float64, t.NumDerived())
	for i := 0; ; i++ {
		if i == tries {
			return nil, fmt.Errorf("chain %d: no valid starting point in %d draws from the initial distribution", c, tries)
		}
		cfg.Init(ch.rng, x)
		ch.setBeta()
		lp, parts := ch.evaluate(x, der)
		if !math.IsNaN(lp) && !math.IsInf(lp, -1) && !math.IsInf(lp, 1) {
			ch.st.X, ch.st.Derived, ch.st.LogDensity, ch.st.LogParts = x, der, lp, parts
			break
		}
	}
	ch.setInitialProposal()
	ch.resetMoments()
	return ch, nil
}

// Restore rebuilds a chain from a saved State; the target and config must be the ones it ran with.
func Restore(t Target, cfg Config, st State) (*Chain, error) {
	if err := cfg.Validate(); err != nil {
		return nil, err
	}
	pcg := &rand.PCG{}
	if err := pcg.UnmarshalBinary(st.RNG); err != nil {
		return nil, fmt.Errorf("chain %d: random-generator state: %w", st.Chain, err)
	}
	ch := newChain(t, cfg, pcg)
	if err := ch.setBlocks(); err != nil {
		return nil, fmt.Errorf("chain %d: %w", st.Chain, err)
	}
	dc := len(ch.cont)
	if len(st.Blocks) != len(ch.blk) {
		return nil, fmt.Errorf("chain %d: state has %d extra blocks, config %d", st.Chain, len(st.Blocks), len(ch.blk))
	}
	for b, pos := range ch.blk {
		n, a := len(pos), st.Blocks[b]
		if len(a.Mean) != n || len(a.Cov) != n*n || len(a.Chol) != n*n {
			return nil, fmt.Errorf("chain %d: adaptation state of block %d does not match its %d coordinates", st.Chain, b, n)
		}
	}
	switch {
	case len(st.X) != t.Dim():
		return nil, fmt.Errorf("chain %d: state has %d coordinates, target %d", st.Chain, len(st.X), t.Dim())
	case len(st.Derived) != t.NumDerived():
		return nil, fmt.Errorf("chain %d: state has %d derived values, target %d", st.Chain, len(st.Derived), t.NumDerived())
	case len(st.Adapt.Mean) != dc || len(st.Adapt.Cov) != dc*dc || len(st.Adapt.Chol) != dc*dc ||
		(len(st.Adapt.IndChol) != 0 && (len(st.Adapt.IndChol) != dc*dc || len(st.Adapt.IndMean) != dc)):
		return nil, fmt.Errorf("chain %d: adaptation state does not match %d continuous coordinates", st.Chain, dc)
	}
	ch.st = cloneState(st)
	ch.st.RNG = nil
	if a := &ch.st.Adapt; len(a.LevelCounts) != len(ch.disc) {
		// A state written before level counts existed: start them afresh (they only shape the
		// independence proposal's level probabilities).
		a.LevelCounts = nil
		for _, i := range ch.disc {
			a.LevelCounts = append(a.LevelCounts, make([]float64, ch.lev[i]))
		}
	}
	ch.setBeta()
	return ch, nil
}

func newChain(t Target, cfg Config, pcg *rand.PCG) *Chain {
	lev := append([]int(nil), t.Levels()...)
	ch := &Chain{t: t, cfg: cfg, pcg: pcg, rng: rand.New(pcg), lev: lev}
	for i, l := range lev {
		if l > 0 {
			ch.disc = append(ch.disc, i)
		} else {
			ch.cont = append(ch.cont, i)
		}
	}
	dc := len(ch.cont)
	ch.d0 = make([]float64, dc)
	ch.logc = make([]bool, dc)
	for k, i := range ch.cont {
		ch.logc[k] = i < len(cfg.Log) && cfg.Log[i]
		s := 1.0
		if i < len(cfg.InitialScale) && cfg.InitialScale[i] > 0 && !math.IsInf(cfg.InitialScale[i], 0) {
			s = cfg.InitialScale[i]
		}
		ch.d0[k] = s * s
	}
	ch.y = make([]float64, t.Dim())
	ch.z = make([]float64, dc)
	ch.dy = make([]float64, dc)
	ch.delta = make([]float64, dc)
	ch.yDer = make([]float64, t.NumDerived())
	if b, ok := t.(Bounded); ok {
		if lo, hi := b.Bounds(); len(lo) == t.Dim() && len(hi) == t.Dim() {
			ch.lo, ch.hi = lo, hi
		}
	}
	if sp, ok := t.(Split); ok {
		if end := int64(cfg.Anneal * float64(cfg.Warmup)); end > 0 {
			ch.split, ch.annealEnd = sp, end
		}
	}
	ch.beta = 1
	ch.all = make([]int, dc)
	for k := range dc {
		ch.all[k] = k
	}
	return ch
}

// setBlocks maps Config.Blocks to positions among the continuous coordinates.
func (ch *Chain) setBlocks() error {
	pos := make(map[int]int, len(ch.cont))
	for k, i := range ch.cont {
		pos[i] = k
	}
	ch.blk = ch.blk[:0]
	for b, idx := range ch.cfg.Blocks {
		if len(idx) == 0 {
			return fmt.Errorf("block %d is empty", b)
		}
		seen := map[int]bool{}
		var ps []int
		for _, i := range idx {
			k, ok := pos[i]
			if !ok || seen[i] {
				return fmt.Errorf("block %d: coordinate %d is not a distinct continuous coordinate", b, i)
			}
			seen[i] = true
			ps = append(ps, k)
		}
		ch.blk = append(ch.blk, ps)
	}
	return nil
}

// resetMoments clears the running moments of the joint move and of every extra block.
func (ch *Chain) resetMoments() {
	resetBlockMoments(&ch.st.Adapt, len(ch.all))
	ch.st.Adapt.LevelCounts = nil
	for _, i := range ch.disc {
		ch.st.Adapt.LevelCounts = append(ch.st.Adapt.LevelCounts, make([]float64, ch.lev[i]))
	}
	for b, pos := range ch.blk {
		resetBlockMoments(&ch.st.Blocks[b], len(pos))
	}
}

func resetBlockMoments(a *AdaptState, n int) {
	a.N = 0
	a.Mean = make([]float64, n)
	a.Cov = make([]float64, n*n)
}

// setInitialProposal sets every block's proposal to diag(initial scales²), without the 2.38²/d
// factor: before any moments exist the user's scales are taken as they are.
func (ch *Chain) setInitialProposal() {
	ch.initialProposal(&ch.st.Adapt, ch.all)
	ch.st.Blocks = make([]AdaptState, len(ch.blk))
	for b, pos := range ch.blk {
		resetBlockMoments(&ch.st.Blocks[b], len(pos))
		ch.initialProposal(&ch.st.Blocks[b], pos)
	}
}

func (ch *Chain) initialProposal(a *AdaptState, pos []int) {
	n := len(pos)
	a.Chol = make([]float64, n*n)
	for k, p := range pos {
		a.Chol[k*n+k] = math.Sqrt(ch.d0[p])
	}
	a.LogScale = 0
}

// State returns a deep copy of the chain's state, including the generator state.
func (ch *Chain) State() State {
	s := cloneState(ch.st)
	b, err := ch.pcg.MarshalBinary()
	if err != nil { // PCG.MarshalBinary cannot fail; keep the contract explicit.
		panic(fmt.Sprintf("mcmc: marshal PCG: %v", err))
	}
	s.RNG = b
	return s
}

func cloneState(s State) State {
	c := s
	c.X = append([]float64(nil), s.X...)
	c.Derived = append([]float64(nil), s.Derived...)
	c.RNG = append([]byte(nil), s.RNG...)
	c.Adapt.Mean = append([]float64(nil), s.Adapt.Mean...)
	c.Adapt.Cov = append([]float64(nil), s.Adapt.Cov...)
	c.Adapt.Chol = append([]float64(nil), s.Adapt.Chol...)
	c.Adapt.IndMean = append([]float64(nil), s.Adapt.IndMean...)
	c.Adapt.IndChol = append([]float64(nil), s.Adapt.IndChol...)
	c.Adapt.PrevMean = append([]float64(nil), s.Adapt.PrevMean...)
	c.Adapt.PrevCov = append([]float64(nil), s.Adapt.PrevCov...)
	c.Adapt.LevelCounts = cloneCounts(s.Adapt.LevelCounts)
	c.Adapt.PrevLevelCounts = cloneCounts(s.Adapt.PrevLevelCounts)
	c.Adapt.IndLevels = cloneCounts(s.Adapt.IndLevels)
	c.Blocks = nil
	for _, b := range s.Blocks {
		b.Mean = append([]float64(nil), b.Mean...)
		b.Cov = append([]float64(nil), b.Cov...)
		b.Chol = append([]float64(nil), b.Chol...)
		c.Blocks = append(c.Blocks, b)
	}
	return c
}

// Iter is the number of completed sweeps.
func (ch *Chain) Iter() int64 { return ch.st.Iter }

// Done reports whether the chain has run all its sweeps.
func (ch *Chain) Done() bool { return ch.st.Iter >= ch.cfg.Total() }

// Counts returns the move counters.
func (ch *Chain) Counts() Counters { return ch.st.Counts }

// Emit receives a kept draw. The slices are only valid during the call.
type Emit func(draw int64, x, derived []float64, logDensity float64)

// Advance runs sweeps until the chain has completed until sweeps (or all of them), or stop returns
// true (checked before every sweep; nil means never). Kept draws go to emit. It returns the number
// of sweeps run.
func (ch *Chain) Advance(until int64, stop func() bool, emit Emit) int64 {
	return advance(ch.cfg, &ch.st.Iter, &ch.st.Draws, until, stop, ch.sweep, func() {
		if emit != nil {
			emit(ch.st.Draws, ch.st.X, ch.st.Derived, ch.st.LogDensity)
		}
	})
}

// advance is the loop of Chain.Advance and Tempered.Advance: it calls sweep (which increments
// *iter) until *iter reaches until (at most cfg.Total()) or stop returns true, and after every
// post-warm-up sweep the thinning keeps calls kept and counts the draw in *draws. It returns the
// number of sweeps run.
func advance(cfg Config, iter, draws *int64, until int64, stop func() bool, sweep, kept func()) int64 {
	until = min(until, cfg.Total())
	var n int64
	for *iter < until {
		if stop != nil && stop() {
			break
		}
		sweep()
		n++
		if post := *iter - cfg.Warmup; post > 0 && post%cfg.Thin == 0 {
			kept()
			*draws++
		}
	}
	return n
}

// sweep is one iteration: a block move of the continuous coordinates, then one move per discrete
// coordinate, then (during warm-up) adaptation.
func (ch *Chain) sweep() {
	phase := 1
	warm := ch.st.Iter < ch.cfg.Warmup
	if warm {
		phase = 0
	}
	c := &ch.st.Counts
	if ch.split != nil && ch.st.Iter <= ch.annealEnd {
		ch.anneal()
	}
	// The uniform is drawn only when independence moves are on, so that chains without them keep
	// their random streams. During warm-up they are on only once PoolWarmup has fitted a
	// provisional proposal half-way through it.
	// joint: the independence move, which then also moves the discrete coordinates, can happen.
	joint := !warm && len(ch.cont) > 0 && ch.cfg.Independence > 0 && len(ch.disc) > 0 &&
		len(ch.st.Adapt.IndLevels) == len(ch.disc) && len(ch.st.Adapt.IndChol) == len(ch.cont)*len(ch.cont)
	if dc := len(ch.cont); dc > 0 && ch.cfg.Independence > 0 && len(ch.st.Adapt.IndChol) == dc*dc &&
		ch.rng.Float64() < ch.cfg.Independence {
		c.IndependenceProposed[phase]++
		if ch.independenceMove(phase) {
			c.IndependenceAccepted[phase]++
		}
	} else if dc > 0 {
		c.Proposed[phase]++
		if ch.rwMove(&ch.st.Adapt, ch.all, phase, warm) {
			c.Accepted[phase]++
		}
	}
	for b, pos := range ch.blk {
		c.BlockProposed[phase]++
		if ch.rwMove(&ch.st.Blocks[b], pos, phase, warm) {
			c.BlockAccepted[phase]++
		}
	}
	for _, i := range ch.disc {
		k := ch.lev[i]
		if k < 2 || joint {
			// After warm-up, with a fitted joint independence proposal, the discrete coordinates
			// move with it (independenceMove) and not by moves of their own: a proposal of a
			// level the data exclude costs a full model evaluation, and on the demo these were a
			// third of all evaluations for a core state that never changed (evaluations per
			// sweep 1.39 → 0.94 on the demo; our choice, by measurement). The joint move keeps
			// every level proposable (indLevelFloor), so the chain stays irreducible.
			continue
		}
		// Uniform over all K levels, the current one included: symmetric, and aperiodic even when
		// the levels are equally probable (proposing only the other levels would make a two-level
		// chain with a flat density alternate deterministically, so that an even thinning would
		// see one level only). Staying put costs no density evaluation.
		nl := ch.rng.IntN(k)
		c.DiscreteProposed[phase]++
		if nl == int(ch.st.X[i]) {
			c.DiscreteAccepted[phase]++
			continue
		}
		copy(ch.y, ch.st.X)
		ch.y[i] = float64(nl)
		if ch.metropolis(phase, 0) {
			c.DiscreteAccepted[phase]++
		}
	}
	ch.st.Iter++
	if warm {
		ch.adapt()
		if ch.st.Iter == ch.cfg.Warmup && ch.cfg.Independence > 0 {
			ch.fitIndependence()
		}
	}
}

// priorSweep is the sweep of a β = 0 replica whose target can draw from its prior: the whole
// point is proposed from the prior. At β = 0 the replica's density is the prior restricted to the
// points with a finite likelihood, so with the prior as an independence proposal the
// Metropolis–Hastings ratio π(y)q(x)/(π(x)q(y)) is 1 for every valid y: the draw is accepted
// whenever its likelihood is finite. One evaluation per sweep (the likelihood is needed for the
// exchanges) instead of a random walk's and a categorical move's, and exact mixing at the hot end
// of the ladder. No adaptation is needed.
func (ch *Chain) priorSweep(ps PriorSampler) {
	phase := 1
	if ch.st.Iter < ch.cfg.Warmup {
		phase = 0
	}
	c := &ch.st.Counts
	ps.SamplePrior(ch.rng, ch.y)
	lp, parts := ch.evaluate(ch.y, ch.yDer)
	c.IndependenceProposed[phase]++
	if finite(lp) {
		ch.accept(lp, parts)
		c.IndependenceAccepted[phase]++
	} else {
		c.Invalid[phase]++
	}
	ch.st.Iter++
}

// Independence proposal. After warm-up the continuous block can also be moved by a proposal that
// ignores the current point: a multivariate t with indDoF degrees of freedom centred on the
// warm-up mean, with scale matrix indInflate·(C + εD) from the warm-up covariance, in the working
// coordinates (log x for Log coordinates). It is fixed once fitted, so the Metropolis–Hastings
// kernel with ratio π(y)q(x)/(π(x)q(y)) leaves π invariant (Tierney 1994, Ann. Stat. 22, 1701, the
// independence chain; from memory), and so does its mixture with the random walk. Where the
// posterior is close to its Gaussian fit an accepted move jumps across the whole posterior at
// once, which a random walk needs many steps for; the t tails (and the inflation) keep the
// importance ratio q/π bounded in the posterior's tails, which the chain's geometric ergodicity
// needs (Mengersen & Tweedie 1996, from memory). The degrees of freedom and the inflation are
// common practice, no source; the random-walk moves remain, so a poor fit costs efficiency, never
// correctness.
const (
	indDoF     = 5
	indInflate = 1.5
)

// fitIndependence fixes the independence proposal from the chain's own warm-up moments.
func (ch *Chain) fitIndependence() { ch.setIndependence(ch.st.Adapt) }

// setIndependence fits the independence proposal to the moments m (of the joint block); it leaves
// the proposal as it was (random walk only, if none) when the moments are too few or the matrix is
// not positive definite.
func (ch *Chain) setIndependence(m AdaptState) {
	if m.N < int64(2*len(ch.cont)+10) {
		return
	}
	if l, ok := ch.covCholesky(&m, ch.all, indInflate); ok {
		a := &ch.st.Adapt
		a.IndMean = append([]float64(nil), m.Mean...)
		a.IndChol = l
		a.IndLevels = nil
		if len(m.LevelCounts) == len(ch.disc) && len(ch.disc) > 0 {
			for _, c := range m.LevelCounts {
				a.IndLevels = append(a.IndLevels, levelProposal(c))
			}
		}
	}
}

// indLevelFloor is the share of the independence proposal's level probabilities spread
// uniformly over the levels, so that every level keeps a chance of being proposed however rarely
// warm-up visited it (which keeps the joint move irreducible; common practice, no source).
const indLevelFloor = 0.1

// levelProposal turns level counts into proposal probabilities (1 − f)·c/Σc + f/K.
func levelProposal(c []float64) []float64 {
	sum := 0.0
	for _, v := range c {
		sum += v
	}
	q := make([]float64, len(c))
	for l, v := range c {
		q[l] = indLevelFloor / float64(len(c))
		if sum > 0 {
			q[l] += (1 - indLevelFloor) * v / sum
		} else {
			q[l] += (1 - indLevelFloor) / float64(len(c))
		}
	}
	return q
}

// covCholesky returns the lower Cholesky factor of f·(C + εD) for the block at positions pos, C
// its running covariance and D the initial variances; false if it is not positive definite.
func (ch *Chain) covCholesky(a *AdaptState, pos []int, f float64) ([]float64, bool) {
	d := len(pos)
	m := make([]float64, d*d)
	for r := range d {
		for c := range d {
			m[r*d+c] = f * a.Cov[r*d+c]
		}
		m[r*d+r] += f * covEpsilon * ch.d0[pos[r]]
	}
	return m, cholesky(m, d)
}

// independenceMove proposes the continuous block from the independence proposal and accepts it
// with the Metropolis–Hastings ratio. In working coordinates w the t density is
// ∝ (1 + |L⁻¹(w − μ)|²/ν)^(−(ν+d)/2); for a Log coordinate the density in x carries the Jacobian
// 1/x, which adds Σ (w_y − w_x) over those coordinates to the log ratio.
//
// With a Bounded target the proposal is redrawn until it falls in the box, i.e. drawn from q
// restricted to the box, q_B = q·1_B/Z with a constant Z, which cancels from the ratio for the
// points x, y ∈ B the chain can visit: the kernel stays exact and no move is wasted on a point of
// zero density (on the demo, whose crust thickness fills its uniform prior, 40 % of the
// unrestricted proposals fell outside). After maxRedraws misses the move is a rejection; the
// chance of that does not depend on x, so the kernel is a mixture of the exact kernel and the
// identity, still invariant.
func (ch *Chain) independenceMove(phase int) bool {
	dc := len(ch.cont)
	a := &ch.st.Adapt
	// The current point's t quadratic form and log Jacobian part.
	jac, quadX := 0.0, 0.0
	for k := range dc {
		row := a.IndChol[k*dc : k*dc+k+1]
		wx := ch.st.X[ch.cont[k]]
		if ch.logc[k] {
			wx = math.Log(wx)
			jac -= wx
		}
		// Forward substitution L u = w_x − μ, row k (u stored in dy).
		u := wx - a.IndMean[k]
		for j := range k {
			u -= row[j] * ch.dy[j]
		}
		ch.dy[k] = u / row[k]
		quadX += ch.dy[k] * ch.dy[k]
	}
	copy(ch.y, ch.st.X)
	var quadY, jacY float64
	for try := 0; ; try++ {
		if try == maxRedraws {
			ch.st.Counts.Invalid[phase]++
			return false
		}
		quadY, jacY = ch.drawIndependence()
		if ch.inBox() {
			break
		}
	}
	e := -0.5 * float64(indDoF+dc)
	logq := e*math.Log1p(quadX/indDoF) - e*math.Log1p(quadY/indDoF) + jac + jacY
	// The discrete coordinates, drawn jointly with the continuous ones from IndLevels (their
	// probabilities enter the ratio like the continuous density).
	for j, q := range a.IndLevels {
		i := ch.disc[j]
		u, l := ch.rng.Float64(), 0
		for l < len(q)-1 && u >= q[l] {
			u -= q[l]
			l++
		}
		logq += math.Log(q[int(ch.st.X[i])]) - math.Log(q[l])
		ch.y[i] = float64(l)
	}
	return ch.metropolis(phase, logq)
}

// maxRedraws bounds the redraws of a restricted independence proposal (common practice, no
// source: a box that catches fewer than 1 in 100 draws of the fitted t means the fit is useless
// there anyway).
const maxRedraws = 100

// drawIndependence draws the continuous coordinates of ch.y from the independence proposal and
// returns the t quadratic form of the draw and Σ log y over Log coordinates.
func (ch *Chain) drawIndependence() (quad, jac float64) {
	dc := len(ch.cont)
	a := &ch.st.Adapt
	g := 0.0
	for range indDoF {
		z := ch.rng.NormFloat64()
		g += z * z
	}
	f := math.Sqrt(indDoF / g)
	zz := 0.0
	for k := range ch.z {
		ch.z[k] = ch.rng.NormFloat64()
		zz += ch.z[k] * ch.z[k]
	}
	for k := range dc {
		row := a.IndChol[k*dc : k*dc+k+1]
		v := 0.0
		for j, l := range row {
			v += l * ch.z[j]
		}
		i := ch.cont[k]
		wy := a.IndMean[k] + f*v
		if ch.logc[k] {
			ch.y[i] = math.Exp(wy)
			jac += wy
		} else {
			ch.y[i] = wy
		}
	}
	return f * f * zz, jac
}

// inBox reports whether the continuous coordinates of ch.y lie in the target's box (always true
// without one). NaN is outside.
func (ch *Chain) inBox() bool {
	if ch.lo == nil {
		return true
	}
	for _, i := range ch.cont {
		if !(ch.y[i] >= ch.lo[i] && ch.y[i] <= ch.hi[i]) {
			return false
		}
	}
	return true
}

// rwMove is an adaptive random-walk Metropolis move of the continuous coordinates at positions
// pos (of cont), with the proposal state a: y = x + s·L·z (log coordinates multiplicatively, with
// the Hastings correction y/x). During warm-up the global scale s follows a Robbins–Monro
// recursion towards acceptance 0.234 (the gain decays so adaptation settles within warm-up).
func (ch *Chain) rwMove(a *AdaptState, pos []int, phase int, warm bool) bool {
	n := len(pos)
	s := math.Exp(a.LogScale)
	z := ch.z[:n]
	for k := range z {
		z[k] = ch.rng.NormFloat64()
	}
	copy(ch.y, ch.st.X)
	logq := 0.0 // log Hastings ratio q(x|y)/q(y|x): Σ log(y/x) over log coordinates
	for k, p := range pos {
		row := a.Chol[k*n : k*n+k+1]
		v := 0.0
		for j, l := range row {
			v += l * z[j]
		}
		i := ch.cont[p]
		if ch.logc[p] {
			ch.y[i] *= math.Exp(s * v)
			logq += s * v
		} else {
			ch.y[i] += s * v
		}
	}
	acc := false
	if ch.inBox() {
		acc = ch.metropolis(phase, logq)
	} else {
		ch.st.Counts.Invalid[phase]++
	}
	if warm {
		t := ch.st.Iter + 1
		if ch.split != nil && ch.st.Iter >= ch.annealEnd {
			t -= ch.annealEnd // adaptation restarted at the end of annealing
		}
		gain := math.Pow(float64(t), -robbinsMonroEx)
		r := 0.0
		if acc {
			r = 1
		}
		a.LogScale += gain * (r - targetAccept)
	}
	return acc
}

// metropolis evaluates the proposal in ch.y and accepts it with probability
// min(1, p(y)/p(x)·exp(logq)), logq being the log Hastings ratio of the proposal.
func (ch *Chain) metropolis(phase int, logq float64) bool {
	lp, parts := ch.evaluate(ch.y, ch.yDer)
	u := ch.rng.Float64()
	if math.IsNaN(lp) || math.IsInf(lp, 0) {
		// +Inf is as unusable as NaN: a density cannot be infinite at a sampled point.
		ch.st.Counts.Invalid[phase]++
		return false
	}
	if math.Log(u) < lp-ch.st.LogDensity+logq {
		ch.accept(lp, parts)
		return true
	}
	return false
}

// accept makes the proposal in ch.y (with its derived values in ch.yDer) the current point.
func (ch *Chain) accept(lp float64, parts [2]float64) {
	copy(ch.st.X, ch.y)
	ch.st.Derived, ch.yDer = ch.yDer, ch.st.Derived
	ch.st.LogDensity, ch.st.LogParts = lp, parts
}

// Annealed warm-up. A chain started from the prior can settle in a local mode of the
// likelihood — the demo's travel times have such traps, with log likelihoods 100+ below the
// posterior's — and a random walk never leaves it (R̂ then flags the run, but the run is lost).
// Raising the likelihood's weight gradually lets the chain find the main basin while the
// density is still broad and follow it as it narrows: simulated annealing (Kirkpatrick, Gelatt &
// Vecchi 1983) used only to reach the typical set. It touches warm-up alone, whose draws are
// discarded; from annealEnd on the chain samples the posterior itself, and the moment windows
// restart at W/4 and W/2, so the adapted proposal does not remember the annealed densities when
// Anneal ≤ 1/4. The start β and the geometric schedule are our choice (a prior draw typically
// has log likelihood −10⁴…−10⁶ on the demo, so β = 10⁻⁶ starts close to the prior).
const annealBetaMin = 1e-6

// annealBeta is β at sweep it: annealBetaMin^(1 − it/annealEnd) before annealEnd, then 1.
func (ch *Chain) annealBeta(it int64) float64 {
	if ch.split == nil || it >= ch.annealEnd {
		return 1
	}
	return math.Pow(annealBetaMin, 1-float64(it)/float64(ch.annealEnd))
}

// setBeta sets β for the current sweep.
func (ch *Chain) setBeta() { ch.beta = ch.annealBeta(ch.st.Iter) }

// anneal moves the current point to this sweep's β: its density is re-weighted from the stored
// parts, and at annealEnd evaluated afresh by the target's own LogDensity, so that the density
// of the post-annealing chain is exactly the unannealed one.
func (ch *Chain) anneal() {
	ch.setBeta()
	if ch.st.Iter == ch.annealEnd {
		ch.st.LogDensity = ch.t.LogDensity(ch.st.X, ch.st.Derived)
		ch.st.LogParts = [2]float64{}
		// The proposals adapted to the broad annealed densities (their global scales grow by
		// orders of magnitude while β is small, and the Robbins–Monro gain has decayed by the
		// time β = 1): adaptation starts afresh here, as at sweep 0.
		ch.resetMoments()
		ch.setInitialProposal()
		return
	}
	ch.st.LogDensity = ch.st.LogParts[0] + ch.beta*ch.st.LogParts[1]
}

// evaluate returns the chain's log density at x (filling derived) and, while annealing, its log
// prior and log likelihood.
func (ch *Chain) evaluate(x, derived []float64) (float64, [2]float64) {
	if ch.beta == 1 {
		return ch.t.LogDensity(x, derived), [2]float64{}
	}
	lp, ll := ch.split.LogParts(x, derived)
	if !finite(lp) || !finite(ll) {
		return math.Inf(-1), [2]float64{}
	}
	return lp + ch.beta*ll, [2]float64{lp, ll}
}

// adapt updates the running moments with the current point, restarts them at the window
// boundaries and refreshes the proposal's Cholesky factor every cholEvery sweeps.
func (ch *Chain) adapt() {
	if len(ch.cont) == 0 {
		return
	}
	it, w := ch.st.Iter, ch.cfg.Warmup
	if it == w/2 {
		a := &ch.st.Adapt
		a.PrevN, a.PrevMean, a.PrevCov = a.N, append([]float64(nil), a.Mean...), append([]float64(nil), a.Cov...)
		a.PrevLevelCounts = cloneCounts(a.LevelCounts)
	}
	if it == w/4 || it == w/2 {
		ch.resetMoments()
	}
	ch.adaptBlock(&ch.st.Adapt, ch.all)
	for j, i := range ch.disc {
		ch.st.Adapt.LevelCounts[j][int(ch.st.X[i])]++
	}
	for b, pos := range ch.blk {
		ch.adaptBlock(&ch.st.Blocks[b], pos)
	}
}

// cloneCounts deep-copies level counts.
func cloneCounts(c [][]float64) [][]float64 {
	out := make([][]float64, len(c))
	for j := range c {
		out[j] = append([]float64(nil), c[j]...)
	}
	return out
}

// adaptBlock adds the current point to the running moments of the block at positions pos and
// every cholEvery sweeps sets its proposal factor to that of (2.38²/d)(C + εD), keeping the old
// factor when the matrix is not positive definite (which a finite sample covariance plus εD
// always is, barring round-off).
func (ch *Chain) adaptBlock(a *AdaptState, pos []int) {
	d := len(pos)
	a.N++
	n := float64(a.N)
	delta := ch.delta[:d]
	for k, p := range pos {
		w := ch.st.X[ch.cont[p]]
		if ch.logc[p] {
			w = math.Log(w)
		}
		delta[k] = w - a.Mean[k]
		a.Mean[k] += delta[k] / n
	}
	// Welford: Cov holds the running covariance (divisor n).
	for r := range d {
		for c := range d {
			idx := r*d + c
			a.Cov[idx] += ((n-1)/n*delta[r]*delta[c] - a.Cov[idx]) / n
		}
	}
	if ch.st.Iter%cholEvery == 0 && a.N > int64(2*d+10) {
		if m, ok := ch.covCholesky(a, pos, 2.38*2.38/float64(d)); ok {
			a.Chol = m
		}
	}
}

// cholesky factors the symmetric matrix m (row-major n×n) in place into its lower factor,
// zeroing the upper triangle; false if m is not positive definite.
func cholesky(m []float64, n int) bool {
	for j := range n {
		s := m[j*n+j]
		for k := range j {
			s -= m[j*n+k] * m[j*n+k]
		}
		if !(s > 0) {
			return false
		}
		d := math.Sqrt(s)
		m[j*n+j] = d
		for i := j + 1; i < n; i++ {
			v := m[i*n+j]
			for k := range j {
				v -= m[i*n+k] * m[j*n+k]
			}
			m[i*n+j] = v / d
		}
		for k := j + 1; k < n; k++ {
			m[j*n+k] = 0
		}
	}
	return true
}
