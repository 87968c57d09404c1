package seismic

import (
	"math"
	"sort"
)

// table samples Δ(p) of one family of phases for a surface source, at ray
// parameters chosen so that Δ is monotone between consecutive samples:
//
//   - the slowness radius η at both sides of every layer boundary and
//     discontinuity in the turning region (there Δ(p) has cusps: the ends of
//     triplications and of shadow zones, Bullen & Bolt 1985 ch. 7, from
//     memory), and the ends of the phase's range;
//   - interior samples at the middle of the η interval of evenly spaced
//     shells, about samplesPerLeg over the region and at least one in every
//     layer, and of the first and last shell of every layer;
//   - every local extremum of Δ(p) (caustic) revealed by an interior sample
//     whose dΔ/dp disagrees in sign with the secant to a neighbour, located
//     by bisection and a safeguarded secant search on dΔ/dp = 0;
//   - both sides of every local minimum of η(r) (the top of a low-velocity
//     zone, smooth or at a discontinuity where the velocity drops
//     downwards): there Δ(p) jumps (a shadow zone) and the intervals around
//     it are marked as gaps, never bracketed.
//
// A query scans consecutive samples for crossings of the target distance and
// solves each bracket by safeguarded Newton. Two roots between consecutive
// samples (a caustic pair narrower than the sampling, or the sub-kilometre
// micro-triplications that the gradient changes at shell nodes of any
// piecewise Bullen model create) are not resolved.
type table struct {
	p, d, dd []float64 // ray parameters, Δ and dΔ/dp (NaN at nodes) of the samples
	gap      []bool    // gap[i]: Δ jumps between samples i−1 and i (no crossing there)
}

// samplesPerLeg is the number of interior samples of a turning region
// (common practice, no source: enough to resolve the caustics of smooth
// layers and to start Newton close to the root).
const samplesPerLeg = 12

// reflectSamples are the ray parameters (as fractions of the largest) at which
// the monotone Δ(p) of core reflections is sampled: 1 − v², v = 1, 0.9, …, 0,
// dense near the grazing ray where Δ(p) behaves like a square root.
var reflectSamples = [...]float64{0, 0.19, 0.36, 0.51, 0.64, 0.75, 0.84, 0.91, 0.96, 0.99, 1}

// table returns the sampled curve t, building it on first use.
func (md *Medium) table(t int) *table {
	md.tabsOnce[t].Do(func() { md.buildTable(t) })
	return &md.tabs[t]
}

// buildTable fills md.tabs[t].
func (md *Medium) buildTable(t int) {
	sp := &phases[tableBase[t]]
	lo, hi, ok := md.pRange(sp, nil)
	if !ok {
		return
	}
	tb := &md.tabs[t]
	if sp.turn == turnNone {
		// Core reflections: Δ(p) is monotone (a sum of full legs).
		for _, f := range reflectSamples {
			p := lo + (hi-lo)*f
			if r, _, ok := md.eval(sp, nil, p); ok {
				tb.p = append(tb.p, p)
				tb.d = append(tb.d, r.d)
				tb.dd = append(tb.dd, r.dd)
				tb.gap = append(tb.gap, false)
			}
		}
		return
	}
	var sh []shell
	var first, last int
	switch sp.turn {
	case turnMantle:
		l := md.pm
		sh = md.sp
		if sp.turnWave == waveS {
			l, sh = md.sm, md.ss
		}
		first, last = l.lo, l.hi
	case turnOuter:
		sh, first, last = md.sp, md.k.lo, md.k.hi
	case turnInner:
		sh, first, last = md.sp, md.in.lo, md.in.hi
	}
	type sample struct {
		p, d, dd float64
		node     bool // p is a node's η: dΔ/dp is singular there
		gap      bool // Δ jumps between the previous sample and this one
	}
	cand := []sample{{p: lo, node: true}, {p: hi, node: true}}
	stride := max(1, (last-first)/samplesPerLeg)
	for i := first; i < last; i++ {
		c := &sh[i]
		if md.brk[i] || i == first {
			cand = append(cand, sample{p: c.etaT, node: true})
		}
		if i+1 == last || md.brk[i+1] {
			cand = append(cand, sample{p: c.etaB, node: true})
			// Rays reflected at a discontinuity where η drops downwards:
			// samples inside the gap, denser towards its top, where Δ(p)
			// behaves like a square root.
			if i+1 < last && sh[i+1].etaT < c.etaB {
				gap := c.etaB - sh[i+1].etaT
				for _, v := range [...]float64{0.8, 0.6, 0.4, 0.2} {
					cand = append(cand, sample{p: c.etaB - gap*v*v})
				}
			}
		}
		// A local minimum of η(r) at the bottom node of this shell (η falls
		// downwards into the node and rises below it, smoothly or across a
		// discontinuity): the top of a low-velocity zone. Rays with p just
		// below the minimum pass the node and turn much deeper, so Δ(p)
		// jumps there (a shadow zone). Sample both sides; the intervals
		// around the minimum are gaps.
		if i+1 < last {
			lw := &sh[i+1]
			var m float64
			var isMin bool
			if lw.etaT >= c.etaB { // continuous, or η jumps up downwards
				m = c.etaB
				isMin = c.etaT > c.etaB && (lw.etaT > c.etaB || lw.etaB > lw.etaT)
			} else { // η jumps down downwards: the minimum is just below
				m = lw.etaT
				isMin = lw.etaB > lw.etaT
			}
			if isMin {
				cand = append(cand, sample{p: m * (1 - 1e-13)}, sample{p: m, node: true, gap: true},
					sample{p: m * (1 + 1e-13), gap: true})
			}
		}
	}
	// Interior samples: in every layer (run of shells between breakpoints),
	// about one per stride shells and at least one, at the middle of the η
	// interval of evenly spaced shells.
	for i0 := first; i0 < last; {
		i1 := i0 + 1
		for i1 < last && !md.brk[i1] {
			i1++
		}
		n := i1 - i0
		m := max(1, (n+stride/2)/stride)
		for k := range m {
			c := &sh[i0+(2*k+1)*n/(2*m)]
			cand = append(cand, sample{p: 0.5 * (c.etaT + c.etaB)})
		}
		// And in the first and last shell, next to the layer's boundary
		// nodes, where a square-root cusp of Δ(p) can turn the curve back.
		for _, j := range [2]int{i0, i1 - 1} {
			c := &sh[j]
			cand = append(cand, sample{p: 0.5 * (c.etaT + c.etaB)})
		}
		i0 = i1
	}
	sort.Slice(cand, func(i, j int) bool { return cand[i].p < cand[j].p })
	var s []sample
	for _, c := range cand {
		if c.p < lo || c.p > hi {
			continue
		}
		if n := len(s); n > 0 && s[n-1].p == c.p {
			s[n-1].node = s[n-1].node || c.node
			s[n-1].gap = s[n-1].gap || c.gap
			continue
		}
		r, _, ok := md.eval(sp, nil, c.p)
		if !ok && c.p == lo {
			// The smallest η lies at the top of a low-velocity region: the
			// ray with p = lo passes it, and the range is open there. Take
			// the limit from above (rays reflected at that node).
			c.p = lo * (1 + 1e-13)
			r, _, ok = md.eval(sp, nil, c.p)
		}
		if !ok {
			continue
		}
		c.d, c.dd = r.d, r.dd
		s = append(s, c)
	}
	// Caustics. Between consecutive samples Δ must be monotone. At an
	// interior sample dΔ/dp is known (at node samples it is singular); if its
	// sign differs from that of the secant to a neighbour, Δ turns back
	// between the two (a caustic, or two for an S-shaped piece): search from
	// the interior sample towards that neighbour for dΔ/dp = 0.
	ev := func(p float64) (float64, float64, bool) {
		r, _, ok := md.eval(sp, nil, p)
		return r.d, r.dd, ok
	}
	var extra []sample
	// At the ends of the range Δ(p) typically has a square-root cusp (a leg
	// grazing a boundary): take the slope just inside.
	if n := len(s); n >= 2 {
		for _, q := range [2]float64{s[0].p + 1e-9*(s[1].p-s[0].p), s[n-1].p - 1e-9*(s[n-1].p-s[n-2].p)} {
			if d, dd, ok := ev(q); ok && finite(dd) {
				s = append(s, sample{p: q, d: d, dd: dd})
			}
		}
		sort.Slice(s, func(i, j int) bool { return s[i].p < s[j].p })
	}
	for i, c := range s {
		if c.node || !finite(c.dd) || c.dd == 0 {
			continue
		}
		for _, j := range [2]int{i - 1, i + 1} {
			if j < 0 || j >= len(s) || s[max(i, j)].gap {
				continue
			}
			nb := s[j]
			secant := (nb.d - c.d) / (nb.p - c.p)
			if secant == 0 || (secant > 0) == (c.dd > 0) {
				continue
			}
			if p, d, ok := extremumBisect(ev, c.p, c.dd, nb.p); ok {
				extra = append(extra, sample{p: p, d: d})
			}
		}
	}
	s = append(s, extra...)
	sort.Slice(s, func(i, j int) bool { return s[i].p < s[j].p })
	tb.p = make([]float64, 0, len(s))
	tb.d = make([]float64, 0, len(s))
	tb.dd = make([]float64, 0, len(s))
	tb.gap = make([]bool, 0, len(s))
	for i, c := range s {
		if i > 0 && c.p == s[i-1].p {
			continue
		}
		dd := c.dd
		if c.node {
			dd = math.NaN() // singular there: no usable slope
		}
		tb.p = append(tb.p, c.p)
		tb.d = append(tb.d, c.d)
		tb.dd = append(tb.dd, dd)
		tb.gap = append(tb.gap, c.gap)
	}
}

// extremum finds p in (a, b) with dΔ/dp = 0, given finite derivatives da, db
// of opposite signs at the ends, by the Illinois variant of regula falsi on
// the derivative, bisecting when a step would land within a tenth of the
// bracket from an end, to 1e-7 relative in p (at most 40 steps). Δ is
// quadratic about the extremum, so the extremal distance is then exact far
// below the root tolerance.
func extremum(ev func(float64) (float64, float64, bool), a, da, b, db float64) (p, d float64, ok bool) {
	side := 0
	for range 40 {
		p = (a*db - b*da) / (db - da)
		// Bisect when the step would stay near an end (a square-root
		// singularity of dΔ/dp at a grazing ray makes regula falsi crawl).
		if w := b - a; !(p > a+0.1*w && p < b-0.1*w) {
			p = 0.5 * (a + b)
		}
		var dp float64
		d, dp, ok = ev(p)
		if !ok {
			return 0, 0, false
		}
		if dp == 0 || b-a <= 1e-7*b || !finite(dp) {
			return p, d, true
		}
		if (dp < 0) == (da < 0) {
			a, da = p, dp
			if side == -1 {
				db *= 0.5
			}
			side = -1
		} else {
			b, db = p, dp
			if side == 1 {
				da *= 0.5
			}
			side = 1
		}
	}
	return p, d, true
}

// extremumBisect finds the extremum between a (finite derivative da) and the
// neighbour sample nb, whose derivative is unknown or unreliable: bisection on
// the sign of dΔ/dp until a point with the opposite sign is found, then
// extremum.
func extremumBisect(ev func(float64) (float64, float64, bool), a, da, nb float64) (p, d float64, ok bool) {
	b := nb
	for range 60 {
		m := 0.5 * (a + b)
		dm, dpm, ok := ev(m)
		if ok && !finite(dpm) {
			// m is exactly a node's η (dΔ/dp singular there): step aside.
			m += 1e-9 * (a - m)
			dm, dpm, ok = ev(m)
		}
		if !ok || !finite(dpm) {
			return 0, 0, false
		}
		if (dpm < 0) != (da < 0) {
			lo, dlo, hi, dhi := a, da, m, dpm
			if lo > hi {
				lo, dlo, hi, dhi = hi, dhi, lo, dlo
			}
			return extremum(ev, lo, dlo, hi, dhi)
		}
		a, da = m, dpm
		if math.Abs(b-a) <= 1e-7*math.Abs(b) {
			return m, dm, true
		}
	}
	return 0, 0, false
}
