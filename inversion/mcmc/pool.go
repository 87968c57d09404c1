package mcmc

import (
	"errors"
	"fmt"
)

// Pooled warm-up. Each chain adapts its proposal from its own warm-up, and a chain alone can
// misjudge a direction it has not explored yet: along a coordinate that the data barely
// constrain (its posterior fills a uniform prior), a chain whose last warm-up window saw only a
// sliver of that range adapts a proposal as narrow as the sliver, in the random walk and in the
// independence proposal alike, and then needs far longer than the run to cover the range (R̂
// flags it; see DEVELOPERS.md, "Measurements behind design choices"). Chains started apart have between them seen much
// more of it. PoolWarmup therefore refits every chain's independence proposal from the moments of
// a warm-up window pooled over all chains — within-chain covariances plus the spread of the chain
// means — the inter-chain adaptation of Craiu, Rosenthal & Yang (2009, JASA 104, 1454). It is done
// at two fixed points of warm-up, half-way and at its end, with the chains stopped there: after
// warm-up the proposals are fixed, so each chain is a homogeneous Markov chain with the posterior
// as its invariant distribution, and the chains continue independently (their only link is that
// their proposals came from one warm-up). The result does not depend on the order in which the
// chains reached the pooling point.

// PoolWarmup fits the independence proposal of chains that have all just reached the same
// point of warm-up from their pooled moments (see refit):
//   - half-way through warm-up (Iter == Warmup/2), a provisional proposal from the window that
//     closed there; the chains then use independence moves in the second half of warm-up, mix
//     faster there, and so estimate the last window's moments — the final proposal's and the
//     random walk's — much better, which raises the post-warm-up independence acceptance and
//     the effective sample sizes (chosen by measurement; see DEVELOPERS.md, "Measurements behind design choices");
//   - at the end of warm-up (Iter == Warmup), the final proposal from the last window.
//
// One chain, or chains without independence moves, are left as they are.
func PoolWarmup(chains []*Chain) error {
	if len(chains) < 2 {
		return nil
	}
	ref := chains[0]
	it, w := ref.st.Iter, ref.cfg.Warmup
	if it != w && it != w/2 {
		return fmt.Errorf("pool warm-up: chain %d is at sweep %d, neither half-way (%d) nor at the end (%d) of warm-up", ref.st.Chain, it, w/2, w)
	}
	for _, ch := range chains {
		if ch.st.Iter != it {
			return fmt.Errorf("pool warm-up: chain %d is at sweep %d, chain %d at %d", ch.st.Chain, ch.st.Iter, ref.st.Chain, it)
		}
	}
	if len(ref.cont) == 0 || w == 0 || ref.cfg.Independence == 0 {
		return nil
	}
	adapts := make([]*AdaptState, len(chains))
	for i, ch := range chains {
		a := ch.st.Adapt
		if it == w/2 && it != w {
			a = AdaptState{N: a.PrevN, Mean: a.PrevMean, Cov: a.PrevCov, LevelCounts: a.PrevLevelCounts}
		}
		adapts[i] = &a
	}
	joint, err := poolMoments(adapts)
	if err != nil {
		return err
	}
	for _, ch := range chains {
		ch.refit(joint)
		a := &ch.st.Adapt
		a.PrevN, a.PrevMean, a.PrevCov, a.PrevLevelCounts = 0, nil, nil, nil
	}
	return nil
}

// poolMoments combines running moments (divisor-N covariances) of the same block:
// N = Σ Nᵢ, μ = Σ Nᵢμᵢ/N, C = Σ Nᵢ(Cᵢ + (μᵢ − μ)(μᵢ − μ)ᵀ)/N (the law of total covariance).
func poolMoments(as []*AdaptState) (AdaptState, error) {
	d := len(as[0].Mean)
	p := AdaptState{Mean: make([]float64, d), Cov: make([]float64, d*d)}
	if d == 0 {
		return p, errors.New("pool warm-up: no moments to pool")
	}
	for _, a := range as {
		if len(a.Mean) != d || len(a.Cov) != d*d {
			return p, errors.New("pool warm-up: chains disagree on the block size")
		}
		p.N += a.N
	}
	if p.N == 0 {
		return p, nil
	}
	for _, a := range as {
		w := float64(a.N) / float64(p.N)
		for k := range d {
			p.Mean[k] += w * a.Mean[k]
		}
	}
	// Level counts add up.
	if lc := as[0].LevelCounts; len(lc) > 0 {
		p.LevelCounts = make([][]float64, len(lc))
		for j := range lc {
			p.LevelCounts[j] = make([]float64, len(lc[j]))
			for _, a := range as {
				if len(a.LevelCounts) != len(lc) || len(a.LevelCounts[j]) != len(lc[j]) {
					return p, errors.New("pool warm-up: chains disagree on the discrete coordinates")
				}
				for l, v := range a.LevelCounts[j] {
					p.LevelCounts[j][l] += v
				}
			}
		}
	}
	for _, a := range as {
		w := float64(a.N) / float64(p.N)
		for r := range d {
			dr := a.Mean[r] - p.Mean[r]
			for c := range d {
				p.Cov[r*d+c] += w * (a.Cov[r*d+c] + dr*(a.Mean[c]-p.Mean[c]))
			}
		}
	}
	return p, nil
}

// refit sets the chain's independence proposal from the pooled moments of the joint block
// (setIndependence). The random-walk proposals keep the chain's own covariance and global scale:
// the scale was tuned to that covariance, and chains still far apart would give a pooled
// covariance (dominated by the spread of their means) far too wide for a local move, whose
// acceptance then collapses (measured; see DEVELOPERS.md, "Measurements behind design choices"). The independence
// proposal is fitted with its own inflation and needs no tuned scale; a poor fit costs only its
// own acceptance.
func (ch *Chain) refit(joint AdaptState) {
	if ch.cfg.Independence > 0 {
		ch.setIndependence(joint)
	}
}

// PoolTemperedWarmup pools the β = 1 replicas of tempered chains that have all just reached the
// same point of warm-up (see PoolWarmup). The hotter replicas keep their own proposals: once the
// ladders adapt, replica k of one chain and of another sample different densities.
func PoolTemperedWarmup(ts []*Tempered) error {
	cs := make([]*Chain, len(ts))
	for i, tp := range ts {
		cs[i] = tp.reps[0]
	}
	return PoolWarmup(cs)
}
