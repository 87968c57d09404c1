package report

import (
	"math"
	"plumb/inversion/mcmc"
	"slices"
)

// finiteSorted returns the finite values of v in ascending order (a copy).
func finiteSorted(v []float64) []float64 {
	out := make([]float64, 0, len(v))
	for _, x := range v {
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			out = append(out, x)
		}
	}
	slices.Sort(out)
	return out
}

// span returns a plotting range for the sorted values s: their range, widened when it is
// degenerate (a constant column) so that a bin has a positive width.
func span(s []float64) (lo, hi float64) {
	lo, hi = s[0], s[len(s)-1]
	if hi > lo {
		return lo, hi
	}
	d := math.Abs(lo) * 1e-3
	if d == 0 {
		d = 1
	}
	return lo - d, hi + d
}

// binCount is the Freedman–Diaconis number of histogram bins over [lo, hi] for the sorted
// sample s, bin width 2·IQR·n^(−1/3) (Freedman & Diaconis 1981), kept within [minBins, maxBins]
// (limits: common practice, no source).
func binCount(s []float64, lo, hi float64, minBins, maxBins int) int {
	iqr := mcmc.Quantile7Sorted(s, 0.75) - mcmc.Quantile7Sorted(s, 0.25)
	if !(iqr > 0) {
		return minBins
	}
	w := 2 * iqr / math.Cbrt(float64(len(s)))
	n := int(math.Ceil((hi - lo) / w))
	return max(minBins, min(maxBins, n))
}

// histogram counts s in n equal bins over [lo, hi] (the last bin closed) and returns the
// probability density of each bin (count / (N·width)).
func histogram(s []float64, lo, hi float64, n int) []float64 {
	d := make([]float64, n)
	w := (hi - lo) / float64(n)
	for _, x := range s {
		k := int((x - lo) / w)
		if x == hi {
			k = n - 1
		}
		if k < 0 || k >= n {
			continue
		}
		d[k]++
	}
	for k := range d {
		d[k] /= float64(len(s)) * w
	}
	return d
}
