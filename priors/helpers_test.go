package priors

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// The reference formulas in this file are written independently of the
// package code (plain math.Erf/Erfc, bisection, direct quadrature) so that
// the tests compare against something the implementation does not share.

// newRand returns a fixed-seed PCG generator.
func newRand(s1, s2 uint64) *rand.Rand { return rand.New(rand.NewPCG(s1, s2)) }

// refPhi is the standard normal density.
func refPhi(z float64) float64 {
	if math.IsInf(z, 0) {
		return 0
	}
	return math.Exp(-z*z/2) / math.Sqrt(2*math.Pi)
}

// refQ is the standard normal upper tail probability ½erfc(z/√2).
func refQ(z float64) float64 { return 0.5 * math.Erfc(z/math.Sqrt2) }

// refTN holds reference quantities of a truncated normal.
type refTN struct {
	mu, sigma, lo, hi float64
	a, b, z           float64 // standardised bounds and mass
}

// newRefTN computes the mass from erfc, on the upper side unless the whole
// interval is below the mean (where the lower tail is used, by symmetry).
func newRefTN(mu, sigma, lo, hi float64) refTN {
	r := refTN{mu: mu, sigma: sigma, lo: lo, hi: hi, a: (lo - mu) / sigma, b: (hi - mu) / sigma}
	if r.b < 0 {
		r.z = refQ(-r.b) - refQ(-r.a)
	} else {
		r.z = refQ(r.a) - refQ(r.b)
	}
	return r
}

func (r refTN) pdf(x float64) float64 {
	if x < r.lo || x > r.hi {
		return 0
	}
	return refPhi((x-r.mu)/r.sigma) / (r.sigma * r.z)
}

func (r refTN) cdf(x float64) float64 {
	switch {
	case x <= r.lo:
		return 0
	case x >= r.hi:
		return 1
	}
	s := (x - r.mu) / r.sigma
	if r.b < 0 {
		return (refQ(-s) - refQ(-r.a)) / r.z
	}
	return (refQ(r.a) - refQ(s)) / r.z
}

// moments: Johnson, Kotz & Balakrishnan (1994), Continuous Univariate
// Distributions vol. 1, 2nd ed., ch. 13, truncated normal (section number
// from memory): with λa = φ(a)/Z, λb = φ(b)/Z,
// mean = μ + σ(λa − λb), var = σ²[1 + aλa − bλb − (λa − λb)²].
func (r refTN) moments() (mean, variance float64) {
	la, lb := refPhi(r.a)/r.z, refPhi(r.b)/r.z
	ala, blb := 0.0, 0.0
	if !math.IsInf(r.a, 0) {
		ala = r.a * la
	}
	if !math.IsInf(r.b, 0) {
		blb = r.b * lb
	}
	m := la - lb
	return r.mu + r.sigma*m, r.sigma * r.sigma * (1 + ala - blb - m*m)
}

// bisect solves f(x) = target for increasing f on [lo, hi].
func bisect(f func(float64) float64, lo, hi, target float64) float64 {
	for range 200 {
		mid := 0.5 * (lo + hi)
		if mid == lo || mid == hi {
			break
		}
		if f(mid) < target {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5 * (lo + hi)
}

// integrate is composite 20-point Gauss–Legendre quadrature over n panels,
// spaced geometrically when geom is set (for densities like 1/x).
func integrate(f func(float64) float64, lo, hi float64, n int, geom bool) float64 {
	s := 0.0
	for i := 0; i < n; i++ {
		var a, b float64
		if geom {
			r := hi / lo
			a = lo * math.Pow(r, float64(i)/float64(n))
			b = lo * math.Pow(r, float64(i+1)/float64(n))
		} else {
			a = lo + (hi-lo)*float64(i)/float64(n)
			b = lo + (hi-lo)*float64(i+1)/float64(n)
		}
		s += quad.Fixed(f, a, b, 20, quad.Legendre{}, 0)
	}
	return s
}

// sampleMoments returns the mean, the variance and the standard errors of
// both from draws (the variance SE from the sample fourth central moment,
// SE² = (m4 − s⁴)/n).
func sampleMoments(x []float64) (mean, variance, seMean, seVar float64) {
	n := float64(len(x))
	for _, v := range x {
		mean += v
	}
	mean /= n
	var m2, m4 float64
	for _, v := range x {
		d := v - mean
		m2 += d * d
		m4 += d * d * d * d
	}
	m2 /= n
	m4 /= n
	variance = m2 * n / (n - 1)
	return mean, variance, math.Sqrt(m2 / n), math.Sqrt(math.Max(m4-m2*m2, 0) / n)
}

// closeRel reports whether got is within tol of want, relative to
// max(|want|, scale).
func closeRel(got, want, tol, scale float64) bool {
	return math.Abs(got-want) <= tol*math.Max(math.Abs(want), scale)
}

// checkClose fails the test when got and want differ by more than tol
// relative to max(|want|, scale).
func checkClose(t *testing.T, what string, got, want, tol, scale float64) {
	t.Helper()
	if !closeRel(got, want, tol, scale) {
		t.Errorf("%s = %.17g, want %.17g (tol %g × %g)", what, got, want, tol, math.Max(math.Abs(want), scale))
	}
}

// mustDist unwraps a constructor result in test tables.
func mustDist[D Dist](d D, err error) D {
	if err != nil {
		panic(err)
	}
	return d
}

// errOf keeps the error of a constructor result.
func errOf[D any](_ D, err error) error { return err }
