package eos

import (
	"fmt"
	"math"
	"testing"
)

// bisectDensity is an independent reference inversion: plain bisection on ρ with P(ρ) until
// the bracket is two adjacent floats (P is monotone below any turnover; Birch 1947,
// Vinet et al. 1989 forms).
func bisectDensity(e EOS, p, hi float64) float64 {
	lo := e.ReferenceDensity()
	if m, ok := e.(interface{ MaxPressure() (float64, float64) }); ok {
		_, hi = m.MaxPressure() // the whole rising branch
	}
	for e.Pressure(hi) < p {
		lo, hi = hi, 2*hi
	}
	for {
		mid := lo + 0.5*(hi-lo)
		if mid <= lo || mid >= hi {
			return mid
		}
		if e.Pressure(mid) < p {
			lo = mid
		} else {
			hi = mid
		}
	}
}

// Density agrees with the last-bit bisection reference to 1e-14 relative (the interface
// promises 1e-13), from 1 kPa to 10 TPa, for BM3 and Vinet, cold and warm-started. This is what
// validates the Halley stopping rule.
func TestDensityAccuracy(t *testing.T) {
	for _, c := range fitCases {
		for _, e := range eosFor(t, c, Fluid()) {
			for _, p := range []float64{1e3, 1e6, 1e9, 1e10, 5e10, 1e11, 3.3e11, 1e12, 3e12, 1e13} {
				if b, ok := e.(BM3); ok {
					if pmax, _ := b.MaxPressure(); p > 0.99*pmax {
						continue
					}
				}
				name := fmt.Sprintf("%s %s: p = %g Pa", eosName(e), c.name, p)
				got, err := e.Density(p)
				if err != nil {
					t.Errorf("%s: %v", name, err)
					continue
				}
				want := bisectDensity(e, p, 1.01*c.rho0)
				checkRel(t, name, got, want, 1e-14)
				for _, off := range []float64{1e-8, 1e-4, -1e-3, 0.1, 3} {
					near, err := DensityNear(e, p, want*(1+off))
					if err != nil {
						t.Errorf("%s, guess off by %g: %v", name, off, err)
						continue
					}
					checkRel(t, fmt.Sprintf("%s, guess off by %g", name, off), near, want, 1e-14)
				}
			}
		}
	}
}

// Where P″(u) ≈ 0 at the root (an inflection; found by FuzzDensity) the Halley error constant
// is carried by P‴ alone; Density must still match the bisection reference.
func TestDensityAtInflection(t *testing.T) {
	b, err := NewBM3(1033.625, 8.17e12, 1.076, Fluid())
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range []float64{1e11, 3.2999999997e11, 5e11} {
		got, err := b.Density(p)
		if err != nil {
			t.Fatal(err)
		}
		checkRel(t, fmt.Sprintf("p = %g", p), got, bisectDensity(b, p, 1.01*b.Rho0), 1e-14)
	}
}

// A sweep over the accepted K0′ range and pressures up to each limit, against the bisection
// reference: 1e-14 relative times the conditioning max(1, p/K) (both results carry the
// rounding of P, ε·p, which moves ρ by ε·p/K), and the pressure residual everywhere.
func TestDensitySweep(t *testing.T) {
	for _, k0p := range []float64{0.05, 0.5, 1, 1.076, 5.0 / 3, 2, 3, 3.9, 3.999, 4, 5, 8, 12, 20} {
		b, _ := NewBM3(3000, 100e9, k0p, Fluid())
		v, _ := NewVinet(3000, 100e9, k0p, Fluid())
		for _, e := range []EOS{b, v} {
			pmax, _ := e.(interface{ MaxPressure() (float64, float64) }).MaxPressure()
			for _, s := range []float64{1e-12, 1e-6, 1e-3, 0.01, 0.1, 0.3, 0.5, 0.7, 0.9, 0.99, 0.999999} {
				p := s * pmax
				name := fmt.Sprintf("%s K0′=%g p=%g", eosName(e), k0p, p)
				got, err := e.Density(p)
				if err != nil {
					t.Errorf("%s: %v", name, err)
					continue
				}
				want := bisectDensity(e, p, 1.01*e.ReferenceDensity())
				if k := e.BulkModulus(want); k > 1e-3*p {
					checkRel(t, name, got, want, 1e-14*math.Max(1, p/k))
				}
				checkResidual(t, name, e, got, p, 1e-14)
			}
		}
	}
}
