package priors

import "math"

// uniformCases returns the uniform distribution's case of the continuous-distribution tests
// (TestContinuous* in dist_test.go).
func uniformCases() []contCase {
	inf := math.Inf(1)
	return []contCase{
		{
			// Uniform closed forms: mean (a+b)/2, variance (b−a)²/12.
			name: "uniform", d: mustDist(NewUniform(1000, 3000)),
			pdf: func(x float64) float64 {
				if x < 1000 || x > 3000 {
					return 0
				}
				return 1.0 / 2000
			},
			cdf:  func(x float64) float64 { return (x - 1000) / 2000 },
			mean: 2000, variance: 2000.0 * 2000 / 12, median: 2000,
			qlo: 1000, qhi: 3000, points: []float64{1000, 1234.5, 2000, 3000},
			outside: []float64{math.NaN(), 999.999, 3000.001, -inf, inf},
		},
	}
}
