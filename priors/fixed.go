package priors

import (
	"math"
	"math/rand/v2"
)

// Fixed is a point mass at Value: LogProb is 0 at Value and −Inf elsewhere.
// Fixed parameters are not sampled; Space rejects them.
type Fixed struct{ Value float64 }

// NewFixed returns the point mass at value, which must be finite.
func NewFixed(value float64) (Fixed, error) {
	f := Fixed{Value: value}
	if err := f.Validate(); err != nil {
		return Fixed{}, err
	}
	return f, nil
}

// Validate reports whether the value is finite.
func (f Fixed) Validate() error { return checkFinite("fixed", "value", f.Value) }

// LogProb returns 0 at Value and −Inf elsewhere.
func (f Fixed) LogProb(x float64) float64 {
	if x == f.Value {
		return 0
	}
	return math.Inf(-1)
}

// Rand returns Value without consuming randomness.
func (f Fixed) Rand(*rand.Rand) float64 { return f.Value }

// Quantile returns Value for any p in [0, 1].
func (f Fixed) Quantile(p float64) float64 {
	if !validP(p) {
		return math.NaN()
	}
	return f.Value
}

// CDF returns 0 below Value and 1 from Value on.
func (f Fixed) CDF(x float64) float64 {
	switch {
	case math.IsNaN(x):
		return math.NaN()
	case x < f.Value:
		return 0
	}
	return 1
}

// Support returns [Value, Value].
func (f Fixed) Support() (lo, hi float64) { return f.Value, f.Value }

// Mean returns Value.
func (f Fixed) Mean() float64 { return f.Value }

// StdDev returns 0.
func (f Fixed) StdDev() float64 { return 0 }

// String returns e.g. "fixed(3.5)".
func (f Fixed) String() string { return "fixed(" + num(f.Value) + ")" }
