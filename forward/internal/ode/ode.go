package ode

import (
	"errors"
	"fmt"
	"math"
)

// Func evaluates the right-hand side dydt = f(t, y). It must write all
// len(y) components of dydt and must not keep y or dydt.
type Func func(t float64, y, dydt []float64)

// Stats counts the work of the last call to Solver.Integrate.
type Stats struct {
	Steps    int // accepted steps
	Rejected int // rejected steps
	Evals    int // evaluations of f
}

// Solver integrates systems of a fixed dimension. It owns all work buffers,
// so Integrate does not allocate. A Solver must not be used by several
// goroutines at once.
type Solver struct {
	// RelTol and AbsTol set the local error tolerance: each step's error
	// estimate e satisfies sqrt(mean_i (e_i/(AbsTol + RelTol·|y_i|))²) ≤ 1.
	RelTol, AbsTol float64
	// MaxSteps bounds the number of steps (accepted plus rejected) of one
	// Integrate call; 0 means 100000.
	MaxSteps int
	// MaxStep bounds |h|; 0 means no bound besides |b − a|.
	MaxStep float64
	// Stats holds the counts of the last Integrate call.
	Stats Stats

	n    int
	k    [7][]float64
	ynew []float64
	tmp  []float64
}

// Dormand–Prince 5(4) coefficients (Dormand & Prince 1980, Table 2).
const (
	c2, c3, c4, c5 = 1.0 / 5, 3.0 / 10, 4.0 / 5, 8.0 / 9

	a21 = 1.0 / 5

	a31, a32 = 3.0 / 40, 9.0 / 40

	a41, a42, a43 = 44.0 / 45, -56.0 / 15, 32.0 / 9

	a51, a52, a53, a54 = 19372.0 / 6561, -25360.0 / 2187, 64448.0 / 6561, -212.0 / 729

	a61, a62, a63, a64, a65 = 9017.0 / 3168, -355.0 / 33, 46732.0 / 5247, 49.0 / 176, -5103.0 / 18656

	// Fifth-order weights (also the last stage row: FSAL).
	b1, b3, b4, b5, b6 = 35.0 / 384, 500.0 / 1113, 125.0 / 192, -2187.0 / 6784, 11.0 / 84

	// Difference between fifth- and fourth-order weights.
	e1, e3, e4, e5, e6, e7 = 71.0 / 57600, -71.0 / 16695, 71.0 / 1920, -17253.0 / 339200, 22.0 / 525, -1.0 / 40
)

// NewSolver returns a solver for systems of dimension n ≥ 1 with relative and
// absolute tolerances rtol and atol (both ≥ 0, not both 0).
func NewSolver(n int, rtol, atol float64) (*Solver, error) {
	if n < 1 {
		return nil, fmt.Errorf("ode: dimension must be ≥ 1, got %d", n)
	}
	s := &Solver{RelTol: rtol, AbsTol: atol, n: n}
	buf := make([]float64, 9*n)
	for i := range s.k {
		s.k[i] = buf[i*n : (i+1)*n : (i+1)*n]
	}
	s.ynew = buf[7*n : 8*n : 8*n]
	s.tmp = buf[8*n:]
	return s, nil
}

// Dim returns the dimension of the systems the solver integrates.
func (s *Solver) Dim() int { return s.n }

// ErrStepTooSmall is returned (wrapped) when the step size underflows
// relative to t, typically at a singularity of f.
var ErrStepTooSmall = errors.New("step size too small")

// Integrate advances y from t = a to t = b (b < a integrates backwards),
// overwriting y with the solution at b. It returns an error, and leaves y at
// the last accepted point, if the tolerances are invalid, len(y) differs
// from the solver dimension, f returns non-finite values, the step size
// underflows or MaxSteps is exceeded.
func (s *Solver) Integrate(f Func, a, b float64, y []float64) error {
	s.Stats = Stats{}
	if len(y) != s.n {
		return fmt.Errorf("ode: state has length %d, solver dimension is %d", len(y), s.n)
	}
	if !(s.RelTol >= 0) || !(s.AbsTol >= 0) || !(s.RelTol > 0 || s.AbsTol > 0) ||
		math.IsInf(s.RelTol, 0) || math.IsInf(s.AbsTol, 0) {
		return fmt.Errorf("ode: tolerances must be finite, ≥ 0 and not both 0, got rtol %g, atol %g", s.RelTol, s.AbsTol)
	}
	if math.IsNaN(a) || math.IsNaN(b) || math.IsInf(a, 0) || math.IsInf(b, 0) {
		return fmt.Errorf("ode: interval [%g, %g] is not finite", a, b)
	}
	if !allFinite(y) {
		return fmt.Errorf("ode: initial state is not finite at t = %g", a)
	}
	if a == b {
		return nil
	}
	maxSteps := s.MaxSteps
	if maxSteps <= 0 {
		maxSteps = 100000
	}
	dir := 1.0
	if b < a {
		dir = -1
	}
	hmax := math.Abs(b - a)
	if s.MaxStep > 0 {
		hmax = math.Min(hmax, s.MaxStep)
	}
	k := &s.k
	f(a, y, k[0])
	s.Stats.Evals++
	if !allFinite(k[0]) {
		return fmt.Errorf("ode: derivative is not finite at t = %g", a)
	}
	h := s.startStep(f, a, y, dir, hmax)
	t := a
	const (
		safety  = 0.9
		minFac  = 0.2
		maxFac  = 5.0
		errExp  = 1.0 / 5
		betaExp = 0.04 // PI step-size stabilisation (Hairer et al. 1993, II.4; value from memory)
	)
	// The PI controller's factor safety·err^(−errExp+0.75β)·errOld^β is
	// evaluated as one exponential of logarithms, keeping ln errOld.
	lnErrOld := math.Log(1e-4)
	rejectedLast := false
	for {
		if s.Stats.Steps+s.Stats.Rejected >= maxSteps {
			return fmt.Errorf("ode: more than %d steps between t = %g and %g (reached t = %g)", maxSteps, a, b, t)
		}
		last := false
		if dir*(t+h-b) >= 0 {
			h = b - t
			last = true
		}
		if math.Abs(h) <= 4*math.Abs(t)*epsilon || h == 0 {
			return fmt.Errorf("ode: at t = %g: %w", t, ErrStepTooSmall)
		}
		errNorm := s.step(f, t, h, y)
		if !(errNorm <= 1) { // also catches NaN
			s.Stats.Rejected++
			rejectedLast = true
			fac := minFac
			if !math.IsNaN(errNorm) && !math.IsInf(errNorm, 0) {
				fac = math.Max(minFac, safety*math.Pow(errNorm, -errExp))
			}
			h *= fac
			continue
		}
		// Accept.
		s.Stats.Steps++
		copy(y, s.ynew)
		k[0], k[6] = k[6], k[0] // FSAL: f(t+h, ynew) is the first stage of the next step
		if last {
			return nil
		}
		t += h
		lnErr := math.Log(math.Max(errNorm, 1e-10))
		fac := safety * math.Exp((-errExp+0.75*betaExp)*lnErr+betaExp*lnErrOld)
		fac = math.Min(maxFac, math.Max(minFac, fac))
		if rejectedLast {
			fac = math.Min(fac, 1)
		}
		rejectedLast = false
		lnErrOld = lnErr
		h = dir * math.Min(math.Abs(h*fac), hmax)
	}
}

const epsilon = 0x1p-52

// step takes one Dormand–Prince step of size h from (t, y) with k[0] =
// f(t, y). It leaves the fifth-order solution in s.ynew and f(t+h, ynew) in
// k[6], and returns the scaled error norm (NaN or +Inf if the stages are not
// finite).
func (s *Solver) step(f Func, t, h float64, y []float64) float64 {
	k, tmp := &s.k, s.tmp
	for i := range y {
		tmp[i] = y[i] + h*a21*k[0][i]
	}
	f(t+c2*h, tmp, k[1])
	for i := range y {
		tmp[i] = y[i] + h*(a31*k[0][i]+a32*k[1][i])
	}
	f(t+c3*h, tmp, k[2])
	for i := range y {
		tmp[i] = y[i] + h*(a41*k[0][i]+a42*k[1][i]+a43*k[2][i])
	}
	f(t+c4*h, tmp, k[3])
	for i := range y {
		tmp[i] = y[i] + h*(a51*k[0][i]+a52*k[1][i]+a53*k[2][i]+a54*k[3][i])
	}
	f(t+c5*h, tmp, k[4])
	for i := range y {
		tmp[i] = y[i] + h*(a61*k[0][i]+a62*k[1][i]+a63*k[2][i]+a64*k[3][i]+a65*k[4][i])
	}
	f(t+h, tmp, k[5])
	yn := s.ynew
	for i := range y {
		yn[i] = y[i] + h*(b1*k[0][i]+b3*k[2][i]+b4*k[3][i]+b5*k[4][i]+b6*k[5][i])
	}
	f(t+h, yn, k[6])
	s.Stats.Evals += 6
	sum := 0.0
	for i := range y {
		e := h * (e1*k[0][i] + e3*k[2][i] + e4*k[3][i] + e5*k[4][i] + e6*k[5][i] + e7*k[6][i])
		sc := s.AbsTol + s.RelTol*math.Max(math.Abs(y[i]), math.Abs(yn[i]))
		r := e / sc
		sum += r * r
	}
	if !allFinite(yn) || !allFinite(k[6]) {
		return math.Inf(1)
	}
	return math.Sqrt(sum / float64(len(y)))
}

// startStep estimates an initial step size (Hairer et al. 1993, II.4,
// "starting step size"), using k[0] = f(a, y) and k[1], tmp as scratch.
func (s *Solver) startStep(f Func, a float64, y []float64, dir, hmax float64) float64 {
	k, tmp := &s.k, s.tmp
	d0, d1 := 0.0, 0.0
	for i := range y {
		sc := s.AbsTol + s.RelTol*math.Abs(y[i])
		d0 += (y[i] / sc) * (y[i] / sc)
		d1 += (k[0][i] / sc) * (k[0][i] / sc)
	}
	n := float64(len(y))
	d0, d1 = math.Sqrt(d0/n), math.Sqrt(d1/n)
	h0 := 1e-6
	if d0 >= 1e-5 && d1 >= 1e-5 {
		h0 = 0.01 * d0 / d1
	}
	h0 = math.Min(h0, hmax)
	for i := range y {
		tmp[i] = y[i] + dir*h0*k[0][i]
	}
	f(a+dir*h0, tmp, k[1])
	s.Stats.Evals++
	d2 := 0.0
	for i := range y {
		sc := s.AbsTol + s.RelTol*math.Abs(y[i])
		r := (k[1][i] - k[0][i]) / sc
		d2 += r * r
	}
	d2 = math.Sqrt(d2/n) / h0
	var h1 float64
	if m := math.Max(d1, d2); m <= 1e-15 || math.IsNaN(m) {
		h1 = math.Max(1e-6, h0*1e-3)
	} else {
		h1 = math.Pow(0.01/m, 1.0/5)
	}
	h := math.Min(math.Min(100*h0, h1), hmax)
	return dir * h
}

func allFinite(v []float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}
