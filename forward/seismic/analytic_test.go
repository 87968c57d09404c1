package seismic

import (
	"fmt"
	"math"
	"testing"

	"plumb/forward"
)

// chord returns the length of the straight segment between points at radii
// r1 and r2 separated by the angle phi at the centre (law of cosines), and the
// ray parameter of a straight ray along it at speed v: p = d/v with d the
// distance of the line from the centre, d = r1 r2 sin(phi)/L (twice the
// triangle's area divided by its base).
func chord(r1, r2, phi, v float64) (L, p float64) {
	L = math.Sqrt(r1*r1 + r2*r2 - 2*r1*r2*math.Cos(phi))
	return L, r1 * r2 * math.Sin(phi) / L / v
}

// In a uniform sphere rays are straight chords: T = 2R sin(Δ/2)/v for a
// surface source (exact geometry). For a source at radius rs the ray is the
// chord of length √(rs² + R² − 2 rs R cos Δ) (law of cosines); it leaves the
// source downwards (phase P) when the foot of the perpendicular from the
// centre lies between source and receiver, upwards (phase p) otherwise.
func TestUniformChords(t *testing.T) {
	const R, vp, vs = 6371e3, 8000.0, 4500.0
	md, err := NewMedium(uniform(R, vp, vs, false), 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	var wt worst
	defer func() { t.Logf("uniform sphere: largest relative time error %.2g (%s)", wt.v, wt.what) }()
	for _, w := range []struct {
		down, up string
		v        float64
	}{{"P", "p", vp}, {"S", "s", vs}} {
		for _, dd := range []float64{0.5, 1, 10, 33.3, 60, 90, 120, 150, 179, 180} {
			dist := dd * deg
			a := arrivals(t, md, w.down, dist, 0)
			want := 2 * R * math.Sin(dist/2) / w.v
			if len(a) != 1 {
				t.Fatalf("%s at %g°: %d arrivals, want 1", w.down, dd, len(a))
			}
			e := relErr(a[0].Time, want)
			wt.add(e, fmt.Sprintf("%s %g°", w.down, dd))
			if e > 1e-9 {
				t.Errorf("%s at %g°: T = %.12g s, chord %.12g s (rel. error %.2g)", w.down, dd, a[0].Time, want, e)
			}
			_, p := chord(R, R, dist, w.v)
			if math.Abs(a[0].RayParam-p) > 1e-9*R/w.v {
				t.Errorf("%s at %g°: p = %.12g, chord %.12g s/rad", w.down, dd, a[0].RayParam, p)
			}
			for _, depth := range []float64{10e3, 700e3, 3000e3, 6000e3} {
				rs := R - depth
				L, p := chord(rs, R, dist, w.v)
				// Foot of the perpendicular: parameter t* along source→receiver.
				sx, rx, ry := rs, R*math.Cos(dist), R*math.Sin(dist)
				ts := -(sx*(rx-sx) + 0*ry) / (L * L)
				name, other := w.up, w.down
				if ts > 0 && ts < 1 {
					name, other = w.down, w.up
				}
				got := arrivals(t, md, name, dist, depth)
				none := arrivals(t, md, other, dist, depth)
				if len(got) != 1 || len(none) != 0 {
					t.Errorf("depth %g km, %g°: %d %s and %d %s arrivals, want 1 and 0", depth/km, dd, len(got), name, len(none), other)
					continue
				}
				e := relErr(got[0].Time, L/w.v)
				wt.add(e, fmt.Sprintf("%s %g° depth %g km", name, dd, depth/km))
				if e > 1e-9 {
					t.Errorf("%s depth %g km at %g°: T = %.12g s, chord %.12g s (rel. error %.2g)", name, depth/km, dd, got[0].Time, L/w.v, e)
				}
				if math.Abs(got[0].RayParam-p) > 1e-9*R/w.v {
					t.Errorf("%s depth %g km at %g°: p = %.12g, chord %.12g s/rad", name, depth/km, dd, got[0].RayParam, p)
				}
			}
		}
	}
}

// reflection returns the time and ray parameter of a ray from radius r1 to
// radius r2 (both above the reflector) that reflects once at radius c with
// speed v1 on the first leg and v2 on the second, angular separation dist, in
// a medium of uniform speeds (straight legs). The reflection point at angle φ
// from the source is where both legs have the same ray parameter (Snell's law
// at the reflector; equivalently the stationary point of T(φ), Fermat), found
// by bisection: p1(φ) rises and p2(dist − φ) falls with φ.
func reflection(r1, r2, c, v1, v2, dist float64) (T, p float64) {
	// Each leg must stay above the reflector: its angle is at most that of
	// the chord tangent to it, acos(c/r).
	lo := math.Max(0, dist-math.Acos(c/r2))
	hi := math.Min(dist, math.Acos(c/r1))
	for range 200 {
		phi := 0.5 * (lo + hi)
		_, p1 := chord(r1, c, phi, v1)
		_, p2 := chord(r2, c, dist-phi, v2)
		if p1 < p2 {
			lo = phi
		} else {
			hi = phi
		}
	}
	phi := 0.5 * (lo + hi)
	L1, p1 := chord(r1, c, phi, v1)
	L2, _ := chord(r2, c, dist-phi, v2)
	return L1/v1 + L2/v2, p1
}

// twoLayer is a uniform mantle (vp, vs) over a uniform core of radius c with
// P velocity vc (fluid).
func twoLayer(R, c, vp, vs, vc float64) forward.Model {
	return forward.Model{Layers: []forward.Layer{
		{Name: "core", Inner: 0, Outer: c, Density: forward.Const(11000), Vp: forward.Const(vc), Fluid: true},
		{Name: "mantle", Inner: c, Outer: R, Density: forward.Const(4500), Vp: forward.Const(vp), Vs: forward.Const(vs)},
	}}
}

// Core reflections in a uniform mantle: two straight legs meeting at the CMB
// with equal ray parameters (law of cosines per leg, see reflection).
func TestCoreReflectionsUniform(t *testing.T) {
	const R, c, vp, vs = 6371e3, 3480e3, 11000.0, 6000.0
	md, err := NewMedium(twoLayer(R, c, vp, vs, 9000), c, 0)
	if err != nil {
		t.Fatal(err)
	}
	var wt worst
	defer func() { t.Logf("core reflections: largest relative time error %.2g (%s)", wt.v, wt.what) }()
	// The reflected ray exists until it grazes the CMB: each leg reaches at
	// most acos(c/R) from the source side (tangent chord).
	for _, ph := range []struct {
		name   string
		v1, v2 float64
	}{{"PcP", vp, vp}, {"ScS", vs, vs}, {"ScP", vs, vp}, {"PcS", vp, vs}} {
		for _, dd := range []float64{0, 5, 30, 60, 90, 100} {
			for _, depth := range []float64{0, 35e3, 600e3} {
				dist := dd * deg
				rs := R - depth
				a := arrivals(t, md, ph.name, dist, depth)
				// Largest distance: both legs reach the CMB, p ≤ c/v on each;
				// a straight leg at distance d = p v from the centre spans
				// acos(d/r_top) − acos(d/c) between radii c and r_top.
				pmax := math.Min(c/ph.v1, c/ph.v2)
				span := func(r, v float64) float64 { return math.Acos(pmax*v/r) - math.Acos(pmax*v/c) }
				if dmax := span(rs, ph.v1) + span(R, ph.v2); dist > dmax {
					if len(a) != 0 {
						t.Errorf("%s at %g°, depth %g km: %d arrivals beyond the grazing distance %.3f°", ph.name, dd, depth/km, len(a), dmax/deg)
					}
					continue
				}
				wantT, wantP := reflection(rs, R, c, ph.v1, ph.v2, dist)
				if len(a) != 1 {
					t.Errorf("%s at %g°, depth %g km: %d arrivals, want 1", ph.name, dd, depth/km, len(a))
					continue
				}
				e := relErr(a[0].Time, wantT)
				wt.add(e, fmt.Sprintf("%s %g° depth %g km", ph.name, dd, depth/km))
				if e > 1e-9 {
					t.Errorf("%s at %g°, depth %g km: T = %.12g s, geometry %.12g s (rel. error %.2g)", ph.name, dd, depth/km, a[0].Time, wantT, e)
				}
				if math.Abs(a[0].RayParam-wantP) > 1e-9*R/vs {
					t.Errorf("%s at %g°, depth %g km: p = %.12g, geometry %.12g s/rad", ph.name, dd, depth/km, a[0].RayParam, wantP)
				}
				if a[0].Bottom != c {
					t.Errorf("%s: bottom %g m, want the CMB %g m", ph.name, a[0].Bottom, c)
				}
			}
		}
	}
	// Beyond the grazing reflection (tangent chords from both ends,
	// 2 acos(c/R) for PcP from the surface) there is no PcP.
	if a := arrivals(t, md, "PcP", 2*math.Acos(c/R)+1e-6, 0); len(a) != 0 {
		t.Errorf("PcP beyond the grazing distance: %d arrivals", len(a))
	}
	if a := arrivals(t, md, "PcP", 2*math.Acos(c/R)-1e-6, 0); len(a) != 1 {
		t.Errorf("PcP just before the grazing distance: %d arrivals, want 1", len(a))
	}
}

// powerNodes samples v = v0 (r/R)^b (vs = v0/√3) at n nodes plus the centre.
func powerNodes(R, v0, b float64, n int) []Node {
	f0 := math.Pow(1/float64(n), b)
	nodes := []Node{{R: 0, Vp: v0 * f0, Vs: v0 / math.Sqrt(3) * f0}}
	for i := 1; i <= n; i++ {
		r := R * float64(i) / float64(n)
		if i == n {
			r = R
		}
		v := v0 * math.Pow(r/R, b)
		nodes = append(nodes, Node{R: r, Vp: v, Vs: v / math.Sqrt(3)})
	}
	return nodes
}

// Power-law sphere v = v0 (r/R)^b, b < 1. With η = r/v = R^b r^(1−b)/v0,
// dr/r = dη/((1−b)η), so for a surface source and receiver
//
//	Δ(p) = 2 ∫_p^{η_R} p dη/((1−b) η √(η² − p²)) = 2 acos(p/η_R)/(1−b),
//	T(p) = 2 ∫_p^{η_R} η dη/((1−b) √(η² − p²)) = 2 √(η_R² − p²)/(1−b)
//
// (derived here; the same closed forms as Bullen & Bolt 1985, §7.3, from
// memory), η_R = R/v0. A power law is represented exactly by Bullen shells
// with nodes sampled from it, so the code must agree to rounding; checked at
// 1e-7 relative (an accuracy target; common practice, no source) for rays
// turning above the innermost (constant-velocity) shell.
func TestPowerLawSphere(t *testing.T) {
	const R, v0 = 6371e3, 6000.0
	var wt, wi worst
	defer func() {
		t.Logf("power law: largest relative time error %.2g (%s); of the integrals at given p %.2g (%s)", wt.v, wt.what, wi.v, wi.what)
	}()
	for _, b := range []float64{-0.7, 0, 0.3, 0.6, 0.9, 0.97} {
		md, err := NewMediumNodes(powerNodes(R, v0, b, 200), 0, 0)
		if err != nil {
			t.Fatal(err)
		}
		etaR := R / v0
		for _, f := range []float64{0.02, 0.1, 0.3, 0.5, 0.7, 0.9, 0.99} {
			dist := f * math.Pi
			// Ray parameter from Δ(p): p = η_R cos(Δ(1−b)/2).
			p := etaR * math.Cos(dist*(1-b)/2)
			// Turning radius (η(r) = p) must lie above the centre shell.
			rt := R * math.Pow(p/etaR, 1/(1-b))
			if !(p > 0) || rt <= R/200 {
				continue
			}
			wantT := 2 * math.Sqrt(etaR*etaR-p*p) / (1 - b)
			for _, w := range []struct {
				name string
				k    float64
			}{{"P", 1}, {"S", math.Sqrt(3)}} {
				// Δ(p) exceeds π when b > 0: rays also arrive the long way
				// round, and rays reaching the constant-velocity centre shell
				// (Δ → π as p → 0) add branches. The closed-form ray is the
				// minor-arc arrival with the matching ray parameter; any other
				// minor-arc arrival must bottom in the centre shell.
				all := arrivals(t, md, w.name, dist, 0)
				var a []Arrival
				for _, x := range all {
					switch {
					case x.MajorArc:
					case relErr(x.RayParam, w.k*p) < 1e-3:
						a = append(a, x)
					case x.Bottom > R/200:
						t.Errorf("b = %g, %s at %.1f°: extra arrival %+v turns above the centre shell", b, w.name, dist/deg, x)
					}
				}
				if len(a) != 1 {
					t.Errorf("b = %g, %s at %.1f°: %d arrivals near p = %g, want 1 (all: %+v)", b, w.name, dist/deg, len(a), w.k*p, all)
					continue
				}
				e := relErr(a[0].Time, w.k*wantT)
				wt.add(e, fmt.Sprintf("b = %g %s %.1f°", b, w.name, dist/deg))
				if e > 1e-7 {
					t.Errorf("b = %g, %s at %.1f°: T = %.12g s, closed form %.12g s (rel. error %.2g)", b, w.name, dist/deg, a[0].Time, w.k*wantT, e)
				}
				if e := relErr(a[0].RayParam, w.k*p); e > 1e-7 {
					t.Errorf("b = %g, %s at %.1f°: p = %.12g, closed form %.12g (rel. error %.2g)", b, w.name, dist/deg, a[0].RayParam, w.k*p, e)
				}
				if e := relErr(a[0].Bottom, rt); e > 1e-7 {
					t.Errorf("b = %g, %s at %.1f°: turning radius %.9g m, closed form %.9g m", b, w.name, dist/deg, a[0].Bottom, rt)
				}
			}
			// Δ and T at the given p directly (the integrals, no root
			// finding). Bound 1e-9: for b → 1 the exponent 1/(1−b) of each
			// shell comes from ln(η_t/η_b) ≈ (1−b) ln(r_t/r_b), so rounding
			// of the node values is amplified by up to 1/((1−b) ln(r_t/r_b)).
			sp, _ := mustPhase(t, "P").spec()
			r, _, ok := md.eval(sp, nil, p)
			wi.add(math.Max(relErr(r.d, dist), relErr(r.t, wantT)), fmt.Sprintf("b = %g, p = %.6g", b, p))
			if !ok || relErr(r.d, dist) > 1e-9 || relErr(r.t, wantT) > 1e-9 {
				t.Errorf("b = %g, p = %g: Δ = %.15g (want %.15g), T = %.15g (want %.15g)", b, p, r.d, dist, r.t, wantT)
			}
		}
	}
}

// A ray in a shell where v ∝ r (b = 1, η constant) cannot turn; Δ and T of a
// ray crossing it are the exact integrals of the constant integrands,
// Δ = L p/√(η² − p²), T = L η²/√(η² − p²), L = ln(r_t/r_b). The shell is
// tested through the full-leg integrals (PcP crosses it).
func TestConstantSlownessShell(t *testing.T) {
	const R, c, eta = 6371e3, 3480e3, 6371e3 / 11000
	nodes := []Node{
		{R: 0, Vp: 9000},
		{R: c, Vp: 9000},
		{R: c, Vp: c / eta, Vs: c / eta / 1.8},
		{R: R, Vp: R / eta, Vs: R / eta / 1.8},
	}
	md, err := NewMediumNodes(nodes, c, 0)
	if err != nil {
		t.Fatal(err)
	}
	L := math.Log(R / c)
	for _, p := range []float64{0, 50, 200, 400, 0.9 * eta} {
		s := math.Sqrt(eta*eta - p*p)
		wantD, wantT := 2*L*p/s, 2*L*eta*eta/s
		sp, _ := mustPhase(t, "PcP").spec()
		r, _, ok := md.eval(sp, nil, p)
		if !ok || relErr(r.t, wantT) > 1e-12 || (p > 0 && relErr(r.d, wantD) > 1e-12) || (p == 0 && r.d != 0) {
			t.Errorf("p = %g: Δ = %.15g (want %.15g), T = %.15g (want %.15g)", p, r.d, wantD, r.t, wantT)
		}
		// And through the root finder (Δ(p) → ∞ as p → η, so rays also
		// arrive the long way round; one minor-arc arrival).
		if p > 0 {
			var minor []Arrival
			for _, a := range arrivals(t, md, "PcP", wantD, 0) {
				if !a.MajorArc {
					minor = append(minor, a)
				}
			}
			if len(minor) != 1 || relErr(minor[0].Time, wantT) > 1e-9 {
				t.Errorf("PcP at %g rad: %+v, want one arrival with T = %.12g", wantD, minor, wantT)
			}
		}
	}
	// No mantle-turning P exists.
	if a := arrivals(t, md, "P", 0.3, 0); len(a) != 0 {
		t.Errorf("P in a constant-η mantle: %d arrivals, want 0", len(a))
	}
}
