package priors

import "math"

// normalCases returns the normal distribution's case of the continuous-distribution tests
// (TestContinuous* in dist_test.go).
func normalCases() []contCase {
	return []contCase{
		{
			name: "normal", d: mustDist(NewNormal(5000, 100)),
			pdf: func(x float64) float64 { return refPhi((x-5000)/100) / 100 },
			cdf: func(x float64) float64 { return 1 - refQ((x-5000)/100) },
			// Normal: mean μ, variance σ², median μ.
			mean: 5000, variance: 1e4, median: 5000,
			qlo: 5000 - 1500, qhi: 5000 + 1500, points: []float64{4600, 4700, 5000, 5250, 5400},
			outside: []float64{math.NaN()},
		},
	}
}
