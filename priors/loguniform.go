package priors

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// LogUniform has density ∝ 1/x on [Min, Max] with 0 < Min < Max, i.e. log x
// is uniform on [log Min, log Max].
type LogUniform struct{ Min, Max float64 }

// NewLogUniform returns the log-uniform distribution on [min, max]; both
// bounds must be finite with 0 < min < max.
func NewLogUniform(min, max float64) (LogUniform, error) {
	l := LogUniform{Min: min, Max: max}
	if err := l.Validate(); err != nil {
		return LogUniform{}, err
	}
	return l, nil
}

// Validate reports whether l is a proper distribution.
func (l LogUniform) Validate() error {
	if err := checkFinite("log-uniform", "min", l.Min); err != nil {
		return err
	}
	if err := checkFinite("log-uniform", "max", l.Max); err != nil {
		return err
	}
	if !(l.Min > 0) {
		return fmt.Errorf("log-uniform prior: min is %s; it must be positive", num(l.Min))
	}
	if !(l.Min < l.Max) {
		return fmt.Errorf("log-uniform prior: min (%s) must be less than max (%s)", num(l.Min), num(l.Max))
	}
	return nil
}

// logWidth returns log(Max/Min), as log1p((Max−Min)/Min) for full relative
// precision on narrow intervals, or as log Max − log Min if that ratio
// overflows.
func (l LogUniform) logWidth() float64 {
	if r := (l.Max - l.Min) / l.Min; !math.IsInf(r, 0) {
		return math.Log1p(r)
	}
	return math.Log(l.Max) - math.Log(l.Min)
}

// LogProb returns −log x − log log(Max/Min) inside [Min, Max], −Inf elsewhere.
func (l LogUniform) LogProb(x float64) float64 {
	if !(x >= l.Min && x <= l.Max) {
		return math.Inf(-1)
	}
	return -math.Log(x) - math.Log(l.logWidth())
}

// Rand draws a value by inverting the CDF at a uniform variate from r.
func (l LogUniform) Rand(r *rand.Rand) float64 {
	return l.Quantile(r.Float64())
}

// Quantile returns Min·(Max/Min)^p.
func (l LogUniform) Quantile(p float64) float64 {
	if !validP(p) {
		return math.NaN()
	}
	switch p {
	case 0:
		return l.Min
	case 1:
		return l.Max
	}
	return clamp(l.Min*math.Exp(p*l.logWidth()), l.Min, l.Max)
}

// CDF returns log(x/Min)/log(Max/Min) clamped to [0, 1].
func (l LogUniform) CDF(x float64) float64 {
	switch {
	case math.IsNaN(x):
		return math.NaN()
	case x <= l.Min:
		return 0
	case x >= l.Max:
		return 1
	}
	return clamp((math.Log(x)-math.Log(l.Min))/l.logWidth(), 0, 1)
}

// Support returns [Min, Max].
func (l LogUniform) Support() (lo, hi float64) { return l.Min, l.Max }

// Mean returns (Max − Min)/log(Max/Min), written as Min·expm1(d)/d with
// d = log(Max/Min) so that narrow intervals keep full precision.
func (l LogUniform) Mean() float64 {
	d := l.logWidth()
	return l.Min * math.Expm1(d) / d
}

// StdDev returns the standard deviation. With X = Min·e^{dU}, U uniform on
// [0, 1] and d = log(Max/Min),
//
//	Var(e^{dU}) = expm1(2d)/(2d) − (expm1(d)/d)²
//	            = Σ_{n≥2} (2ⁿ(n−2) + 2)/(n+2)! · dⁿ,
//
// (the series follows from E[e^{kdU}] = Σ (kd)ⁿ/(n+1)!; derived here). The
// closed form cancels badly for small d, so the all-positive series is used
// for d < 1.
func (l LogUniform) StdDev() float64 {
	d := l.logWidth()
	var v float64
	if d < 1 {
		// term_n = (2ⁿ(n−2)+2) dⁿ/(n+2)!; track dⁿ/(n+2)! and 2ⁿ separately.
		pow2 := 4.0     // 2ⁿ at n = 2
		t := d * d / 24 // dⁿ/(n+2)! at n = 2
		for n := 2; n < 60; n++ {
			term := (pow2*float64(n-2) + 2) * t
			v += term
			if term < 1e-17*v {
				break
			}
			pow2 *= 2
			t *= d / float64(n+3)
		}
	} else {
		b := math.Expm1(d) / d
		v = math.Expm1(2*d)/(2*d) - b*b
	}
	return l.Min * math.Sqrt(v)
}

// String returns e.g. "loguniform(1e+19, 1e+23)".
func (l LogUniform) String() string {
	return "loguniform(" + num(l.Min) + ", " + num(l.Max) + ")"
}
