package priors

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"strconv"
)

// Param is one sampled coordinate.
type Param struct {
	// Name is a column-safe name with the output unit in it, e.g.
	// "core_outer_radius_km": ASCII letters, digits and '_', not starting
	// with a digit.
	Name string
	// Unit is the output unit, e.g. "km", "kg/m3"; "" for categorical.
	Unit string
	// ToUnit multiplies an SI value to give the output unit (e.g. 1e-3 for
	// m → km); 1 if there is no conversion.
	ToUnit float64
	// Prior is the prior distribution, in SI units.
	Prior Dist
}

// Levels returns the number of levels of a categorical prior, 0 for a
// continuous one.
func (p Param) Levels() int {
	if c, ok := p.Prior.(interface{ NumLevels() int }); ok {
		return c.NumLevels()
	}
	return 0
}

// String returns e.g. "core_outer_radius_km ~ uniform(1000, 3000) km", the
// prior expressed in the output unit.
func (p Param) String() string {
	if p.Prior == nil {
		return p.Name + " ~ <no prior>"
	}
	s := p.Name + " ~ " + scaledString(p.Prior, p.ToUnit)
	if p.Unit != "" {
		s += " " + p.Unit
	}
	return s
}

// PriorString returns the prior expressed in the output unit, e.g. "uniform(1000, 3000)" for a
// radius prior held in metres and shown in km.
func (p Param) PriorString() string {
	if p.Prior == nil {
		return "<no prior>"
	}
	return scaledString(p.Prior, p.ToUnit)
}

// scaledString formats d after converting its values by the factor k; an
// unknown kind is printed as is, marked as SI.
func scaledString(d Dist, k float64) string {
	if !(k > 0) || math.IsInf(k, 0) || k == 1 {
		return d.String()
	}
	// Scaled values are rounded to 12 significant digits, so that a unit converted to SI and back
	// (degrees → radians → degrees) prints as written, not as 119.99999999999999.
	sc := func(v float64) float64 {
		r, err := strconv.ParseFloat(strconv.FormatFloat(v*k, 'g', 12, 64), 64)
		if err != nil {
			return v * k
		}
		return r
	}
	switch v := d.(type) {
	case Uniform:
		return Uniform{Min: sc(v.Min), Max: sc(v.Max)}.String()
	case Normal:
		return Normal{Mu: sc(v.Mu), Sigma: sc(v.Sigma)}.String()
	case TruncNormal:
		return TruncNormal{Mu: sc(v.Mu), Sigma: sc(v.Sigma), Min: sc(v.Min), Max: sc(v.Max)}.String()
	case LogUniform:
		return LogUniform{Min: sc(v.Min), Max: sc(v.Max)}.String()
	case Fixed:
		return Fixed{Value: sc(v.Value)}.String()
	case Categorical:
		return v.String()
	}
	return d.String() + " (SI)"
}

// Space is the ordered list of sampled parameters (fixed values are not in
// it). A point of the space is a []float64 of length Dim in SI units, with
// categorical coordinates carried as level indices.
type Space struct{ Params []Param }

// Dim returns the number of coordinates.
func (s Space) Dim() int { return len(s.Params) }

// Index returns the coordinate of the parameter called name, −1 if absent.
func (s Space) Index(name string) int {
	for i := range s.Params {
		if s.Params[i].Name == name {
			return i
		}
	}
	return -1
}

// Names returns the parameter names in coordinate order.
func (s Space) Names() []string {
	out := make([]string, len(s.Params))
	for i := range s.Params {
		out[i] = s.Params[i].Name
	}
	return out
}

// LogPrior returns Σ LogProb(x[i]), the joint log prior density of the
// independent coordinates. It is −Inf if any coordinate lies outside its
// support or is NaN, if a categorical coordinate is not an exact integer
// level index, or if len(x) ≠ Dim. It does not allocate.
func (s Space) LogPrior(x []float64) float64 {
	if len(x) != len(s.Params) {
		return math.Inf(-1)
	}
	sum := 0.0
	for i := range s.Params {
		lp := s.Params[i].Prior.LogProb(x[i])
		if math.IsNaN(lp) || math.IsInf(lp, 0) {
			return math.Inf(-1)
		}
		sum += lp
	}
	return sum
}

// Sample draws every coordinate independently from its prior into x, using
// r. x should have length Dim; only the first min(len(x), Dim) entries are
// written.
func (s Space) Sample(r *rand.Rand, x []float64) {
	n := min(len(x), len(s.Params))
	for i := 0; i < n; i++ {
		x[i] = s.Params[i].Prior.Rand(r)
	}
}

// Levels returns, per coordinate, the number of levels of a categorical
// prior or 0 for a continuous one.
func (s Space) Levels() []int {
	out := make([]int, len(s.Params))
	for i := range s.Params {
		out[i] = s.Params[i].Levels()
	}
	return out
}

// Validate checks that every name is non-empty, column-safe and unique,
// every prior is present and valid (and not a point mass: fixed values do
// not belong in the sampled space), continuous priors have a positive finite
// spread, and every ToUnit is positive and finite.
func (s Space) Validate() error {
	seen := make(map[string]int, len(s.Params))
	for i, p := range s.Params {
		where := fmt.Sprintf("parameter %d", i+1)
		if p.Name != "" {
			where = fmt.Sprintf("parameter %d (%q)", i+1, p.Name)
		}
		if err := checkName(p.Name); err != nil {
			return fmt.Errorf("%s: %w", where, err)
		}
		if j, dup := seen[p.Name]; dup {
			return fmt.Errorf("%s: name already used by parameter %d", where, j+1)
		}
		seen[p.Name] = i
		if isNilDist(p.Prior) {
			return fmt.Errorf("%s: no prior given", where)
		}
		switch p.Prior.(type) {
		case Fixed, *Fixed:
			return fmt.Errorf("%s: prior %s is a fixed value; fixed values are not sampled and must be left out of the space",
				where, p.Prior)
		}
		if v, ok := p.Prior.(Validator); ok {
			if err := v.Validate(); err != nil {
				return fmt.Errorf("%s: %w", where, err)
			}
		}
		if p.Levels() == 0 {
			if sd := p.Prior.StdDev(); !(sd > 0) || math.IsInf(sd, 0) {
				return fmt.Errorf("%s: prior %s has standard deviation %v; a sampled parameter needs a positive finite spread",
					where, p.Prior, sd)
			}
		}
		if !(p.ToUnit > 0) || math.IsInf(p.ToUnit, 0) {
			return fmt.Errorf("%s: unit factor ToUnit is %v; it must be positive and finite (1 for no conversion)",
				where, p.ToUnit)
		}
	}
	return nil
}

// checkName reports whether name is non-empty and made of ASCII letters,
// digits and '_', not starting with a digit.
func checkName(name string) error {
	if name == "" {
		return fmt.Errorf("name is empty")
	}
	for i := 0; i < len(name); i++ {
		c := name[i]
		switch {
		case c == '_', c >= 'a' && c <= 'z', c >= 'A' && c <= 'Z':
		case c >= '0' && c <= '9':
			if i == 0 {
				return fmt.Errorf("name %q starts with a digit", name)
			}
		default:
			return fmt.Errorf("name %q contains %q; use only letters, digits and '_'", name, rune(c))
		}
	}
	return nil
}

// isNilDist reports whether d is nil or an interface holding a nil pointer.
func isNilDist(d Dist) bool {
	if d == nil {
		return true
	}
	v := reflect.ValueOf(d)
	switch v.Kind() {
	case reflect.Pointer, reflect.Map, reflect.Slice, reflect.Func, reflect.Interface, reflect.Chan:
		return v.IsNil()
	}
	return false
}
