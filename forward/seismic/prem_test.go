package seismic

import (
	"math"
	"testing"

	"plumb/internal/prem"
)

// Travel times of PREM (Dziewonski & Anderson 1981) for a surface source,
// against published values within 1 %. The reference times are from memory:
// the iasp91 tables (Kennett & Engdahl 1991, GJI 105, 429–465) and PREM-based
// tables agree with each other to about a second at these distances, far
// inside the 1 % bound: P(30°) ≈ 370 s, P(60°) ≈ 607 s, P(90°) ≈ 780 s,
// S(60°) ≈ 1102 s, S(90°) ≈ 1436 s, PcP(0°) ≈ 511 s, ScS(0°) ≈ 935 s,
// PKIKP(150°) ≈ 1186 s, PKIKP(180°) ≈ 1212 s. The first arrival is compared
// (P at 30° also has later upper-mantle triplication branches).
func TestPREMReference(t *testing.T) {
	md := premMedium(t)
	for _, c := range []struct {
		phase string
		dist  float64 // degrees
		want  float64 // s
	}{
		{"P", 30, 370}, {"P", 60, 607}, {"P", 90, 780},
		{"S", 60, 1102}, {"S", 90, 1436},
		{"PcP", 0, 511}, {"ScS", 0, 935},
		{"PKIKP", 150, 1186}, {"PKIKP", 180, 1212},
	} {
		a := arrivals(t, md, c.phase, c.dist*deg, 0)
		if len(a) == 0 {
			t.Errorf("%s at %g°: no arrival", c.phase, c.dist)
			continue
		}
		e := relErr(a[0].Time, c.want)
		t.Logf("PREM %-5s %5.1f°: %8.3f s (reference %g s, %+.3f %%)", c.phase, c.dist, a[0].Time, c.want, 100*(a[0].Time-c.want)/c.want)
		if e > 0.01 {
			t.Errorf("%s at %g°: %.3f s, reference %g s (%.2f %% off, bound 1 %%)", c.phase, c.dist, a[0].Time, c.want, 100*e)
		}
	}
}

// The P-wave core shadow of PREM begins near 98–100° (from memory; the
// grazing ray at the CMB). The last P distance is that of the ray with
// p = η just above the CMB (the smallest η in the mantle); the code must
// return P just before it and none just after. Likewise PKP-B, the caustic
// where the PKP branches AB and BC meet, is near 145° for PREM (from memory,
// 143–146°): two PKP arrivals just beyond it, none just before.
func TestPREMShadowAndCaustic(t *testing.T) {
	md := premMedium(t)
	sp, _ := mustPhase(t, "P").spec()
	r, _, ok := md.eval(sp, nil, md.pmMin)
	if !ok {
		t.Fatal("grazing P ray not evaluated")
	}
	edge := r.d
	t.Logf("PREM P shadow edge %.4f° (grazing ray, p = %.4f s/°)", edge/deg, md.pmMin*deg)
	if edge < 97*deg || edge > 101*deg {
		t.Errorf("P shadow edge at %.3f°, want 97–101°", edge/deg)
	}
	if a := arrivals(t, md, "P", edge-1e-4, 0); len(a) == 0 {
		t.Errorf("no P just before the shadow edge")
	}
	if a := arrivals(t, md, "P", edge+1e-4, 0); len(a) != 0 {
		t.Errorf("%d P arrivals just beyond the shadow edge", len(a))
	}
	// PKP caustic: the smallest table distance of PKP.
	tb := md.table(tabPKP)
	caustic := math.Inf(1)
	for _, d := range tb.d {
		caustic = math.Min(caustic, d)
	}
	t.Logf("PREM PKP-B caustic %.4f°", caustic/deg)
	if caustic < 143*deg || caustic > 146*deg {
		t.Errorf("PKP caustic at %.3f°, want 143–146°", caustic/deg)
	}
	if a := arrivals(t, md, "PKP", caustic-1e-4, 0); len(a) != 0 {
		t.Errorf("%d PKP arrivals just before the caustic", len(a))
	}
	if a := arrivals(t, md, "PKP", caustic+1e-4, 0); len(a) != 2 {
		t.Errorf("%d PKP arrivals just beyond the caustic, want 2 (AB and BC)", len(a))
	}
}

// dT/dΔ = p along every branch (the defining property of the ray parameter;
// Bullen & Bolt 1985 ch. 7): centred finite differences of the returned times
// at Δ ± h, matched to the branch by ray parameter, agree with RayParam to
// 1e-6 relative (PREM; surface and 100 km sources; several phases, with
// triplication and PKP branches and major-arc SKKS).
func TestSlownessIsDTDDelta(t *testing.T) {
	md := premMedium(t)
	const h = 2e-5 // rad
	worst := 0.0
	n := 0
	for _, depth := range []float64{0, 100 * km} {
		for _, c := range []struct {
			phase string
			dists []float64
		}{
			{"P", []float64{22, 30, 60, 95}}, {"S", []float64{25, 50, 80}},
			{"PP", []float64{60, 140}}, {"SS", []float64{100}},
			{"PcP", []float64{5, 40, 80}}, {"ScS", []float64{20, 70}}, {"ScP", []float64{45}}, {"PcS", []float64{45}},
			{"SKS", []float64{90, 120}}, {"SKKS", []float64{100, 150}},
			{"PKP", []float64{150, 170}}, {"PKIKP", []float64{130, 170}},
			{"pP", []float64{40, 80}}, {"sS", []float64{60}}, {"p", []float64{0.3}},
		} {
			if depth == 0 && (c.phase == "pP" || c.phase == "sS" || c.phase == "p") {
				continue // need a buried source
			}
			for _, dd := range c.dists {
				dist := dd * deg
				at := arrivals(t, md, c.phase, dist, depth)
				if len(at) == 0 {
					t.Errorf("%s at %g°, depth %g km: no arrival", c.phase, dd, depth/km)
				}
				lo := arrivals(t, md, c.phase, dist-h, depth)
				hi := arrivals(t, md, c.phase, dist+h, depth)
				for _, a := range at {
					al, okl := match(lo, a)
					ah, okh := match(hi, a)
					if !okl || !okh {
						continue // branch ends within h (a cusp): nothing to difference
					}
					fd := (ah.Time - al.Time) / (2 * h)
					want := a.RayParam
					if a.MajorArc {
						want = -want
					}
					e := relErr(fd, want)
					worst = math.Max(worst, e)
					n++
					if e > 1e-7 {
						t.Logf("%s at %g°, depth %g km, p = %.6f s/°: rel. error %.2g", c.phase, dd, depth/km, a.RayParam*deg, e)
					}
					if e > 1e-6 {
						t.Errorf("%s at %g°, depth %g km, p = %.6f s/°: dT/dΔ = %.9g, p = %.9g (rel. error %.2g)",
							c.phase, dd, depth/km, a.RayParam*deg, fd, want, e)
					}
				}
			}
		}
	}
	t.Logf("dT/dΔ vs p: %d branch points, worst relative difference %.2g", n, worst)
}

// match returns the arrival of as on the same branch as a: same arc, ray
// parameter within 1 % and the same sign of dΔ/dp.
func match(as []Arrival, a Arrival) (Arrival, bool) {
	best, ok := Arrival{}, false
	for _, b := range as {
		if b.MajorArc != a.MajorArc || (b.DAngleDP < 0) != (a.DAngleDP < 0) || relErr(b.RayParam, a.RayParam) > 0.01 {
			continue
		}
		if !ok || math.Abs(b.RayParam-a.RayParam) < math.Abs(best.RayParam-a.RayParam) {
			best, ok = b, true
		}
	}
	return best, ok
}

// Halving the shell thickness changes PREM's P, PcP and PKIKP times by less
// than 1 ms (the accuracy target of the shells; common practice, no source):
// with uniform 10 km → 5 km shells (NewMediumShells) and for the default
// discretisation against one with half the thickness and a quarter of the
// curvature tolerance (the misfit falls as the square of the thickness), and
// the default against uniform 1 km shells (the error of the default).
func TestConvergence(t *testing.T) {
	m := prem.MustLoadWithoutOcean(t)
	build := func(h, tol float64) *Medium {
		md, err := newMediumShells(m, 3480*km, 1221.5*km, h, tol)
		if err != nil {
			t.Fatal(err)
		}
		return md
	}
	cases := []struct {
		phase string
		dist  float64
	}{{"P", 30}, {"P", 60}, {"P", 90}, {"PcP", 0}, {"PcP", 50}, {"PKIKP", 130}, {"PKIKP", 180}, {"S", 60}, {"ScS", 30}}
	for _, pair := range []struct {
		name string
		a, b *Medium
	}{
		{"10 km → 5 km", build(10*km, math.Inf(1)), build(5*km, math.Inf(1))},
		{"default → half", build(DefaultMaxShell, curvTol), build(DefaultMaxShell/2, curvTol/4)},
		{"default → 1 km", build(DefaultMaxShell, curvTol), build(1*km, math.Inf(1))},
	} {
		worst := 0.0
		for _, c := range cases {
			a := arrivals(t, pair.a, c.phase, c.dist*deg, 0)
			b := arrivals(t, pair.b, c.phase, c.dist*deg, 0)
			if len(a) == 0 || len(b) == 0 {
				t.Fatalf("%s at %g°: no arrival", c.phase, c.dist)
			}
			d := math.Abs(a[0].Time - b[0].Time)
			worst = math.Max(worst, d)
			t.Logf("%s (%d → %d shells) %-5s %5.1f°: %.6f → %.6f s (Δ %.2g ms)", pair.name, pair.a.Shells(), pair.b.Shells(), c.phase, c.dist, a[0].Time, b[0].Time, 1e3*d)
			if d >= 1e-3 {
				t.Errorf("%s: %s at %g° changes by %.3g ms", pair.name, c.phase, c.dist, 1e3*d)
			}
		}
		t.Logf("%s: largest change %.3g ms", pair.name, 1e3*worst)
	}
}

// A lowermost mantle made liquid (PREM's bottom 150 km): S legs cannot cross
// it (convention of the package), so S rays that would turn in it, ScS, ScP
// and SKS have no arrival, while S turning above it and P phases are
// unchanged.
func TestLiquidLowermostMantle(t *testing.T) {
	m := prem.MustLoadWithoutOcean(t)
	m.Layers = append(m.Layers[:0:0], m.Layers...)
	var found bool
	for i := range m.Layers {
		if m.Layers[i].Name == "lowermost_mantle" {
			m.Layers[i].Fluid, found = true, true
		}
	}
	if !found {
		t.Fatal("no lowermost_mantle layer in PREM")
	}
	md, err := NewMedium(m, 3480*km, 1221.5*km)
	if err != nil {
		t.Fatal(err)
	}
	ref := premMedium(t)
	for _, c := range []struct {
		phase string
		dist  float64
		none  bool
	}{
		{"S", 60, false}, {"S", 98, true}, {"ScS", 0, true}, {"ScS", 50, true}, {"ScP", 40, true}, {"PcS", 40, true},
		{"SKS", 100, true}, {"SKKS", 120, true}, {"P", 60, false}, {"PcP", 40, false}, {"PKIKP", 150, false},
	} {
		got := arrivals(t, md, c.phase, c.dist*deg, 0)
		want := arrivals(t, ref, c.phase, c.dist*deg, 0)
		if len(want) == 0 {
			t.Fatalf("reference PREM has no %s at %g°", c.phase, c.dist)
		}
		switch {
		case c.none && len(got) != 0:
			t.Errorf("%s at %g° with a liquid lowermost mantle: %d arrivals, want none", c.phase, c.dist, len(got))
		case !c.none && (len(got) == 0 || math.Abs(got[0].Time-want[0].Time) > 1e-6 && c.phase == "S"):
			t.Errorf("%s at %g°: %+v, want an arrival like %+v", c.phase, c.dist, got, want[0])
		}
	}
	// SKS exists with PREM's liquid outer core; PKIKP needs an inner core.
	if a := arrivals(t, ref, "SKS", 100*deg, 0); len(a) == 0 {
		t.Error("no SKS at 100° in PREM")
	}
	noIC, err := NewMedium(prem.MustLoadWithoutOcean(t), 3480*km, 0)
	if err != nil {
		t.Fatal(err)
	}
	for _, dd := range []float64{120, 150, 180} {
		if a := arrivals(t, noIC, "PKIKP", dd*deg, 0); len(a) != 0 {
			t.Errorf("PKIKP at %g° without inner core: %d arrivals", dd, len(a))
		}
	}
	// Without an inner core PKP turns anywhere in the core, down to the
	// centre: it reaches 180°.
	if a := arrivals(t, noIC, "PKP", 180*deg, 0); len(a) == 0 {
		t.Error("no PKP at 180° without inner core")
	}
	// With the ocean, S from a surface source is impossible (fluid surface).
	ocean, err := NewMedium(prem.MustLoad(t), 3480*km, 1221.5*km)
	if err != nil {
		t.Fatal(err)
	}
	if a := arrivals(t, ocean, "S", 60*deg, 0); len(a) != 0 {
		t.Errorf("S through the ocean: %d arrivals", len(a))
	}
	if a := arrivals(t, ocean, "P", 60*deg, 0); len(a) == 0 {
		t.Error("no P with the ocean")
	}
}
