package mcmc

import (
	"math"
)

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
// zero density. This matters for a coordinate whose uniform prior is barely constrained: its
// posterior fills the box, so the t fitted to it puts much of its mass outside (measured; see
// DEVELOPERS.md, "Measurements behind design choices"). After maxRedraws misses the move is a rejection; the
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
