package mcmc

import (
	"errors"
	"fmt"
	"math"
)

// batchKeep is the fewest complete batches a LogLikStat keeps once it has had 2·batchKeep: when
// the number of batches reaches 2·batchKeep, adjacent pairs are merged and the batch size doubles,
// so a long run always has between batchKeep and 2·batchKeep−1 batches and the batch size grows in
// proportion to the run (batch means with a growing batch size; the doubling scheme is common
// practice, no source).
const batchKeep = 32

// LogLikStat accumulates the log likelihood of one replica over the post-warm-up sweeps of one
// tempered chain: count, mean, sum of squared deviations (Welford) and non-overlapping batch means
// for a Monte Carlo standard error. All fields are plain numbers, so a LogLikStat is part of the
// serialised TemperedState and resumes exactly. The replicas of one chain see the same sweeps, so
// their batches are aligned in time (same BatchSize, same number of batches); Evidence relies on it.
type LogLikStat struct {
	// N is the number of sweeps accumulated.
	N int64 `json:"n"`
	// Mean is the mean log likelihood.
	Mean float64 `json:"mean"`
	// M2 is the sum of squared deviations from Mean.
	M2 float64 `json:"m2"`
	// BatchSize is the number of sweeps per batch (1 until the first merge).
	BatchSize int64 `json:"batch_size"`
	// Batches are the means of the complete batches, in time order.
	Batches []float64 `json:"batches"`
	// PartialSum and PartialN describe the batch in progress.
	PartialSum float64 `json:"partial_sum"`
	PartialN   int64   `json:"partial_n"`
}

// add accumulates one value.
func (s *LogLikStat) add(v float64) {
	s.N++
	d := v - s.Mean
	s.Mean += d / float64(s.N)
	s.M2 += d * (v - s.Mean)
	if s.BatchSize < 1 {
		s.BatchSize = 1
	}
	s.PartialSum += v
	s.PartialN++
	if s.PartialN < s.BatchSize {
		return
	}
	s.Batches = append(s.Batches, s.PartialSum/float64(s.BatchSize))
	s.PartialSum, s.PartialN = 0, 0
	if len(s.Batches) == 2*batchKeep {
		for i := range batchKeep {
			s.Batches[i] = 0.5 * (s.Batches[2*i] + s.Batches[2*i+1])
		}
		s.Batches = s.Batches[:batchKeep]
		s.BatchSize *= 2
	}
}

func (s LogLikStat) clone() LogLikStat {
	c := s
	c.Batches = append([]float64(nil), s.Batches...)
	return c
}

// Var is the sample variance of the log likelihood (divisor N−1); NaN for N < 2.
func (s LogLikStat) Var() float64 {
	if s.N < 2 {
		return math.NaN()
	}
	return s.M2 / float64(s.N-1)
}

// MCSE is the batch-means Monte Carlo standard error of Mean: the sample standard deviation of the
// complete batch means divided by √(number of batches) (non-overlapping batch means, e.g. Flegal &
// Jones 2010, Ann. Statist. 38, 1034 — from memory). It is NaN with fewer than 2 complete batches.
// Early in a run, when the batch size is still 1 or 2, it ignores autocorrelation and is too small.
func (s LogLikStat) MCSE() float64 {
	nb := len(s.Batches)
	if nb < 2 {
		return math.NaN()
	}
	return math.Sqrt(sampleVarDiag(s.Batches) / float64(nb))
}

// Evidence estimates the log marginal likelihood log Z = log ∫ π(x) L(x) dx by thermodynamic
// integration, log Z = ∫₀¹ E_β[log L] dβ, where E_β is the expectation under the power posterior
// ∝ π(x) L(x)^β (Gelman & Meng 1998, Statist. Sci. 13, 163; Lartillot & Philippe 2006, Syst.
// Biol. 55, 195–207). The identity gives log Z relative to the prior's normalising constant, so π
// must be a normalised density and L must include its normalising constants (for a Gaussian
// likelihood, its 1/√(2πσ²) factors) for log Z to be the absolute evidence.
//
// betas is the ladder 1 = β₀ > β₁ > … > β_{K−1} = 0 (Tempered.Betas after warm-up) and
// stats[chain][replica] the post-warm-up statistics of each chain (Tempered.LogLikStats), which
// are pooled, each chain weighted by its number of sweeps. All chains must have run on the same
// ladder; the function cannot check that.
//
// Quadrature. With f(β) = E_β[log L], the identity f′(β) = Var_β[log L] gives the slope at every
// rung from the replica's sample variance, so each interval is integrated by the cubic Hermite
// (corrected trapezoidal) rule ∫ₐᵇ g ≈ h/2·(g(a) + g(b)) + h²/12·(g′(a) − g′(b)), exact for cubics
// (the "corrected trapezium rule" of Friel, Hurn & Wyse 2014, Stat. Comput. 24, 709–723, from
// memory). Between positive rungs it is applied in u = log β to g(u) = β·f(β), g′(u) = β·f + β²·f′:
// ladders are roughly geometric and f typically varies on the scale of β itself (for a Gaussian
// likelihood in d dimensions f ≈ c − d/(2β) once the likelihood dominates), so g is smooth in u where
// f is steep in β. With the exact moments of the conjugate 1-D Gaussian on geometric ladders,
// this rule is far more accurate than the trapezoidal or the Hermite rule in β (chosen by
// measurement; see DEVELOPERS.md, "Measurements behind design choices"). The last interval [0, β_{K−2}] uses the
// Hermite rule in β.
//
// The standard error combines, in quadrature:
//   - Monte Carlo error: the estimate is Σ w_k m_k + Σ c_k v_k (m, v the replica means and
//     variances). The linear part is a fixed combination of the replica means, so the same
//     combination of the replicas' time-aligned batch means gives batch means of the estimate
//     itself; their variance / number of batches is its MCSE per chain, and chains are
//     independent (variance Σ (N_c/N)²·MCSE_c²). This includes the correlation between replicas
//     that exchanges create. The Monte Carlo error of the variances (the slope terms) is
//     neglected: they enter with weight h²/12.
//   - Discretisation error: with K ≥ 4, the ladder is coarsened by dropping every other interior
//     rung (which doubles the spacing in log β; once the odd, once the even rungs, so that every
//     interval is merged with a neighbour at least once, and the larger estimate is used); on
//     each coarse interval the coarse rule is compared with the fine rule over the same span,
//     and |difference|/3 is summed over the intervals (absolute values, so that errors of
//     opposite sign in different intervals cannot cancel, as signed sums were measured to do;
//     see DEVELOPERS.md, "Measurements behind design choices"); plus the size of the slope correction on
//     [0, β_{K−2}], which both ladders share (the difference between the Hermite and trapezoidal
//     rules there, a conservative stand-in for the Hermite rule's error). Richardson's estimate
//     for a fourth-order rule would divide by 2⁴ − 1 = 15, which assumes the asymptotic regime;
//     practical ladders need not be in it (on the conjugate Gaussian of TestEvidenceInputs the
//     ratio coarse-minus-fine / true error was measured well below 15), so dividing by 3 (as if
//     second order) keeps a margin (common practice to be conservative here, no source). With
//     K < 4 there is no coarser ladder, and the size of all slope corrections (Hermite minus
//     trapezoidal rule) is used instead. Finally, f is nondecreasing (f′ ≥ 0), so each
//     interval's integral lies between h·f at its ends; an interval whose Hermite value falls
//     outside that bracket (a ladder with a gap over the prior-to-likelihood transition, which
//     the coarsened ladders cannot detect) gets the bracket's midpoint, and its half-width is
//     added to the error.
//
// Limitation: no estimate made from the rungs alone can see structure in f between two rungs that
// no neighbouring rung resolves — for example one interval spanning the whole transition from
// prior-dominated to likelihood-dominated β, where the estimate can be wrong by far more than its
// error bar (an example is in DEVELOPERS.md, "Measurements behind design choices"). Use a ladder that is roughly
// geometric down to below that transition (the default initial ladder reaches 10⁻³; an adapted
// ladder needs enough replicas, see TestTemperedGaussianEvidence), and check that the estimate is
// stable when replicas are added.
//
// Errors: a ladder that is not strictly decreasing from 1 to 0, stats of the wrong shape, a
// replica with no sweeps, replicas of one chain with different counts or batch layouts, fewer than
// 2 complete batches, or non-finite statistics.
func Evidence(betas []float64, stats [][]LogLikStat) (logZ, stdErr float64, err error) {
	q, mcVar, disc, err := evidenceParts(betas, stats)
	if err != nil {
		return 0, 0, err
	}
	return finishEvidence(q, mcVar, disc)
}

// EvidenceLadders is Evidence for chains that each ran on their own ladder (betas[chain], as
// Tempered.Betas returns after an adapted warm-up: every chain adapts its ladder independently, so
// that it depends only on its own random streams). Each chain's estimate is computed on its own
// ladder; the estimates are averaged with weights N_c/N, their Monte Carlo variances combined as
// Σ (N_c/N)²·var_c, and their discretisation errors — systematic, not averaged down — as the
// weighted mean Σ (N_c/N)·err_c.
func EvidenceLadders(betas [][]float64, stats [][]LogLikStat) (logZ, stdErr float64, err error) {
	if len(betas) != len(stats) || len(stats) == 0 {
		return 0, 0, fmt.Errorf("evidence: %d ladders for %d chains", len(betas), len(stats))
	}
	total := 0.0
	for _, cs := range stats {
		if len(cs) > 0 {
			total += float64(cs[0].N)
		}
	}
	var q, mcVar, disc float64
	for c := range stats {
		qc, vc, dc, err := evidenceParts(betas[c], stats[c:c+1])
		if err != nil {
			return 0, 0, fmt.Errorf("chain %d: %w", c, err)
		}
		f := float64(stats[c][0].N) / total
		q += f * qc
		mcVar += f * f * vc
		disc += f * dc
	}
	return finishEvidence(q, mcVar, disc)
}

func finishEvidence(q, mcVar, disc float64) (logZ, stdErr float64, err error) {
	logZ, stdErr = q, math.Sqrt(mcVar+disc*disc)
	if math.IsNaN(logZ) || math.IsInf(logZ, 0) || math.IsNaN(stdErr) || math.IsInf(stdErr, 0) {
		return 0, 0, fmt.Errorf("evidence: non-finite result (log Z %g ± %g)", logZ, stdErr)
	}
	return logZ, stdErr, nil
}

// evidenceParts returns the estimate of Evidence, its Monte Carlo variance and its discretisation
// error.
func evidenceParts(betas []float64, stats [][]LogLikStat) (q, mcVar, disc float64, err error) {
	K := len(betas)
	if K < 2 {
		return 0, 0, 0, fmt.Errorf("evidence: ladder has %d temperatures, need at least 2", K)
	}
	if betas[0] != 1 || betas[K-1] != 0 {
		return 0, 0, 0, fmt.Errorf("evidence: ladder must run from β = 1 to β = 0, got %g … %g", betas[0], betas[K-1])
	}
	for k := 1; k < K; k++ {
		if !(betas[k] < betas[k-1]) {
			return 0, 0, 0, fmt.Errorf("evidence: ladder not strictly decreasing at index %d (%g after %g)", k, betas[k], betas[k-1])
		}
	}
	if len(stats) == 0 {
		return 0, 0, 0, errors.New("evidence: no chains")
	}
	var total float64
	for c, cs := range stats {
		if len(cs) != K {
			return 0, 0, 0, fmt.Errorf("evidence: chain %d has %d replicas, ladder %d", c, len(cs), K)
		}
		for k, s := range cs {
			switch {
			case s.N < 1:
				return 0, 0, 0, fmt.Errorf("evidence: chain %d replica %d has no post-warm-up sweeps", c, k)
			case s.N != cs[0].N || s.BatchSize != cs[0].BatchSize || len(s.Batches) != len(cs[0].Batches):
				return 0, 0, 0, fmt.Errorf("evidence: chain %d replica %d: counts or batches differ from replica 0 (not one tempered chain?)", c, k)
			case math.IsNaN(s.Mean) || math.IsInf(s.Mean, 0) || math.IsNaN(s.M2) || math.IsInf(s.M2, 0):
				return 0, 0, 0, fmt.Errorf("evidence: chain %d replica %d: non-finite statistics", c, k)
			}
		}
		if len(cs[0].Batches) < 2 {
			return 0, 0, 0, fmt.Errorf("evidence: chain %d has %d complete batches, need at least 2", c, len(cs[0].Batches))
		}
		total += float64(cs[0].N)
	}
	// Pooled means and variances per replica (the variance includes between-chain spread).
	m := make([]float64, K)
	v := make([]float64, K)
	for k := range K {
		for _, cs := range stats {
			m[k] += float64(cs[k].N) / total * cs[k].Mean
		}
		ss := 0.0
		for _, cs := range stats {
			d := cs[k].Mean - m[k]
			ss += cs[k].M2 + float64(cs[k].N)*d*d
		}
		if total > 1 {
			v[k] = ss / (total - 1)
		}
	}
	w, c, tail, bracket := tiWeights(betas, m, v)
	q = dot(w, m) + dot(c, v)
	if K >= 4 {
		// Coarse intervals [β_j, β_k] with k, j = 0, 2, 4, … up to K−2 (the last may span one
		// fine interval); each compared with the fine rule over the same span, absolute
		// differences summed so that errors of opposite sign in different intervals do not cancel.
		// Two coarsenings, dropping the odd or the even interior rungs, so that every interval is
		// merged with a neighbour in at least one of them; the larger estimate is used.
		for first := range 2 {
			d := 0.0
			for k := first; k < K-2; k += 2 {
				j := min(k+2, K-2)
				fine := 0.0
				for l := k; l < j; l++ {
					fine += hermiteLog(betas[l], betas[l+1], m[l], m[l+1], v[l], v[l+1])
				}
				d += math.Abs(fine-hermiteLog(betas[k], betas[j], m[k], m[j], v[k], v[j])) / 3
			}
			disc = max(disc, d)
		}
		disc += math.Abs(dot(tail, v))
	} else {
		disc = math.Abs(q - trapezoidLog(betas, m)) // Hermite minus trapezoidal rule
	}
	disc += bracket
	// Monte Carlo variance from the time-aligned batch means of Σ w_k ℓ_k.
	for _, cs := range stats {
		nb := len(cs[0].Batches)
		qb := make([]float64, nb)
		for k := range K {
			for j, b := range cs[k].Batches {
				qb[j] += w[k] * b
			}
		}
		f := float64(cs[0].N) / total
		mcVar += f * f * sampleVarDiag(qb) / float64(nb)
	}
	return q, mcVar, disc, nil
}

// tiWeights returns the weights of the thermodynamic-integration rule (the estimate is
// Σ w_k m_k + Σ c_k v_k), the slope weights of the last interval [0, β_{K−2}] alone (tail), and the
// summed half-widths of the intervals where the rule was replaced by the monotone bracket.
//
// Bracket: f is nondecreasing (f′ = Var_β[log L] ≥ 0), so the integral over [β_j, β_k] lies
// between h·f(β_j) and h·f(β_k), h = β_k − β_j. Where the Hermite value falls outside (an interval
// too wide for the rule, e.g. one spanning the whole prior-to-likelihood transition), the interval
// gets the bracket's midpoint — the trapezoidal rule in β — and its half-width h·|f(β_k) − f(β_j)|/2
// is added to the discretisation error (our safeguard, no source).
func tiWeights(betas, m, v []float64) (w, c, tail []float64, bracket float64) {
	K := len(betas)
	w, c, tail = make([]float64, K), make([]float64, K), make([]float64, K)
	for k := 0; k+1 < K; k++ {
		j := k + 1 // interval [β_j, β_k], β_j < β_k
		hb := betas[k] - betas[j]
		var val float64
		if j == K-1 { // [0, β_k]: Hermite rule in β
			val = hb/2*(m[k]+m[j]) + hb*hb/12*(v[j]-v[k])
		} else {
			val = hermiteLog(betas[k], betas[j], m[k], m[j], v[k], v[j])
		}
		lo, hi := hb*min(m[k], m[j]), hb*max(m[k], m[j])
		if !(val >= lo && val <= hi) {
			w[k] += hb / 2
			w[j] += hb / 2
			bracket += (hi - lo) / 2
			continue
		}
		if j == K-1 {
			w[k] += hb / 2
			w[j] += hb / 2
			c[j] += hb * hb / 12
			c[k] -= hb * hb / 12
			tail[j] += hb * hb / 12
			tail[k] -= hb * hb / 12
			continue
		}
		// Hermite rule in u = log β on g = β f, g′ = β f + β² f′ (as hermiteLog).
		bk, bj := betas[k], betas[j]
		h := math.Log(bk) - math.Log(bj)
		w[j] += h/2*bj + h*h/12*bj
		w[k] += h/2*bk - h*h/12*bk
		c[j] += h * h / 12 * bj * bj
		c[k] -= h * h / 12 * bk * bk
	}
	return w, c, tail, bracket
}

// hermiteLog is the Hermite rule in u = log β over [βj, βk] (βk > βj > 0) for f with means fk, fj
// and slopes (variances) vk, vj; tiWeights applies the same rule through weights.
func hermiteLog(bk, bj, fk, fj, vk, vj float64) float64 {
	h := math.Log(bk) - math.Log(bj)
	gk, gj := bk*fk, bj*fj
	dk, dj := bk*fk+bk*bk*vk, bj*fj+bj*bj*vj
	return h/2*(gk+gj) + h*h/12*(dj-dk)
}

// trapezoidLog is the trapezoidal counterpart of the rule of tiWeights (in log β between positive
// rungs, in β on the last interval).
func trapezoidLog(betas, m []float64) float64 {
	K := len(betas)
	s := 0.0
	for k := 0; k+1 < K; k++ {
		if k == K-2 {
			s += (betas[k] - betas[k+1]) / 2 * (m[k] + m[k+1])
			continue
		}
		h := math.Log(betas[k]) - math.Log(betas[k+1])
		s += h / 2 * (betas[k]*m[k] + betas[k+1]*m[k+1])
	}
	return s
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}
