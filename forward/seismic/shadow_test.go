package seismic

import (
	"fmt"
	"math"
	"testing"
)

// pkpUniform returns Δ and T of PKP with ray parameter p in a uniform mantle
// (speed vm, radii c..R) over a uniform core (speed vc < vm, radius c). Legs
// are straight: a line at distance d from the centre spans acos(d/r1) −
// acos(d/r2) between radii r2 < r1 and has length √(r1² − d²) − √(r2² − d²)
// (exact geometry). Two mantle legs (d = p vm) and one core chord (d = p vc).
func pkpUniform(R, c, vm, vc, p float64) (dist, T float64) {
	dm, dc := p*vm, p*vc
	dist = 2*(math.Acos(dm/R)-math.Acos(dm/c)) + 2*math.Acos(dc/c)
	T = 2*(math.Sqrt(R*R-dm*dm)-math.Sqrt(c*c-dm*dm))/vm + 2*math.Sqrt(c*c-dc*dc)/vc
	return dist, T
}

// Shadow-zone edges for a uniform mantle over a slower liquid core (exact
// geometry of straight rays and Snell's law, Bullen & Bolt 1985 ch. 7 on the
// core shadow, from memory):
//
//   - P: the last mantle ray grazes the CMB (p = c/vm, the slowness radius
//     just above the CMB); its chord is tangent to the core, so P reaches
//     2 acos(c/R) and no farther;
//   - PKP: Δ(p) of pkpUniform has a minimum (the caustic) inside
//     0 < p < c/vm; PKP has no arrival below it and two (the branches that
//     meet there) above it, with times given by pkpUniform at the code's
//     ray parameters to 1e-9.
func TestShadowEdges(t *testing.T) {
	const R, c, vm, vs, vc = 6371e3, 3480e3, 11000.0, 6000.0, 8000.0
	md, err := NewMedium(twoLayer(R, c, vm, vs, vc), c, 0)
	if err != nil {
		t.Fatal(err)
	}
	edge := 2 * math.Acos(c/R)
	a := arrivals(t, md, "P", edge-1e-7, 0)
	if len(a) != 1 || relErr(a[0].Time, 2*math.Sqrt(R*R-c*c)/vm) > 1e-6 {
		t.Errorf("P just before the shadow edge %.4f°: %+v", edge/deg, a)
	}
	for _, dd := range []float64{1e-7, 1e-3, 0.5, 20} {
		if a := arrivals(t, md, "P", edge+dd*deg, 0); len(a) != 0 {
			t.Errorf("P %g° beyond the shadow edge: %d arrivals", dd, len(a))
		}
	}
	// Caustic: golden-section minimum of the closed-form Δ(p).
	lo, hi := 0.0, c/vm
	g := (math.Sqrt(5) - 1) / 2
	for range 200 {
		m1, m2 := hi-g*(hi-lo), lo+g*(hi-lo)
		d1, _ := pkpUniform(R, c, vm, vc, m1)
		d2, _ := pkpUniform(R, c, vm, vc, m2)
		if d1 < d2 {
			hi = m2
		} else {
			lo = m1
		}
	}
	caustic, _ := pkpUniform(R, c, vm, vc, 0.5*(lo+hi))
	t.Logf("uniform model: P shadow edge %.4f°, PKP caustic %.4f°", edge/deg, caustic/deg)
	// The upper branch reaches its grazing end (p = c/vm) beyond 180°: those
	// rays arrive the long way round at 2π − Δ (MajorArc).
	dMax, _ := pkpUniform(R, c, vm, vc, c/vm)
	var wt worst
	defer func() { t.Logf("PKP closed form: largest relative time error %.2g (%s)", wt.v, wt.what) }()
	for _, dd := range []float64{-1e-4, 1e-4, 0.1, 2, 10} {
		dist := caustic + dd*deg
		a := arrivals(t, md, "PKP", dist, 0)
		wantMinor, wantMajor := 0, 0
		if dd > 0 {
			wantMinor = 2
		}
		if 2*math.Pi-dist <= dMax {
			wantMajor = 1
		}
		minor, major := 0, 0
		for _, x := range a {
			travelled := dist
			if x.MajorArc {
				major++
				travelled = 2*math.Pi - dist
			} else {
				minor++
			}
			d, T := pkpUniform(R, c, vm, vc, x.RayParam)
			wt.add(relErr(x.Time, T), fmt.Sprintf("%.4f° major %v", dist/deg, x.MajorArc))
			if math.Abs(d-travelled) > 1e-9 || relErr(x.Time, T) > 1e-9 || x.Angle != travelled {
				t.Errorf("PKP at %.4f° (major arc %v), p = %g: closed form Δ = %.12g (want %.12g), T = %.12g (code %.12g)",
					dist/deg, x.MajorArc, x.RayParam, d, travelled, T, x.Time)
			}
		}
		if minor != wantMinor || major != wantMajor {
			t.Errorf("PKP %g° from the caustic: %d minor-arc and %d major-arc arrivals, want %d and %d", dd, minor, major, wantMinor, wantMajor)
		}
	}
	// SKS exists (liquid core, solid uniform mantle); PKIKP does not (no inner core).
	if a := arrivals(t, md, "SKS", 100*deg, 0); len(a) == 0 {
		t.Error("no SKS at 100°")
	}
	if a := arrivals(t, md, "PKIKP", 170*deg, 0); len(a) != 0 {
		t.Errorf("PKIKP without inner core: %d arrivals", len(a))
	}
}
