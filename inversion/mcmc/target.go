package mcmc

import (
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

// PriorSampler is an optional interface of a Split target that can draw exactly from its prior
// (the density exp(logPrior), in the target's own coordinates). A tempered chain then moves its
// β = 0 replica by such draws (see Chain.priorSweep).
type PriorSampler interface {
	SamplePrior(r *rand.Rand, x []float64)
}

// Split is a Target whose log density is a log prior plus a log likelihood, so that it can be
// tempered.
type Split interface {
	Target
	// LogParts returns log prior and log likelihood at x and fills derived exactly like LogDensity
	// (LogDensity = logPrior + logLik). A point outside the support has logPrior = −Inf (or NaN).
	LogParts(x, derived []float64) (logPrior, logLik float64)
}
