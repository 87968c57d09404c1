package priors

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Uniform is the uniform distribution on [Min, Max].
type Uniform struct{ Min, Max float64 }

// NewUniform returns the uniform distribution on [min, max]. Both bounds must
// be finite with min < max.
func NewUniform(min, max float64) (Uniform, error) {
	u := Uniform{Min: min, Max: max}
	if err := u.Validate(); err != nil {
		return Uniform{}, err
	}
	return u, nil
}

// Validate reports whether u is a proper distribution.
func (u Uniform) Validate() error {
	if err := checkFinite("uniform", "min", u.Min); err != nil {
		return err
	}
	if err := checkFinite("uniform", "max", u.Max); err != nil {
		return err
	}
	if !(u.Min < u.Max) {
		return fmt.Errorf("uniform prior: min (%s) must be less than max (%s)", num(u.Min), num(u.Max))
	}
	if math.IsInf(u.Max-u.Min, 0) {
		return fmt.Errorf("uniform prior: width max − min of [%s, %s] overflows", num(u.Min), num(u.Max))
	}
	return nil
}

// LogProb returns −log(Max − Min) inside [Min, Max] and −Inf elsewhere.
func (u Uniform) LogProb(x float64) float64 {
	if !(x >= u.Min && x <= u.Max) {
		return math.Inf(-1)
	}
	return -math.Log(u.Max - u.Min)
}

// Rand draws a value by scaling a uniform variate from r.
func (u Uniform) Rand(r *rand.Rand) float64 {
	return u.Quantile(r.Float64())
}

// Quantile returns Min + p(Max − Min).
func (u Uniform) Quantile(p float64) float64 {
	if !validP(p) {
		return math.NaN()
	}
	if p == 1 {
		return u.Max
	}
	return clamp(u.Min+p*(u.Max-u.Min), u.Min, u.Max)
}

// CDF returns the probability of a value ≤ x.
func (u Uniform) CDF(x float64) float64 {
	if math.IsNaN(x) {
		return math.NaN()
	}
	return clamp((x-u.Min)/(u.Max-u.Min), 0, 1)
}

// Support returns [Min, Max].
func (u Uniform) Support() (lo, hi float64) { return u.Min, u.Max }

// Mean returns (Min + Max)/2.
func (u Uniform) Mean() float64 { return u.Min + 0.5*(u.Max-u.Min) }

// StdDev returns (Max − Min)/√12.
func (u Uniform) StdDev() float64 { return (u.Max - u.Min) / math.Sqrt(12) }

// String returns e.g. "uniform(1000, 3000)".
func (u Uniform) String() string {
	return "uniform(" + num(u.Min) + ", " + num(u.Max) + ")"
}
