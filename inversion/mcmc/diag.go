package mcmc

// Convergence diagnostics for several chains of one scalar quantity: potential scale reduction
// (R̂), effective sample size (ESS) and Monte Carlo standard errors (MCSE), after Vehtari, Gelman,
// Simpson, Carpenter & Bürkner (2021), "Rank-normalization, folding, and localization: an improved
// R̂ for assessing convergence of MCMC", Bayesian Analysis 16(2), 667–718 (V21 below), Gelman
// et al. (2013), Bayesian Data Analysis, 3rd ed., ch. 11 (BDA3), and Geyer (1992), "Practical
// Markov chain Monte Carlo", Statistical Science 7(4), 473–483. Section and equation numbers
// below are from memory.
//
// All functions take draws[chain][iteration]. The conventions, which fix the numbers:
//   - split chains: each chain is cut into a first and a second half; for an odd length the middle
//     draw is dropped;
//   - rank normalisation: ranks r over all (split) draws pooled, ties averaged, mapped to
//     z = Φ⁻¹((r − 3/8)/(S + 1/4)), S the number of pooled draws (Blom 1958 offset);
//   - folding: |x − median| with the median over the pooled (split) draws;
//   - quantiles: type 7 (Quantile7);
//   - per-chain autocovariance γ̂ₜ by zero-padded FFT, biased (divisor n, Geyer 1992), combined over
//     m chains as ρ̂ₜ = 1 − (W − mean over chains of γ̂ₜ)/var̂⁺ (V21 §3.2), where W is the mean
//     within-chain sample variance and var̂⁺ = (n−1)/n·W + B/n (BDA3 eq. 11.3);
//   - Geyer's (1992) initial positive sequence of pair sums ρ̂₂ₖ + ρ̂₂ₖ₊₁, made monotone, and
//     ESS = S/τ̂ with τ̂ = −1 + 2·Σ_{t<2K} ρ̂ₜ + ρ̂_{2K} (V21 eq. 13), 2K the even lag of the
//     last pair examined; τ̂ is bounded below by 1/log₁₀ S, so ESS ≤ S·log₁₀ S.
//
// Undefined results are NaN; no input makes these functions panic. Common NaN cases are listed in
// each doc comment as "the invalid-input cases": no chains (fewer than 2 for R̂), chains of unequal
// length, a chain with fewer than 4 draws, a NaN or ±Inf draw, or all draws equal (zero variance,
// R̂ and ESS are 0/0). If each chain is constant but the chains differ, R̂ is +Inf (the chains have
// plainly not mixed) and ESS is small but finite.

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// diagMinDraws is the fewest draws per chain for which any diagnostic is computed.
const diagMinDraws = 4

// SplitRHat returns the basic split-R̂ of draws (no rank normalisation): with split chains of
// length n, W the mean within-chain sample variance and B/n the sample variance of the chain
// means, R̂ = √((n−1)/n + (B/n)/W) (BDA3 eq. 11.4 on split chains). It needs at least 2 chains
// and is NaN in the invalid-input cases (see the notes at the top of diag.go).
func SplitRHat(draws [][]float64) float64 {
	if !diagValid(draws, 2) {
		return math.NaN()
	}
	return rhatDiag(splitChainsDiag(draws))
}

// RankRHat returns the rank-normalised split-R̂ of V21: the larger of the bulk R̂ (split-R̂ of
// the rank-normalised split draws) and the tail R̂ (split-R̂ of the rank-normalised folded split
// draws). It needs at least 2 chains and is NaN in the invalid-input cases. It is also NaN when
// the folded draws are all equal (e.g. a two-valued quantity split exactly in half around its
// median), since the tail R̂ is then 0/0; the reference implementation does the same.
func RankRHat(draws [][]float64) float64 {
	if !diagValid(draws, 2) {
		return math.NaN()
	}
	split := splitChainsDiag(draws)
	bulk := rhatDiag(rankNormalDiag(split))
	tail := rhatDiag(rankNormalDiag(foldDiag(split)))
	if math.IsNaN(bulk) || math.IsNaN(tail) {
		return math.NaN()
	}
	return math.Max(bulk, tail)
}

// ESSBasic returns the effective sample size of draws without splitting the chains and without
// rank normalisation. One chain is allowed; the result is NaN in the invalid-input cases. With 4 or
// 5 draws per chain no autocorrelation pair beyond lag 1 is examined and τ̂ = 2 (ESS = S/2), as in
// the reference implementations.
func ESSBasic(draws [][]float64) float64 {
	if !diagValid(draws, 1) {
		return math.NaN()
	}
	return essDiag(draws)
}

// ESSBulk returns the bulk effective sample size of V21: the ESS of the rank-normalised split
// chains. One chain is allowed. The result is NaN in the invalid-input cases and for fewer than 6
// draws per chain (a half-chain needs 3).
func ESSBulk(draws [][]float64) float64 {
	if !diagValid(draws, 1) {
		return math.NaN()
	}
	return essDiag(rankNormalDiag(splitChainsDiag(draws)))
}

// ESSTail returns the tail effective sample size of V21: the smaller of the split-chain ESS of the
// indicators I(x ≤ q₀.₀₅) and I(x ≤ q₀.₉₅), with q the type-7 quantiles of all draws. The result is
// NaN in the invalid-input cases, for fewer than 6 draws per chain, and when an indicator is
// constant (at least 95 % of the draws equal to the largest value).
func ESSTail(draws [][]float64) float64 {
	if !diagValid(draws, 1) {
		return math.NaN()
	}
	sorted := pooledSortedDiag(draws)
	lo := essDiag(splitChainsDiag(indicatorDiag(draws, quantile7Sorted(sorted, 0.05))))
	hi := essDiag(splitChainsDiag(indicatorDiag(draws, quantile7Sorted(sorted, 0.95))))
	if math.IsNaN(lo) || math.IsNaN(hi) {
		return math.NaN()
	}
	return math.Min(lo, hi)
}

// MCSEMean returns the Monte Carlo standard error of the posterior mean estimate, s/√ESS, with s
// the sample standard deviation of all draws and ESS that of the split (not rank-normalised)
// chains. It is NaN in the invalid-input cases and for fewer than 6 draws per chain; in particular
// constant draws give NaN, not 0.
func MCSEMean(draws [][]float64) float64 {
	if !diagValid(draws, 1) {
		return math.NaN()
	}
	ess := essDiag(splitChainsDiag(draws))
	_, v := meanVarDiag(draws)
	return math.Sqrt(v / ess)
}

// MCSESd returns the Monte Carlo standard error of the posterior standard deviation estimate
// σ̂ = √E, E = mean(c²), c = x − x̄ over all draws, by the delta method without assuming normality:
// Var(Ê) ≈ (mean(c⁴) − E²)/ESS and MCSE(σ̂) = √(Var(Ê)/(4E)), with ESS the split-chain ESS of |c|.
// (The ESS of |c| rather than of c² is what the reference value for lp in
// testdata/mcmc-diagnostics requires; see diag_test.go.) NaN cases as for MCSEMean.
func MCSESd(draws [][]float64) float64 {
	if !diagValid(draws, 1) {
		return math.NaN()
	}
	mean, _ := meanVarDiag(draws)
	abs := make([][]float64, len(draws))
	var m2, m4 float64
	for i, ch := range draws {
		abs[i] = make([]float64, len(ch))
		for j, v := range ch {
			d := v - mean
			abs[i][j] = math.Abs(d)
			m2 += d * d
			m4 += d * d * d * d
		}
	}
	s := float64(len(draws) * len(draws[0]))
	m2 /= s
	m4 /= s
	ess := essDiag(splitChainsDiag(abs))
	return math.Sqrt((m4 - m2*m2) / ess / (4 * m2))
}

// MCSEQuantile returns the Monte Carlo standard error of the type-7 p-quantile estimate of all
// draws, 0 < p < 1, by the method of V21: with S draws and E the split-chain ESS of the indicator
// I(x ≤ q̂ₚ), the rank fraction of qₚ is taken as Beta(E·p + 1, E·(1−p) + 1) distributed; with
// a₁ < a₂ its Φ(−1) and Φ(1) quantiles (a central ±1σ interval), the result is half the distance
// between the order statistics x₍max(⌊a₁S⌋,1)₎ and x₍min(⌈a₂S⌉,S)₎ of the sorted draws. It is NaN
// for p outside (0, 1), in the cases where MCSEMean is NaN, and when the indicator is constant.
func MCSEQuantile(draws [][]float64, p float64) float64 {
	if !diagValid(draws, 1) || !(p > 0 && p < 1) {
		return math.NaN()
	}
	sorted := pooledSortedDiag(draws)
	ess := essDiag(splitChainsDiag(indicatorDiag(draws, quantile7Sorted(sorted, p))))
	if math.IsNaN(ess) || !(ess > 0) {
		return math.NaN()
	}
	// Beta.Quantile is deterministic; no random source is involved.
	b := distuv.Beta{Alpha: ess*p + 1, Beta: ess*(1-p) + 1}
	a1 := b.Quantile(distuv.UnitNormal.CDF(-1))
	a2 := b.Quantile(distuv.UnitNormal.CDF(1))
	s := len(sorted)
	i1 := max(int(math.Floor(a1*float64(s))), 1)
	i2 := min(int(math.Ceil(a2*float64(s))), s)
	return (sorted[i2-1] - sorted[i1-1]) / 2
}
