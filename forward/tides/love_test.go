package tides

import (
	"math"
	"strings"
	"testing"

	"plumb/forward"
	"plumb/internal/prem"
)

// homogeneous returns a uniform sphere of radius 6371 km.
func homogeneous(rho, vp, vs float64, fluid bool) forward.Model {
	return forward.Model{Layers: []forward.Layer{{
		Name: "all", Outer: 6371e3, Fluid: fluid,
		Density: forward.Const(rho), Vp: forward.Const(vp), Vs: forward.Const(vs),
	}}}
}

func solve(t testing.TB, m forward.Model) *forward.Structure {
	t.Helper()
	s, err := forward.Solve(m)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func love(t testing.TB, m forward.Model, n int) (k, h, l float64) {
	t.Helper()
	k, h, l, err := Love(solve(t, m), n)
	if err != nil {
		t.Fatal(err)
	}
	return k, h, l
}

func checkRel(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if rel := math.Abs(got-want) / math.Abs(want); !(rel <= tol) {
		t.Errorf("%s = %.10g, want %.10g (rel. error %.3g, tolerance %.3g)", what, got, want, rel, tol)
	}
}

// Homogeneous incompressible self-gravitating elastic sphere (Kelvin; Love
// 1911, Some Problems of Geodynamics, ch. VII; degree-n form as given e.g. by
// Munk & MacDonald 1960, The Rotation of the Earth; from memory):
//
//	k_n = 3/(2(n−1)) / (1 + μ̃),  h_n = (2n+1)/(2(n−1)) / (1 + μ̃),
//	l_n = 3/(2n(n−1)) / (1 + μ̃),  μ̃ = (2n² + 4n + 3) μ / (n ρ g R),
//
// which for n = 2 is k2 = (3/2)/(1 + 19μ/(2ρgR)), h2 = (5/2)/(…), l2 = (3/4)/(…).
// Incompressibility is approached with vp = 30000 km/s, so that both μ/λ and
// the gravitational compression ρgR/λ are below 10⁻⁶ (l of a nearly fluid
// sphere is the most sensitive to the remaining compressibility, ∝ 1/vp²).
func TestKelvinSphere(t *testing.T) {
	const rho = 5500.0
	cases := []struct {
		n  int
		vs float64 // m/s
	}{
		{2, 50}, {2, 500}, {2, 1000}, {2, 3000}, {2, 6000}, {2, 20000},
		{3, 3000}, {4, 3000}, {8, 3000},
	}
	for _, c := range cases {
		m := homogeneous(rho, 3e7, c.vs, false)
		s := solve(t, m)
		k, h, l, err := Love(s, c.n)
		if err != nil {
			t.Fatal(err)
		}
		n := float64(c.n)
		mu := rho * c.vs * c.vs
		z := 1 + (2*n*n+4*n+3)*mu/(n*rho*s.SurfaceGravity()*s.Radius())
		checkRel(t, "k", k, 3/(2*(n-1))/z, 1e-4)
		checkRel(t, "h", h, (2*n+1)/(2*(n-1))/z, 1e-4)
		checkRel(t, "l", l, 3/(2*n*(n-1))/z, 1e-4)
	}
}

// A homogeneous fluid sphere follows its equipotentials: k_n = 3/(2(n−1)),
// h_n = 1 + k_n, so k2 = 3/2 and h2 = 5/2 (the μ → 0 limit of Kelvin's
// solution; Love 1911, ch. VII, from memory).
func TestFluidSphere(t *testing.T) {
	for _, n := range []int{2, 3, 5} {
		fn := float64(n)
		k, h, l := love(t, homogeneous(4000, 5000, 0, true), n)
		checkRel(t, "fluid k", k, 3/(2*(fn-1)), 1e-7)
		checkRel(t, "fluid h", h, (2*fn+1)/(2*(fn-1)), 1e-7)
		if !math.IsNaN(l) {
			t.Errorf("fluid surface: l = %g, want NaN (undetermined)", l)
		}
	}
}

// earthLike is a five-layer model with linear profiles: solid inner core,
// fluid outer core, lower and upper mantle, crust (values rounded from PREM,
// Dziewonski & Anderson 1981, from memory). vsMantle scales the mantle shear
// velocities, with vp changed so that the bulk modulus at the layer ends stays
// the same; solidCore makes the outer core solid with vs = 3500 m/s.
func earthLike(vsMantle float64, solidCore bool) forward.Model {
	lin := forward.Linear
	f := vsMantle
	// vp² = K/ρ + (4/3) vs² at fixed K/ρ.
	vp := func(vp, vs float64) float64 { return math.Sqrt(vp*vp + 4.0/3*(f*f-1)*vs*vs) }
	return forward.Model{Layers: []forward.Layer{
		{Name: "inner core", Outer: 1221.5e3, Density: lin(0, 13088, 1221.5e3, 12764),
			Vp: lin(0, 11262, 1221.5e3, 11028), Vs: lin(0, 3668, 1221.5e3, 3504)},
		{Name: "outer core", Inner: 1221.5e3, Outer: 3480e3, Fluid: !solidCore,
			Density: lin(1221.5e3, 12166, 3480e3, 9903), Vp: lin(1221.5e3, 10356, 3480e3, 8065),
			Vs: forward.Const(3500)},
		{Name: "lower mantle", Inner: 3480e3, Outer: 5701e3, Density: lin(3480e3, 5566, 5701e3, 4381),
			Vp: lin(3480e3, vp(13717, 7265), 5701e3, vp(10751, 5945)), Vs: lin(3480e3, 7265*f, 5701e3, 5945*f)},
		{Name: "upper mantle", Inner: 5701e3, Outer: 6346.6e3, Density: lin(5701e3, 3992, 6346.6e3, 3381),
			Vp: lin(5701e3, vp(10266, 5570), 6346.6e3, vp(8110, 4490)), Vs: lin(5701e3, 5570*f, 6346.6e3, 4490*f)},
		{Name: "crust", Inner: 6346.6e3, Outer: 6371e3, Density: forward.Const(2800),
			Vp: forward.Const(6500), Vs: forward.Const(3700)},
	}}
}

// fluidCentre is earthLike without the inner core: the fluid core reaches the
// centre (or is solid with vs = 3500 m/s if solidCore).
func fluidCentre(solidCore bool) forward.Model {
	m := earthLike(1, solidCore)
	m.Layers = append([]forward.Layer(nil), m.Layers[1:]...)
	m.Layers[0].Inner = 0
	return m
}

// Physical ordering (physical expectation, common practice, no source): a
// fluid core yields more easily than a solid one, so it raises k2 and h2; a
// stiffer mantle lowers them.
func TestOrdering(t *testing.T) {
	pairs := []struct {
		name         string
		fluid, solid forward.Model
	}{
		{"fluid outer core", earthLike(1, false), earthLike(1, true)},
		{"fluid core at the centre", fluidCentre(false), fluidCentre(true)},
	}
	for _, p := range pairs {
		kF, hF, _ := love(t, p.fluid, 2)
		kS, hS, _ := love(t, p.solid, 2)
		if !(kF > kS) || !(hF > hS) {
			t.Errorf("%s: k2 = %.5f, h2 = %.5f; solid instead: k2 = %.5f, h2 = %.5f: want fluid > solid",
				p.name, kF, hF, kS, hS)
		}
	}
	kF, hF, _ := love(t, earthLike(1, false), 2)
	prev := math.Inf(1)
	for _, f := range []float64{0.5, 0.8, 1, 1.2, 1.5, 2} {
		k, _, _ := love(t, earthLike(f, false), 2)
		if !(k < prev) {
			t.Errorf("mantle vs × %g: k2 = %.6f, not below %.6f of the softer mantle", f, k, prev)
		}
		prev = k
	}
	// Both k2 and h2 of the Earth-like model lie between 0 (rigid) and the
	// fluid values 3/2, 5/2.
	if !(kF > 0 && kF < 1.5 && hF > 0 && hF < 2.5) {
		t.Errorf("k2 = %g, h2 = %g outside (0, 3/2) × (0, 5/2)", kF, hF)
	}
}

// Elastic degree-2 Love numbers of PREM (Dziewonski & Anderson 1981) without
// ocean, as quoted in the tidal literature: k2 ≈ 0.30, h2 ≈ 0.60–0.61,
// l2 ≈ 0.084 (from memory). Checked to within 1 % of k2 = 0.30, inside
// [0.60, 0.61] for h2 and within 2 % of 0.084 for l2.
func TestPREM(t *testing.T) {
	k, h, l := love(t, prem.MustLoadWithoutOcean(t), 2)
	t.Logf("PREM (no ocean): k2 = %.5f, h2 = %.5f, l2 = %.5f", k, h, l)
	checkRel(t, "PREM k2", k, 0.30, 0.01)
	if h < 0.60 || h > 0.61 {
		t.Errorf("PREM h2 = %.5f, want 0.60–0.61", h)
	}
	checkRel(t, "PREM l2", l, 0.084, 0.02)

	// With the global ocean as a static fluid the surface follows the
	// equipotential (h = 1 + k, Saito 1974) and the ocean's load raises k2.
	ko, ho, lo := love(t, prem.MustLoad(t), 2)
	if math.Abs(ho-(1+ko)) > 1e-12 || !math.IsNaN(lo) || !(ko > k) {
		t.Errorf("PREM with ocean: k2 = %.5f, h2 = %.5f, l2 = %g; want h2 = 1 + k2, l2 NaN, k2 > %.5f", ko, ho, lo, k)
	}
}

// namedModel is a test model with a label.
type namedModel struct {
	name string
	m    forward.Model
}

// numericsModels are the models on which the integration's accuracy is checked: a nearly
// incompressible uniform sphere, Earth-like layers, PREM with and without its ocean, and fluid
// or solid centres under a mantle.
func numericsModels(t testing.TB) []namedModel {
	return []namedModel{
		{"Kelvin", homogeneous(5500, 1.5e6, 5000, false)},
		{"Earth-like", earthLike(1, false)},
		{"PREM", prem.MustLoadWithoutOcean(t)},
		{"PREM with ocean", prem.MustLoad(t)},
		{"fluid centre", fluidCentre(false)},
		{"solid centre, fluid outer core", fluidCentre(true)},
	}
}

// Halving the tolerance changes k2 by less than 1e-7 (an accuracy target;
// common practice, no source).
func TestConvergence(t *testing.T) {
	for _, c := range numericsModels(t) {
		s := solve(t, c.m)
		for _, tol := range []float64{1e-6, DefaultTol, 1e-11} {
			k1, _, _, err1 := LoveTol(s, 2, tol)
			k2, _, _, err2 := LoveTol(s, 2, tol/2)
			if err1 != nil || err2 != nil {
				t.Fatal(err1, err2)
			}
			if d := math.Abs(k1 - k2); d >= 1e-7 {
				t.Errorf("%s: k2 = %.12f at tol %g, %.12f at tol %g (diff %.2g)", c.name, k1, tol, k2, tol/2, d)
			}
		}
	}
}

// TestDefaultTolAccuracy checks the claim behind DefaultTol: at the default
// tolerance k2, h2 and l2 agree with an integration at 1e-12 to 2e-7
// (absolute; the Love numbers are O(0.1–1)). Numerical self-consistency, no
// outside source: the outside checks are TestKelvinSphere and TestPREM.
func TestDefaultTolAccuracy(t *testing.T) {
	for _, c := range numericsModels(t) {
		s := solve(t, c.m)
		k, h, l, err := Love(s, 2)
		if err != nil {
			t.Fatal(err)
		}
		kr, hr, lr, err := LoveTol(s, 2, 1e-12)
		if err != nil {
			t.Fatal(err)
		}
		for _, q := range []struct {
			what      string
			got, want float64
		}{{"k2", k, kr}, {"h2", h, hr}, {"l2", l, lr}} {
			if math.IsNaN(q.want) && math.IsNaN(q.got) {
				continue // l of a fluid surface
			}
			if d := math.Abs(q.got - q.want); !(d <= 2e-7) {
				t.Errorf("%s: %s = %.12f at DefaultTol, %.12f at 1e-12 (diff %.2g)", c.name, q.what, q.got, q.want, d)
			}
		}
	}
}

// TestGravityCache checks the per-layer gravity polynomial of calc against
// forward.Structure.Gravity (the closed forms it re-arranges) inside every
// layer of PREM, of a self-consistent structure's quartic pieces and of the
// thin-layer tabulated model.
func TestGravityCache(t *testing.T) {
	pr := solve(t, earthLike(1, false)).Profile(200)
	tab, err := forward.FromTable(forward.Table{Radius: pr.Radius, Density: pr.Density, Vp: pr.Vp, Vs: pr.Vs})
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range []forward.Model{prem.MustLoad(t), earthLike(1, false), tab} {
		s := solve(t, m)
		c, err := newCalc(s, 2, DefaultTol)
		if err != nil {
			t.Fatal(err)
		}
		for i, l := range s.Model.Layers {
			c.enter(i, i)
			for _, f := range []float64{0, 0.3, 0.7, 1} {
				r := l.Inner + f*(l.Outer-l.Inner)
				if r == 0 {
					continue
				}
				want := s.Gravity(r) / c.g0
				if got := c.gravity(r / c.R); !(math.Abs(got-want) <= 1e-13*math.Abs(want)+1e-15) {
					t.Fatalf("layer %d (%q) r = %g m: g/g0 = %.16g, structure %.16g", i, l.Name, r, got, want)
				}
			}
		}
	}
}

// vanishingRigidity is a uniform sphere whose vs = 4000 ((r − 0.53R)/(0.47R))²
// m/s touches 0 at r = 0.53 R only, between the sample points of the
// up-front check.
func vanishingRigidity() forward.Model {
	m := homogeneous(5500, 8000, 4000, false)
	a := 4000 / (0.47 * 0.47)
	m.Layers[0].Vs = forward.Poly{C: []float64{a * 0.53 * 0.53, -2 * a * 0.53, a}, Scale: 6371e3}
	return m
}

func TestErrors(t *testing.T) {
	good := solve(t, homogeneous(5500, 8000, 4000, false))
	soft := homogeneous(5500, 8000, 4000, false)
	soft.Layers[0].Vs = forward.Linear(0, 4000, 6371e3, 0) // vs = 0 at the surface of a solid
	cases := []struct {
		name string
		s    *forward.Structure
		n    int
		tol  float64
		want string // substring of the error message
	}{
		{"nil structure", nil, 2, 1e-8, "no structure"},
		{"degree 1", good, 1, 1e-8, "got 1"},
		{"degree 0", good, 0, 1e-8, "got 0"},
		{"degree too high", good, 1000, 1e-8, "got 1000"},
		{"zero tolerance", good, 2, 0, "tolerance"},
		{"NaN tolerance", good, 2, math.NaN(), "tolerance"},
		{"loose tolerance", good, 2, 0.5, "tolerance"},
		{"solid with zero rigidity", solve(t, soft), 2, 1e-8, `layer 0 ("all") at r = 6.371e+06 m`},
		{"rigidity vanishing inside a layer", solve(t, vanishingRigidity()), 2, 1e-8, `layer 0 ("all")`},
		{"solid with zero bulk modulus", solve(t, homogeneous(5500, 4000, 4000, false)), 2, 1e-8, "vp² > 4vs²/3"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			k, h, l, err := LoveTol(c.s, c.n, c.tol)
			if err == nil {
				t.Fatalf("no error; k = %g, h = %g, l = %g", k, h, l)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q does not mention %q", err, c.want)
			}
			if !math.IsNaN(k) || !math.IsNaN(h) || !math.IsNaN(l) {
				t.Errorf("error %v returned with k = %g, h = %g, l = %g; want NaN", err, k, h, l)
			}
		})
	}
}

// BenchmarkLove computes k2, h2, l2 of the five-layer Earth-like model.
func BenchmarkLove(b *testing.B) {
	s := solve(b, earthLike(1, false))
	b.ReportAllocs()
	for b.Loop() {
		if _, _, _, err := Love(s, 2); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLovePREM computes k2, h2, l2 of PREM (13 layers, with ocean).
func BenchmarkLovePREM(b *testing.B) {
	s := solve(b, prem.MustLoad(b))
	b.ReportAllocs()
	for b.Loop() {
		if _, _, _, err := Love(s, 2); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkLove1000Nodes computes k2, h2, l2 of a 5-layer Earth-like model tabulated at ~1000
// nodes (its profile, 200 nodes per layer, re-read as a piecewise-linear table: ~1000 thin layers),
// the size of a typical tabulated input model.
func BenchmarkLove1000Nodes(b *testing.B) {
	pr := solve(b, earthLike(1, false)).Profile(200)
	m, err := forward.FromTable(forward.Table{Radius: pr.Radius, Density: pr.Density, Vp: pr.Vp, Vs: pr.Vs})
	if err != nil {
		b.Fatal(err)
	}
	s, err := forward.Solve(m)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportMetric(float64(len(pr.Radius)), "nodes")
	b.ReportAllocs()
	for b.Loop() {
		if _, _, _, err := Love(s, 2); err != nil {
			b.Fatal(err)
		}
	}
}

// TestJoinedLayers checks the integration across continuous layer boundaries
// in one segment against the restart at every boundary (perLayer) on a model
// tabulated at ~1000 nodes: both solve the same equations, so k2, h2, l2 must
// agree to the integration accuracy (common practice, no source).
func TestJoinedLayers(t *testing.T) {
	pr := solve(t, earthLike(1, false)).Profile(200)
	m, err := forward.FromTable(forward.Table{Radius: pr.Radius, Density: pr.Density, Vp: pr.Vp, Vs: pr.Vs})
	if err != nil {
		t.Fatal(err)
	}
	s := solve(t, m)
	var got [2][3]float64
	for p, per := range []bool{false, true} {
		c, err := newCalc(s, 2, 1e-10)
		if err != nil {
			t.Fatal(err)
		}
		c.perLayer = per
		k, h, l, err := c.run()
		if err != nil {
			t.Fatal(err)
		}
		got[p] = [3]float64{k, h, l}
	}
	for i, name := range []string{"k2", "h2", "l2"} {
		if d := math.Abs(got[0][i] - got[1][i]); !(d <= 1e-8) {
			t.Errorf("%s joined %.12f, per layer %.12f (diff %.2g)", name, got[0][i], got[1][i], d)
		}
	}
}
