package eos

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

var (
	nan  = math.NaN()
	pinf = math.Inf(1)
)

// Constructors reject non-physical parameters with ErrParameter and a message naming the
// offending parameter (project rule: clear error, never a panic).
func TestConstructorErrors(t *testing.T) {
	cases := []struct {
		rho0, k0, k0p float64
		want          string
	}{
		{0, 1e11, 4, "ρ0"}, {-1, 1e11, 4, "ρ0"}, {nan, 1e11, 4, "ρ0"}, {pinf, 1e11, 4, "ρ0"}, {2e5, 1e11, 4, "ρ0"},
		{3000, 0, 4, "K0 ="}, {3000, -1e9, 4, "K0 ="}, {3000, nan, 4, "K0 ="}, {3000, pinf, 4, "K0 ="},
		{3000, 1e11, 0, "K0′"}, {3000, 1e11, -1, "K0′"}, {3000, 1e11, 20.5, "K0′"}, {3000, 1e11, nan, "K0′"}, {3000, 1e11, pinf, "K0′"},
	}
	for _, c := range cases {
		_, errB := NewBM3(c.rho0, c.k0, c.k0p, Fluid())
		_, errV := NewVinet(c.rho0, c.k0, c.k0p, Fluid())
		for _, err := range []error{errB, errV} {
			if !errors.Is(err, ErrParameter) || !strings.Contains(err.Error(), c.want) {
				t.Errorf("(%g, %g, %g): err = %v, want ErrParameter naming %s", c.rho0, c.k0, c.k0p, err, c.want)
			}
		}
		// A literal that skipped the constructor fails in Density, not with NaN.
		for _, e := range []EOS{BM3{Rho0: c.rho0, K0: c.k0, K0p: c.k0p}, Vinet{Rho0: c.rho0, K0: c.k0, K0p: c.k0p}} {
			rho, err := e.Density(1e9)
			if !errors.Is(err, ErrParameter) || rho != 0 {
				t.Errorf("%s literal (%g, %g, %g): Density = %g, %v; want ErrParameter", eosName(e), c.rho0, c.k0, c.k0p, rho, err)
			}
		}
	}
	for _, r := range []float64{0, -1, nan, pinf, 1e6} {
		if _, err := NewConstant(r); !errors.Is(err, ErrParameter) {
			t.Errorf("NewConstant(%g): err = %v", r, err)
		}
		if _, err := (Constant{Rho: r}).Density(0); !errors.Is(err, ErrParameter) {
			t.Errorf("Constant{%g}.Density: err = %v", r, err)
		}
	}
}

// Density rejects pressures it cannot invert with ErrPressure, never NaN with a nil error.
func TestDensityDomainErrors(t *testing.T) {
	fs, _ := NewFiniteStrainShear(100e9, 1.5)
	b, _ := NewBM3(4000, 200e9, 4.5, fs)
	soft, _ := NewBM3(4000, 200e9, 3, fs)
	v, _ := NewVinet(4000, 200e9, 4.5, fs)
	c, _ := NewConstant(4000)
	pmax, _ := soft.MaxPressure()
	type call struct {
		e EOS
		p float64
	}
	var calls []call
	for _, e := range []EOS{b, soft, v, c} {
		for _, p := range []float64{-1, -1e-300, math.Inf(-1), nan, pinf} {
			calls = append(calls, call{e, p})
		}
	}
	calls = append(calls, call{soft, pmax * (1 + 1e-12)}, call{soft, 2 * pmax}, call{soft, 1e300})
	for _, c := range calls {
		rho, err := c.e.Density(c.p)
		if !errors.Is(err, ErrPressure) {
			t.Errorf("%s Density(%g) = %g, %v; want ErrPressure", eosName(c.e), c.p, rho, err)
		}
		if math.IsNaN(rho) {
			t.Errorf("%s Density(%g) returned NaN", eosName(c.e), c.p)
		}
		rho, err = DensityNear(c.e, c.p, 5000)
		if !errors.Is(err, ErrPressure) || math.IsNaN(rho) {
			t.Errorf("%s DensityNear(%g) = %g, %v; want ErrPressure", eosName(c.e), c.p, rho, err)
		}
	}
	// The turnover message says where the maximum is.
	_, err := soft.Density(2 * pmax)
	if err == nil || !strings.Contains(err.Error(), "maximum") {
		t.Errorf("turnover error %q does not name the maximum", err)
	}
}

// Density-valued methods have no error result; for a density that is not finite and
// positive they return NaN (documented), and Velocities turns that into ErrDensity.
func TestBadDensity(t *testing.T) {
	fs, _ := NewFiniteStrainShear(100e9, 1.5)
	lin, _ := NewLinearShear(100e9, 1.5)
	b, _ := NewBM3(4000, 200e9, 4.5, fs)
	bl, _ := NewBM3(4000, 200e9, 4.5, lin)
	bf, _ := NewBM3(4000, 200e9, 4.5, Fluid())
	v, _ := NewVinet(4000, 200e9, 4.5, fs)
	c, _ := NewConstant(4000)
	for _, e := range []EOS{b, bl, bf, v, c} {
		for _, rho := range []float64{0, -1, nan, pinf, math.Inf(-1)} {
			name := fmt.Sprintf("%s at ρ = %g", eosName(e), rho)
			if p := e.Pressure(rho); !math.IsNaN(p) {
				t.Errorf("%s: P = %g, want NaN", name, p)
			}
			if k := e.BulkModulus(rho); !math.IsNaN(k) {
				t.Errorf("%s: K = %g, want NaN", name, k)
			}
			if mu := e.ShearModulus(rho); !math.IsNaN(mu) {
				t.Errorf("%s: μ = %g, want NaN", name, mu)
			}
			if _, _, err := Velocities(e, rho); !errors.Is(err, ErrDensity) {
				t.Errorf("%s: Velocities err = %v, want ErrDensity", name, err)
			}
		}
	}
	// Past the BM3 turnover K < 0: Velocities reports it instead of returning NaN.
	soft, _ := NewBM3(4000, 200e9, 3, Fluid())
	_, rmax := soft.MaxPressure()
	if _, _, err := Velocities(soft, 1.2*rmax); !errors.Is(err, ErrModulus) {
		t.Errorf("past the turnover: Velocities err = %v, want ErrModulus", err)
	}
}
