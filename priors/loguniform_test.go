package priors

import (
	"math"
)

// luCase builds a log-uniform case. Moments by direct integration of the
// density 1/(x L), L = ln(b/a): E[X^k] = (b^k − a^k)/(k L); median √(ab).
func luCase(name string, a, b float64, points []float64) contCase {
	L := math.Log(b / a)
	m := (b - a) / L
	return contCase{
		name: name, d: mustDist(NewLogUniform(a, b)),
		pdf: func(x float64) float64 {
			if x < a || x > b {
				return 0
			}
			return 1 / (x * L)
		},
		cdf:      func(x float64) float64 { return math.Log(x/a) / L },
		mean:     m,
		variance: (b*b-a*a)/(2*L) - m*m,
		median:   math.Sqrt(a * b),
		qlo:      a, qhi: b, geom: true, points: points,
		outside: []float64{math.NaN(), math.Nextafter(a, 0), 0, -a, math.Nextafter(b, math.Inf(1)), 2 * b},
	}
}

// logUniformCases returns the log-uniform distribution's cases of the continuous-distribution
// tests (TestContinuous* in dist_test.go), from wide to narrow.
func logUniformCases() []contCase {
	return []contCase{
		luCase("loguniform-wide", 1e-3, 10, []float64{1e-3, 0.01, 0.5, 10}),
		luCase("loguniform-mid", 1, 2, []float64{1, 1.5, 2}),
		luCase("loguniform-narrow", 1000, 1001, []float64{1000, 1000.5, 1001}),
	}
}
