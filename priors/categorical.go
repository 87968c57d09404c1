package priors

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
)

// Categorical is a discrete distribution over the levels Labels. A value x is
// a level index 0..K−1 carried as a float64. Weights are relative
// probabilities; they are normalised internally (NewCategorical stores them
// normalised to sum 1, and the methods divide by the sum in any case).
type Categorical struct {
	Labels  []string
	Weights []float64
}

// NewCategorical returns the categorical distribution over labels with the
// given relative weights. Labels must be non-empty and unique; there must be
// one finite, positive weight per label. The slices are copied.
func NewCategorical(labels []string, weights []float64) (Categorical, error) {
	c := Categorical{Labels: labels, Weights: weights}
	if err := c.Validate(); err != nil {
		return Categorical{}, err
	}
	sum := c.weightSum()
	out := Categorical{
		Labels:  append([]string(nil), labels...),
		Weights: make([]float64, len(weights)),
	}
	for i, w := range weights {
		out.Weights[i] = w / sum
	}
	return out, nil
}

// NewCategoricalEqual returns the categorical distribution giving every label
// the same probability.
func NewCategoricalEqual(labels []string) (Categorical, error) {
	w := make([]float64, len(labels))
	for i := range w {
		w[i] = 1
	}
	return NewCategorical(labels, w)
}

// Validate reports whether c is a proper distribution: at least one label,
// no empty or duplicate labels, and one finite positive weight per label.
func (c Categorical) Validate() error {
	if len(c.Labels) == 0 {
		return fmt.Errorf("categorical prior: no labels given")
	}
	seen := make(map[string]int, len(c.Labels))
	for i, l := range c.Labels {
		if l == "" {
			return fmt.Errorf("categorical prior: label %d is empty", i+1)
		}
		if j, dup := seen[l]; dup {
			return fmt.Errorf("categorical prior: duplicate label %q (positions %d and %d)", l, j+1, i+1)
		}
		seen[l] = i
	}
	if len(c.Weights) != len(c.Labels) {
		return fmt.Errorf("categorical prior: %d labels but %d weights; give one weight per label",
			len(c.Labels), len(c.Weights))
	}
	for i, w := range c.Weights {
		if !(w > 0) || math.IsInf(w, 0) {
			return fmt.Errorf("categorical prior: weight of label %q is %v; weights must be positive and finite",
				c.Labels[i], w)
		}
	}
	sum := c.weightSum()
	if math.IsInf(sum, 0) {
		return fmt.Errorf("categorical prior: weights sum to infinity; rescale them")
	}
	for i, w := range c.Weights {
		if !(w/sum > 0) {
			return fmt.Errorf("categorical prior: weight of label %q (%v) is negligible next to the total %v",
				c.Labels[i], w, sum)
		}
	}
	return nil
}

// weightSum returns Σ Weights.
func (c Categorical) weightSum() float64 {
	s := 0.0
	for _, w := range c.Weights {
		s += w
	}
	return s
}

// NumLevels returns the number of levels K.
func (c Categorical) NumLevels() int { return len(c.Labels) }

// Index returns the level index of label and whether it exists.
func (c Categorical) Index(label string) (int, bool) {
	for i, l := range c.Labels {
		if l == label {
			return i, true
		}
	}
	return -1, false
}

// Label returns the label of level index x, which must be an exact integer
// in 0..K−1.
func (c Categorical) Label(x float64) (string, bool) {
	k, ok := c.level(x)
	if !ok || k >= len(c.Labels) {
		return "", false
	}
	return c.Labels[k], true
}

// level converts x to a level index if it is an exact integer in range.
func (c Categorical) level(x float64) (int, bool) {
	if !(x >= 0 && x < float64(len(c.Weights))) || x != math.Trunc(x) {
		return 0, false
	}
	return int(x), true
}

// LogProb returns log P(index x); −Inf unless x is an exact integer in
// 0..K−1.
func (c Categorical) LogProb(x float64) float64 {
	k, ok := c.level(x)
	if !ok {
		return math.Inf(-1)
	}
	return math.Log(c.Weights[k] / c.weightSum())
}

// Rand draws a level index by inverting the CDF at a uniform variate from r.
func (c Categorical) Rand(r *rand.Rand) float64 {
	u := r.Float64() * c.weightSum()
	acc := 0.0
	for k, w := range c.Weights {
		acc += w
		if u < acc {
			return float64(k)
		}
	}
	return float64(len(c.Weights) - 1)
}

// Quantile returns the smallest index k with CDF(k) ≥ p.
func (c Categorical) Quantile(p float64) float64 {
	if !validP(p) || len(c.Weights) == 0 {
		return math.NaN()
	}
	target := p * c.weightSum()
	acc := 0.0
	for k, w := range c.Weights {
		acc += w
		if acc >= target {
			return float64(k)
		}
	}
	return float64(len(c.Weights) - 1)
}

// CDF returns P(index ≤ x).
func (c Categorical) CDF(x float64) float64 {
	if math.IsNaN(x) {
		return math.NaN()
	}
	if x < 0 {
		return 0
	}
	acc := 0.0
	for k, w := range c.Weights {
		if float64(k) > x {
			break
		}
		acc += w
	}
	return clamp(acc/c.weightSum(), 0, 1)
}

// Support returns [0, K−1].
func (c Categorical) Support() (lo, hi float64) { return 0, float64(len(c.Weights) - 1) }

// Mean returns the mean level index.
func (c Categorical) Mean() float64 {
	m := 0.0
	for k, w := range c.Weights {
		m += float64(k) * w
	}
	return m / c.weightSum()
}

// StdDev returns the standard deviation of the level index.
func (c Categorical) StdDev() float64 {
	m, s := c.Mean(), c.weightSum()
	v := 0.0
	for k, w := range c.Weights {
		d := float64(k) - m
		v += w * d * d
	}
	return math.Sqrt(v / s)
}

// String returns e.g. "categorical(fe=0.7, fes=0.3)" with normalised weights.
func (c Categorical) String() string {
	var b strings.Builder
	b.WriteString("categorical(")
	s := c.weightSum()
	for i, l := range c.Labels {
		if i > 0 {
			b.WriteString(", ")
		}
		b.WriteString(l)
		if i < len(c.Weights) {
			b.WriteString("=")
			b.WriteString(strconv.FormatFloat(c.Weights[i]/s, 'g', 4, 64))
		}
	}
	b.WriteString(")")
	return b.String()
}
