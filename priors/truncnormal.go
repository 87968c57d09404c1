package priors

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/mathext"
)

// TruncNormal is the normal distribution with mean Mu and standard deviation
// Sigma restricted to [Min, Max] and renormalised so that it integrates to 1
// over that interval. Min may be −Inf and Max may be +Inf (one-sided
// truncation).
//
// Build it with NewTruncNormal, which also precomputes the normalisation;
// a value built as a literal (or whose fields were changed afterwards) is
// still correct but recomputes the normalisation on every call. Methods of a
// value that fails Validate return −Inf (LogProb) or NaN (the others).
//
// Numerics. With standardised bounds a = (Min−Mu)/Sigma, b = (Max−Mu)/Sigma:
//
//   - Wide intervals, (b−a)·max(1, |a|, |b|) ≥ 1: the mass Z = Φ(b) − Φ(a)
//     is formed from erfc on the side of the distribution that holds the
//     interval (Q(a) − Q(b) when a ≥ 0, Φ(b) − Φ(a) when b ≤ 0,
//     1 − Φ(a) − Q(b) otherwise, where Q = 1 − Φ is evaluated as ½erfc(z/√2)),
//     so deep tails keep full relative precision. Sampling is by inverse CDF:
//     for p the mass below the draw is Φ(a) + pZ and the mass above it is
//     Q(b) + (1−p)Z; the smaller of the two is inverted with Φ⁻¹ (gonum
//     mathext.NormalQuantile, a rational approximation that keeps relative
//     precision for small probabilities), so no 1 − p cancellation occurs.
//   - Narrow intervals, (b−a)·max(1, |a|, |b|) < 1, where differences of Φ
//     would cancel: the density relative to its value at c, the point of
//     [a, b] closest to 0, is exp(−(t²−c²)/2), which stays within a factor e
//     of 1 over the interval. Its integrals are evaluated with
//     16-point Gauss–Legendre quadrature (exact to rounding for this entire,
//     slowly varying integrand), and the inverse CDF is found by a safeguarded
//     Newton iteration. Sampling is exact accept–reject: a uniform proposal
//     on [a, b] accepted with probability exp(−(t²−c²)/2) ≥ e^{−1}.
//
// Both sampling schemes are exact. An interval holding less than
// MinTruncMass of the untruncated normal's probability is rejected as a
// configuration error.
type TruncNormal struct {
	Mu, Sigma, Min, Max float64

	tab tnTable // derived constants for the parameters above
}

// MinTruncMass is the smallest probability of the untruncated normal that
// the truncation interval of a TruncNormal may hold (about 7 standard
// deviations into one tail). Smaller masses almost always mean a mistyped
// bound or unit. The value is a chosen threshold (common practice, no
// source).
const MinTruncMass = 1e-12

// glPoints is the number of Gauss–Legendre nodes used on narrow intervals.
const glPoints = 16

// tnTable holds the constants derived from the parameters of a TruncNormal.
type tnTable struct {
	mu, sigma, min, max float64 // parameters the table was built for
	built               bool    // the table was filled in
	valid               bool    // parameters describe a proper distribution

	a, b   float64 // standardised bounds
	narrow bool    // use the quadrature path
	mass   float64 // Φ(b) − Φ(a), the untruncated probability of [a, b]
	k      float64 // LogProb(x) = k − z²/2 with z = (x − mu)/sigma

	// wide path
	pa, qa, qb float64 // Φ(a), Q(a), Q(b)

	// narrow path
	c float64 // point of [a, b] closest to 0
	g float64 // ∫_a^b exp(−(t² − c²)/2) dt
}

// NewTruncNormal returns the normal distribution N(mu, sigma²) truncated to
// [min, max]. mu and sigma must be finite with sigma > 0; min < max, neither
// NaN (min may be −Inf, max may be +Inf); and the interval must hold at
// least MinTruncMass of the untruncated probability.
func NewTruncNormal(mu, sigma, min, max float64) (TruncNormal, error) {
	t := TruncNormal{Mu: mu, Sigma: sigma, Min: min, Max: max}
	if err := t.Validate(); err != nil {
		return TruncNormal{}, err
	}
	t.tab = newTNTable(mu, sigma, min, max)
	return t, nil
}

// Validate reports whether t is a proper distribution.
func (t TruncNormal) Validate() error {
	const kind = "truncated normal"
	if err := validateNormalParams(kind, t.Mu, t.Sigma); err != nil {
		return err
	}
	if math.IsNaN(t.Min) || math.IsNaN(t.Max) {
		return fmt.Errorf("%s prior: bounds [%v, %v] contain NaN", kind, t.Min, t.Max)
	}
	if !(t.Min < t.Max) {
		return fmt.Errorf("%s prior: min (%s) must be less than max (%s)", kind, num(t.Min), num(t.Max))
	}
	tab := newTNTable(t.Mu, t.Sigma, t.Min, t.Max)
	if !tab.valid {
		dist := 0.0 // distance of the interval from the mean, in sigmas
		switch {
		case tab.a > 0:
			dist = tab.a
		case tab.b < 0:
			dist = -tab.b
		}
		return fmt.Errorf("%s prior: interval [%s, %s] holds negligible mass: only %.3g of the probability of "+
			"normal(%s, %s), at least %g is required (the interval is %.3g sigma wide and lies %.3g sigma "+
			"from the mean); check the bounds and their units",
			kind, num(t.Min), num(t.Max), tab.mass, num(t.Mu), num(t.Sigma), MinTruncMass, tab.b-tab.a, dist)
	}
	return nil
}

// newTNTable computes the derived constants. valid is false when the
// parameters are not a proper distribution.
func newTNTable(mu, sigma, min, max float64) tnTable {
	tab := tnTable{mu: mu, sigma: sigma, min: min, max: max, built: true}
	if !isFinite(mu) || !isFinite(sigma) || !(sigma > 0) || !(min < max) {
		return tab
	}
	a, b := (min-mu)/sigma, (max-mu)/sigma
	tab.a, tab.b = a, b
	w := (b - a) * math.Max(1, math.Max(math.Abs(a), math.Abs(b)))
	if w < 1 { // finite and narrow
		tab.narrow = true
		switch {
		case a >= 0:
			tab.c = a
		case b <= 0:
			tab.c = b
		}
		tab.g = tab.relIntegral(a, b)
		tab.mass = stdNormalPDF(tab.c) * tab.g
		tab.k = 0.5*tab.c*tab.c - math.Log(sigma) - math.Log(tab.g)
	} else {
		tab.pa, tab.qa, tab.qb = stdNormalCDF(a), stdNormalSF(a), stdNormalSF(b)
		switch {
		case a >= 0:
			tab.mass = tab.qa - tab.qb
		case b <= 0:
			tab.mass = stdNormalCDF(b) - tab.pa
		default:
			tab.mass = 1 - tab.pa - tab.qb
		}
		tab.k = -math.Log(sigma) - halfLog2Pi - math.Log(tab.mass)
	}
	tab.valid = tab.mass >= MinTruncMass && isFinite(tab.k)
	return tab
}

// table returns the precomputed constants if they match the current fields,
// otherwise computes them afresh.
func (t TruncNormal) table() tnTable {
	if t.tab.built && t.tab.mu == t.Mu && t.tab.sigma == t.Sigma && t.tab.min == t.Min && t.tab.max == t.Max {
		return t.tab
	}
	return newTNTable(t.Mu, t.Sigma, t.Min, t.Max)
}

// relIntegral returns ∫_lo^hi exp(−(t² − c²)/2) dt by Gauss–Legendre
// quadrature (narrow path only: lo, hi finite).
func (tab *tnTable) relIntegral(lo, hi float64) float64 {
	return tab.relMoment(lo, hi, 0, 0)
}

// relMoment returns ∫_lo^hi (t − ref)^n exp(−(t² − c²)/2) dt for n ≤ 2 by
// Gauss–Legendre quadrature.
func (tab *tnTable) relMoment(lo, hi, ref float64, n int) float64 {
	if !(lo < hi) {
		return 0
	}
	var leg quad.Legendre
	c2 := tab.c * tab.c
	s := 0.0
	for i := 0; i < glPoints; i++ {
		x, w := leg.FixedLocationSingle(glPoints, i, lo, hi)
		f := math.Exp(-0.5 * (x*x - c2))
		for j := 0; j < n; j++ {
			f *= x - ref
		}
		s += w * f
	}
	return s
}

// LogProb returns the log density at x: log φ((x−Mu)/Sigma) − log Sigma −
// log Z inside [Min, Max], −Inf elsewhere.
func (t TruncNormal) LogProb(x float64) float64 {
	if !(x >= t.Min && x <= t.Max) {
		return math.Inf(-1)
	}
	tab := t.table()
	if !tab.valid {
		return math.Inf(-1)
	}
	z := (x - t.Mu) / t.Sigma
	return tab.k - 0.5*z*z
}

// Rand draws a value using r: by inverse CDF on wide intervals, by exact
// accept–reject from a uniform proposal on narrow ones (see TruncNormal).
func (t TruncNormal) Rand(r *rand.Rand) float64 {
	tab := t.table()
	if !tab.valid {
		return math.NaN()
	}
	if !tab.narrow {
		return t.Quantile(r.Float64())
	}
	// The target density relative to its maximum at c is
	// exp(−(s² − c²)/2) ≥ e^{−1} on a narrow interval, so a uniform proposal
	// accepted with that probability is exact and accepts at least 37% of
	// the time.
	c2 := tab.c * tab.c
	for {
		s := tab.a + (tab.b-tab.a)*r.Float64()
		if r.Float64() < math.Exp(-0.5*(s*s-c2)) {
			return clamp(t.Mu+t.Sigma*s, t.Min, t.Max)
		}
	}
}

// Quantile returns the inverse CDF at p (Min at p = 0, Max at p = 1).
func (t TruncNormal) Quantile(p float64) float64 {
	tab := t.table()
	if !validP(p) || !tab.valid {
		return math.NaN()
	}
	switch p {
	case 0:
		return t.Min
	case 1:
		return t.Max
	}
	var s float64
	if tab.narrow {
		s = tab.narrowQuantile(p)
	} else {
		lower := tab.pa + p*tab.mass     // Φ(s)
		upper := tab.qb + (1-p)*tab.mass // Q(s)
		if lower <= upper {
			s = mathext.NormalQuantile(clamp(lower, 0, 1))
		} else {
			s = -mathext.NormalQuantile(clamp(upper, 0, 1))
		}
	}
	return clamp(t.Mu+t.Sigma*clamp(s, tab.a, tab.b), t.Min, t.Max)
}

// narrowQuantile solves ∫_a^s exp(−(t²−c²)/2) dt = p·g for s by Newton's
// method safeguarded with bisection.
func (tab *tnTable) narrowQuantile(p float64) float64 {
	lo, hi := tab.a, tab.b
	target := p * tab.g
	s := tab.a + p*(tab.b-tab.a) // the density is nearly flat: a close start
	// The rounding noise of the quadrature moves the root by about
	// 1e-16·(b − a); stop well above that.
	tol := 1e-14*(tab.b-tab.a) + 4e-16*math.Max(math.Abs(tab.a), math.Abs(tab.b))
	for range 100 {
		f := tab.relIntegral(tab.a, s) - target
		if f == 0 {
			return s
		}
		if f > 0 {
			hi = s
		} else {
			lo = s
		}
		step := f / math.Exp(-0.5*(s*s-tab.c*tab.c))
		if math.Abs(step) <= tol {
			return clamp(s-step, tab.a, tab.b)
		}
		next := s - step
		if !(next > lo && next < hi) {
			next = 0.5 * (lo + hi)
		}
		if hi-lo <= tol {
			return next
		}
		s = next
	}
	return s
}

// CDF returns the probability of a value ≤ x.
func (t TruncNormal) CDF(x float64) float64 {
	tab := t.table()
	switch {
	case math.IsNaN(x) || !tab.valid:
		return math.NaN()
	case x <= t.Min:
		return 0
	case x >= t.Max:
		return 1
	}
	s := (x - t.Mu) / t.Sigma
	var f float64
	switch {
	case tab.narrow:
		f = tab.relIntegral(tab.a, s) / tab.g
	case s <= 0:
		f = (stdNormalCDF(s) - tab.pa) / tab.mass
	default:
		f = (tab.qa - stdNormalSF(s)) / tab.mass
	}
	return clamp(f, 0, 1)
}

// Support returns [Min, Max].
func (t TruncNormal) Support() (lo, hi float64) { return t.Min, t.Max }

// stdMoments returns the mean and variance of the standardised truncated
// variable. Wide path: the closed forms of Johnson, Kotz & Balakrishnan
// (1994, Continuous Univariate Distributions vol. 1, 2nd ed., ch. 13,
// section on truncated normal distributions; section number from memory):
//
//	E = (φ(a) − φ(b))/Z,  Var = 1 + (aφ(a) − bφ(b))/Z − E².
//
// Narrow path: quadrature about the interval midpoint, which avoids the
// cancellation of the closed form.
func (tab *tnTable) stdMoments() (mean, variance float64) {
	if tab.narrow {
		mid := 0.5 * (tab.a + tab.b)
		m1 := tab.relMoment(tab.a, tab.b, mid, 1) / tab.g
		m2 := tab.relMoment(tab.a, tab.b, mid, 2) / tab.g
		return mid + m1, math.Max(m2-m1*m1, 0)
	}
	pa, pb := stdNormalPDF(tab.a), stdNormalPDF(tab.b)
	apa, bpb := 0.0, 0.0 // a·φ(a), b·φ(b), zero at infinite bounds
	if !math.IsInf(tab.a, 0) {
		apa = tab.a * pa
	}
	if !math.IsInf(tab.b, 0) {
		bpb = tab.b * pb
	}
	mean = (pa - pb) / tab.mass
	variance = 1 + (apa-bpb)/tab.mass - mean*mean
	return mean, math.Max(variance, 0)
}

// Mean returns the mean of the truncated distribution.
func (t TruncNormal) Mean() float64 {
	tab := t.table()
	if !tab.valid {
		return math.NaN()
	}
	m, _ := tab.stdMoments()
	return clamp(t.Mu+t.Sigma*m, t.Min, t.Max)
}

// StdDev returns the standard deviation of the truncated distribution.
func (t TruncNormal) StdDev() float64 {
	tab := t.table()
	if !tab.valid {
		return math.NaN()
	}
	_, v := tab.stdMoments()
	return t.Sigma * math.Sqrt(v)
}

// String returns e.g. "normal(3300, 200) on [3000, 4000]".
func (t TruncNormal) String() string {
	return "normal(" + num(t.Mu) + ", " + num(t.Sigma) + ") on [" + num(t.Min) + ", " + num(t.Max) + "]"
}
