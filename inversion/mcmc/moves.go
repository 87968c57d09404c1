package mcmc

import (
	"math"
)

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
// likelihood, one whose log likelihood lies far below the main mode's, and a random walk never
// leaves it (R̂ then flags the run, but the run is lost).
// Raising the likelihood's weight gradually lets the chain find the main basin while the
// density is still broad and follow it as it narrows: simulated annealing (Kirkpatrick, Gelatt &
// Vecchi 1983) used only to reach the typical set. It touches warm-up alone, whose draws are
// discarded; from annealEnd on the chain samples the posterior itself, and the moment windows
// restart at W/4 and W/2, so the adapted proposal does not remember the annealed densities when
// Anneal ≤ 1/4. The start β and the geometric schedule are our choice: the first annealed
// density is close to the prior when β·log L is of order one or smaller at prior draws, which
// β = 10⁻⁶ gives for the log likelihoods of the targets it was chosen on (see DEVELOPERS.md,
// "Measurements behind design choices").
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
