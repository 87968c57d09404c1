package eos

import (
	"math"
	"testing"
)

// relErr is |got − want|/|want| (|got − want| when want is 0).
func relErr(got, want float64) float64 {
	if want == 0 {
		return math.Abs(got)
	}
	return math.Abs(got-want) / math.Abs(want)
}

func checkRel(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if e := relErr(got, want); !(e <= tol) {
		t.Errorf("%s: got %.17g, want %.17g (relative error %.3g > %.3g)", what, got, want, e, tol)
	}
}

// deriv6 is the sixth-order central difference of g at x with step h (Fornberg 1988,
// Math. Comp. 51, 699, table 1: weights −1/60, 3/20, −3/4, 0, 3/4, −3/20, 1/60).
func deriv6(g func(float64) float64, x, h float64) float64 {
	return (-g(x-3*h) + 9*g(x-2*h) - 45*g(x-h) + 45*g(x+h) - 9*g(x+2*h) + g(x+3*h)) / (60 * h)
}

// fitCase is a set of reference parameters used by several tests. The numbers are typical
// planetary materials (rounded; common practice, no source); the tests check identities that
// hold for any parameters, so nothing depends on their exact values.
type fitCase struct {
	name          string
	rho0, k0, k0p float64
}

var fitCases = []fitCase{
	{"iron-like", 8269, 163.4e9, 5.38},
	{"perovskite-like", 4108, 253e9, 3.9},
	{"K0p=4", 3000, 100e9, 4},
	{"ice-like", 1000, 10e9, 7},
	{"soft K0p=2.5", 3300, 130e9, 2.5},
}

// compressions are ρ/ρ0 values 1.0, 1.05, …, 2.5.
func compressions() []float64 {
	var s []float64
	for i := 0; i <= 30; i++ {
		s = append(s, 1+0.05*float64(i))
	}
	return s
}

// eosFor returns BM3 and Vinet built from c (and the given shear law), failing the test on error.
func eosFor(t testing.TB, c fitCase, sh ShearLaw) []EOS {
	t.Helper()
	b, err := NewBM3(c.rho0, c.k0, c.k0p, sh)
	if err != nil {
		t.Fatal(err)
	}
	v, err := NewVinet(c.rho0, c.k0, c.k0p, sh)
	if err != nil {
		t.Fatal(err)
	}
	return []EOS{b, v}
}

// below reports whether ρ is below the turnover of e (always true for Vinet).
func below(e EOS, rho float64) bool {
	if b, ok := e.(BM3); ok {
		_, rmax := b.MaxPressure()
		return rho < rmax*(1-1e-3)
	}
	return true
}

func eosName(e EOS) string {
	switch e.(type) {
	case BM3:
		return "BM3"
	case Vinet:
		return "Vinet"
	case Constant:
		return "Constant"
	}
	return "?"
}

// checkResidual checks that ρ solves P(ρ) = p up to the rounding with which P(ρ) itself can
// be evaluated: a relative error ε in ρ moves P by ε·K, so the residual is measured against
// max(p, K(ρ)).
func checkResidual(t *testing.T, what string, e EOS, rho, p, tol float64) {
	t.Helper()
	got := e.Pressure(rho)
	scale := math.Max(p, math.Abs(e.BulkModulus(rho)))
	if d := math.Abs(got - p); !(d <= tol*scale) {
		t.Errorf("%s: P(ρ = %.17g) = %.17g, want %.17g (residual %.3g > %.3g·%.3g)", what, rho, got, p, d, tol, scale)
	}
}
