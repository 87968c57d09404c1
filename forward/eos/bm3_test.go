package eos

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// With K0′ = 4 the third-order bracket is 1, and BM3 must equal the second-order
// Birch–Murnaghan form P = (3/2)K0[η^{7/3} − η^{5/3}] (Birch 1947, Phys. Rev. 71, 809;
// Poirier 2000, Introduction to the Physics of the Earth's Interior, 2nd ed., ch. 4). The
// reference is evaluated as (3/2)K0 η^{5/3}·expm1((2/3) ln η), the same expression factored so
// that it has no cancellation near η = 1, through math.Pow/Expm1 rather than our cube-root path.
func TestBM3SecondOrderLimit(t *testing.T) {
	const rho0, k0 = 3000.0, 100e9
	b, err := NewBM3(rho0, k0, 4, Fluid())
	if err != nil {
		t.Fatal(err)
	}
	for _, eta := range []float64{1.0001, 1.01, 1.1, 1.3, 1.5, 1.8, 2.0, 2.2, 2.5} {
		rho := eta * rho0
		d := (rho - rho0) / rho0 // the compression actually represented by rho, exact here
		want := 1.5 * k0 * math.Pow(1+d, 5.0/3) * math.Expm1(2.0/3*math.Log1p(d))
		checkRel(t, fmt.Sprintf("P(η=%g)", eta), b.Pressure(rho), want, 1e-14)
	}
	// Away from η = 1 the unfactored textbook form itself agrees (its own cancellation is
	// mild there).
	for _, eta := range []float64{1.3, 1.7, 2.5} {
		want := 1.5 * k0 * (math.Pow(eta, 7.0/3) - math.Pow(eta, 5.0/3))
		checkRel(t, fmt.Sprintf("P(η=%g), textbook form", eta), b.Pressure(eta*rho0), want, 1e-14)
	}
}

// P(ρ0) = 0 exactly and K(ρ0) = K0: the defining reference state of any EOS (Birch 1947);
// checked for BM3 and Vinet.
func TestReferenceState(t *testing.T) {
	for _, c := range fitCases {
		for _, e := range eosFor(t, c, Fluid()) {
			name := eosName(e) + " " + c.name
			if p := e.Pressure(c.rho0); p != 0 {
				t.Errorf("%s: P(ρ0) = %g, want exactly 0", name, p)
			}
			checkRel(t, name+": K(ρ0)", e.BulkModulus(c.rho0), c.k0, 1e-15)
			// dP/dρ at ρ0 by finite differences equals K0/ρ0.
			h := 1e-4 * c.rho0
			checkRel(t, name+": dP/dρ(ρ0)", deriv6(e.Pressure, c.rho0, h), c.k0/c.rho0, 1e-9)
			if got, _ := e.Density(0); got != c.rho0 {
				t.Errorf("%s: Density(0) = %g, want ρ0 = %g", name, got, c.rho0)
			}
			if e.ReferenceDensity() != c.rho0 {
				t.Errorf("%s: ReferenceDensity = %g, want %g", name, e.ReferenceDensity(), c.rho0)
			}
		}
	}
}

// The analytic K = ρ dP/dρ agrees with a sixth-order central difference of P (Fornberg 1988)
// at compressions 1.0–2.5, for BM3 (Birch 1947) and Vinet (Vinet et al. 1989).
func TestBulkModulusVsFiniteDifference(t *testing.T) {
	for _, c := range fitCases {
		for _, e := range eosFor(t, c, Fluid()) {
			for _, eta := range compressions() {
				rho := eta * c.rho0
				if !below(e, rho*1.01) {
					continue
				}
				fd := rho * deriv6(e.Pressure, rho, 1e-3*rho)
				checkRel(t, fmt.Sprintf("%s %s: K(η=%.2f)", eosName(e), c.name, eta), e.BulkModulus(rho), fd, 1e-8)
			}
		}
	}
}

// K′ = dK/dP at ρ0 equals the K0′ parameter (its definition; Birch 1947, Vinet et al. 1989),
// by finite differences dK/dP = (dK/dρ)/(dP/dρ).
func TestK0pAtReference(t *testing.T) {
	for _, c := range fitCases {
		for _, e := range eosFor(t, c, Fluid()) {
			h := 1e-3 * c.rho0
			kp := deriv6(e.BulkModulus, c.rho0, h) / deriv6(e.Pressure, c.rho0, h)
			if math.Abs(kp-c.k0p) > 1e-6*c.k0p {
				t.Errorf("%s %s: dK/dP at ρ0 = %.12g, want K0′ = %g", eosName(e), c.name, kp, c.k0p)
			}
		}
	}
}

// Density inverts Pressure: Density(P(ρ)) = ρ to 1e-12 over compressions 1.0–2.5, for BM3 and
// Vinet (the inverse of the analytic P of Birch 1947 and Vinet et al. 1989).
func TestDensityRoundTrip(t *testing.T) {
	for _, c := range fitCases {
		for _, e := range eosFor(t, c, Fluid()) {
			for _, eta := range compressions() {
				rho := eta * c.rho0
				if !below(e, rho) {
					continue
				}
				p := e.Pressure(rho)
				got, err := e.Density(p)
				if err != nil {
					t.Errorf("%s %s: Density(%g Pa) at η=%.2f: %v", eosName(e), c.name, p, eta, err)
					continue
				}
				checkRel(t, fmt.Sprintf("%s %s: Density(P(η=%.2f))", eosName(e), c.name, eta), got, rho, 1e-12)
			}
		}
	}
}

// For K0′ < 4 the BM3 bracket 1 + (3K0′−5)f + (27/2)(K0′−4)f² has a positive root where K = 0
// and P is maximal (Birch 1947 form, analytic): check K = 0 there, P lower on both sides, and
// Density's errors above it.
func TestBM3Turnover(t *testing.T) {
	for _, k0p := range []float64{0.5, 1, 2, 3, 3.9} {
		b, err := NewBM3(4000, 200e9, k0p, Fluid())
		if err != nil {
			t.Fatal(err)
		}
		pmax, rmax := b.MaxPressure()
		if !(pmax > 0) || math.IsInf(pmax, 0) || !(rmax > b.Rho0) {
			t.Fatalf("K0′=%g: MaxPressure = %g Pa at %g kg/m³", k0p, pmax, rmax)
		}
		// Zero up to the rounding of the terms of the bracket, K0 (1+2f)^{5/2}(1 + |b1| f + |b2| f²).
		u := math.Pow(rmax/b.Rho0, 2.0/3)
		f := 0.5 * (u - 1)
		scale := b.K0 * math.Pow(u, 2.5) * (1 + math.Abs(3*k0p-5)*f + math.Abs(13.5*(k0p-4))*f*f)
		if k := b.BulkModulus(rmax); math.Abs(k) > 1e-14*scale {
			t.Errorf("K0′=%g: K at the turnover = %g Pa, want 0 (term scale %g Pa)", k0p, k, scale)
		}
		for _, s := range []float64{0.999, 1.001} {
			if p := b.Pressure(s * rmax); !(p < pmax) {
				t.Errorf("K0′=%g: P(%g ρmax) = %g ≥ pmax = %g", k0p, s, p, pmax)
			}
		}
		_, err = b.Density(pmax * (1 + 1e-9))
		if !errors.Is(err, ErrPressure) {
			t.Errorf("K0′=%g: Density above pmax: err = %v, want ErrPressure", k0p, err)
		}
		// At and just below pmax: a density at or below the turnover whose pressure matches.
		for _, p := range []float64{pmax, pmax * (1 - 1e-6), 0.9 * pmax} {
			rho, err := b.Density(p)
			if err != nil {
				t.Errorf("K0′=%g: Density(%g) below pmax: %v", k0p, p, err)
				continue
			}
			if rho > rmax {
				t.Errorf("K0′=%g: Density(%g) = %g beyond the turnover %g", k0p, p, rho, rmax)
			}
			checkResidual(t, fmt.Sprintf("K0′=%g: P(Density(%g))", k0p, p), b, rho, p, 1e-14)
		}
	}
	// Without a turnover before it, the limit is the compression bound ρ/ρ0 = MaxCompression.
	for _, k0p := range []float64{3.99, 4, 4.5, 8} {
		b, _ := NewBM3(4000, 200e9, k0p, Fluid())
		pmax, rmax := b.MaxPressure()
		if rmax != MaxCompression*b.Rho0 {
			t.Errorf("K0′=%g: MaxPressure density %g, want %g", k0p, rmax, MaxCompression*b.Rho0)
		}
		checkRel(t, fmt.Sprintf("K0′=%g: MaxPressure", k0p), pmax, b.Pressure(rmax), 1e-14)
		checkCompressionLimit(t, b, pmax, rmax)
	}
}

// checkCompressionLimit checks Density just below, at and above the compression limit.
func checkCompressionLimit(t *testing.T, e EOS, pmax, rmax float64) {
	t.Helper()
	if _, err := e.Density(pmax * (1 + 1e-9)); !errors.Is(err, ErrPressure) || !strings.Contains(err.Error(), "compression") {
		t.Errorf("%s: Density above the compression limit: err = %v, want ErrPressure naming the compression", eosName(e), err)
	}
	for _, s := range []float64{1, 1 - 1e-9, 0.5} {
		rho, err := e.Density(s * pmax)
		if err != nil {
			t.Errorf("%s: Density(%g·pmax): %v", eosName(e), s, err)
			continue
		}
		checkResidual(t, fmt.Sprintf("%s: Density(%g·pmax)", eosName(e), s), e, rho, s*pmax, 1e-14)
		if rho > rmax {
			t.Errorf("%s: Density(%g·pmax) = %g beyond the limit %g", eosName(e), s, rho, rmax)
		}
	}
}

// Pressure keeps full relative accuracy at tiny compressions, where P ≈ K0 (ρ − ρ0)/ρ0 (the
// linear-elastic limit of both forms, i.e. the definition of K0).
func TestSmallStrainPressure(t *testing.T) {
	for _, c := range fitCases {
		for _, e := range eosFor(t, c, Fluid()) {
			for _, d := range []float64{1e-12, 1e-9, 1e-6} {
				rho := c.rho0 * (1 + d)
				d = (rho - c.rho0) / c.rho0 // the representable compression
				// Second-order: P = K0 δ [1 + (K0′ − 1)δ/2 + O(δ²)] from dK/dP = K0′.
				want := c.k0 * d * (1 + 0.5*(c.k0p-1)*d)
				// Tolerance: a few ulp plus the O(δ²) truncation of the expansion.
				checkRel(t, fmt.Sprintf("%s %s: P(δ=%g)", eosName(e), c.name, d), e.Pressure(rho), want, 1e-15+100*d*d)
			}
		}
	}
}
