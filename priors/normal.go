package priors

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mathext"
)

// Normal is the normal (Gaussian) distribution with mean Mu and standard
// deviation Sigma.
type Normal struct{ Mu, Sigma float64 }

// NewNormal returns the normal distribution with mean mu and standard
// deviation sigma; both must be finite and sigma > 0.
func NewNormal(mu, sigma float64) (Normal, error) {
	n := Normal{Mu: mu, Sigma: sigma}
	if err := n.Validate(); err != nil {
		return Normal{}, err
	}
	return n, nil
}

// Validate reports whether n is a proper distribution.
func (n Normal) Validate() error {
	return validateNormalParams("normal", n.Mu, n.Sigma)
}

// validateNormalParams checks a mean and a standard deviation.
func validateNormalParams(kind string, mu, sigma float64) error {
	if err := checkFinite(kind, "mean", mu); err != nil {
		return err
	}
	if err := checkFinite(kind, "sigma", sigma); err != nil {
		return err
	}
	if !(sigma > 0) {
		return fmt.Errorf("%s prior: sigma is %s; it must be positive", kind, num(sigma))
	}
	return nil
}

// halfLog2Pi is ½ log(2π).
const halfLog2Pi = 0.91893853320467274178032973640561763986139747363778

// LogProb returns the log of the normal density at x.
func (n Normal) LogProb(x float64) float64 {
	if math.IsNaN(x) {
		return math.Inf(-1)
	}
	z := (x - n.Mu) / n.Sigma
	return -0.5*z*z - math.Log(n.Sigma) - halfLog2Pi
}

// Rand draws Mu + Sigma·N(0, 1) with the standard normal variate from r.
func (n Normal) Rand(r *rand.Rand) float64 {
	return n.Mu + n.Sigma*r.NormFloat64()
}

// Quantile returns Mu + Sigma·Φ⁻¹(p) (−Inf at p = 0, +Inf at p = 1).
func (n Normal) Quantile(p float64) float64 {
	if !validP(p) {
		return math.NaN()
	}
	return n.Mu + n.Sigma*mathext.NormalQuantile(p)
}

// CDF returns Φ((x − Mu)/Sigma), evaluated with erfc so that both tails keep
// full relative precision.
func (n Normal) CDF(x float64) float64 {
	return stdNormalCDF((x - n.Mu) / n.Sigma)
}

// Support returns (−Inf, +Inf).
func (n Normal) Support() (lo, hi float64) { return math.Inf(-1), math.Inf(1) }

// Mean returns Mu.
func (n Normal) Mean() float64 { return n.Mu }

// StdDev returns Sigma.
func (n Normal) StdDev() float64 { return n.Sigma }

// String returns e.g. "normal(5000, 100)" (mean, standard deviation).
func (n Normal) String() string {
	return "normal(" + num(n.Mu) + ", " + num(n.Sigma) + ")"
}

// stdNormalCDF is Φ(z) = ½ erfc(−z/√2).
func stdNormalCDF(z float64) float64 { return 0.5 * math.Erfc(-z/math.Sqrt2) }

// stdNormalSF is the upper tail Q(z) = 1 − Φ(z) = ½ erfc(z/√2).
func stdNormalSF(z float64) float64 { return 0.5 * math.Erfc(z/math.Sqrt2) }

// stdNormalPDF is φ(z); it is 0 at ±Inf.
func stdNormalPDF(z float64) float64 { return math.Exp(-0.5*z*z - halfLog2Pi) }
