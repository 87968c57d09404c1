package mcmc

import (
	"math"
	"math/rand/v2"
	"testing"
)

// LogLikStat: the mean and variance equal the direct two-pass values, the batches are the means
// of consecutive blocks of BatchSize values, and their count stays in [32, 63] (definition of
// non-overlapping batch means).
func TestLogLikStat(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	var s LogLikStat
	var xs []float64
	for range 10007 {
		v := 100 + r.NormFloat64()
		xs = append(xs, v)
		s.add(v)
	}
	m, v := chainMeanVarDiag(xs)
	if math.Abs(s.Mean-m) > 1e-9 || math.Abs(s.Var()-v) > 1e-9 || s.N != int64(len(xs)) {
		t.Errorf("mean %g var %g n %d, want %g %g %d", s.Mean, s.Var(), s.N, m, v, len(xs))
	}
	if nb := len(s.Batches); nb < batchKeep || nb >= 2*batchKeep || s.BatchSize != 256 {
		t.Errorf("%d batches of %d", nb, s.BatchSize)
	}
	for j, b := range s.Batches {
		sum := 0.0
		for _, x := range xs[j*int(s.BatchSize) : (j+1)*int(s.BatchSize)] {
			sum += x
		}
		if math.Abs(b-sum/float64(s.BatchSize)) > 1e-9 {
			t.Fatalf("batch %d = %g, want %g", j, b, sum/float64(s.BatchSize))
		}
	}
	// Independent draws: MCSE ≈ 1/√N within the ~13 % relative error of a 39-batch estimate.
	if got, want := s.MCSE(), 1/math.Sqrt(float64(s.N)); math.Abs(got/want-1) > 0.4 {
		t.Errorf("MCSE %g, want ≈ %g", got, want)
	}
}

// Evidence on synthetic statistics with exact means and variances.
//   - Two rungs {1, 0}: the Hermite rule in β is exact for a cubic integrand; f(β) = −7 + 3β − β³
//     (f′ = 3 − 3β², supplied as the variances) integrates to −5.75.
//   - The conjugate 1-D Gaussian (prior N(0, s0²), likelihood N(y; x, s²)): under the power
//     posterior x ~ N(μ_β, τ²), τ² = 1/(1/s0² + β/s²), μ_β = τ²βy/s², so with m = y − μ_β,
//     E_β[log L] = −½log(2πs²) − (τ² + m²)/(2s²) and Var_β[log L] = (2τ⁴ + 4m²τ²)/(4s⁴)
//     (moments of a squared normal variable, from memory), and log Z = log N(y; 0, s0² + s²).
//     On geometric ladders the estimate must be within its discretisation error of log Z, and the
//     error must shrink as rungs are added.
//
// Malformed input is an error.
func TestEvidenceInputs(t *testing.T) {
	mk := func(mean, variance float64) LogLikStat {
		return LogLikStat{N: 64, Mean: mean, M2: 63 * variance, BatchSize: 2, Batches: []float64{mean - 1e-9, mean + 1e-9, mean}}
	}
	cubic := [][]LogLikStat{{mk(-5, 0), mk(-7, 3)}}
	if z, _, err := Evidence([]float64{1, 0}, cubic); err != nil || math.Abs(z+5.75) > 1e-12 {
		t.Errorf("cubic integrand: log Z = %v (%v), want −5.75", z, err)
	}

	for _, g := range []struct{ s0, s, y, bmin float64 }{{10, 0.3, 1.5, 1e-4}, {10, 0.3, 1.5, 1e-3}, {3, 0.5, -3, 1e-4}} {
		conjugateEvidence(t, g.s0, g.s, g.y, g.bmin, mk)
	}

	// Slopes inconsistent with the means (as noise can make them): on {1, 0} with f(0) = −10,
	// f(1) = −1, f′(0) = 0, f′(1) = 100 the Hermite value −13.8 lies below the monotone bracket
	// [−10, −1]; the estimate must be the bracket's midpoint −5.5 with at least its half-width 4.5
	// as error.
	if z, se, err := Evidence([]float64{1, 0}, [][]LogLikStat{{mk(-1, 100), mk(-10, 0)}}); err != nil || math.Abs(z+5.5) > 1e-12 || se < 4.5 {
		t.Errorf("outside the bracket: log Z = %v ± %v (%v), want −5.5 ± ≥ 4.5", z, se, err)
	}

	betas := []float64{1, 0.3, 0.05, 0}
	stats := [][]LogLikStat{{mk(1, 1), mk(1, 1), mk(1, 1), mk(1, 1)}}
	bad := []struct {
		betas []float64
		stats [][]LogLikStat
	}{
		{[]float64{1}, stats},
		{[]float64{1, 0.05, 0.3, 0}, stats},
		{[]float64{0.9, 0.3, 0.05, 0}, stats},
		{betas, nil},
		{betas, [][]LogLikStat{stats[0][:3]}},
		{betas, [][]LogLikStat{{mk(1, 1), mk(1, 1), mk(1, 1), {N: 0}}}},
		{betas, [][]LogLikStat{{mk(1, 1), mk(1, 1), mk(1, 1), {N: 64, Mean: 1, BatchSize: 2, Batches: []float64{1}}}}},
		{betas, [][]LogLikStat{{mk(1, 1), mk(1, 1), mk(1, 1), mk(math.NaN(), 1)}}},
	}
	for i, b := range bad {
		if _, _, err := Evidence(b.betas, b.stats); err == nil {
			t.Errorf("case %d: want an error", i)
		}
	}
	if _, _, err := EvidenceLadders([][]float64{betas}, append(stats, stats[0])); err == nil {
		t.Error("EvidenceLadders: one ladder for two chains: want an error")
	}
}

// conjugateEvidence checks Evidence against the conjugate Gaussian's exact log Z on geometric
// ladders of increasing size (see TestEvidenceInputs): the error bar must cover the error, and with
// 20 rungs reaching below the prior-to-likelihood transition β ≈ s²/s0² the error must be small
// (above the transition the last interval dominates and only the error bar is checked).
func conjugateEvidence(t *testing.T, s0, s, y, bmin float64, mk func(mean, variance float64) LogLikStat) {
	t.Helper()
	exact := -0.5*math.Log(2*math.Pi*(s0*s0+s*s)) - y*y/(2*(s0*s0+s*s))
	for _, K := range []int{3, 5, 8, 12, 20} {
		betas, _ := initialLadder(K, bmin)
		st := make([]LogLikStat, K)
		for k, b := range betas {
			tau2 := 1 / (1/(s0*s0) + b/(s*s))
			m := y - tau2*b*y/(s*s)
			st[k] = mk(-0.5*math.Log(2*math.Pi*s*s)-(tau2+m*m)/(2*s*s), (2*tau2*tau2+4*m*m*tau2)/(4*s*s*s*s))
		}
		z, se, err := Evidence(betas, [][]LogLikStat{st})
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("s0 %g s %g βmin %g K = %d: log Z = %.6f ± %.2g, exact %.6f (error %.2g)", s0, s, bmin, K, z, se, exact, z-exact)
		if math.Abs(z-exact) > se {
			t.Errorf("s0 %g s %g βmin %g K = %d: log Z = %.6f ± %.3g, exact %.6f: the discretisation error is underestimated", s0, s, bmin, K, z, se, exact)
		}
		if K == 20 && bmin < s*s/(s0*s0) && (math.Abs(z-exact) > 1e-4 || se > 1e-3) {
			t.Errorf("s0 %g s %g βmin %g K = 20: error %.3g ± %.3g, want below 10⁻⁴ ± 10⁻³ (measured 3·10⁻⁵ ± 3·10⁻⁴)", s0, s, bmin, z-exact, se)
		}
	}
}
