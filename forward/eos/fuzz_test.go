package eos

import (
	"errors"
	"math"
	"testing"
)

// FuzzDensity: for random parameters and pressures, Density either returns an error wrapping
// ErrParameter or ErrPressure (the latter only for p < 0, NaN, Inf or above MaxPressure),
// or a finite ρ ≥ ρ0 (not beyond MaxPressure's density) whose pressure
// matches p to the rounding of P (|P(ρ) − p| ≤ 1e-12·max(p, K)) and which Density recovers
// from P(ρ) (relative 1e-12, scaled by the conditioning max(1, p/K)). Never a panic or NaN.
func FuzzDensity(f *testing.F) {
	f.Add(uint8(0), 8269.0, 163.4e9, 5.38, 330e9, 0.0)
	f.Add(uint8(1), 8269.0, 163.4e9, 5.38, 330e9, 9000.0)
	f.Add(uint8(0), 4000.0, 200e9, 3.0, 1e12, 0.0)
	f.Add(uint8(0), 4000.0, 200e9, 0.1, 1e9, 0.0)
	f.Add(uint8(1), 1000.0, 1e3, 20.0, 1e15, 1e9)
	f.Add(uint8(2), 3300.0, 0.0, 0.0, 1e9, 0.0)
	f.Add(uint8(1), 1e-300, 1e-300, 1e-3, 1e300, -1.0)
	f.Add(uint8(0), 5.0, 1e13, 19.9, 1.7e308, math.NaN())
	// Found by fuzzing: P″ ≈ 0 at the root (an inflection of P(u)), where a stopping rule that
	// ignored P‴ stopped one step early.
	f.Add(uint8(12), 1033.625, 8.17e12, 1.076, 3.2999999997e11, 8998.0)
	f.Fuzz(func(t *testing.T, kind uint8, rho0, k0, k0p, p, guess float64) {
		var e EOS
		var err error
		switch kind % 3 {
		case 0:
			e, err = NewBM3(rho0, k0, k0p, Fluid())
		case 1:
			e, err = NewVinet(rho0, k0, k0p, Fluid())
		default:
			e, err = NewConstant(rho0)
		}
		if err != nil {
			if !errors.Is(err, ErrParameter) {
				t.Fatalf("constructor error %v does not wrap ErrParameter", err)
			}
			return
		}
		for _, warm := range []bool{false, true} {
			var rho float64
			if warm {
				rho, err = DensityNear(e, p, guess)
			} else {
				rho, err = e.Density(p)
			}
			if err != nil {
				if !errors.Is(err, ErrPressure) {
					t.Fatalf("Density(%g): error %v does not wrap ErrPressure", p, err)
				}
				if math.IsNaN(rho) {
					t.Fatalf("Density(%g): NaN with an error", p)
				}
				if m, ok := e.(interface{ MaxPressure() (float64, float64) }); ok {
					if pmax, _ := m.MaxPressure(); p >= 0 && p < pmax*(1-1e-12) {
						t.Fatalf("Density(%g) below MaxPressure %g failed: %v", p, pmax, err)
					}
				}
				continue
			}
			if math.IsNaN(rho) || math.IsInf(rho, 0) || rho < rho0 {
				t.Fatalf("Density(%g) = %g with nil error (ρ0 = %g)", p, rho, rho0)
			}
			if m, ok := e.(interface{ MaxPressure() (float64, float64) }); ok {
				if _, rmax := m.MaxPressure(); rho > rmax*(1+1e-15) {
					t.Fatalf("Density(%g) = %g beyond MaxPressure's density %g", p, rho, rmax)
				}
			}
			if kind%3 == 2 {
				if rho != rho0 {
					t.Fatalf("Constant Density = %g, want %g", rho, rho0)
				}
				continue
			}
			k := math.Abs(e.BulkModulus(rho))
			scale := math.Max(p, k)
			if pr := e.Pressure(rho); !(math.Abs(pr-p) <= 1e-12*scale) {
				t.Fatalf("P(Density(%g) = %g) = %g: residual %g > 1e-12·%g", p, rho, pr, pr-p, scale)
			}
			rho2, err := e.Density(e.Pressure(rho))
			if err != nil {
				if m, ok := e.(interface{ MaxPressure() (float64, float64) }); ok {
					if pmax, _ := m.MaxPressure(); e.Pressure(rho) > pmax*(1-1e-12) {
						continue // rounding put P(ρ) at the limit
					}
				}
				t.Fatalf("round trip Density(P(%g)): %v", rho, err)
			}
			cond := 1.0
			if k > 0 {
				cond = math.Max(1, p/k)
			} else {
				cond = math.Inf(1)
			}
			if d := math.Abs(rho2-rho) / rho; !(d <= 1e-12*cond) {
				t.Fatalf("round trip: Density(P(%g)) = %g, relative %g > 1e-12·%g", rho, rho2, d, cond)
			}
		}
	})
}
