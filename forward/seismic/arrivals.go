package seismic

import (
	"fmt"
	"math"
	"sort"
)

// Arrival is one ray of a phase reaching the target distance.
type Arrival struct {
	Time     float64 // travel time (s)
	RayParam float64 // ray parameter p = dT/dΔ along the ray's path (s/rad), ≥ 0
	// Angle is the angle the ray travels around the centre (rad): the target
	// distance, or 2π − distance for a ray arriving the long way round
	// (MajorArc). Along the distance, dT/d(distance) is +RayParam for a
	// minor-arc ray and −RayParam for a major-arc one.
	Angle    float64
	MajorArc bool
	// DAngleDP is dΔ/dp (rad per s/rad) at the ray: its sign tells the branch
	// (negative: Δ grows as p falls, as on a normal prograde branch), and
	// |DAngleDP| enters geometrical spreading. It is ±Inf for a ray that is
	// horizontal exactly at a shell node (a cusp of Δ(p)).
	DAngleDP float64
	// Bottom is the deepest radius the ray reaches (m): its turning radius, or
	// the core–mantle boundary for core reflections, or the source radius for
	// an up-going p or s.
	Bottom float64
	First  bool // the earliest arrival of the phase returned by this call
}

// source describes a source at depth: the shell containing it and the
// sub-shell from the source up to that shell's top, per wave type.
type source struct {
	depth      float64
	rs         float64
	js         int     // shell containing the source (r_b < rs ≤ r_t)
	sub        bool    // a partial shell rs..r_t exists (rs < r_t)
	subP, subS shell   // the partial shell for P and S
	maxP, maxS float64 // largest p of a ray existing from the source to the surface
	okS        bool    // S can leave the source and reach the surface
}

// newSource locates a source at depth (validated by the caller).
func (md *Medium) newSource(depth float64) source {
	src := source{depth: depth, rs: md.radius - depth}
	if depth == 0 {
		src.rs = md.radius
	}
	rs := src.rs
	// First shell (from the top) whose bottom is below rs.
	js := sort.Search(len(md.rBot), func(i int) bool { return md.rBot[i] < rs })
	src.js = js
	rt, rb := md.rTop[js], md.rBot[js]
	src.sub = rs < rt
	minAbove := func(sh []shell, n int) float64 {
		m := math.Inf(1)
		for i := 0; i < n; i++ {
			m = math.Min(m, math.Min(sh[i].etaT, sh[i].etaB))
		}
		return m
	}
	src.maxP = minAbove(md.sp, js)
	src.okS = js < md.sBlock
	if src.okS {
		src.maxS = minAbove(md.ss, js)
	}
	if src.sub {
		c := &md.sp[js]
		eta := c.etaAt(rt, rb, rs)
		src.subP = newShell(rt, rs, c.etaT, eta)
		src.maxP = math.Min(src.maxP, math.Min(eta, c.etaT))
		if src.okS {
			c := &md.ss[js]
			eta := c.etaAt(rt, rb, rs)
			src.subS = newShell(rt, rs, c.etaT, eta)
			src.maxS = math.Min(src.maxS, math.Min(eta, c.etaT))
		}
	}
	return src
}

// up returns the one-way integrals from the source to the surface for wave w.
func (md *Medium) up(src *source, w wave, p float64) legSum {
	sh, sub := md.sp, &src.subP
	if w == waveS {
		sh, sub = md.ss, &src.subS
	}
	r := full(sh[:src.js], p)
	if src.sub {
		s := fullOne(sub, p)
		r.add(s, 1)
	}
	return r
}

// fullOne is full for a single shell.
func fullOne(c *shell, p float64) legSum {
	var r legSum
	pp := p * p
	r.addShell(c, p, pp, sqrtPos(c.etaT*c.etaT-pp), sqrtPos(c.etaB*c.etaB-pp))
	return r
}

// pRange returns the interval [lo, hi] of ray parameters for which the phase
// exists from the source, or ok = false.
func (md *Medium) pRange(sp *phaseSpec, src *source) (lo, hi float64, ok bool) {
	lo, hi = 0, math.Inf(1)
	switch sp.turn {
	case turnMantle:
		l := md.pm
		if sp.turnWave == waveS {
			l = md.sm
		}
		if l.empty() {
			return 0, 0, false
		}
		lo, hi = l.etaMin, l.etaTop
	case turnOuter:
		if md.k.empty() {
			return 0, 0, false
		}
		lo, hi = md.k.etaMin, md.k.etaTop
	case turnInner:
		if md.in.empty() {
			return 0, 0, false
		}
		lo, hi = 0, md.in.etaTop
	}
	if sp.nPm > 0 {
		if md.pm.empty() || md.iCMB == len(md.rTop) {
			return 0, 0, false
		}
		hi = math.Min(hi, md.pmMin)
	}
	if sp.nSm > 0 {
		if !md.sFull || md.iCMB == len(md.rTop) {
			return 0, 0, false
		}
		hi = math.Min(hi, md.smMin)
	}
	if sp.nK > 0 {
		if md.in.empty() {
			return 0, 0, false
		}
		hi = math.Min(hi, md.k.etaMin)
	}
	if src != nil {
		if sp.src != srcDown && src.depth == 0 {
			return 0, 0, false // depth phases and up-going rays need a buried source
		}
		if sp.srcWave == waveS {
			if !src.okS {
				return 0, 0, false
			}
			hi = math.Min(hi, src.maxS)
		} else {
			hi = math.Min(hi, src.maxP)
		}
	}
	if sp.src == srcUp {
		lo = 0
	}
	if !(lo < hi) || math.IsInf(hi, 0) {
		return 0, 0, false
	}
	return lo, hi, true
}

// eval returns Δ, T and dΔ/dp of the phase for ray parameter p (inside the
// phase's range) and the index (in md's shells) of the shell where its
// turning leg turned (−1 if none).
func (md *Medium) eval(sp *phaseSpec, src *source, p float64) (legSum, int, bool) {
	var tot legSum
	ti := -1
	if sp.src == srcUp {
		return md.up(src, sp.srcWave, p), -1, true
	}
	if sp.turn != turnNone {
		var sh []shell
		off := 0
		switch sp.turn {
		case turnMantle:
			if sp.turnWave == waveP {
				sh = md.sp[md.pm.lo:md.pm.hi]
			} else {
				sh = md.ss[md.sm.lo:md.sm.hi]
			}
		case turnOuter:
			sh, off = md.sp[md.k.lo:md.k.hi], md.k.lo
		case turnInner:
			sh, off = md.sp[md.in.lo:md.in.hi], md.in.lo
		}
		r, i, ok := turn(sh, p)
		if !ok {
			return tot, -1, false
		}
		tot.add(r, sp.nTurn)
		ti = off + i
	}
	if sp.nPm > 0 {
		tot.add(full(md.sp[:md.iCMB], p), sp.nPm)
	}
	if sp.nSm > 0 {
		tot.add(full(md.ss[:md.iCMB], p), sp.nSm)
	}
	if sp.nK > 0 {
		tot.add(full(md.sp[md.iCMB:md.iICB], p), sp.nK)
	}
	if src != nil && src.depth > 0 {
		u := md.up(src, sp.srcWave, p)
		if sp.src == srcDepth {
			tot.add(u, 1)
		} else {
			tot.add(u, -1)
		}
	}
	if !finite(tot.d) || !finite(tot.t) {
		return tot, ti, false
	}
	return tot, ti, true
}

// bottom returns the deepest radius of the ray of phase sp with ray parameter
// p whose turning leg turned in shell ti.
func (md *Medium) bottom(sp *phaseSpec, src *source, p float64, ti int) float64 {
	switch {
	case sp.src == srcUp:
		return src.rs
	case sp.turn == turnNone:
		return md.cmb
	}
	if ti < 0 || ti >= len(md.rTop) {
		return 0 // not reached: eval reports a turning shell for every ray it accepts
	}
	c := &md.sp[ti]
	if sp.turn == turnMantle && sp.turnWave == waveS {
		c = &md.ss[ti]
	}
	switch {
	case c.etaT < p:
		return md.rTop[ti]
	case c.etaB == p:
		return md.rBot[ti]
	case c.etaB == 0:
		return md.rTop[ti] * p / c.etaT
	}
	// η = η_t (r/r_t)^(1/k)  ⇒  r = r_t (p/η_t)^k.
	return md.rTop[ti] * math.Exp(c.k*math.Log(p/c.etaT))
}

// Arrivals appends every arrival of ph at epicentral distance dist (rad, in
// [0, π]) for a source at depth (m, 0 ≤ depth < surface radius − cmb) below
// the surface, ordered by time, to dst and returns it (dst lets callers avoid
// allocation). A phase that does not exist there (shadow zone, S leg through a
// fluid, inner-core phase without inner core, depth phase of a surface source)
// leaves dst unchanged and returns a nil error; invalid input is an error.
func (md *Medium) Arrivals(dst []Arrival, ph Phase, dist, depth float64) ([]Arrival, error) {
	sp, ok := ph.spec()
	if !ok {
		return dst, fmt.Errorf("seismic: invalid phase (zero Phase value or not from ParsePhase)")
	}
	if !finite(dist) || dist < 0 || dist > math.Pi {
		return dst, fmt.Errorf("seismic: %s: distance %g rad outside [0, π]", sp.name, dist)
	}
	if !finite(depth) || depth < 0 || depth >= md.radius-md.cmb {
		return dst, fmt.Errorf("seismic: %s: source depth %g m outside [0, %g) m (surface to the core)", sp.name, depth, md.radius-md.cmb)
	}
	src := md.newSource(depth)
	lo, hi, ok := md.pRange(sp, &src)
	if !ok {
		return dst, nil
	}
	n0 := len(dst)
	targets := [2]float64{dist, 2*math.Pi - dist}
	nt := 2
	if dist == math.Pi {
		nt = 1
	}
	s := scan{md: md, sp: sp, src: &src, targets: targets[:nt]}
	if sp.table < 0 {
		// Δ(p) is monotone on [lo, hi]: core reflections and up-going rays
		// are sums of full legs, each increasing with p.
		s.point(lo, 0, false, nil)
		r, _, ok := md.eval(sp, &src, hi)
		if ok {
			s.point(hi, r.d, false, &dst)
		}
	} else {
		md.scanTable(&s, md.table(sp.table), lo, hi, &dst)
	}
	out := dst[n0:]
	// Insertion sort by time (few arrivals).
	for i := 1; i < len(out); i++ {
		for j := i; j > 0 && out[j].Time < out[j-1].Time; j-- {
			out[j], out[j-1] = out[j-1], out[j]
		}
	}
	if len(out) > 0 {
		out[0].First = true
	}
	return dst, nil
}

// scanTable feeds the samples of tb inside [lo, hi], corrected for the
// source depth, to s. For a buried source the correction ∓Δ_up(p) (the leg
// from the source to the surface) is computed only where a crossing is
// possible: Δ_up is increasing in p, so 0 ≤ Δ_up ≤ U = Δ_up(hi) bounds the
// corrected values of an interval by its surface values. The end point hi, if
// it falls between samples, is evaluated in full when needed.
func (md *Medium) scanTable(s *scan, tb *table, lo, hi float64, dst *[]Arrival) {
	sp, src := s.sp, s.src
	scale := sp.tableScale
	if src.depth == 0 {
		last := lo
		for i, p := range tb.p {
			if p < lo {
				continue
			}
			if p > hi {
				break
			}
			s.point(p, scale*tb.d[i], tb.gap[i], dst)
			last = p
		}
		if last < hi {
			if r, _, ok := md.eval(sp, src, hi); ok {
				s.point(hi, r.d, false, dst)
			}
		}
		return
	}
	U := md.up(src, sp.srcWave, hi).d
	sign := -1.0 // down-going first leg: Δ = Δ_surface − Δ_up
	if sp.src == srcDepth {
		sign = 1
	}
	lowAdj, highAdj := math.Min(0, sign*U), math.Max(0, sign*U)
	may := func(d1, d2 float64) bool {
		mn, mx := math.Min(d1, d2)+lowAdj, math.Max(d1, d2)+highAdj
		for _, tg := range s.targets {
			if mn <= tg && tg <= mx {
				return true
			}
		}
		return false
	}
	ev := func(p float64) (float64, float64, bool) {
		r, _, ok := md.eval(sp, src, p)
		return r.d, r.dd, ok
	}
	// A sample: ray parameter, surface Δ and dΔ/dp, and (once computed) the
	// values corrected for the source depth.
	type pt struct {
		p, raw, rawDD, d, dd float64
		adj                  bool
	}
	adjust := func(x *pt) {
		if !x.adj {
			u := md.up(src, sp.srcWave, x.p)
			x.d, x.dd, x.adj = x.raw+sign*u.d, x.rawDD+sign*u.dd, true
		}
	}
	var prev pt
	started, fed := false, false
	// interval handles the monotone-for-the-surface interval (prev, cur):
	// the depth correction can turn it back (an extremum inside), which is
	// located and split off before the crossings are solved.
	interval := func(cur pt) {
		adjust(&prev)
		if !fed {
			s.n = 0 // restart: the previous point was skipped
			s.point(prev.p, prev.d, false, nil)
		}
		if cur.p > prev.p {
			// Slopes that disagree in sign with the secant reveal an
			// extremum (two if both ends disagree). NaN slopes (table nodes)
			// are unknown; an infinite slope (a leg horizontal at the source)
			// has a usable sign, but a search must start from a finite one.
			sec := (cur.d - prev.d) / (cur.p - prev.p)
			disagree := func(dd float64) bool { return !math.IsNaN(dd) && dd != 0 && sec != 0 && (dd > 0) != (sec > 0) }
			usable := func(dd float64) bool { return finite(dd) && dd != 0 }
			var ext [2]float64
			ne := 0
			pd, cd := disagree(prev.dd), disagree(cur.dd)
			switch {
			case pd && cd:
				if usable(prev.dd) {
					if p, _, ok := extremumBisect(ev, prev.p, prev.dd, cur.p); ok {
						ext[ne] = p
						ne++
					}
				}
				if usable(cur.dd) {
					if p, _, ok := extremumBisect(ev, cur.p, cur.dd, prev.p); ok && (ne == 0 || p > ext[0]) {
						ext[ne] = p
						ne++
					}
				}
			case pd || cd:
				if usable(prev.dd) {
					if p, _, ok := extremumBisect(ev, prev.p, prev.dd, cur.p); ok {
						ext[ne] = p
						ne++
					}
				} else if usable(cur.dd) {
					if p, _, ok := extremumBisect(ev, cur.p, cur.dd, prev.p); ok {
						ext[ne] = p
						ne++
					}
				}
			}
			for _, p := range ext[:ne] {
				if d, _, ok := ev(p); ok && p > s.pp && p < cur.p {
					s.point(p, d, false, dst)
				}
			}
		}
		s.point(cur.p, cur.d, false, dst)
		fed = true
	}
	for i, p := range tb.p {
		if p < lo {
			continue
		}
		cur := pt{p: p, raw: scale * tb.d[i], rawDD: scale * tb.dd[i]}
		if p > hi {
			// hi lies inside the surface-monotone interval (prev, p): its
			// surface value is between those of the two samples.
			if started && prev.p < hi && may(prev.raw, cur.raw) {
				if r, _, ok := md.eval(sp, src, hi); ok {
					interval(pt{p: hi, d: r.d, dd: r.dd, adj: true})
				}
			}
			return
		}
		if started && !tb.gap[i] && may(prev.raw, cur.raw) {
			adjust(&cur)
			interval(cur)
		} else {
			fed = false
		}
		prev, started = cur, true
	}
}

// scan walks the samples of a piecewise-monotone Δ(p) in increasing p and
// solves for every crossing of the targets.
type scan struct {
	md      *Medium
	sp      *phaseSpec
	src     *source
	targets []float64
	n       int     // samples seen
	pp, pd  float64 // previous sample
	p2, d2  float64 // the one before
}

// point adds sample (p, d); for every target crossed between the previous
// sample and this one an arrival is appended to *dst, unless gap says that Δ
// jumps between them.
func (s *scan) point(p, d float64, gap bool, dst *[]Arrival) {
	if s.n > 0 && dst != nil && !gap {
		for ti, tg := range s.targets {
			fa, fb := s.pd-tg, d-tg
			opposite := (fa < 0 && fb > 0) || (fa > 0 && fb < 0)
			// Half-open intervals (previous, this]: a root exactly at a sample
			// belongs to the interval it ends, except at the first sample.
			if !opposite && fb != 0 && !(s.n == 1 && fa == 0) {
				continue
			}
			// Starting guess: inverse quadratic interpolation through this
			// and the two previous samples when they are monotone, else the
			// secant of the bracket.
			start := math.NaN()
			if s.n >= 2 && (s.d2 < s.pd) == (s.pd < d) && s.d2 != s.pd {
				start = invQuad(s.d2-tg, s.p2, fa, s.pp, fb, p)
			}
			if a, ok := s.md.solve(s.sp, s.src, tg, s.pp, fa, p, fb, start); ok {
				a.MajorArc = ti == 1
				*dst = append(*dst, a)
			}
		}
	}
	s.n++
	s.p2, s.d2 = s.pp, s.pd
	s.pp, s.pd = p, d
}

// invQuad returns the value at f = 0 of the quadratic p(f) through (f0, p0),
// (f1, p1), (f2, p2) (Lagrange form; the f's must be distinct).
func invQuad(f0, p0, f1, p1, f2, p2 float64) float64 {
	if f0 == f1 || f1 == f2 || f0 == f2 {
		return math.NaN()
	}
	return p0*f1*f2/((f0-f1)*(f0-f2)) + p1*f0*f2/((f1-f0)*(f1-f2)) + p2*f0*f1/((f2-f0)*(f2-f1))
}

// Root-finding tolerances: the distance residual at which iteration stops
// (rad), the residual above which a collapsed bracket is not a root (rad;
// near a square-root cusp of Δ(p) the bracket can reach the resolution of p
// with a residual above tolAngle), and the iteration cap.
const (
	tolAngle  = 1e-10
	tolReject = 1e-7
	maxIter   = 100
)

// solve finds the ray parameter in [a, b] (f = Δ − target has values fa, fb
// of opposite signs or one zero; Δ monotone there) by Newton steps safeguarded
// by bisection, from start if it lies inside (a, b), and returns the arrival. The time is corrected to first order
// for the last residual, T + p (target − Δ) (dT/dΔ = p).
func (md *Medium) solve(sp *phaseSpec, src *source, target, a, fa, b, fb, start float64) (Arrival, bool) {
	var p float64
	switch {
	case fa == 0:
		p = a
	case fb == 0:
		p = b
	case start > a && start < b:
		p = start
	default:
		p = a + (b-a)*fa/(fa-fb)
		if !(p > a && p < b) {
			p = 0.5 * (a + b)
		}
	}
	var r legSum
	ti := -1
	ok := false
	for range maxIter {
		r, ti, ok = md.eval(sp, src, p)
		if !ok {
			return Arrival{}, false
		}
		f := r.d - target
		if math.Abs(f) <= tolAngle {
			break
		}
		if (f < 0) == (fa < 0) {
			a, fa = p, f
		} else {
			b, fb = p, f
		}
		if b-a <= 2e-16*b {
			break
		}
		pn := p - f/r.dd
		if !(pn > a && pn < b) {
			pn = 0.5 * (a + b)
		}
		p = pn
	}
	// A bracket that closed on a jump of Δ(p) (a shadow-zone edge not
	// sampled as a gap) leaves a residual: no ray reaches the target there.
	if math.Abs(r.d-target) > tolReject {
		return Arrival{}, false
	}
	t := r.t + p*(target-r.d)
	if !finite(t) || t < 0 {
		return Arrival{}, false
	}
	if math.IsNaN(r.dd) {
		// Infinite one-sided slopes of two legs at a node: a cusp.
		r.dd = math.Inf(1)
	}
	return Arrival{
		Time:     t,
		RayParam: p,
		Angle:    target,
		DAngleDP: r.dd,
		Bottom:   md.bottom(sp, src, p, ti),
	}, true
}
