package ode

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mathext"
)

func newSolver(t testing.TB, n int, rtol, atol float64) *Solver {
	t.Helper()
	s, err := NewSolver(n, rtol, atol)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// y' = c y has the closed form y(t) = y(a) e^{c(t−a)}.
func TestExponential(t *testing.T) {
	cases := []struct {
		name    string
		c, a, b float64
	}{
		{"growth forward", 1, 0, 5},
		{"decay forward", -2, 0, 10},
		{"growth backward", 1, 5, 0},
		{"decay backward", -0.5, 3, -2},
		{"negative interval", 3, -2, -1},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s := newSolver(t, 1, 1e-10, 0) // pure relative control
			y := []float64{1.5}
			f := func(_ float64, y, dy []float64) { dy[0] = tc.c * y[0] }
			if err := s.Integrate(f, tc.a, tc.b, y); err != nil {
				t.Fatal(err)
			}
			want := 1.5 * math.Exp(tc.c*(tc.b-tc.a)) // closed form
			if rel := math.Abs(y[0]-want) / want; rel > 1e-8 {
				t.Errorf("y(%g) = %.15g, want %.15g (rel. error %.2g)", tc.b, y[0], want, rel)
			}
		})
	}
}

// x” = −ω² x with x(0) = 1, x'(0) = 0 has x = cos ωt, x' = −ω sin ωt; 100
// periods test the accumulation of phase and amplitude error.
func TestHarmonicOscillator(t *testing.T) {
	const omega = 2 * math.Pi
	for _, rtol := range []float64{1e-8, 1e-10, 1e-12} {
		s := newSolver(t, 2, rtol, rtol)
		y := []float64{1, 0}
		f := func(_ float64, y, dy []float64) { dy[0], dy[1] = y[1], -omega*omega*y[0] }
		const T = 100.25 // periods
		if err := s.Integrate(f, 0, T, y); err != nil {
			t.Fatal(err)
		}
		wantX, wantV := math.Cos(omega*T), -omega*math.Sin(omega*T)
		errX, errV := math.Abs(y[0]-wantX), math.Abs(y[1]-wantV)/omega
		// Global error grows roughly linearly with the number of periods
		// (common practice, no source): allow 1000·rtol over 100 periods.
		if errX > 1000*rtol || errV > 1000*rtol {
			t.Errorf("rtol %g: x = %.12g (want %.12g), v = %.12g (want %.12g)", rtol, y[0], wantX, y[1], wantV)
		}
	}
}

// Airy's equation y” = t y, solved for Ai from t = 2 back into the
// oscillatory region t = −15, compared with the Amos-algorithm Ai of
// gonum/mathext.
func TestAiry(t *testing.T) {
	ai := func(x float64) float64 { return real(mathext.AiryAi(complex(x, 0))) }
	aip := func(x float64) float64 { return real(mathext.AiryAiDeriv(complex(x, 0))) }
	s := newSolver(t, 2, 1e-11, 1e-13)
	f := func(x float64, y, dy []float64) { dy[0], dy[1] = y[1], x*y[0] }
	y := []float64{ai(2), aip(2)}
	x := 2.0
	for _, next := range []float64{0, -5, -10, -15} {
		if err := s.Integrate(f, x, next, y); err != nil {
			t.Fatal(err)
		}
		x = next
		if d := math.Abs(y[0] - ai(x)); d > 1e-8 {
			t.Errorf("Ai(%g) = %.12g, want %.12g", x, y[0], ai(x))
		}
		if d := math.Abs(y[1] - aip(x)); d > 1e-7 {
			t.Errorf("Ai'(%g) = %.12g, want %.12g", x, y[1], aip(x))
		}
	}
}

// Bessel's equation of order 0, y” + y'/t + y = 0, from t = 1 to 30, against
// J0 and −J1 of the Go standard library.
func TestBessel(t *testing.T) {
	s := newSolver(t, 2, 1e-11, 1e-13)
	f := func(x float64, y, dy []float64) { dy[0], dy[1] = y[1], -y[1]/x-y[0] }
	y := []float64{math.J0(1), -math.J1(1)}
	if err := s.Integrate(f, 1, 30, y); err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(y[0] - math.J0(30)); d > 1e-9 {
		t.Errorf("J0(30) = %.12g, want %.12g", y[0], math.J0(30))
	}
	if d := math.Abs(y[1] + math.J1(30)); d > 1e-9 {
		t.Errorf("J0'(30) = %.12g, want %.12g", y[1], -math.J1(30))
	}
}

// For a method of order p with error-per-step control, the global error
// scales like tol^{p/(p+1)} (Hairer et al. 1993, II.4); for p = 5 a factor
// 10⁻³ in tolerance should reduce the error by about 10^{−2.5}. We accept
// a reduction between 10^{−2} and 10^{−3.2}, i.e. an apparent exponent
// p/(p+1) ∈ [0.67, 1.07] (common practice, no source).
func TestConvergenceOrder(t *testing.T) {
	errAt := func(tol float64) float64 {
		s := newSolver(t, 2, tol, tol)
		f := func(_ float64, y, dy []float64) { dy[0], dy[1] = y[1], -y[0] }
		y := []float64{1, 0}
		if err := s.Integrate(f, 0, 20, y); err != nil {
			t.Fatal(err)
		}
		return math.Hypot(y[0]-math.Cos(20), y[1]+math.Sin(20))
	}
	e1, e2 := errAt(1e-6), errAt(1e-9)
	slope := math.Log10(e1/e2) / 3
	if slope < 0.67 || slope > 1.07 {
		t.Errorf("error %.3g at tol 1e-6, %.3g at 1e-9: apparent exponent %.3f, want ≈ 5/6", e1, e2, slope)
	}
}

func TestErrors(t *testing.T) {
	good := func(_ float64, y, dy []float64) { dy[0] = -y[0] }
	cases := []struct {
		name       string
		n          int
		rtol, atol float64
		f          Func
		a, b       float64
		y          []float64
		maxSteps   int
		want       string // substring of the error message
		is         error
	}{
		{"wrong length", 1, 1e-6, 1e-6, good, 0, 1, []float64{1, 2}, 0, "length 2", nil},
		{"zero tolerances", 1, 0, 0, good, 0, 1, []float64{1}, 0, "tolerances", nil},
		{"negative tolerance", 1, -1, 1e-6, good, 0, 1, []float64{1}, 0, "rtol -1", nil},
		{"infinite tolerance", 1, math.Inf(1), 1e-6, good, 0, 1, []float64{1}, 0, "tolerances", nil},
		{"NaN bound", 1, 1e-6, 1e-6, good, 0, math.NaN(), []float64{1}, 0, "not finite", nil},
		{"NaN state", 1, 1e-6, 1e-6, good, 0, 1, []float64{math.NaN()}, 0, "initial state", nil},
		{"NaN derivative", 1, 1e-6, 1e-6, func(_ float64, _, dy []float64) { dy[0] = math.NaN() }, 0, 1, []float64{1}, 0, "derivative", nil},
		// y' = y² with y(0) = 1 is 1/(1 − t): it blows up at t = 1.
		{"blow-up", 1, 1e-8, 1e-8, func(_ float64, y, dy []float64) { dy[0] = y[0] * y[0] }, 0, 2, []float64{1}, 0, "t = 1", ErrStepTooSmall},
		{"max steps", 1, 1e-12, 1e-12, good, 0, 100, []float64{1}, 5, "more than 5 steps", nil},
		// y' = 1/(1−t)² has a pole at t = 1.
		{"pole", 1, 1e-8, 1e-8, func(t float64, _, dy []float64) { dy[0] = 1 / ((1 - t) * (1 - t)) }, 0, 2, []float64{1}, 0, "t = 0.99999", ErrStepTooSmall},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			s := newSolver(t, tc.n, tc.rtol, tc.atol)
			s.MaxSteps = tc.maxSteps
			err := s.Integrate(tc.f, tc.a, tc.b, tc.y)
			if err == nil {
				t.Fatalf("no error, y = %v", tc.y)
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q does not mention %q", err, tc.want)
			}
			if tc.is != nil && !errors.Is(err, tc.is) {
				t.Errorf("error %v is not %v", err, tc.is)
			}
		})
	}
	if _, err := NewSolver(0, 1e-6, 1e-6); err == nil {
		t.Error("NewSolver(0) gave no error")
	}
}

func TestNoAllocation(t *testing.T) {
	s := newSolver(t, 2, 1e-9, 1e-9)
	f := func(_ float64, y, dy []float64) { dy[0], dy[1] = y[1], -y[0] }
	y := []float64{1, 0}
	allocs := testing.AllocsPerRun(10, func() {
		y[0], y[1] = 1, 0
		if err := s.Integrate(f, 0, 10, y); err != nil {
			t.Fatal(err)
		}
	})
	if allocs != 0 {
		t.Errorf("Integrate allocates %.0f times per call", allocs)
	}
}

// BenchmarkIntegrate integrates a 6-component linear system (three uncoupled
// oscillators) over 10 periods at tolerance 1e-10.
func BenchmarkIntegrate(b *testing.B) {
	s := newSolver(b, 6, 1e-10, 1e-10)
	f := func(_ float64, y, dy []float64) {
		for i := 0; i < 6; i += 2 {
			w := float64(i/2 + 1)
			dy[i], dy[i+1] = y[i+1], -w*w*y[i]
		}
	}
	y := make([]float64, 6)
	b.ReportAllocs()
	for b.Loop() {
		for i := range y {
			y[i] = float64(1 - i%2)
		}
		if err := s.Integrate(f, 0, 20*math.Pi, y); err != nil {
			b.Fatal(err)
		}
	}
}
