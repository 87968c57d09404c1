package mcmc

import (
	"crypto/sha256"
	"encoding/binary"
	"fmt"
	"math"
	"math/rand/v2"
)

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
			// level the data exclude costs a full density evaluation and is all but certain to
			// be rejected, so for a discrete coordinate that the data settle these moves are
			// evaluations spent for nothing (chosen by measurement; see DEVELOPERS.md,
			// "Measurements behind design choices"). The joint move keeps every level proposable (indLevelFloor), so the
			// chain stays irreducible.
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
