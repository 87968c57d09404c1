package forward

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

func uniformLayer(name string, inner, outer, rho float64, fluid bool) Layer {
	vs := Const(3000)
	if fluid {
		vs = Const(0)
	}
	return Layer{Name: name, Inner: inner, Outer: outer, Density: Const(rho), Vp: Const(6000), Vs: vs, Fluid: fluid}
}

// Homogeneous self-gravitating sphere in hydrostatic equilibrium: M = 4/3 πρR³,
// I/(MR²) = 2/5, g(r) = 4/3 πGρr, P(r) = 2/3 πGρ²(R² − r²) (Turcotte &
// Schubert, Geodynamics, 2nd ed. 2002, §2.7 and §4.11 (pressure in a uniform
// sphere); the moment of inertia of a uniform sphere is the textbook 2/5 MR²).
// The same sphere split into several equal-density layers must give the same
// answers (layer bookkeeping; there the layer constant K cancels to ≈ 0, so the
// 1/r and ln r terms are tested by the two-layer and linear-mantle cases).
func TestHomogeneousSphere(t *testing.T) {
	cases := []struct {
		name   string
		rho, R float64
		splits []float64 // internal boundaries as fractions of R
	}{
		{"earth-size single layer", 5514, 6371e3, nil},
		{"moon-size single layer", 3344, 1737.4e3, nil},
		{"earth-size five layers", 5514, 6371e3, []float64{0.2, 0.5, 0.51, 0.999}},
		{"small body two layers", 2000, 250e3, []float64{0.7}},
	}
	const tol = 1e-12
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			edges := append([]float64{0}, c.splits...)
			var m Model
			for i, f := range edges {
				outer := c.R
				if i+1 < len(edges) {
					outer = edges[i+1] * c.R
				}
				m.Layers = append(m.Layers, uniformLayer("l", f*c.R, outer, c.rho, i%2 == 1))
			}
			s, err := Solve(m)
			if err != nil {
				t.Fatal(err)
			}
			M := 4.0 / 3 * math.Pi * c.rho * c.R * c.R * c.R
			checkRel(t, "mass", s.Mass, M, tol)
			checkRel(t, "I/(MR²)", s.MoIFactor(), 0.4, tol)
			checkRel(t, "inertia", s.Inertia, 0.4*M*c.R*c.R, tol)
			checkRel(t, "mean density", s.MeanDensity(), c.rho, tol)
			checkRel(t, "surface gravity", s.SurfaceGravity(), G*M/(c.R*c.R), tol)
			Pc := 2.0 / 3 * math.Pi * G * c.rho * c.rho * c.R * c.R
			checkRel(t, "central pressure", s.CentralPressure(), Pc, tol)
			for _, f := range []float64{0, 1e-6, 0.1, 0.2, 0.3, 0.5, 0.51, 0.75, 0.9, 0.99} {
				r := f * c.R
				checkRel(t, "g(r)", s.Gravity(r), 4.0/3*math.Pi*G*c.rho*r, tol)
				checkRel(t, "P(r)", s.Pressure(r), 2.0/3*math.Pi*G*c.rho*c.rho*(c.R*c.R-r*r), tol)
				checkRel(t, "m(r)", s.EnclosedMassAt(r), 4.0/3*math.Pi*c.rho*r*r*r, tol)
			}
			if p := s.Pressure(c.R); p != 0 {
				t.Errorf("surface pressure = %g, want 0", p)
			}
		})
	}
}

// Two uniform layers (core ρc to radius a, mantle ρm to R). Hand-derived closed
// forms from m(r) = 4/3 π[(ρc−ρm)a³ + ρm r³] in the mantle:
//
//	M   = 4/3 π [ρc a³ + ρm (R³ − a³)]
//	I   = 8/15 π [ρc a⁵ + ρm (R⁵ − a⁵)]
//	P_a = 4/3 πG ρm [(ρc − ρm) a³ (1/a − 1/R) + ρm (R² − a²)/2]
//	P_c = P_a + 2/3 πG ρc² a²
func TestTwoLayerUniform(t *testing.T) {
	cases := []struct{ a, R, rc, rm float64 }{
		{3480e3, 6371e3, 10900, 4400}, // Earth-like
		{1830e3, 2440e3, 7000, 3200},  // Mercury-like large core
		{500e3, 6000e3, 3000, 5000},   // denser mantle than core (unphysical but valid)
	}
	for _, c := range cases {
		m := Model{Layers: []Layer{
			uniformLayer("core", 0, c.a, c.rc, true),
			uniformLayer("mantle", c.a, c.R, c.rm, false),
		}}
		s, err := Solve(m)
		if err != nil {
			t.Fatal(err)
		}
		a, R := c.a, c.R
		M := 4.0 / 3 * math.Pi * (c.rc*a*a*a + c.rm*(R*R*R-a*a*a))
		I := 8.0 / 15 * math.Pi * (c.rc*math.Pow(a, 5) + c.rm*(math.Pow(R, 5)-math.Pow(a, 5)))
		Pa := 4.0 / 3 * math.Pi * G * c.rm * ((c.rc-c.rm)*a*a*a*(1/a-1/R) + c.rm*(R*R-a*a)/2)
		Pc := Pa + 2.0/3*math.Pi*G*c.rc*c.rc*a*a
		checkRel(t, "mass", s.Mass, M, 1e-12)
		checkRel(t, "inertia", s.Inertia, I, 1e-12)
		checkRel(t, "CMB pressure", s.BoundaryPressure[1], Pa, 1e-12)
		checkRel(t, "CMB pressure (pointwise)", s.Pressure(a), Pa, 1e-12)
		checkRel(t, "central pressure", s.CentralPressure(), Pc, 1e-12)
		checkRel(t, "enclosed mass at CMB", s.EnclosedMass[1], 4.0/3*math.Pi*c.rc*a*a*a, 1e-12)
	}
}

// Linear density ρ = A + B r in a full sphere. Hand-derived:
//
//	m(r) = 4π (A r³/3 + B r⁴/4)
//	M    = 4π (A R³/3 + B R⁴/4)
//	I    = 8π/3 (A R⁵/5 + B R⁶/6)
//	P_c  = ∫_0^R ρ G m/r² dr = 4πG (A² R²/6 + 7AB R³/36 + B² R⁴/16)
func TestLinearDensitySphere(t *testing.T) {
	cases := []struct{ R, rho0, rhoR float64 }{
		{6371e3, 13000, 3000},
		{3389.5e3, 7000, 2900},
		{1000e3, 2000, 4000}, // increasing outward
	}
	for _, c := range cases {
		R := c.R
		A, B := c.rho0, (c.rhoR-c.rho0)/R
		m := Model{Layers: []Layer{{
			Name: "all", Inner: 0, Outer: R,
			Density: Linear(0, c.rho0, R, c.rhoR), Vp: Const(8000), Vs: Const(4000),
		}}}
		s, err := Solve(m)
		if err != nil {
			t.Fatal(err)
		}
		M := 4 * math.Pi * (A*R*R*R/3 + B*R*R*R*R/4)
		I := 8 * math.Pi / 3 * (A*math.Pow(R, 5)/5 + B*math.Pow(R, 6)/6)
		Pc := 4 * math.Pi * G * (A*A*R*R/6 + 7*A*B*R*R*R/36 + B*B*R*R*R*R/16)
		checkRel(t, "mass", s.Mass, M, 1e-12)
		checkRel(t, "inertia", s.Inertia, I, 1e-12)
		checkRel(t, "central pressure", s.CentralPressure(), Pc, 1e-12)
	}
}

// Uniform core (ρc, radius a) under a mantle with linear density ρ = A + B r.
// This is the case with the ln r term. Hand-derived: in the mantle
// m(r)/(4π) = K + A r³/3 + B r⁴/4 with K = ρc a³/3 − A a³/3 − B a⁴/4, so
//
//	P_a/(4πG) = A K (1/a − 1/R) + B K ln(R/a) + A²(R² − a²)/6
//	          + 7AB (R³ − a³)/36 + B² (R⁴ − a⁴)/16
//	M   = 4π [ρc a³/3 + A (R³ − a³)/3 + B (R⁴ − a⁴)/4]
//	I   = 8π/3 [ρc a⁵/5 + A (R⁵ − a⁵)/5 + B (R⁶ − a⁶)/6]
func TestLinearMantleOverCore(t *testing.T) {
	a, R := 3480e3, 6371e3
	rc := 11000.0
	rhoA, rhoR := 5500.0, 3300.0
	B := (rhoR - rhoA) / (R - a)
	A := rhoA - B*a
	m := Model{Layers: []Layer{
		uniformLayer("core", 0, a, rc, true),
		{Name: "mantle", Inner: a, Outer: R, Density: Linear(a, rhoA, R, rhoR), Vp: Const(1e4), Vs: Const(5e3)},
	}}
	s, err := Solve(m)
	if err != nil {
		t.Fatal(err)
	}
	K := rc*a*a*a/3 - A*a*a*a/3 - B*a*a*a*a/4
	Pa := 4 * math.Pi * G * (A*K*(1/a-1/R) + B*K*math.Log(R/a) + A*A*(R*R-a*a)/6 +
		7*A*B*(R*R*R-a*a*a)/36 + B*B*(math.Pow(R, 4)-math.Pow(a, 4))/16)
	M := 4 * math.Pi * (rc*a*a*a/3 + A*(R*R*R-a*a*a)/3 + B*(math.Pow(R, 4)-math.Pow(a, 4))/4)
	I := 8 * math.Pi / 3 * (rc*math.Pow(a, 5)/5 + A*(math.Pow(R, 5)-math.Pow(a, 5))/5 + B*(math.Pow(R, 6)-math.Pow(a, 6))/6)
	// The reference formulas themselves lose a few digits to cancellation
	// (A and B are large and of opposite sign), hence 1e-11.
	checkRel(t, "CMB pressure", s.BoundaryPressure[1], Pa, 1e-11)
	checkRel(t, "mass", s.Mass, M, 1e-11)
	checkRel(t, "inertia", s.Inertia, I, 1e-11)
	checkRel(t, "central pressure", s.CentralPressure(), Pa+2.0/3*math.Pi*G*rc*rc*a*a, 1e-11)
}

// Independent check by numerical integration (Gauss–Legendre quadrature from
// gonum) of the defining integrals m(r) = ∫4πρr²dr, I = 8π/3∫ρr⁴dr and
// P(r) = ∫_r^R ρ G m/r² dr, on PREM (cubic densities in 13 layers) and on
// random models with densities of degree 4, 5 and 9.
func TestAgainstQuadrature(t *testing.T) {
	models := map[string]Model{"PREM": loadPREM(t)}
	rng := rand.New(rand.NewPCG(1, 2))
	// Degree 9 (10 coefficients) exceeds the stack buffers and exercises the
	// heap fallback.
	for k, deg := range []int{4, 5, 9} {
		models["random"+string(rune('A'+k))] = randomModel(rng, 4+k, deg)
	}
	for name, m := range models {
		t.Run(name, func(t *testing.T) {
			s, err := Solve(m)
			if err != nil {
				t.Fatal(err)
			}
			const n = 24 // nodes per layer: exact for the mass and inertia integrands
			massQ := func(r float64) float64 {
				sum := 0.0
				for _, l := range m.Layers {
					a, b := l.Inner, min(r, l.Outer)
					if b > a {
						sum += quad.Fixed(func(x float64) float64 { return 4 * math.Pi * l.Density.At(x) * x * x }, a, b, n, quad.Legendre{}, 0)
					}
				}
				return sum
			}
			inertQ := 0.0
			for _, l := range m.Layers {
				inertQ += quad.Fixed(func(x float64) float64 { return 8 * math.Pi / 3 * l.Density.At(x) * math.Pow(x, 4) }, l.Inner, l.Outer, n, quad.Legendre{}, 0)
			}
			checkRel(t, "mass", s.Mass, massQ(s.Radius()), 1e-12)
			checkRel(t, "inertia", s.Inertia, inertQ, 1e-12)
			R := s.Radius()
			for _, f := range []float64{0.05, 0.3, 0.5477, 0.8, 0.95} {
				r := f * R
				checkRel(t, "m(r)", s.EnclosedMassAt(r), massQ(r), 1e-12)
				// Pressure: outer quadrature of ρ G m_Q(r')/r'² with the quadrature mass.
				pQ := 0.0
				for _, l := range m.Layers {
					a, b := max(r, l.Inner), l.Outer
					if b > a {
						pQ += quad.Fixed(func(x float64) float64 { return l.Density.At(x) * G * massQ(x) / (x * x) }, a, b, 40, quad.Legendre{}, 0)
					}
				}
				checkRel(t, "P(r)", s.Pressure(r), pQ, 1e-10)
			}
		})
	}
}

// randomModel returns a valid model of nl layers with random positive
// polynomial densities of degree deg (positive coefficients in r/R with a
// dominant constant term) and random thicknesses.
func randomModel(rng *rand.Rand, nl, deg int) Model {
	R := 1e6 + 9e6*rng.Float64()
	cuts := make([]float64, nl+1)
	for i := 1; i < nl; i++ {
		cuts[i] = float64(i)/float64(nl) + (rng.Float64()-0.5)/float64(3*nl)
	}
	cuts[nl] = 1
	var m Model
	for i := range nl {
		c := make([]float64, deg+1)
		c[0] = 3000 + 9000*rng.Float64()
		for k := 1; k <= deg; k++ {
			c[k] = (rng.Float64() - 0.5) * 1500
		}
		m.Layers = append(m.Layers, Layer{
			Name: "rand", Inner: cuts[i] * R, Outer: cuts[i+1] * R,
			Density: Poly{C: c, Scale: R}, Vp: Const(7000), Vs: Const(3500),
		})
	}
	m.Layers[0].Inner = 0
	m.Layers[nl-1].Outer = R
	return m
}

func TestGravityPressureOutside(t *testing.T) {
	s, err := Solve(Model{Layers: []Layer{uniformLayer("x", 0, 1e6, 3000, false)}})
	if err != nil {
		t.Fatal(err)
	}
	checkRel(t, "g outside (GM/r²)", s.Gravity(2e6), G*s.Mass/4e12, 1e-15)
	if s.Pressure(2e6) != 0 || s.Pressure(-1) != s.CentralPressure() || s.Gravity(-1) != 0 ||
		s.EnclosedMassAt(-1) != 0 || s.EnclosedMassAt(5e6) != s.Mass {
		t.Error("out-of-range radii not handled as documented")
	}
	if !math.IsNaN(s.Pressure(math.NaN())) || !math.IsNaN(s.Gravity(math.NaN())) || !math.IsNaN(s.EnclosedMassAt(math.NaN())) {
		t.Error("NaN radius must give NaN")
	}
}

func TestLayerAt(t *testing.T) {
	s, err := Solve(Model{Layers: []Layer{
		uniformLayer("a", 0, 1, 1000, false),
		uniformLayer("b", 1, 2, 1000, false),
		uniformLayer("c", 2, 3, 1000, false),
	}})
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		r     float64
		above bool
		want  int
	}{
		{-1, true, 0}, {0, false, 0}, {0, true, 0}, {0.5, false, 0},
		{1, false, 0}, {1, true, 1}, {1.5, true, 1}, {2, false, 1}, {2, true, 2},
		{2.9, false, 2}, {3, true, 2}, {3, false, 2}, {4, false, 2},
	}
	for _, c := range cases {
		if got := s.LayerAt(c.r, c.above); got != c.want {
			t.Errorf("LayerAt(%g, %v) = %d, want %d", c.r, c.above, got, c.want)
		}
	}
}

// Profile nodes must equal the pointwise functions exactly, with each internal
// boundary listed twice (value below, then above).
func TestProfile(t *testing.T) {
	m := loadPREM(t)
	s, err := Solve(m)
	if err != nil {
		t.Fatal(err)
	}
	const n = 7
	p := s.Profile(n)
	L := len(m.Layers)
	if len(p.Radius) != n*L {
		t.Fatalf("len = %d, want %d", len(p.Radius), n*L)
	}
	for i, l := range m.Layers {
		for k := range n {
			j := i*n + k
			r := p.Radius[j]
			wantR := l.Inner + (l.Outer-l.Inner)*float64(k)/float64(n-1)
			if k == 0 {
				wantR = l.Inner
			} else if k == n-1 {
				wantR = l.Outer
			}
			if r != wantR {
				t.Fatalf("node %d radius %g, want %g", j, r, wantR)
			}
			wantVs := l.Vs.At(r)
			if l.Fluid {
				wantVs = 0
			}
			if p.Density[j] != l.Density.At(r) || p.Vp[j] != l.Vp.At(r) || p.Vs[j] != wantVs {
				t.Errorf("node %d (layer %s, r=%g): material values differ from the layer polynomials", j, l.Name, r)
			}
			if p.Gravity[j] != s.Gravity(r) {
				t.Errorf("node %d: g %.17g != Gravity(r) %.17g", j, p.Gravity[j], s.Gravity(r))
			}
			if p.Pressure[j] != s.Pressure(r) {
				t.Errorf("node %d: P %.17g != Pressure(r) %.17g", j, p.Pressure[j], s.Pressure(r))
			}
		}
		if i > 0 {
			below, above := i*n-1, i*n
			if p.Radius[below] != p.Radius[above] || p.Radius[above] != s.Boundary[i] {
				t.Errorf("boundary %d not duplicated: %g, %g", i, p.Radius[below], p.Radius[above])
			}
			if p.Density[below] != m.Layers[i-1].Density.At(s.Boundary[i]) || p.Density[above] != l.Density.At(s.Boundary[i]) {
				t.Errorf("boundary %d: density order is not below-then-above", i)
			}
			if p.Pressure[below] != s.BoundaryPressure[i] || p.Pressure[above] != s.BoundaryPressure[i] {
				t.Errorf("boundary %d: pressure not continuous and equal to BoundaryPressure", i)
			}
		}
	}
	if p2 := s.Profile(1); len(p2.Radius) != 2*L {
		t.Errorf("Profile(1) has %d nodes, want %d (n clamped to 2)", len(p2.Radius), 2*L)
	}
}

// ProfileAt on a fixed grid, against the closed forms of two uniform layers (core ρc to a,
// mantle ρm to R; derived as in TestTwoLayerUniform): g = 4/3 πGρc r in the core,
// g = 4/3 πG[(ρc−ρm)a³ + ρm r³]/r² in the mantle; P(r) = P_a + 2/3 πGρc²(a² − r²) in the core,
// P(r) = 4/3 πGρm[(ρc−ρm)a³(1/r − 1/R) + ρm(R² − r²)/2] in the mantle. A grid node on the
// boundary takes the layer below (the core).
func TestProfileAtTwoLayer(t *testing.T) {
	const a, R, rc, rm = 1500e3, 4000e3, 7500.0, 3300.0
	m := Model{Layers: []Layer{
		uniformLayer("core", 0, a, rc, true),
		uniformLayer("mantle", a, R, rm, false),
	}}
	s, err := Solve(m)
	if err != nil {
		t.Fatal(err)
	}
	grid := RadiusGrid(R, 100e3)
	if len(grid) != 41 || grid[0] != 0 || grid[15] != a || grid[40] != R {
		t.Fatalf("grid: %d nodes, [0]=%g [15]=%g last=%g", len(grid), grid[0], grid[15], grid[len(grid)-1])
	}
	p := s.ProfileAt(grid)
	Pa := 4.0 / 3 * math.Pi * G * rm * ((rc-rm)*a*a*a*(1/a-1/R) + rm*(R*R-a*a)/2)
	for k, r := range grid {
		var rho, vs, g, P float64
		if r <= a {
			rho, vs = rc, 0
			g = 4.0 / 3 * math.Pi * G * rc * r
			P = Pa + 2.0/3*math.Pi*G*rc*rc*(a*a-r*r)
		} else {
			rho, vs = rm, 3000
			g = 4.0 / 3 * math.Pi * G * ((rc-rm)*a*a*a + rm*r*r*r) / (r * r)
			P = 4.0 / 3 * math.Pi * G * rm * ((rc-rm)*a*a*a*(1/r-1/R) + rm*(R*R-r*r)/2)
		}
		if p.Radius[k] != r || p.Density[k] != rho || p.Vs[k] != vs || p.Vp[k] != 6000 {
			t.Errorf("node %d (r=%g): ρ %g vs %g (want %g, %g)", k, r, p.Density[k], p.Vs[k], rho, vs)
		}
		if math.Abs(p.Gravity[k]-g) > 1e-12*max(g, 1) {
			t.Errorf("node %d: g %.15g, want %.15g", k, p.Gravity[k], g)
		}
		if math.Abs(p.Pressure[k]-P) > 1e-12*Pa {
			t.Errorf("node %d: P %.15g, want %.15g", k, p.Pressure[k], P)
		}
	}
}

func TestRadiusGrid(t *testing.T) {
	cases := []struct {
		radius, step float64
		n            int
		last         float64
	}{
		{100, 10, 11, 100},
		{105, 10, 12, 105},
		{100, 30, 5, 100},
		{100, 200, 2, 100},
		{100, 0, 0, 0},
		{0, 10, 0, 0},
		{100, math.NaN(), 0, 0},
	}
	for _, c := range cases {
		g := RadiusGrid(c.radius, c.step)
		if len(g) != c.n || (c.n > 0 && g[len(g)-1] != c.last) {
			t.Errorf("RadiusGrid(%g, %g) = %v", c.radius, c.step, g)
		}
		for k := 1; k < len(g); k++ {
			if !(g[k] > g[k-1]) {
				t.Errorf("RadiusGrid(%g, %g) not increasing: %v", c.radius, c.step, g)
			}
		}
	}
}
