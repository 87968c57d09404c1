package mcmc

import (
	"math"
	"slices"
	"testing"
)

// TestQuantile7 checks the type-7 sample quantile (Hyndman & Fan 1996, Am. Stat. 50(4), def. 7:
// h = (n−1)p, Q = x₍⌊h⌋₊₁₎ + (h − ⌊h⌋)(x₍⌊h⌋₊₂₎ − x₍⌊h⌋₊₁₎)) against values worked by hand from
// that definition. The first case is also the example value R's quantile() gives, stated in the
// brief (R's default type 7).
func TestQuantile7(t *testing.T) {
	inf := math.Inf(1)
	cases := []struct {
		name string
		x    []float64
		p    float64
		want float64
	}{
		{"R doc 1:4 at 0.1 (h=0.3)", []float64{1, 2, 3, 4}, 0.1, 1.3},
		{"unsorted 1:4 at 0.1", []float64{4, 1, 3, 2}, 0.1, 1.3},
		{"1:4 median (h=1.5)", []float64{1, 2, 3, 4}, 0.5, 2.5},
		{"1:4 at 0.9 (h=2.7)", []float64{1, 2, 3, 4}, 0.9, 3.7},
		{"1:10 at 0.33 (h=2.97)", []float64{10, 9, 8, 7, 6, 5, 4, 3, 2, 1}, 0.33, 3.97},
		{"p=0 is min", []float64{3, -2, 7}, 0, -2},
		{"p=1 is max", []float64{3, -2, 7}, 1, 7},
		{"single value", []float64{5}, 0.37, 5},
		{"exact order statistic (h=2)", []float64{0, 10, 20, 30, 40}, 0.5, 20},
		{"ties stay exact", []float64{0.1, 0.1, 0.1, 0.7}, 0.4, 0.1},
		{"odd count 0.25 (h=1.5)", []float64{1, 3, 5, 7, 9, 11, 13}, 0.25, 4},
		{"-Inf lower neighbour", []float64{-inf, 1, 2}, 0.25, -inf},
		{"+Inf upper neighbour", []float64{0, 1, inf}, 0.75, inf},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			orig := slices.Clone(c.x)
			got := Quantile7(c.x, c.p)
			if !(got == c.want || math.Abs(got-c.want) <= 1e-12*math.Max(1, math.Abs(c.want))) {
				t.Errorf("Quantile7(%v, %v) = %v, want %v", orig, c.p, got, c.want)
			}
			if !slices.Equal(c.x, orig) {
				t.Errorf("input modified: %v, was %v", c.x, orig)
			}
		})
	}
}

// TestQuantile7Undefined checks the documented NaN results.
func TestQuantile7Undefined(t *testing.T) {
	cases := []struct {
		name string
		x    []float64
		p    float64
	}{
		{"empty", nil, 0.5},
		{"p below 0", []float64{1, 2}, -0.01},
		{"p above 1", []float64{1, 2}, 1.01},
		{"p NaN", []float64{1, 2}, math.NaN()},
		{"NaN in x", []float64{1, math.NaN(), 2}, 0.5},
		{"Inf and -Inf interpolated", []float64{math.Inf(-1), math.Inf(1)}, 0.5},
	}
	for _, c := range cases {
		if got := Quantile7(c.x, c.p); !math.IsNaN(got) {
			t.Errorf("%s: Quantile7 = %v, want NaN", c.name, got)
		}
	}
}

// TestQuantile7Monotone checks that the quantile is non-decreasing in p and stays within the
// sample range (a property of any quantile definition; no external value needed).
func TestQuantile7Monotone(t *testing.T) {
	x := []float64{0.3, -1.2, 4.4, 4.4, 2.0, -0.7, 9.1, 0.0}
	prev := math.Inf(-1)
	for i := 0; i <= 1000; i++ {
		q := Quantile7(x, float64(i)/1000)
		if q < prev || q < -1.2 || q > 9.1 {
			t.Fatalf("p=%v: q=%v (previous %v) not monotone or out of range", float64(i)/1000, q, prev)
		}
		prev = q
	}
}

func BenchmarkQuantile7(b *testing.B) {
	x := make([]float64, 40000)
	for i := range x {
		x[i] = math.Sin(float64(i) * 1.37)
	}
	for b.Loop() {
		Quantile7(x, 0.05)
	}
}

// Quantile7Sorted of a sorted sample equals Quantile7 of the unsorted one, and is NaN where
// Quantile7 is (empty input, p outside [0, 1]).
func TestQuantile7SortedMatchesQuantile7(t *testing.T) {
	v := []float64{3, -1, 4, 1, 5, 9, 2, 6, 5, 3, 5}
	s := slices.Clone(v)
	slices.Sort(s)
	for _, p := range []float64{0, 0.05, 0.25, 0.5, 0.75, 0.95, 1} {
		if got, want := Quantile7Sorted(s, p), Quantile7(v, p); got != want {
			t.Errorf("p=%g: %g, want %g", p, got, want)
		}
	}
	for _, c := range []struct {
		s []float64
		p float64
	}{{nil, 0.5}, {s, -0.1}, {s, 1.1}, {s, math.NaN()}} {
		if got := Quantile7Sorted(c.s, c.p); !math.IsNaN(got) {
			t.Errorf("Quantile7Sorted(%v, %g) = %g, want NaN", c.s, c.p, got)
		}
	}
}
