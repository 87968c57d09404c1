package problem

import "plumb/inversion/mcmc"

// structCache remembers, for one chain, the structure-only results of its last evaluation (the
// solved structure or its failure, Love numbers, ray-tracing medium), keyed by the exact values
// of the structural parameters — every parameter except the seismic events' source parameters.
// A move that changes only an event's distance, depth or origin time (sampler.event_blocks) then
// recomputes only that event's arrivals. The cached values are those a fresh evaluation would
// compute, so the draws are bit-identical with or without it.
type structCache struct {
	key   []float64
	valid bool
	sh    *shared // nil when the structure could not be solved
}

// hit reports whether x has the structural parameter values of the cached evaluation.
func (c *structCache) hit(p *Problem, x []float64) bool {
	if !c.valid {
		return false
	}
	for k, i := range p.structIdx {
		if x[i] != c.key[k] {
			return false
		}
	}
	return true
}

// set caches sh (nil: not solvable) for the structural parameter values of x.
func (c *structCache) set(p *Problem, x []float64, sh *shared) {
	c.key = c.key[:0]
	for _, i := range p.structIdx {
		c.key = append(c.key, x[i])
	}
	c.sh, c.valid = sh, true
}

// chainTarget is the problem as one chain sees it: the same density, plus its own structCache
// (chains run on several goroutines; each chain, with all its tempered replicas, runs on one at a
// time).
type chainTarget struct {
	*Problem
	cache structCache
}

// LogDensity is Problem.LogDensity through the chain's cache.
func (t *chainTarget) LogDensity(x, derived []float64) float64 {
	lp, ll := t.Problem.logParts(x, derived, &t.cache)
	if t.priorOnly {
		return lp
	}
	return lp + ll
}

// LogParts is Problem.LogParts through the chain's cache.
func (t *chainTarget) LogParts(x, derived []float64) (logPrior, logLik float64) {
	return t.Problem.logParts(x, derived, &t.cache)
}

// ChainTarget returns the problem with a fresh cache for one chain, or the problem itself
// when no parameter is an event's (a cache could then only hit on identical points).
func (p *Problem) ChainTarget() mcmc.Split {
	if len(p.structIdx) == p.Dim() {
		return p
	}
	return &chainTarget{Problem: p}
}
