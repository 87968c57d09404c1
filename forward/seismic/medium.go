package seismic

import (
	"fmt"
	"math"
	"sort"
	"sync"

	"plumb/forward"
)

// Default discretisation of polynomial layers (see NewMedium).
const (
	// DefaultMaxShell is the largest shell thickness used by NewMedium (m).
	DefaultMaxShell = 25e3
	// curvTol bounds the relative misfit between a layer's polynomial velocity
	// and the Bullen law of a shell (see NewMedium).
	curvTol = 2e-6
	// maxShellsPerLayer caps the subdivision of one layer (a safeguard against
	// pathological polynomials).
	maxShellsPerLayer = 20000
)

// Node is one point of a tabulated velocity profile (NewMediumNodes).
type Node struct {
	R  float64 // radius (m)
	Vp float64 // P velocity (m/s), > 0
	Vs float64 // S velocity (m/s), ≥ 0; 0 marks a fluid (impassable to S)
}

// legRange is a contiguous run of shells [lo, hi) (indices from the surface
// down) traversed by one kind of leg, with the slowness radius η at its top
// and the smallest η over its nodes.
type legRange struct {
	lo, hi         int
	etaTop, etaMin float64
}

func (l legRange) empty() bool { return l.hi <= l.lo }

// Medium is a velocity model prepared for ray tracing: thin Bullen-law shells
// (v = a r^b between the velocities at each shell's ends), split at the
// core–mantle and inner-core boundaries, with sampled travel-time curves used
// to bracket every branch. It is immutable after construction and safe for
// concurrent use: the sampled curve of a family of phases is computed once, on
// the first query of one of its phases (guarded by a sync.Once), so a caller
// pays only for the families it uses. A Medium must not be copied.
type Medium struct {
	radius, cmb, icb float64
	rTop, rBot       []float64 // per shell, from the surface down (m)
	brk              []bool    // the shell's top node is a layer boundary or discontinuity
	sp, ss           []shell   // P and S constants per shell (ss valid where sOK)
	sOK              []bool    // the shell is passable to S (vs > 0 at both ends)
	iCMB, iICB       int       // first shell of the outer core, of the inner core (= len if none)
	sBlock           int       // first S-impassable shell from the surface (= len if none)

	pm, sm, k, in legRange // P mantle, S mantle above any fluid, outer core (P), inner core (P)
	sFull         bool     // the whole mantle is passable to S
	pmMin, smMin  float64  // smallest η over the mantle for P and S (full-leg limits)

	// Sampled Δ(p) per family of phases, built on first use (see table).
	tabs     [nTables]table
	tabsOnce [nTables]sync.Once
}

// NewMedium prepares model m for ray tracing with core–mantle boundary cmb and
// inner-core boundary icb (radii in m; icb = 0: no inner core; cmb = 0: no
// core at all, then icb must be 0).
//
// Shells: each layer (split at cmb and icb if they fall inside it) is cut into
// n equal shells, n the smallest count with thickness ≤ DefaultMaxShell for
// which the Bullen law through the ends of every shell matches the layer's
// polynomial vp and vs to 2e-6 relative at the shell's geometric-mean radius,
// where the law gives exactly √(v_b v_t) (the misfit of an interpolant through
// the ends of an interval is largest near its middle and falls as the square
// of the thickness; common practice, no source). On PREM the travel times
// are then within 1 ms of those with 1 km shells (TestConvergence). The
// innermost shell, which contains r = 0, has the constant velocity of its
// top.
func NewMedium(m forward.Model, cmb, icb float64) (*Medium, error) {
	return newMediumShells(m, cmb, icb, DefaultMaxShell, curvTol)
}

// NewMediumShells is NewMedium with the curvature test switched off: each
// layer (split at cmb and icb) is cut into ⌈thickness/maxShell⌉ equal shells,
// so that maxShell (m) alone sets the number of shells (for convergence
// studies and benchmarks).
func NewMediumShells(m forward.Model, cmb, icb, maxShell float64) (*Medium, error) {
	return newMediumShells(m, cmb, icb, maxShell, math.Inf(1))
}

// newMediumShells is NewMediumShells with the curvature tolerance tol.
func newMediumShells(m forward.Model, cmb, icb, maxShell, tol float64) (*Medium, error) {
	if err := m.Validate(); err != nil {
		return nil, fmt.Errorf("seismic: invalid model: %w", err)
	}
	if !(maxShell > 0) || math.IsInf(maxShell, 0) {
		return nil, fmt.Errorf("seismic: maximum shell thickness must be finite and > 0, got %g m", maxShell)
	}
	R := m.Radius()
	if err := checkCore(R, cmb, icb); err != nil {
		return nil, err
	}
	// Segments: layers cut at icb and cmb; shell counts first, so that the
	// node slices are allocated once.
	type segment struct {
		l    *forward.Layer
		a, b float64
		n    int
	}
	segs := make([]segment, 0, len(m.Layers)+2)
	total := 0
	for li := range m.Layers {
		l := &m.Layers[li]
		var cutBuf [4]float64
		cuts := append(cutBuf[:0], l.Inner)
		for _, c := range [2]float64{icb, cmb} {
			if c > l.Inner && c < l.Outer {
				cuts = append(cuts, c)
			}
		}
		cuts = append(cuts, l.Outer)
		for ci := 0; ci+1 < len(cuts); ci++ {
			a, b := cuts[ci], cuts[ci+1]
			n := segmentShells(l, a, b, maxShell, tol)
			segs = append(segs, segment{l, a, b, n})
			total += n + 1
		}
	}
	nodes := make([]Node, 0, total)
	brk := make([]bool, 0, total)
	for _, sg := range segs {
		for j := 0; j <= sg.n; j++ {
			r := sg.a + (sg.b-sg.a)*float64(j)/float64(sg.n)
			if j == sg.n {
				r = sg.b
			}
			nodes = append(nodes, layerNode(sg.l, r))
			brk = append(brk, j == 0 || j == sg.n)
		}
	}
	return build(nodes, brk, cmb, icb)
}

// layerNode evaluates layer l at radius r.
func layerNode(l *forward.Layer, r float64) Node {
	nd := Node{R: r, Vp: l.Vp.At(r)}
	if !l.Fluid {
		nd.Vs = l.Vs.At(r)
	}
	return nd
}

// segmentShells returns the number of shells for the part a ≤ r ≤ b of layer l.
func segmentShells(l *forward.Layer, a, b, maxShell, tol float64) int {
	// The cap also bounds the work for absurd sizes (a fuzzed or mistyped planet radius of
	// 10⁹ km would otherwise ask for 10⁸ shells); such a body gets thicker shells instead.
	n := min(max(int(math.Ceil((b-a)/maxShell)), 1), maxShellsPerLayer)
	for range 4 {
		if math.IsInf(tol, 1) {
			break
		}
		dev := 0.0
		for j := 0; j < n; j++ {
			ra := a + (b-a)*float64(j)/float64(n)
			rb := a + (b-a)*float64(j+1)/float64(n)
			if ra == 0 {
				continue // constant-velocity centre shell
			}
			rm := math.Sqrt(ra * rb)
			dev = math.Max(dev, lawMisfit(l.Vp, ra, rb, rm))
			if !l.Fluid {
				dev = math.Max(dev, lawMisfit(l.Vs, ra, rb, rm))
			}
		}
		if dev <= tol || n >= maxShellsPerLayer {
			break
		}
		n = min(maxShellsPerLayer, int(math.Ceil(float64(n)*math.Sqrt(dev/tol)*1.05)))
	}
	return n
}

// lawMisfit is |√(v(ra) v(rb)) − v(rm)|/v(rm): the relative misfit of the
// Bullen law through the ends at the geometric-mean radius rm.
func lawMisfit(p forward.Poly, ra, rb, rm float64) float64 {
	va, vb, vm := p.At(ra), p.At(rb), p.At(rm)
	if !(va > 0 && vb > 0 && vm > 0) {
		return 0 // vs reaching 0: the shell is impassable to S anyway
	}
	return math.Abs(math.Sqrt(va*vb)-vm) / vm
}

// NewMediumNodes prepares a tabulated profile for ray tracing. nodes run from
// the centre (R = 0) to the surface with non-decreasing radii; two nodes at the
// same radius make a discontinuity (the first gives the values below, the
// second above), more than two are an error. Between consecutive nodes the
// velocities follow Bullen's law v = a r^b through the two nodes (exact for a
// profile that is a power law between them); the innermost shell has the
// constant velocity of its top node. A shell with vs = 0 at either end is
// impassable to S. cmb and icb are as for NewMedium; a node is inserted there
// (on the local power law) if none exists.
func NewMediumNodes(nodes []Node, cmb, icb float64) (*Medium, error) {
	if len(nodes) < 2 {
		return nil, fmt.Errorf("seismic: need at least 2 nodes, got %d", len(nodes))
	}
	brk := make([]bool, len(nodes))
	for i := range nodes {
		brk[i] = i == 0 || i == len(nodes)-1 ||
			(i > 0 && nodes[i].R == nodes[i-1].R) || (i+1 < len(nodes) && nodes[i].R == nodes[i+1].R)
	}
	return build(nodes, brk, cmb, icb)
}

// checkCore validates the core radii against the surface radius R.
func checkCore(R, cmb, icb float64) error {
	if !finite(cmb) || !finite(icb) {
		return fmt.Errorf("seismic: core radii must be finite, got cmb %g m, icb %g m", cmb, icb)
	}
	if cmb < 0 || cmb >= R {
		return fmt.Errorf("seismic: core–mantle boundary %g m must be in [0, %g) m (0 = no core)", cmb, R)
	}
	if icb < 0 || (cmb > 0 && icb >= cmb) || (cmb == 0 && icb != 0) {
		return fmt.Errorf("seismic: inner-core boundary %g m must be 0 or in (0, cmb = %g m)", icb, cmb)
	}
	return nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// build makes the Medium from nodes (centre out) with breakpoint marks.
func build(nodes []Node, brk []bool, cmb, icb float64) (*Medium, error) {
	if nodes[0].R != 0 {
		return nil, fmt.Errorf("seismic: first node must be at r = 0, got %g m", nodes[0].R)
	}
	for i, nd := range nodes {
		if !finite(nd.R) || !finite(nd.Vp) || !finite(nd.Vs) {
			return nil, fmt.Errorf("seismic: node %d (r = %g m) has a non-finite value", i, nd.R)
		}
		if !(nd.Vp > 0) || nd.Vs < 0 {
			return nil, fmt.Errorf("seismic: node %d (r = %g m): need vp > 0 and vs ≥ 0, got vp %g, vs %g m/s", i, nd.R, nd.Vp, nd.Vs)
		}
		if i > 0 && nd.R < nodes[i-1].R {
			return nil, fmt.Errorf("seismic: node %d: radius %g m below the previous node's %g m", i, nd.R, nodes[i-1].R)
		}
		if i > 1 && nd.R == nodes[i-2].R {
			return nil, fmt.Errorf("seismic: more than two nodes at r = %g m", nd.R)
		}
	}
	R := nodes[len(nodes)-1].R
	if !(R > 0) {
		return nil, fmt.Errorf("seismic: surface radius must be > 0")
	}
	if len(nodes) >= 2 && nodes[len(nodes)-2].R == R {
		return nil, fmt.Errorf("seismic: discontinuity at the surface r = %g m", R)
	}
	if err := checkCore(R, cmb, icb); err != nil {
		return nil, err
	}
	nodes, brk = insertNode(nodes, brk, icb)
	nodes, brk = insertNode(nodes, brk, cmb)

	// Shells from the surface down: pairs of consecutive nodes with distinct radii.
	md := &Medium{radius: R, cmb: cmb, icb: icb}
	N := 0
	for j := 1; j < len(nodes); j++ {
		if nodes[j].R != nodes[j-1].R {
			N++
		}
	}
	md.rTop = make([]float64, 0, N)
	md.rBot = make([]float64, 0, N)
	md.brk = make([]bool, 0, N)
	md.sp = make([]shell, 0, N)
	md.ss = make([]shell, 0, N)
	md.sOK = make([]bool, 0, N)
	for j := len(nodes) - 1; j > 0; j-- {
		a, b := nodes[j-1], nodes[j] // a below, b above
		if a.R == b.R {
			continue
		}
		md.rTop = append(md.rTop, b.R)
		md.rBot = append(md.rBot, a.R)
		md.brk = append(md.brk, brk[j])
		etaPb := 0.0
		if a.R > 0 {
			etaPb = a.R / a.Vp
		}
		md.sp = append(md.sp, newShell(b.R, a.R, b.R/b.Vp, etaPb))
		ok := b.Vs > 0 && (a.Vs > 0 || a.R == 0)
		md.sOK = append(md.sOK, ok)
		var s shell
		if ok {
			etaSb := 0.0
			if a.R > 0 {
				etaSb = a.R / a.Vs
			}
			s = newShell(b.R, a.R, b.R/b.Vs, etaSb)
		}
		md.ss = append(md.ss, s)
	}
	md.iCMB, md.iICB = N, N
	for i := N - 1; i >= 0; i-- {
		if cmb > 0 && md.rTop[i] <= cmb {
			md.iCMB = i
		}
		if icb > 0 && md.rTop[i] <= icb {
			md.iICB = i
		}
	}
	md.sBlock = N
	for i := range md.sOK {
		if !md.sOK[i] {
			md.sBlock = i
			break
		}
	}
	md.pm = md.rangeOf(md.sp, 0, md.iCMB)
	md.sm = md.rangeOf(md.ss, 0, min(md.sBlock, md.iCMB))
	md.sFull = md.sBlock >= md.iCMB && md.iCMB > 0
	if cmb > 0 {
		md.k = md.rangeOf(md.sp, md.iCMB, md.iICB)
	}
	if icb > 0 {
		md.in = md.rangeOf(md.sp, md.iICB, N)
	}
	md.pmMin, md.smMin = md.pm.etaMin, md.sm.etaMin
	return md, nil
}

// insertNode adds a node at radius r (0 < r) on the local power law unless a
// node exists there, and marks the node(s) at r as breakpoints.
func insertNode(nodes []Node, brk []bool, r float64) ([]Node, []bool) {
	if r <= 0 {
		return nodes, brk
	}
	j := sort.Search(len(nodes), func(i int) bool { return nodes[i].R >= r })
	if j < len(nodes) && nodes[j].R == r {
		for i := j; i < len(nodes) && nodes[i].R == r; i++ {
			brk[i] = true
		}
		return nodes, brk
	}
	a, b := nodes[j-1], nodes[j]
	nd := Node{R: r}
	if a.R == 0 {
		nd.Vp, nd.Vs = b.Vp, b.Vs // constant-velocity centre shell
	} else {
		f := math.Log(r/a.R) / math.Log(b.R/a.R)
		nd.Vp = a.Vp * math.Pow(b.Vp/a.Vp, f)
		if a.Vs > 0 && b.Vs > 0 {
			nd.Vs = a.Vs * math.Pow(b.Vs/a.Vs, f)
		}
	}
	nodes = append(nodes[:j:j], append([]Node{nd}, nodes[j:]...)...)
	brk = append(brk[:j:j], append([]bool{true}, brk[j:]...)...)
	return nodes, brk
}

// rangeOf describes shells [lo, hi) of sh.
func (md *Medium) rangeOf(sh []shell, lo, hi int) legRange {
	l := legRange{lo: lo, hi: hi}
	if hi <= lo {
		return l
	}
	l.etaTop = sh[lo].etaT
	l.etaMin = math.Inf(1)
	for i := lo; i < hi; i++ {
		l.etaMin = math.Min(l.etaMin, math.Min(sh[i].etaT, sh[i].etaB))
	}
	return l
}

// Radius returns the surface radius of the medium (m).
func (md *Medium) Radius() float64 { return md.radius }

// Shells returns the number of shells of the medium.
func (md *Medium) Shells() int { return len(md.rTop) }

// FindCore returns default core radii for a model that does not give them
// (common practice, no source): the core–mantle boundary cmb is the layer
// boundary with the largest density increase downwards (ρ just below minus ρ
// just above); the inner-core boundary icb is the outermost boundary below
// cmb at which a solid layer lies directly beneath a fluid layer, or 0. A
// model without any density increase at a boundary returns (0, 0): no core.
func FindCore(m forward.Model) (cmb, icb float64) {
	best := 0.0
	for i := 1; i < len(m.Layers); i++ {
		lo, up := &m.Layers[i-1], &m.Layers[i]
		r := up.Inner
		jump := lo.Density.At(r) - up.Density.At(r)
		if jump > best && finite(jump) {
			best, cmb = jump, r
		}
	}
	if cmb == 0 {
		return 0, 0
	}
	for i := len(m.Layers) - 1; i >= 1; i-- {
		lo, up := &m.Layers[i-1], &m.Layers[i]
		if up.Inner < cmb && up.Fluid && !lo.Fluid {
			return cmb, up.Inner
		}
	}
	return cmb, 0
}
