package forward

import (
	"fmt"
	"math"
	"sort"
)

// Structure is the solved radial structure of a Model. For polynomial
// densities every quantity is evaluated in closed form.
type Structure struct {
	// Model is the solved model. It shares its layers with the Model passed to
	// Solve; do not modify them afterwards.
	Model            Model
	Boundary         []float64 // len L+1: 0, Layers[0].Outer, …, R (m)
	EnclosedMass     []float64 // len L+1: mass inside Boundary[i] (kg)
	BoundaryPressure []float64 // len L+1: hydrostatic pressure at Boundary[i] (Pa), 0 at the surface
	Mass             float64   // total mass (kg)
	Inertia          float64   // mean moment of inertia (8π/3)∫ρ r⁴ dr (kg m²)

	mu []float64 // EnclosedMass[i] / (4π R³), the normalised enclosed mass (kg/m³)
}

// Sizes of the stack buffers used by the closed-form integrals; polynomials
// with more than stackCoeffs coefficients still work but allocate.
const (
	stackCoeffs = 8
	stackPowers = 2*stackCoeffs + 1
)

// The closed forms, in the normalised radius x = r/R (R = planet radius) so that
// all powers stay O(1) however high the degree. For a layer with density
// ρ(x) = Σ_k a_k x^k (a_k = C_k (R/Scale)^k) starting at x_i:
//
//	m(x) = 4πR³ μ(x),  μ(x) = μ_i + Σ_k b_k (x^{k+3} − x_i^{k+3}),  b_k = a_k/(k+3)
//	I    = (8π/3) R⁵ Σ_layers Σ_k a_k (x_b^{k+5} − x_a^{k+5})/(k+5)
//	g(x) = G m / r² = 4πG R μ(x)/x²
//
// Hydrostatic pressure P(r) = ∫_r^R ρ g dr' = 4πG R² ∫_x^1 ρ μ / x'² dx'. Write
// μ(x) = K + Σ_k b_k x^{k+3} with the layer constant K = μ_i − Σ_k b_k x_i^{k+3}
// (K is the mass below the layer minus the mass the layer's own density law
// would have put there). Then
//
//	ρ μ / x² = K Σ_j a_j x^{j−2} + Σ_j Σ_k a_j b_k x^{j+k+1}
//
// whose antiderivative is exact:
//
//	∫ x^{j+k+1} dx = x^{j+k+2}/(j+k+2)
//	∫ x^{j−2} dx   = −1/x (j = 0),  ln x (j = 1),  x^{j−1}/(j−1) (j ≥ 2).
//
// So over [x_a, x_b] inside one layer:
//
//	∫ ρμ/x² dx = K [a_0 (1/x_a − 1/x_b) + a_1 ln(x_b/x_a) + Σ_{j≥2} a_j (x_b^{j−1} − x_a^{j−1})/(j−1)]
//	           + Σ_{j,k} a_j b_k (x_b^{j+k+2} − x_a^{j+k+2})/(j+k+2).
//
// In the innermost layer x_i = 0 and μ_i = 0, so K = 0 and the 1/x and ln x terms
// (singular at the centre) vanish identically; they are skipped there. Each
// difference is evaluated without cancellation: x_b^n − x_a^n = d·S_n with
// S_n = Σ_{i<n} x_b^{n−1−i} x_a^i (all terms ≥ 0) and d = (r_b − r_a)/R taken
// from the radii directly, 1/x_a − 1/x_b = d/(x_a x_b), ln(x_b/x_a) = log1p(d/x_a).
// This keeps thin layers (a 3 km ocean on a 6371 km planet) accurate.

// shell holds the work of one closed-form integral over [r_a, r_b] in a layer.
// It keeps its numbers in fixed arrays (heap slices only for long polynomials)
// and never points into itself, so that it can live on the stack.
type shell struct {
	abuf   [stackCoeffs]float64 // density coefficients a_k in x = r/R
	bbuf   [stackCoeffs]float64 // b_k = a_k/(k+3)
	qbuf   [stackPowers]float64 // q[n] = (x_b^n − x_a^n)/((x_b − x_a)·n), n ≥ 1
	heap   []float64            // a, b and q back to back when they do not fit
	na, nq int
	xa, xb float64 // normalised end radii
	d      float64 // x_b − x_a, from the radii
}

// slices returns the coefficients a, b and the scaled power sums q.
func (sh *shell) slices() (a, b, q []float64) {
	if sh.heap != nil {
		return sh.heap[:sh.na], sh.heap[sh.na : 2*sh.na], sh.heap[2*sh.na:]
	}
	return sh.abuf[:sh.na], sh.bbuf[:sh.na], sh.qbuf[:sh.nq]
}

// set prepares the integrals of density p over [ra, rb] in a planet of radius R.
func (sh *shell) set(p Poly, R, ra, rb float64) {
	n := len(p.C)
	sh.na = n
	sh.nq = max(2*n, n+4) + 1
	sh.heap = nil
	if n > stackCoeffs {
		sh.heap = make([]float64, 2*n+sh.nq)
	}
	a, b, q := sh.slices()
	scale := R / p.Scale
	f := 1.0
	for k, c := range p.C {
		a[k] = c * f
		b[k] = a[k] / float64(k+3)
		f *= scale
	}
	sh.xa, sh.xb = ra/R, rb/R
	sh.d = (rb - ra) / R
	q[0] = 0
	acc, xap := 0.0, 1.0
	for m := 1; m < len(q); m++ {
		acc = acc*sh.xb + xap // Σ_{i<m} x_b^{m−1−i} x_a^i
		q[m] = acc / float64(m)
		xap *= sh.xa
	}
}

// mass returns ∫ ρ x² dx over the shell (normalised mass increment).
func (sh *shell) mass() float64 { return sh.moment(3) }

// inertia returns ∫ ρ x⁴ dx over the shell.
func (sh *shell) inertia() float64 { return sh.moment(5) }

// moment returns ∫ ρ x^{j−1} dx = d·Σ_k a_k q[k+j] over the shell (j ≥ 1).
func (sh *shell) moment(j int) float64 {
	a, _, q := sh.slices()
	t := 0.0
	for k, ak := range a {
		t += ak * q[k+j]
	}
	return sh.d * t
}

// pressure returns ∫ ρ μ / x² dx over the shell for the layer constant K.
func (sh *shell) pressure(K float64) float64 {
	a, b, q := sh.slices()
	t := 0.0
	for j, aj := range a {
		inner := 0.0
		for k, bk := range b {
			inner += bk * q[j+k+2]
		}
		t += aj * inner
	}
	if K == 0 {
		return sh.d * t
	}
	u := a[0] / (sh.xa * sh.xb)
	for j := 2; j < len(a); j++ {
		u += a[j] * q[j-1]
	}
	res := sh.d * (t + K*u)
	if len(a) > 1 {
		res += K * a[1] * math.Log1p(sh.d/sh.xa)
	}
	return res
}

// layerConst returns K = μ_i − Σ_k a_k x_i^{k+3}/(k+3) for layer i (0 for the
// innermost layer), using the coefficients already in sh.
func (s *Structure) layerConst(i int, sh *shell) float64 {
	if i == 0 {
		return 0
	}
	xi := s.Boundary[i] / s.Radius()
	_, b, _ := sh.slices()
	K := s.mu[i]
	p := xi * xi * xi
	for _, bk := range b {
		K -= bk * p
		p *= xi
	}
	return K
}

// Solve validates the model and computes its structure: enclosed mass at each
// boundary, total mass, mean moment of inertia and hydrostatic pressure at each
// boundary, all by exact integration of the polynomial densities.
func Solve(m Model) (*Structure, error) {
	if err := m.Validate(); err != nil {
		return nil, fmt.Errorf("invalid model: %w", err)
	}
	s := newStructure(m)
	if err := s.integrate(); err != nil {
		return nil, err
	}
	return s, nil
}

// newStructure allocates the structure of m and sets its boundaries; the
// integrals are left to integrate. The model is not validated.
func newStructure(m Model) *Structure {
	L := len(m.Layers)
	buf := make([]float64, 4*(L+1))
	s := &Structure{
		Model:            m,
		Boundary:         buf[0 : L+1 : L+1],
		EnclosedMass:     buf[L+1 : 2*(L+1) : 2*(L+1)],
		BoundaryPressure: buf[2*(L+1) : 3*(L+1) : 3*(L+1)],
		mu:               buf[3*(L+1):],
	}
	for i := range m.Layers {
		s.Boundary[i+1] = m.Layers[i].Outer
	}
	return s
}

// integrate (re)computes enclosed masses, boundary pressures, mass and inertia
// from the current layer densities of s.Model, whose radii must be those the
// structure was allocated with.
func (s *Structure) integrate() error {
	m := s.Model
	L := len(m.Layers)
	R := m.Radius()
	massScale := 4 * math.Pi * R * R * R
	pScale := 4 * math.Pi * G * R * R
	var sh shell
	inert := 0.0
	// One outward pass: the pressure integral across layer i needs only the
	// mass below it, so it is stored in BoundaryPressure[i] for now.
	for i := range m.Layers {
		l := &m.Layers[i]
		sh.set(l.Density, R, l.Inner, l.Outer)
		s.BoundaryPressure[i] = sh.pressure(s.layerConst(i, &sh))
		s.mu[i+1] = s.mu[i] + sh.mass()
		s.EnclosedMass[i+1] = massScale * s.mu[i+1]
		inert += sh.inertia()
	}
	// Then sum the pressure increments from the surface (P = 0) down.
	s.BoundaryPressure[L] = 0
	for i := L - 1; i >= 0; i-- {
		s.BoundaryPressure[i] = s.BoundaryPressure[i+1] + pScale*s.BoundaryPressure[i]
	}
	s.Mass = s.EnclosedMass[L]
	s.Inertia = 8 * math.Pi / 3 * R * R * R * R * R * inert
	if !finite(s.Mass) || !finite(s.Inertia) || !finite(s.BoundaryPressure[0]) || !(s.Mass > 0) {
		return fmt.Errorf("model out of numerical range: mass %g kg, inertia %g kg m², central pressure %g Pa",
			s.Mass, s.Inertia, s.BoundaryPressure[0])
	}
	return nil
}

// Radius returns the planet radius (m).
func (s *Structure) Radius() float64 { return s.Boundary[len(s.Boundary)-1] }

// MoIFactor returns the normalised moment of inertia I/(M R²).
func (s *Structure) MoIFactor() float64 {
	R := s.Radius()
	return s.Inertia / (s.Mass * R * R)
}

// MeanDensity returns M / (4/3 π R³) (kg/m³).
func (s *Structure) MeanDensity() float64 {
	R := s.Radius()
	return s.Mass / (4 * math.Pi / 3 * R * R * R)
}

// SurfaceGravity returns G M / R² (m/s²).
func (s *Structure) SurfaceGravity() float64 {
	R := s.Radius()
	return G * s.Mass / (R * R)
}

// CentralPressure returns the hydrostatic pressure at r = 0 (Pa).
func (s *Structure) CentralPressure() float64 { return s.BoundaryPressure[0] }

// LayerAt returns the index of the layer containing r. At an internal boundary
// it returns the layer above if above is true, else the layer below. Radii
// below 0 map to the innermost layer, radii above the surface to the outermost.
func (s *Structure) LayerAt(r float64, above bool) int {
	L := len(s.Model.Layers)
	if !(r > 0) {
		return 0
	}
	if r >= s.Radius() {
		return L - 1
	}
	j := sort.SearchFloat64s(s.Boundary, r) // first j with Boundary[j] ≥ r, 1 ≤ j ≤ L
	if s.Boundary[j] == r && above {
		return j
	}
	return j - 1
}

// massIn returns the normalised enclosed mass μ at r inside layer i.
func (s *Structure) massIn(i int, r float64, sh *shell) float64 {
	l := &s.Model.Layers[i]
	sh.set(l.Density, s.Radius(), l.Inner, r)
	return s.mu[i] + sh.mass()
}

// gravityIn returns g at r inside layer i.
func (s *Structure) gravityIn(i int, r float64) float64 {
	if r == 0 {
		return 0
	}
	var sh shell
	R := s.Radius()
	x := r / R
	return 4 * math.Pi * G * R * s.massIn(i, r, &sh) / (x * x)
}

// pressureIn returns P at r inside layer i.
func (s *Structure) pressureIn(i int, r float64) float64 {
	var sh shell
	l := &s.Model.Layers[i]
	R := s.Radius()
	sh.set(l.Density, R, l.Inner, l.Outer)
	K := s.layerConst(i, &sh)
	sh.set(l.Density, R, r, l.Outer)
	return s.BoundaryPressure[i+1] + 4*math.Pi*G*R*R*sh.pressure(K)
}

// EnclosedMassAt returns the mass inside radius r (kg): 0 for r ≤ 0, the total
// mass for r ≥ R.
func (s *Structure) EnclosedMassAt(r float64) float64 {
	switch {
	case math.IsNaN(r):
		return r
	case r <= 0:
		return 0
	case r >= s.Radius():
		return s.Mass
	}
	var sh shell
	R := s.Radius()
	return 4 * math.Pi * R * R * R * s.massIn(s.LayerAt(r, false), r, &sh)
}

// Gravity returns the gravitational acceleration G m(r)/r² at radius r (m/s²):
// 0 at and below the centre, G M/r² outside the planet.
func (s *Structure) Gravity(r float64) float64 {
	switch {
	case math.IsNaN(r):
		return r
	case r <= 0:
		return 0
	case r > s.Radius():
		return G * s.Mass / (r * r)
	}
	return s.gravityIn(s.LayerAt(r, false), r)
}

// Pressure returns the hydrostatic pressure at radius r (Pa): the central
// pressure for r ≤ 0, and 0 at and above the surface.
func (s *Structure) Pressure(r float64) float64 {
	switch {
	case math.IsNaN(r):
		return r
	case r <= 0:
		return s.BoundaryPressure[0]
	case r >= s.Radius():
		return 0
	}
	return s.pressureIn(s.LayerAt(r, false), r)
}

// Profile is a structure sampled on a radial grid (SI units: m, kg/m³, m/s,
// m/s², Pa). Vs is 0 in fluid layers.
type Profile struct {
	Radius, Density, Vp, Vs, Gravity, Pressure []float64
}

// newProfile allocates a profile of n nodes in one buffer.
func newProfile(n int) Profile {
	buf := make([]float64, 6*n)
	return Profile{
		Radius:   buf[0*n : 1*n : 1*n],
		Density:  buf[1*n : 2*n : 2*n],
		Vp:       buf[2*n : 3*n : 3*n],
		Vs:       buf[3*n : 4*n : 4*n],
		Gravity:  buf[4*n : 5*n : 5*n],
		Pressure: buf[5*n : 6*n : 6*n],
	}
}

// Profile samples the structure with n nodes per layer (n < 2 is taken as 2),
// evenly spaced in radius from Inner to Outer inclusive. Each internal boundary
// therefore appears twice, first with the values of the layer below and then
// with those of the layer above.
func (s *Structure) Profile(n int) Profile {
	n = max(n, 2)
	L := len(s.Model.Layers)
	total := n * L
	p := newProfile(total)
	idx := 0
	for i := range s.Model.Layers {
		l := &s.Model.Layers[i]
		for k := range n {
			s.sample(&p, idx, i, nodeRadius(l.Inner, l.Outer, k, n))
			idx++
		}
	}
	return p
}

// ProfileAt samples the structure at the given radii (m, any order; radii outside [0, R] are
// clamped to the centre or surface layer by LayerAt). At an internal boundary the layer below is
// used, so a fixed radius grid shared by many models gives every model exactly one row per grid
// radius — the form in which profile ensembles are tabulated for credible bands.
func (s *Structure) ProfileAt(radii []float64) Profile {
	total := len(radii)
	p := newProfile(total)
	for k, r := range radii {
		s.sample(&p, k, s.LayerAt(r, false), r)
	}
	return p
}

// sample sets node k of p to the structure at radius r, evaluated in layer i
// (Vs stays 0 in a fluid layer).
func (s *Structure) sample(p *Profile, k, i int, r float64) {
	l := &s.Model.Layers[i]
	p.Radius[k] = r
	p.Density[k] = l.Density.At(r)
	p.Vp[k] = l.Vp.At(r)
	if !l.Fluid {
		p.Vs[k] = l.Vs.At(r)
	}
	p.Gravity[k] = s.gravityIn(i, r)
	p.Pressure[k] = s.pressureIn(i, r)
}

// RadiusGrid returns the radii 0, step, 2·step, … below radius, then radius itself (m): the
// fixed grid of profile tables. Each node is k·step computed from the integer k, so grids of
// different lengths agree node for node. It returns nil unless step > 0 and radius > 0.
func RadiusGrid(radius, step float64) []float64 {
	if !(step > 0) || !(radius > 0) || radius/step > 1e7 {
		return nil
	}
	var g []float64
	for k := 0; ; k++ {
		r := float64(k) * step
		if r >= radius*(1-1e-12) {
			break
		}
		g = append(g, r)
	}
	return append(g, radius)
}

// nodeRadius is node k of n ≥ 2 evenly spaced nodes on [inner, outer], the end nodes exactly
// inner and outer (so boundaries match bit for bit between layers). Shared by Profile and the
// hydrostatic solver's grid.
func nodeRadius(inner, outer float64, k, n int) float64 {
	switch k {
	case 0:
		return inner
	case n - 1:
		return outer
	}
	return inner + (outer-inner)*float64(k)/float64(n-1)
}
