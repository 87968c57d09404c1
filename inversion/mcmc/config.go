package mcmc

import (
	"errors"
	"fmt"
	"math/rand/v2"
)

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
	// random walk, Dellaportas & Roberts 2003), with the Hastings correction y/x. Products of powers
	// of coordinates (x·y³, say) that the data constrain become linear there, which turns curved
	// ridges of the posterior into nearly straight ones that the adapted covariance can follow.
	Log []bool
	// Init draws a starting point (for example from the prior). Points with −Inf log density
	// are redrawn up to MaxInitTries times.
	Init func(r *rand.Rand, x []float64)
	// MaxInitTries bounds the search for a valid starting point (default 10000).
	MaxInitTries int
	// Blocks are extra groups of continuous coordinates (indices of the target's coordinates),
	// each moved every sweep, after the move of all continuous coordinates together, by its own
	// adaptive Metropolis proposal. A group of coordinates that are nearly independent of the
	// rest given the rest (say, the nuisance parameters of one observation) then mixes at its own
	// scale, which the joint move — whose scale is set by the most constrained direction —
	// cannot. Each block costs one density evaluation per sweep.
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
// a target's coordinates may differ by many orders of magnitude) and s a global scale tuned by a
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
