package seismic

import "math"

// The ray integrals. In a spherically symmetric medium a ray keeps its ray
// parameter p = r sin(i)/v (s/rad), and with the slowness radius η = r/v one
// one-way pass through r_b ≤ r ≤ r_t adds
//
//	Δ = ∫ p dr / (r √(η² − p²)),   T = ∫ η² dr / (r √(η² − p²))
//
// (Bullen & Bolt 1985, Introduction to the Theory of Seismology, 4th ed.,
// ch. 7; Buland & Chapman 1983, BSSA 73, 1271–1302, whose τ(p) = T − pΔ
// is the same integral pair; chapter and equation placement from memory).
// Within a shell the velocity follows Bullen's law v = a r^b, fitted to the
// end values, so η = r^(1−b)/a and, with k = 1/(1−b) = ln(r_t/r_b)/ln(η_t/η_b),
// dr/r = k dη/η. Then, exactly (Bullen & Bolt 1985, §7.3, from memory),
//
//	Δ = k [acos(p/η)]_b^t,   T = k [√(η² − p²)]_b^t.
//
// Both differences are rewritten without cancellation and without the
// k → ∞ (b → 1, η constant) singularity. With s = √(η² − p²) at both ends,
// L = ln(r_t/r_b), the logarithmic mean M = (η_t − η_b)/ln(η_t/η_b) and
// w = L·M (a constant of the shell; w = L·η when η is constant):
//
//	T = w (η_t + η_b)/(s_t + s_b)
//	Δ = k (θ_t − θ_b),  cos θ = p/η,  tan(θ_t − θ_b) = p (η_t² − η_b²)/((s_t + s_b)(p² + s_t s_b)) = x
//	  = T · p/(p² + s_t s_b) · atan(x)/x
//	dΔ/dp = k (1/s_b − 1/s_t) = T/(s_t s_b),   dT/dp = p dΔ/dp.
//
// The first two follow from s_t − s_b = (η_t² − η_b²)/(s_t + s_b) and the
// tangent of a difference of angles; in the η-constant limit they give
// T = L η²/s and Δ = L p/s, the exact integrals of a constant integrand.
// Low-velocity shells (η decreasing outwards, b > 1) need no special case: k,
// η_t − η_b and x change sign together. A ray turns where η = p; in the
// turning shell (η_b < p ≤ η_t) the part from the turning point to the top is
//
//	Δ = k acos(p/η_t) = k atan2(s_t, p),   T = k s_t,   dΔ/dp = −k/s_t,
//
// so the turning-point singularity of the integrands is never sampled. The
// innermost shell (containing r = 0) has a constant velocity: rays are chords,
// k = 1 exactly.

// shell holds the p-independent constants of one Bullen-law shell for one
// wave type.
type shell struct {
	etaT, etaB float64 // η = r/v at the top and bottom (s/rad); etaB = 0 for the centre shell
	sum, diff  float64 // η_t + η_b, η_t − η_b
	w          float64 // ln(r_t/r_b)·(η_t − η_b)/ln(η_t/η_b)  (s)
	k          float64 // ln(r_t/r_b)/ln(η_t/η_b) = 1/(1 − b); +Inf if η_t = η_b; 1 for the centre shell
}

// newShell returns the constants of the Bullen-law shell r_b ≤ r ≤ r_t with
// slowness radii etaT, etaB; rb = 0 makes the constant-velocity centre shell.
func newShell(rt, rb, etaT, etaB float64) shell {
	sh := shell{etaT: etaT, etaB: etaB, sum: etaT + etaB, diff: etaT - etaB}
	if rb == 0 {
		sh.etaB, sh.sum, sh.diff, sh.k = 0, etaT, etaT, 1
		return sh
	}
	L := math.Log(rt / rb)
	t := (etaT - etaB) / etaB
	if t == 0 {
		sh.w = L * etaB
		sh.k = math.Inf(1)
		return sh
	}
	lg := math.Log1p(t)
	sh.w = L * etaB * t / lg
	sh.k = L / lg
	return sh
}

// etaAt returns η at radius r (r_b ≤ r ≤ r_t) on the shell's Bullen law:
// ln η is linear in ln r.
func (sh *shell) etaAt(rt, rb, r float64) float64 {
	if sh.etaB == 0 {
		return sh.etaT * r / rt
	}
	if sh.diff == 0 {
		return sh.etaB
	}
	f := math.Log(r/rb) / math.Log(rt/rb)
	return sh.etaB * math.Exp(f*math.Log1p(sh.diff/sh.etaB))
}

// atanc returns atan(x)/x: for |x| < 0.05 by its Maclaurin series through
// x¹⁰ (truncation error < x¹²/13 < 2e-17), evaluated in Estrin's scheme to
// keep the dependency chain short, otherwise by math.Atan.
func atanc(x float64) float64 {
	x2 := x * x
	if x2 < 0.0025 {
		x4 := x2 * x2
		a := 1 - x2*(1.0/3)
		b := 1.0/5 - x2*(1.0/7)
		c := 1.0/9 - x2*(1.0/11)
		return a + x4*(b+x4*c)
	}
	return math.Atan(x) / x
}

// legSum accumulates Δ, T and dΔ/dp of one ray pass.
type legSum struct {
	d, t, dd float64
}

func (a *legSum) add(b legSum, n float64) {
	a.d += n * b.d
	a.t += n * b.t
	a.dd += n * b.dd
}

// full returns the one-way integrals through every shell of sh; p must not
// exceed any η in sh (the caller guarantees it) and sh must not contain the
// centre shell. This is the hot loop: the shell integrals are written out
// in place (see addShell for the formulas) so that nothing is called per
// shell on the common path.
func full(sh []shell, p float64) legSum {
	var r legSum
	pp := p * p
	prevEta, prevS := math.NaN(), 0.0
	for i := range sh {
		c := &sh[i]
		st := prevS
		if c.etaT != prevEta {
			st = sqrtPos(c.etaT*c.etaT - pp)
		}
		sb := sqrtPos(c.etaB*c.etaB - pp)
		prevEta, prevS = c.etaB, sb
		ss := st * sb
		if ss == 0 {
			r.addShell(c, p, pp, st, sb)
			continue
		}
		q := pp + ss
		inv := 1 / ((st + sb) * q * ss)
		x := p * c.diff * c.sum * ss * inv
		x2 := x * x
		var ac float64 // atanc(x), inlined
		if x2 < 0.0025 {
			x4 := x2 * x2
			ac = (1 - x2*(1.0/3)) + x4*((1.0/5-x2*(1.0/7))+x4*(1.0/9-x2*(1.0/11)))
		} else {
			ac = math.Atan(x) / x
		}
		wi := c.w * c.sum * inv
		r.t += wi * q * ss
		r.d += wi * p * ss * ac
		r.dd += wi * q
	}
	return r
}

// sqrtPos is √max(v, 0).
func sqrtPos(v float64) float64 {
	if v <= 0 {
		return 0
	}
	return math.Sqrt(v)
}

// addShell adds the full-shell integrals of c (see the equations above) for
// ray parameter p (pp = p²) with s_t = st, s_b = sb. One division: with
// D = (s_t + s_b)(p² + s_t s_b) s_t s_b and Σ = η_t + η_b,
//
//	T = w Σ (p² + s_t s_b) s_t s_b / D,  Δ = w Σ p s_t s_b atanc(x) / D,
//	x = p (η_t − η_b) Σ s_t s_b / D,     dΔ/dp = w Σ (p² + s_t s_b) / D;
//
// when s_t s_b = 0 (a ray horizontal at a node) the division is by
// (s_t + s_b)(p² + s_t s_b) instead and dΔ/dp = +Inf.
func (r *legSum) addShell(c *shell, p, pp, st, sb float64) {
	ss := st * sb
	q := pp + ss
	ws := c.w * c.sum
	if ss == 0 {
		inv := 1 / ((st + sb) * q)
		x := p * c.diff * c.sum * inv
		r.t += ws * q * inv
		r.d += ws * p * inv * atanc(x)
		r.dd = math.Inf(1)
		return
	}
	inv := 1 / ((st + sb) * q * ss)
	x := p * c.diff * c.sum * ss * inv
	r.t += ws * q * ss * inv
	r.d += ws * p * ss * inv * atanc(x)
	r.dd += ws * q * inv
}

// turn returns the one-way integrals of a ray that enters sh at its top and
// turns inside it: full shells while η_b > p, then the turning shell's part
// above η = p (nothing if η_t < p already: the ray turns at a discontinuity).
// A ray with p equal to a node's η turns at that node. It also returns the
// index of the shell in which the ray turned and whether it turned at all
// (false if it reaches the bottom of sh with η_b > p, or p exceeds η at the
// top).
func turn(sh []shell, p float64) (legSum, int, bool) {
	var r legSum
	if len(sh) == 0 || p > sh[0].etaT {
		return r, 0, false
	}
	pp := p * p
	prevEta, prevS := math.NaN(), 0.0
	for i := range sh {
		c := &sh[i]
		if c.etaT < p {
			return r, i, true // turned at the top of this shell (η jumps below p)
		}
		st := prevS
		if c.etaT != prevEta {
			st = sqrtPos(c.etaT*c.etaT - pp)
		}
		if c.etaB == 0 || c.etaB < p {
			// Turning shell (or the centre shell, a constant-velocity chord).
			r.d += c.k * math.Atan2(st, p)
			r.t += c.k * st
			r.dd -= c.k / st
			return r, i, true
		}
		sb := sqrtPos(c.etaB*c.etaB - pp)
		prevEta, prevS = c.etaB, sb
		if ss := st * sb; ss == 0 {
			r.addShell(c, p, pp, st, sb)
		} else {
			// The common path of addShell, written out as in full.
			q := pp + ss
			inv := 1 / ((st + sb) * q * ss)
			x := p * c.diff * c.sum * ss * inv
			x2 := x * x
			var ac float64
			if x2 < 0.0025 {
				x4 := x2 * x2
				ac = (1 - x2*(1.0/3)) + x4*((1.0/5-x2*(1.0/7))+x4*(1.0/9-x2*(1.0/11)))
			} else {
				ac = math.Atan(x) / x
			}
			wi := c.w * c.sum * inv
			r.t += wi * q * ss
			r.d += wi * p * ss * ac
			r.dd += wi * q
		}
		if c.etaB == p {
			return r, i, true // horizontal at the bottom node
		}
	}
	return r, len(sh), false
}
