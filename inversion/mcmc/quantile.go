package mcmc

import (
	"math"
	"slices"
)

// Quantile7 returns the type-7 sample quantile of x at probability p: with the values sorted,
// x₍₁₎ ≤ … ≤ x₍ₙ₎, and h = (n−1)p, it interpolates linearly between x₍⌊h⌋+1₎ and x₍⌊h⌋+2₎
// (Hyndman & Fan 1996, Am. Stat. 50(4), definition 7; the default of R's quantile()).
//
// x need not be sorted and is not modified. The result is NaN when x is empty, when p is NaN or
// outside [0, 1], or when x holds a NaN (a quantile of data with missing values is undefined).
// ±Inf values are ordered normally.
func Quantile7(x []float64, p float64) float64 {
	if len(x) == 0 || !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	s := make([]float64, len(x))
	copy(s, x)
	for _, v := range s {
		if math.IsNaN(v) {
			return math.NaN()
		}
	}
	slices.Sort(s)
	return quantile7Sorted(s, p)
}

// quantile7Sorted is Quantile7 for an already sorted, NaN-free, non-empty slice and p in [0, 1].
func quantile7Sorted(s []float64, p float64) float64 {
	n := len(s)
	h := float64(n-1) * p
	lo := int(math.Floor(h))
	if lo >= n-1 {
		return s[n-1]
	}
	f := h - float64(lo)
	a, b := s[lo], s[lo+1]
	if f == 0 || a == b {
		// Exactly a sample value: no rounding, so indicators x ≤ q are exact for ties.
		return a
	}
	// Weighted form (1−f)·a + f·b, as R evaluates it; unlike a + f·(b−a) it also gives −Inf
	// rather than NaN when a = −Inf and b is finite.
	return (1-f)*a + f*b
}

// Quantile7Sorted is Quantile7 of an ascending, NaN-free slice s, without the copy and sort:
// for callers that take several quantiles of one sample. It returns NaN when s is empty or p is
// NaN or outside [0, 1]; an unsorted s gives a meaningless value.
func Quantile7Sorted(s []float64, p float64) float64 {
	if len(s) == 0 || !(p >= 0 && p <= 1) {
		return math.NaN()
	}
	return quantile7Sorted(s, p)
}
