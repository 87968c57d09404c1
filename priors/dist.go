package priors

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
)

// Dist is a one-dimensional prior distribution. Values are in SI units (the
// caller converts).
type Dist interface {
	// LogProb is the log density at x, −Inf outside the support (and for
	// NaN). For Categorical it is log P(index) and x must be an exact
	// integer index.
	LogProb(x float64) float64
	// Rand draws one value using r (never the global generator).
	Rand(r *rand.Rand) float64
	// Quantile is the inverse CDF for p in [0, 1]; it returns NaN for p
	// outside [0, 1] or NaN.
	Quantile(p float64) float64
	// Support returns the closed support bounds (±Inf if unbounded).
	Support() (lo, hi float64)
	// StdDev is the standard deviation, used for initial proposal scales.
	StdDev() float64
	// String is a short human-readable form, e.g. "uniform(1000, 3000)".
	String() string
}

// Validator is implemented by every distribution of this package. Validate
// reports whether the parameters describe a proper distribution; the
// constructors call it, and Space.Validate calls it for each prior.
type Validator interface {
	Validate() error
}

// CDFer is implemented by every distribution of this package: CDF(x) is the
// probability of a value ≤ x.
type CDFer interface {
	CDF(x float64) float64
}

// Compile-time checks that every kind satisfies the interfaces.
var (
	_ Dist = Uniform{}
	_ Dist = Normal{}
	_ Dist = TruncNormal{}
	_ Dist = LogUniform{}
	_ Dist = Categorical{}
	_ Dist = Fixed{}

	_ Validator = Uniform{}
	_ Validator = Normal{}
	_ Validator = TruncNormal{}
	_ Validator = LogUniform{}
	_ Validator = Categorical{}
	_ Validator = Fixed{}

	_ CDFer = Uniform{}
	_ CDFer = Normal{}
	_ CDFer = TruncNormal{}
	_ CDFer = LogUniform{}
	_ CDFer = Categorical{}
	_ CDFer = Fixed{}
)

// num formats a number in its shortest exact form ("1000", "2.5e+06").
func num(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// isFinite reports whether v is neither NaN nor ±Inf.
func isFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// checkFinite returns an error naming the distribution kind and the
// argument when v is NaN or infinite.
func checkFinite(kind, arg string, v float64) error {
	if !isFinite(v) {
		return fmt.Errorf("%s prior: %s is %v; it must be a finite number", kind, arg, v)
	}
	return nil
}

// validP reports whether p is a probability in [0, 1] (false for NaN).
func validP(p float64) bool { return p >= 0 && p <= 1 }

// clamp limits v to [lo, hi].
func clamp(v, lo, hi float64) float64 {
	if v < lo {
		return lo
	}
	if v > hi {
		return hi
	}
	return v
}
