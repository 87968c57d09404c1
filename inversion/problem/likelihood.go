package problem

import (
	"errors"
	"math"
	"math/rand/v2"

	"plumb/forward"
	"plumb/priors"
)

// Dim is the number of sampled parameters (mcmc.Target).
func (p *Problem) Dim() int { return p.Space.Dim() }

// Levels gives the number of levels of each categorical parameter, 0 for continuous ones.
func (p *Problem) Levels() []int { return p.levels }

// NumDerived is the number of recorded derived values: log prior, log likelihood, one
// prediction per observation, then the derived layer radii.
func (p *Problem) NumDerived() int { return 2 + len(p.Observations) + len(p.derivedCol) }

// Model builds the forward model for x; ok is false when x violates a structural constraint
// (radii not increasing, density decreasing with depth when that constraint is on).
func (p *Problem) Model(x []float64) (forward.Model, bool) {
	r, ok := p.radii(x)
	if !ok {
		return forward.Model{}, false
	}
	n := len(p.layers)
	m := forward.Model{Layers: make([]forward.Layer, n)}
	for i, lp := range p.layers {
		in, out := r[i], r[i+1]
		liquid := lp.isLiquid(x)
		l := forward.Layer{
			Name: lp.name, Inner: in, Outer: out,
			Density: lp.density.poly(x, in, out),
			Vp:      lp.vp.poly(x, in, out),
			Fluid:   liquid,
		}
		if lp.hasVs && !liquid {
			l.Vs = lp.vs.poly(x, in, out)
		} else {
			l.Vs = forward.Const(0)
		}
		if lp.hasVisc {
			l.Viscosity = lp.viscosity.at(x)
		}
		m.Layers[i] = l
	}
	if p.monotone && !densityMonotone(p.layers, x) {
		return forward.Model{}, false
	}
	return m, true
}

// radii returns the layer boundaries (m) from the centre to the surface; false when they do not
// increase outward.
func (p *Problem) radii(x []float64) ([]float64, bool) {
	n := len(p.layers)
	r := make([]float64, n+1)
	r[n] = p.radius.at(x)
	for i := n - 1; i >= 1; i-- {
		if o := p.layers[i-1].outer; o != nil {
			r[i] = o.at(x)
		} else {
			r[i] = r[i+1] - p.layers[i].thickness.at(x)
		}
	}
	for i := 1; i <= n; i++ {
		if !(r[i] > r[i-1]) {
			return nil, false
		}
	}
	return r, true
}

// isLiquid reports the layer's state at x.
func (lp *layerPlan) isLiquid(x []float64) bool {
	if lp.stateParam >= 0 {
		return lp.stateLabels[int(x[lp.stateParam])] == StateLiquid
	}
	return lp.liquid
}

func (pr profile) poly(x []float64, in, out float64) forward.Poly {
	if !pr.gradient {
		return forward.Const(pr.inner.at(x))
	}
	return forward.Linear(in, pr.inner.at(x), out, pr.outer.at(x))
}

// solvedDensityMonotone checks a self-consistent structure at its layer boundaries (within an
// EOS layer, compression already makes density increase with depth).
func solvedDensityMonotone(st *forward.Structure, m forward.EOSModel) bool {
	for _, l := range m.Layers[1:] {
		r := l.Inner
		below := st.Model.Layers[st.LayerAt(r, false)].Density.At(r)
		above := st.Model.Layers[st.LayerAt(r, true)].Density.At(r)
		if below < above {
			return false
		}
	}
	return true
}

// prescribedMonotone checks the gradients of the layers without an EOS.
func prescribedMonotone(ls []layerPlan, x []float64) bool {
	for _, l := range ls {
		if l.eos == nil && l.density.inner.at(x) < l.density.outer.at(x) {
			return false
		}
	}
	return true
}

// densityMonotone: density does not decrease with depth — within each (linear) layer and across
// each boundary.
func densityMonotone(ls []layerPlan, x []float64) bool {
	for i, l := range ls {
		if l.density.inner.at(x) < l.density.outer.at(x) {
			return false
		}
		if i > 0 && ls[i-1].density.outer.at(x) < l.density.inner.at(x) {
			return false
		}
	}
	return true
}

// ErrConstraint reports a parameter vector that violates a structural constraint (radii not
// increasing, density decreasing with depth when that constraint is on): a zero prior.
var ErrConstraint = errors.New("structural constraint violated")

// Solve builds the model for x and solves its structure. An error means x is not a physical
// model (ErrConstraint, or the forward model's own error).
func (p *Problem) Solve(x []float64) (*forward.Structure, error) {
	if p.hydro {
		m, err := p.hydroModel(x)
		if err != nil {
			return nil, err
		}
		st, _, err := forward.SolveHydrostatic(m, forward.SolveOptions{})
		if err != nil {
			return nil, err
		}
		if p.monotone && (!solvedDensityMonotone(st, m) || !prescribedMonotone(p.layers, x)) {
			return nil, ErrConstraint
		}
		return st, nil
	}
	m, ok := p.Model(x)
	if !ok {
		return nil, ErrConstraint
	}
	return forward.Solve(m)
}

// LogDensity is the log posterior up to the evidence: log prior + Gaussian log likelihood
// (normalised), or the log prior alone in a prior-only run. It fills derived with the log prior,
// the log likelihood, the predictions (SI) and the derived radii (m). A non-physical model — or
// one for which an observable cannot be computed, such as a picked phase without an arrival —
// returns −Inf.
func (p *Problem) LogDensity(x, derived []float64) float64 {
	lp, ll := p.LogParts(x, derived)
	if p.priorOnly {
		return lp
	}
	return lp + ll
}

// LogParts returns the log prior and the log likelihood at x and fills derived like LogDensity
// (mcmc.Split: tempering raises the likelihood to a power). Outside the support, or for a
// non-physical model, the log prior is −Inf.
func (p *Problem) LogParts(x, derived []float64) (logPrior, logLik float64) {
	return p.logParts(x, derived, nil)
}

// logParts is LogParts with an optional per-chain cache of the structure-only results.
func (p *Problem) logParts(x, derived []float64, c *structCache) (logPrior, logLik float64) {
	lp := p.Space.LogPrior(x)
	if math.IsInf(lp, -1) || math.IsNaN(lp) {
		return math.Inf(-1), 0
	}
	var sh *shared
	if c != nil && c.hit(p, x) {
		sh = c.sh
	} else {
		st, err := p.Solve(x)
		if err == nil {
			sh = &shared{st: st}
		}
		if c != nil {
			c.set(p, x, sh)
		}
	}
	if sh == nil { // the structure could not be solved
		return math.Inf(-1), 0
	}
	ll := 0.0
	ev := &evaluation{shared: sh, p: p, x: x}
	for i, o := range p.Observations {
		v, err := o.Observable.eval(ev)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return math.Inf(-1), 0
		}
		z := (v - o.Value) / o.Sigma
		ll += -0.5*z*z - math.Log(o.Sigma) - 0.5*math.Log(2*math.Pi)
		derived[2+i] = v
	}
	derived[0], derived[1] = lp, ll
	k := 2 + len(p.Observations)
	r, _ := p.radii(x) // valid: Solve succeeded
	for i, l := range p.layers {
		if l.outerColumn {
			derived[k] = r[i+1]
			k++
		}
	}
	return lp, ll
}

// SamplePrior draws x from the prior (mcmc.PriorSampler; tempered chains move their β = 0
// replica this way).
func (p *Problem) SamplePrior(r *rand.Rand, x []float64) { p.Space.Sample(r, x) }

// Bounds is the box of the priors' supports (SI; ±Inf for categorical coordinates): the chains
// reject proposals outside it without evaluating anything and restrict their independence
// proposals to it (mcmc.Bounded).
func (p *Problem) Bounds() (lo, hi []float64) {
	lo, hi = make([]float64, p.Dim()), make([]float64, p.Dim())
	for i, par := range p.Space.Params {
		lo[i], hi[i] = math.Inf(-1), math.Inf(1)
		if par.Levels() == 0 {
			lo[i], hi[i] = par.Prior.Support()
		}
	}
	return lo, hi
}

// PriorOnly reports whether the problem ignores its likelihood (sampler.prior_only): the chains
// then sample the prior, and the predictions are the prior predictive.
func (p *Problem) PriorOnly() bool { return p.priorOnly }

// Residuals returns (predicted − observed)/σ for each observation from a derived vector.
func (p *Problem) Residuals(derived []float64) []float64 {
	r := make([]float64, len(p.Observations))
	for i, o := range p.Observations {
		r[i] = (derived[2+i] - o.Value) / o.Sigma
	}
	return r
}

// DerivedColumns names the derived layer radii recorded with every draw (output unit km), in
// layer order: the tops of layers placed by a thickness or by the planet radius.
func (p *Problem) DerivedColumns() []string { return p.derivedCol }

// DerivedRadii returns the values (m) of DerivedColumns at x; false when x violates a structural
// constraint.
func (p *Problem) DerivedRadii(x []float64) ([]float64, bool) {
	r, ok := p.radii(x)
	if !ok {
		return nil, false
	}
	out := make([]float64, 0, len(p.derivedCol))
	for i, l := range p.layers {
		if l.outerColumn {
			out = append(out, r[i+1])
		}
	}
	return out, true
}

// CategoricalLabels returns the levels of a categorical parameter; false for a continuous one.
func CategoricalLabels(par priors.Param) ([]string, bool) {
	c, ok := par.Prior.(priors.Categorical)
	if !ok {
		return nil, false
	}
	return c.Labels, true
}
