package forward

import (
	"fmt"
	"math"

	"plumb/forward/eos"
)

// EOSLayer is a shell whose density, bulk and shear moduli follow a material's
// equation of state at the local hydrostatic pressure.
type EOSLayer struct {
	Name         string
	Inner, Outer float64 // m
	EOS          eos.EOS
	Fluid        bool    // μ = 0 (vs = 0) regardless of the EOS's shear law
	Viscosity    float64 // Pa·s; 0 = not given
	// Density, when non-nil, prescribes the layer's density profile (kg/m³, e.g. a linear
	// gradient) independent of pressure; EOS is then not used and Vp must be given.
	Density *Poly
	// Vp and Vs, when non-nil, prescribe the layer's velocities (m/s) instead of deriving them
	// from the EOS moduli — needed for an incompressible layer (eos.Constant), whose bulk
	// modulus is infinite. Vs is ignored in a Fluid layer.
	Vp, Vs *Poly
}

// EOSModel is a layered planet whose densities follow equations of state,
// layers ordered from the centre out and contiguous like those of a Model.
type EOSModel struct {
	Layers []EOSLayer
}

// Radius returns the outer radius of the model (m), or 0 for a model without
// layers.
func (m EOSModel) Radius() float64 { return outerRadius(m.Layers) }

// Validate checks the geometry as Model.Validate does (at least one layer,
// contiguous from r = 0, Inner < Outer, finite radii), that every layer has
// either a prescribed Density, finite and > 0 on the layer, with a prescribed
// Vp, or an EOS with a finite positive reference density, and that
// viscosities are finite and ≥ 0. The error names the offending layer by
// index and name.
func (m EOSModel) Validate() error { return validateLayers(m.Layers) }

// geometry and checkMaterial make *EOSLayer a shellLayer.
func (l *EOSLayer) geometry() (name string, inner, outer, viscosity float64) {
	return l.Name, l.Inner, l.Outer, l.Viscosity
}

func (l *EOSLayer) checkMaterial() error {
	if l.Density != nil {
		if l.Vp == nil {
			return fmt.Errorf("a prescribed density needs prescribed velocities (Vp)")
		}
		lo, _, _ := l.Density.extrema(l.Inner, l.Outer)
		if !finite(lo) || !(lo > 0) {
			return fmt.Errorf("prescribed density must be finite and > 0, minimum %g kg/m³", lo)
		}
		return nil
	}
	if l.EOS == nil {
		return fmt.Errorf("no equation of state")
	}
	if rho0 := l.EOS.ReferenceDensity(); !finite(rho0) || !(rho0 > 0) {
		return fmt.Errorf("reference density must be finite and > 0, got %g kg/m³", rho0)
	}
	return nil
}

// SolveOptions controls SolveHydrostatic. The zero value selects the defaults.
type SolveOptions struct {
	// NodesPerLayer is the number of evenly spaced radial nodes in each
	// layer, ends included (0: DefaultNodesPerLayer). It is rounded up to the
	// next n = k·PieceDegree + 1, k ≥ 1, so that every divisor of PieceDegree
	// splits the n − 1 intervals into whole pieces.
	NodesPerLayer int
	// Tol is the convergence threshold on max |ΔP|/P_c over the nodes between
	// the pressure used for the densities and the pressure they produce
	// (0: DefaultTol). Below ~1e-13 it may be unreachable in floating point.
	Tol float64
	// MaxIter bounds the number of density updates (0: DefaultMaxIter).
	MaxIter int
}

// Defaults of SolveOptions and the piece degree of the solved profiles.
const (
	// PieceDegree is the largest polynomial degree of the pieces of the
	// solved density and velocity profiles (see SolveHydrostatic).
	PieceDegree = 4
	// DefaultNodesPerLayer is the default SolveOptions.NodesPerLayer: two
	// quartic pieces per layer. With it the moment of inertia factor of an
	// Earth-like four-layer BM3/Vinet model changes by less than 1e-7 when the
	// number of pieces doubles (TestHydrostaticGridConvergence); more
	// compressed planets need more nodes for the same accuracy
	// (TestHydrostaticSuperEarth).
	DefaultNodesPerLayer = 2*PieceDegree + 1
	// DefaultTol is the default SolveOptions.Tol.
	DefaultTol = 1e-9
	// DefaultMaxIter is the default SolveOptions.MaxIter.
	DefaultMaxIter = 200
)

// andersonDepth is the number of past iterates the Anderson mixing uses.
const andersonDepth = 4

// stallIters is the number of iterations in which the residual must at
// least halve; otherwise the iteration is abandoned as stalled (at a rounding
// floor, or diverging because no equilibrium exists).
const stallIters = 30

// withDefaults fills in the zero fields of o and checks the others.
func (o SolveOptions) withDefaults() (SolveOptions, error) {
	switch {
	case o.NodesPerLayer == 0:
		o.NodesPerLayer = DefaultNodesPerLayer
	case o.NodesPerLayer < 0:
		return o, fmt.Errorf("nodes per layer must be ≥ 0, got %d", o.NodesPerLayer)
	case o.NodesPerLayer > 1<<16:
		return o, fmt.Errorf("nodes per layer must be ≤ %d, got %d", 1<<16, o.NodesPerLayer)
	}
	switch {
	case o.Tol == 0:
		o.Tol = DefaultTol
	case !(o.Tol > 0) || math.IsInf(o.Tol, 1):
		return o, fmt.Errorf("tolerance must be finite and > 0 (0 for the default), got %g", o.Tol)
	}
	switch {
	case o.MaxIter == 0:
		o.MaxIter = DefaultMaxIter
	case o.MaxIter < 0:
		return o, fmt.Errorf("maximum number of iterations must be ≥ 0, got %d", o.MaxIter)
	}
	return o, nil
}

// SolveHydrostatic finds the self-consistent hydrostatic structure of m: the
// density ρ(r) = EOS⁻¹(P(r)) in every layer, where P is the hydrostatic
// pressure of that same density (zero at the surface).
//
// Discretisation. Each layer carries n evenly spaced nodes (see
// SolveOptions.NodesPerLayer) and its density is the piecewise polynomial
// interpolating the nodal densities, one piece per deg + 1 consecutive nodes.
// The degree deg is PieceDegree, lowered to PieceDegree/2, …, 1 in layers so
// thin compared with their radius that the monomial coefficients of the
// pieces (the form the closed-form integrals of Solve need) would amplify
// rounding errors by more than 1e9 (see growthFactor and maxGrowth). Mass,
// moment of inertia and pressure of the piecewise density are the exact
// closed-form integrals of Solve. The equilibrium is imposed at the nodes:
// the nodal density is the EOS density at the nodal pressure.
//
// Iteration. Starting from the zero-pressure densities, the map
// P ↦ P_hydro(EOS⁻¹(P)) on the nodal pressures is iterated with Anderson
// mixing of depth andersonDepth (Anderson 1965, J. ACM 12, 547; in the form of
// Walker & Ni 2011, SIAM J. Numer. Anal. 49, 1715, both from memory), which
// converges in far fewer iterations than the plain fixed point. A mixed
// iterate with a negative pressure, or one the EOS rejects, is replaced
// by the plain fixed-point step and the history cleared. It stops when
// max |P_hydro − P|/P_c < Tol over the nodes, and gives up after MaxIter
// iterations or when the residual has not halved in stallIters iterations.
//
// The result is Solve of the piecewise model: one Layer per piece, carrying
// the EOS layer's Name, Fluid and Viscosity, so that a layer of m is a run of
// consecutive layers of the returned Structure.Model and its boundaries are
// among Structure.Boundary. Vp = √((K + 4μ/3)/ρ) and Vs = √(μ/ρ) come from the
// EOS's moduli at the nodes (μ = 0 in Fluid layers), interpolated like the
// density. K is the EOS's (isothermal) bulk modulus. The returned structure's
// density and pressure therefore satisfy the EOS at every node to Tol.
//
// The second result is the number of density updates made, also on error.
// Invalid input, a pressure outside an EOS's range, moduli without finite
// velocities (e.g. an incompressible eos.Constant, whose K is infinite),
// non-finite numbers and non-convergence are errors.
func SolveHydrostatic(m EOSModel, opt SolveOptions) (*Structure, int, error) {
	if err := m.Validate(); err != nil {
		return nil, 0, fmt.Errorf("invalid EOS model: %w", err)
	}
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, 0, fmt.Errorf("invalid solve options: %w", err)
	}
	h := newHydroSolver(m, opt.NodesPerLayer)
	iters, err := h.iterate(opt.Tol, opt.MaxIter)
	if err != nil {
		return nil, iters, fmt.Errorf("hydrostatic solve: %w", err)
	}
	s, err := h.result()
	if err != nil {
		return nil, iters, fmt.Errorf("hydrostatic solve: %w", err)
	}
	return s, iters, nil
}

// hydroSolver holds the grid and work arrays of one SolveHydrostatic call.
// Node g = j·per + t is node t of EOS layer j; the radius of a boundary
// between layers appears twice (top node of the layer below, bottom node of
// the layer above), with one pressure and two densities. Piece k of the work
// model spans nodes pieces[k].node … pieces[k].node + pieces[k].deg.
type hydroSolver struct {
	m      EOSModel
	per    int // nodes per layer, a multiple of PieceDegree plus 1
	r      []float64
	rho    []float64
	pieces []piece
	model  Model      // one layer per piece; densities rewritten in place
	st     *Structure // integrals of model
}

// piece is one polynomial piece of the solved profile.
type piece struct {
	layer int // EOS layer
	node  int // first node
	deg   int // polynomial degree, a divisor of PieceDegree
}

// maxGrowth bounds growthFactor for the degree chosen in a layer. Rounding
// noise in the nodal densities, amplified by growthFactor in the monomial
// coefficients, feeds back through the pressure integrals: too large a
// growthFactor makes the iteration blow up (thin surface layers) or stall at
// a rounding floor of max |ΔP|/P_c above the default Tol (strongly
// compressed planets). The bound keeps clear of both (common practice, no
// source; TestHydrostaticThinLayers and TestHydrostaticSuperEarth check it).
const maxGrowth = 1e9

// growthFactor estimates by how much the monomial coefficients (in r/R) of the
// interpolating polynomial of degree d on evenly spaced nodes over [a, b]
// can exceed the values: the largest Lagrange basis polynomial has leading
// coefficient ≤ (d/(b−a))^d / ((d/2)!)² (in r), and expanding its d factors
// (r − r_j) about r = 0 multiplies by at most (2b)^d. Rounding errors of
// relative size ε in the nodal values become coefficient noise of size
// ε·growthFactor, which the closed-form integrals then have to cancel.
func growthFactor(d int, a, b float64) float64 {
	den := 1.0
	for i := 2; i <= d/2; i++ {
		den *= float64(i * i)
	}
	return math.Pow(2*float64(d)*b/(b-a), float64(d)) / den
}

// layerDegree returns the largest degree among PieceDegree, PieceDegree/2, …,
// 1 for which a layer [a, b] cut into (per − 1)/degree pieces stays below
// maxGrowth (degree 1 when none does).
func layerDegree(a, b float64, per int) int {
	d := PieceDegree
	for d > 1 {
		pieces := (per - 1) / d
		w := (b - a) / float64(pieces)
		if growthFactor(d, b-w, b) <= maxGrowth {
			break
		}
		d /= 2
	}
	return d
}

func newHydroSolver(m EOSModel, nodes int) *hydroSolver {
	const d = PieceDegree
	per := max(1, (nodes-1+d-1)/d)*d + 1
	L := len(m.Layers)
	R := m.Radius()
	h := &hydroSolver{
		m: m, per: per,
		r:   make([]float64, L*per),
		rho: make([]float64, L*per),
	}
	ncoef := 0
	for j, l := range m.Layers {
		for t := range per {
			h.r[j*per+t] = nodeRadius(l.Inner, l.Outer, t, per)
		}
		deg := layerDegree(l.Inner, l.Outer, per)
		for g := j * per; g < (j+1)*per-1; g += deg {
			h.pieces = append(h.pieces, piece{layer: j, node: g, deg: deg})
			ncoef += deg + 1
		}
	}
	coef := make([]float64, ncoef)
	h.model.Layers = make([]Layer, len(h.pieces))
	for k, pc := range h.pieces {
		l := &m.Layers[pc.layer]
		c := coef[: pc.deg+1 : pc.deg+1]
		coef = coef[pc.deg+1:]
		h.model.Layers[k] = Layer{
			Name:      l.Name,
			Inner:     h.r[pc.node],
			Outer:     h.r[pc.node+pc.deg],
			Density:   Poly{C: c, Scale: R},
			Fluid:     l.Fluid,
			Viscosity: l.Viscosity,
		}
	}
	h.st = newStructure(h.model)
	return h
}

// interpolate sets c (len d + 1) to the coefficients in u = r/R of the
// polynomial of degree d through the values v at the radii r (d + 1 of each),
// by the Björck–Pereyra algorithm (Björck & Pereyra 1970, Math. Comp. 24, 893;
// from memory): Newton divided differences, then expansion of the Newton form
// into monomials. For ordered nodes it is accurate far beyond the condition
// number of the Vandermonde matrix.
func interpolate(c, r, v []float64, R float64) {
	d := len(c) - 1
	copy(c, v[:d+1])
	for k := range d {
		for j := d; j > k; j-- {
			c[j] = (c[j] - c[j-1]) / ((r[j] - r[j-k-1]) / R)
		}
	}
	for k := d - 1; k >= 0; k-- {
		u := r[k] / R
		for j := k; j < d; j++ {
			c[j] -= u * c[j+1]
		}
	}
}

// setDensities rebuilds the piece polynomials from h.rho and integrates them.
func (h *hydroSolver) setDensities() error {
	R := h.m.Radius()
	for k, pc := range h.pieces {
		interpolate(h.model.Layers[k].Density.C, h.r[pc.node:], h.rho[pc.node:], R)
	}
	return h.st.integrate()
}

// pressures writes the hydrostatic pressure of the current densities at every
// node into out. Inside a piece it does what Structure.pressureIn does, with
// the piece's layer constant computed once.
func (h *hydroSolver) pressures(out []float64) {
	st := h.st
	R := h.m.Radius()
	pScale := 4 * math.Pi * G * R * R
	bp := st.BoundaryPressure
	var sh shell
	for k, pc := range h.pieces {
		l := &st.Model.Layers[k]
		g := pc.node
		out[g] = bp[k]
		out[g+pc.deg] = bp[k+1]
		if pc.deg == 1 {
			continue
		}
		sh.set(l.Density, R, l.Inner, l.Outer)
		K := st.layerConst(k, &sh)
		for t := 1; t < pc.deg; t++ {
			sh.set(l.Density, R, h.r[g+t], l.Outer)
			out[g+t] = bp[k+1] + pScale*sh.pressure(K)
		}
	}
}

// densities sets h.rho to the EOS densities at the nodal pressures x.
func (h *hydroSolver) densities(x []float64) error {
	for j, l := range h.m.Layers {
		for g := j * h.per; g < (j+1)*h.per; g++ {
			if l.Density != nil {
				h.rho[g] = l.Density.At(h.r[g])
				continue
			}
			rho, err := l.EOS.Density(x[g])
			if err == nil && (!finite(rho) || !(rho > 0)) {
				err = fmt.Errorf("EOS returned density %g kg/m³", rho)
			}
			if err != nil {
				return fmt.Errorf("layer %d (%q) at r = %g m, P = %g Pa: %w", j, l.Name, h.r[g], x[g], err)
			}
			h.rho[g] = rho
		}
	}
	return nil
}

// iterate runs the fixed point to convergence and leaves the converged
// densities in h.rho and their integrals in h.st. It returns the number of
// density updates.
func (h *hydroSolver) iterate(tol float64, maxIter int) (int, error) {
	n := len(h.r)
	x := make([]float64, n)  // pressures the densities are evaluated at
	fx := make([]float64, n) // hydrostatic pressure of those densities
	for j, l := range h.m.Layers {
		for g := j * h.per; g < (j+1)*h.per; g++ {
			if l.Density != nil {
				h.rho[g] = l.Density.At(h.r[g])
			} else {
				h.rho[g] = l.EOS.ReferenceDensity()
			}
		}
	}
	if err := h.setDensities(); err != nil {
		return 0, fmt.Errorf("zero-pressure model: %w", err)
	}
	h.pressures(x)
	acc := newAnderson(n, andersonDepth)
	mixed := false // x is an Anderson combination, not a plain step
	var prevF []float64
	res, best, bestIt := math.Inf(1), math.Inf(1), 0
	for it := 1; it <= maxIter; it++ {
		err := h.densities(x)
		if err == nil {
			err = h.setDensities()
		}
		if err != nil {
			if mixed && prevF != nil {
				// Retry from the plain step of the last good iterate.
				copy(x, prevF)
				acc.reset()
				mixed = false
				continue
			}
			return it, err
		}
		h.pressures(fx)
		pc := fx[0]
		if !finite(pc) || !(pc > 0) {
			return it, fmt.Errorf("central pressure %g Pa after %d iterations", pc, it)
		}
		res = 0
		for g := range n {
			res = math.Max(res, math.Abs(fx[g]-x[g]))
		}
		res /= pc
		if !finite(res) {
			return it, fmt.Errorf("pressure not finite after %d iterations", it)
		}
		if res < tol {
			return it, nil
		}
		if res < best/2 {
			best, bestIt = res, it
		} else if it-bestIt >= stallIters {
			return it, fmt.Errorf("no convergence: max |ΔP|/P_c = %.3g after %d iterations, not halved since iteration %d (%.3g), tolerance %.3g",
				res, it, bestIt, best, tol)
		}
		if prevF == nil {
			prevF = make([]float64, n)
		}
		copy(prevF, fx)
		mixed = acc.next(x, fx)
		if mixed {
			for _, v := range x {
				if !(v >= 0) || !finite(v) {
					copy(x, fx)
					acc.reset()
					mixed = false
					break
				}
			}
		}
	}
	return maxIter, fmt.Errorf("no convergence in %d iterations: max |ΔP|/P_c = %.3g, tolerance %.3g",
		maxIter, res, tol)
}

// result builds the returned Structure from the converged densities.
func (h *hydroSolver) result() (*Structure, error) {
	R := h.m.Radius()
	n := len(h.r)
	vp := make([]float64, n)
	vs := make([]float64, n)
	for j, l := range h.m.Layers {
		for g := j * h.per; g < (j+1)*h.per; g++ {
			p, s, err := nodeVelocities(l, h.rho[g], h.r[g])
			if err != nil {
				return nil, fmt.Errorf("layer %d (%q) at r = %g m: %w", j, l.Name, h.r[g], err)
			}
			vp[g], vs[g] = p, s
		}
	}
	ncoef := 0
	for _, pc := range h.pieces {
		ncoef += 2 * (pc.deg + 1)
	}
	coef := make([]float64, ncoef)
	for k, pc := range h.pieces {
		nc := pc.deg + 1
		l := &h.model.Layers[k]
		l.Vp = Poly{C: coef[0:nc:nc], Scale: R}
		l.Vs = Poly{C: coef[nc : 2*nc : 2*nc], Scale: R}
		coef = coef[2*nc:]
		interpolate(l.Vp.C, h.r[pc.node:], vp[pc.node:], R)
		interpolate(l.Vs.C, h.r[pc.node:], vs[pc.node:], R)
	}
	s, err := Solve(h.model)
	if err != nil {
		return nil, fmt.Errorf("solved profile: %w", err)
	}
	return s, nil
}

// nodeVelocities returns vp and vs of layer l's material at density rho and radius r.
func nodeVelocities(l EOSLayer, rho, r float64) (vp, vs float64, err error) {
	if l.Vp != nil {
		vp = l.Vp.At(r)
		if l.Vs != nil && !l.Fluid {
			vs = l.Vs.At(r)
		}
		if !finite(vp) || !(vp > 0) || !finite(vs) || vs < 0 {
			return 0, 0, fmt.Errorf("prescribed velocities vp %g, vs %g m/s at r = %g m: %w", vp, vs, r, eos.ErrModulus)
		}
		return vp, vs, nil
	}
	if !l.Fluid {
		return eos.Velocities(l.EOS, rho)
	}
	k := l.EOS.BulkModulus(rho)
	if !finite(k) || !(k > 0) {
		return 0, 0, fmt.Errorf("fluid at density %g kg/m³: bulk modulus %g Pa gives no finite vp: %w", rho, k, eos.ErrModulus)
	}
	return math.Sqrt(k / rho), 0, nil
}

// anderson is Anderson mixing for the fixed point x = F(x): from the last
// depth differences of F and of the residual f = F(x) − x it takes
// x⁺ = F(x) − ΔF γ with γ minimising ‖f − Δf γ‖₂ (least squares by modified
// Gram–Schmidt, dropping columns that are numerically dependent).
type anderson struct {
	depth, cols, head int
	dF, dR            [][]float64 // ring buffers of columns
	prevF, prevR      []float64
	have              bool
	res               []float64
	q                 [][]float64
	rr                []float64 // depth×depth upper triangle of the QR factor
	gamma             []float64
	order             []int
}

func newAnderson(n, depth int) *anderson {
	a := &anderson{depth: depth}
	buf := make([]float64, (3*depth+3)*n)
	take := func() []float64 {
		s := buf[:n:n]
		buf = buf[n:]
		return s
	}
	a.dF = make([][]float64, depth)
	a.dR = make([][]float64, depth)
	a.q = make([][]float64, depth)
	for i := range depth {
		a.dF[i], a.dR[i], a.q[i] = take(), take(), take()
	}
	a.prevF, a.prevR, a.res = take(), take(), take()
	a.rr = make([]float64, depth*depth)
	a.gamma = make([]float64, depth)
	a.order = make([]int, 0, depth)
	return a
}

// reset forgets the history.
func (a *anderson) reset() { a.have, a.cols, a.head = false, 0, 0 }

// next overwrites x with the next iterate given F(x) = fx and reports whether
// it is a mixed one (false: the plain step x = fx, as on the first call).
func (a *anderson) next(x, fx []float64) bool {
	for i := range x {
		a.res[i] = fx[i] - x[i]
	}
	if a.have {
		c := a.head
		for i := range x {
			a.dF[c][i] = fx[i] - a.prevF[i]
			a.dR[c][i] = a.res[i] - a.prevR[i]
		}
		a.head = (a.head + 1) % a.depth
		a.cols = min(a.cols+1, a.depth)
	}
	copy(a.prevF, fx)
	copy(a.prevR, a.res)
	a.have = true
	copy(x, fx)
	if a.cols == 0 {
		return false
	}
	// Columns from newest to oldest, so that dependent old ones are dropped.
	a.order = a.order[:0]
	m := 0
	for k := range a.cols {
		c := (a.head - 1 - k + 2*a.depth) % a.depth
		col := a.dR[c]
		q := a.q[m]
		copy(q, col)
		norm0 := dot(q, q)
		for i := range m {
			rij := dot(a.q[i], q)
			a.rr[i*a.depth+m] = rij
			axpy(-rij, a.q[i], q)
		}
		nq := dot(q, q)
		if !(nq > 1e-20*norm0) || !(norm0 > 0) {
			continue
		}
		nrm := math.Sqrt(nq)
		a.rr[m*a.depth+m] = nrm
		for i := range q {
			q[i] /= nrm
		}
		a.order = append(a.order, c)
		m++
	}
	if m == 0 {
		return false
	}
	// γ = R⁻¹ Qᵀ f.
	for i := range m {
		a.gamma[i] = dot(a.q[i], a.res)
	}
	for i := m - 1; i >= 0; i-- {
		v := a.gamma[i]
		for k := i + 1; k < m; k++ {
			v -= a.rr[i*a.depth+k] * a.gamma[k]
		}
		a.gamma[i] = v / a.rr[i*a.depth+i]
	}
	for i, c := range a.order {
		axpy(-a.gamma[i], a.dF[c], x)
	}
	return true
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}

func axpy(alpha float64, x, y []float64) {
	for i := range y {
		y[i] += alpha * x[i]
	}
}
