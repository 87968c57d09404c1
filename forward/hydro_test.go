package forward

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"plumb/forward/eos"
)

// offsetPolytrope is a test-only EOS, P = κ(ρ² − ρ0²): the n = 1 polytrope
// P = κρ² shifted by a constant so that P(ρ0) = 0. K = ρ dP/dρ = 2κρ², so
// K0 = 2κρ0². Shear: a Poisson solid, μ = 3K/5 (ν = 1/4).
type offsetPolytrope struct{ rho0, kappa float64 }

func (e offsetPolytrope) Pressure(rho float64) float64 {
	return e.kappa * (rho*rho - e.rho0*e.rho0)
}
func (e offsetPolytrope) BulkModulus(rho float64) float64  { return 2 * e.kappa * rho * rho }
func (e offsetPolytrope) ShearModulus(rho float64) float64 { return 0.6 * e.BulkModulus(rho) }
func (e offsetPolytrope) ReferenceDensity() float64        { return e.rho0 }
func (e offsetPolytrope) Density(p float64) (float64, error) {
	if !(p >= 0) || math.IsInf(p, 1) {
		return 0, fmt.Errorf("test polytrope: pressure %g Pa: %w", p, eos.ErrPressure)
	}
	return math.Sqrt(e.rho0*e.rho0 + p/e.kappa), nil
}

// linearEOS is a test-only EOS, P = K0(ρ/ρ0 − 1), so K = K0 ρ/ρ0. No shear.
type linearEOS struct{ rho0, k0 float64 }

func (e linearEOS) Pressure(rho float64) float64       { return e.k0 * (rho/e.rho0 - 1) }
func (e linearEOS) BulkModulus(rho float64) float64    { return e.k0 * rho / e.rho0 }
func (e linearEOS) ShearModulus(float64) float64       { return 0 }
func (e linearEOS) ReferenceDensity() float64          { return e.rho0 }
func (e linearEOS) Density(p float64) (float64, error) { return e.rho0 * (1 + p/e.k0), nil }

// nanEOS is a broken test-only EOS whose Density returns NaN without an error.
type nanEOS struct{ linearEOS }

func (nanEOS) Density(float64) (float64, error) { return math.NaN(), nil }

// polyDeriv returns dp/dr (per m) at r.
func polyDeriv(p Poly, r float64) float64 {
	u := r / p.Scale
	v := 0.0
	for k := len(p.C) - 1; k >= 1; k-- {
		v = v*u + float64(k)*p.C[k]
	}
	return v / p.Scale
}

// densityAt returns the solved density at r, from the layer below r at an
// internal boundary unless above.
func densityAt(s *Structure, r float64, above bool) float64 {
	return s.Model.Layers[s.LayerAt(r, above)].Density.At(r)
}

// must fails the test on a constructor error.
func must(t testing.TB, err error) {
	t.Helper()
	if err != nil {
		t.Fatal(err)
	}
}

// earthLike is a four-layer Earth with PREM's radii (Dziewonski & Anderson
// 1981, PEPI 25, 297: 1221.5, 3480, 5701 and 6371 km, from memory) and
// literature EOS parameters, all quoted from memory:
//
//   - inner core: hcp iron, Vinet, V0 = 22.428 Å³ per two-atom cell
//     (ρ0 = 8269 kg/m³), K0 = 163.4 GPa, K0′ = 5.38 (Dewaele et al. 2006,
//     Phys. Rev. Lett. 97, 215504). No shear law (vs = 0; not checked).
//   - outer core: liquid iron, BM3, ρ0 = 7019 kg/m³, K0 = 109.7 GPa,
//     K0′ = 4.66 (Anderson & Ahrens 1994, J. Geophys. Res. 99, 4273).
//   - lower mantle: MgSiO3 bridgmanite, BM3, V0 = 24.45 cm³/mol with
//     M = 100.39 g/mol (ρ0 = 4106 kg/m³), K0 = 251 GPa, K0′ = 4.1, shear
//     modulus 173 GPa, μ0′ = 1.7 (Stixrude & Lithgow-Bertelloni 2011, Geophys.
//     J. Int. 184, 1180, their table of parameters).
//   - upper mantle and crust: forsterite, BM3, V0 = 43.60 cm³/mol with
//     M = 140.69 g/mol (ρ0 = 3227 kg/m³), K0 = 128 GPa, K0′ = 4.2, shear
//     modulus 82 GPa, μ0′ = 1.5 (same source).
//
// Both core reference densities are multiplied by coreFactor: Earth's core is
// about 10 % less dense than iron at its pressure (Birch 1952, J. Geophys.
// Res. 57, 227; from memory), so coreFactor 0.9 gives a core alloy and 1 pure
// iron.
func earthLike(t testing.TB, coreFactor float64) EOSModel {
	lmShear, err1 := eos.NewFiniteStrainShear(173e9, 1.7)
	umShear, err2 := eos.NewFiniteStrainShear(82e9, 1.5)
	ic, err3 := eos.NewVinet(coreFactor*8269, 163.4e9, 5.38, eos.ShearLaw{})
	oc, err4 := eos.NewBM3(coreFactor*7019, 109.7e9, 4.66, eos.Fluid())
	lm, err5 := eos.NewBM3(4106, 251e9, 4.1, lmShear)
	um, err6 := eos.NewBM3(3227, 128e9, 4.2, umShear)
	must(t, errors.Join(err1, err2, err3, err4, err5, err6))
	return EOSModel{Layers: []EOSLayer{
		{Name: "inner core", Inner: 0, Outer: 1221.5e3, EOS: ic},
		{Name: "outer core", Inner: 1221.5e3, Outer: 3480e3, EOS: oc, Fluid: true, Viscosity: 0.01},
		{Name: "lower mantle", Inner: 3480e3, Outer: 5701e3, EOS: lm},
		{Name: "upper mantle", Inner: 5701e3, Outer: 6371e3, EOS: um},
	}}
}

// polytropeModel is a sphere of radius R of the offset polytrope with
// k R = kR, split at the given fractions of R; layers alternate solid and
// fluid.
func polytropeModel(R, rho0, kR float64, splits []float64) (EOSModel, offsetPolytrope) {
	k := kR / R
	e := offsetPolytrope{rho0: rho0, kappa: 2 * math.Pi * G / (k * k)}
	edges := append(append([]float64{0}, splits...), 1)
	var m EOSModel
	for i := 0; i+1 < len(edges); i++ {
		outer := edges[i+1] * R
		if i+2 == len(edges) {
			outer = R
		}
		m.Layers = append(m.Layers, EOSLayer{Name: fmt.Sprintf("l%d", i), Inner: edges[i] * R, Outer: outer, EOS: e, Fluid: i%2 == 1})
	}
	return m, e
}

// Self-compressed sphere of the offset polytrope P = κ(ρ² − ρ0²). Derivation:
// hydrostatic equilibrium dP/dr = −ρ G m/r² with dP/dr = 2κρ dρ/dr gives
// r² dρ/dr = −(G/2κ) m; differentiating with dm/dr = 4πr²ρ,
//
//	(1/r²) d/dr (r² dρ/dr) + k² ρ = 0,  k² = 2πG/κ,
//
// a linear equation whose solution regular at the centre is
// ρ = ρc sin(kr)/(kr): the Lane–Emden solution of index 1, θ = sin ξ/ξ
// (Chandrasekhar 1939, An Introduction to the Study of Stellar Structure,
// ch. IV; from memory). P(R) = 0 means ρ(R) = ρ0, so ρc = ρ0 kR/sin(kR)
// (kR < π). Then P_c = κ(ρc² − ρ0²), P(r) = κ(ρ(r)² − ρ0²) and
//
//	M = 4π ρc (sin kR − kR cos kR)/k³,
//	I = (8π/3)(ρc/k) [−R³cos kR/k + 3R² sin kR/k² + 6R cos kR/k³ − 6 sin kR/k⁴].
//
// The same sphere split into layers of the same material (one very thin, some
// flagged fluid, which changes only vs) must give the same answer.
func TestHydrostaticPolytrope(t *testing.T) {
	// ρc/ρ0 = kR/sin(kR): 1.19 for kR = 1, 2.2 for kR = 2, 21 for kR = 3.
	cases := []struct {
		name    string
		R, rho0 float64
		kR      float64
		splits  []float64
		nodes   int // 0: default
	}{
		{"mild compression, one layer", 6371e3, 4000, 1, nil, 0},
		{"mild compression, three layers", 6371e3, 4000, 1, []float64{0.2, 0.9}, 0},
		{"strong compression, one layer", 6371e3, 4000, 2, nil, 17},
		{"strong compression, four layers", 6371e3, 4000, 2, []float64{0.3, 0.55, 0.9995}, 17},
		{"near the limit kR → π", 3000e3, 3000, 3, []float64{0.5}, 33},
	}
	const tol = 1e-6
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m, e := polytropeModel(c.R, c.rho0, c.kR, c.splits)
			s, iters, err := SolveHydrostatic(m, SolveOptions{NodesPerLayer: c.nodes})
			if err != nil {
				t.Fatalf("after %d iterations: %v", iters, err)
			}
			R := c.R
			k := c.kR / R
			rhoC := c.rho0 * c.kR / math.Sin(c.kR)
			rho := func(r float64) float64 {
				if r == 0 {
					return rhoC
				}
				return rhoC * math.Sin(k*r) / (k * r)
			}
			sn, cs := math.Sin(c.kR), math.Cos(c.kR)
			M := 4 * math.Pi * rhoC * (sn - c.kR*cs) / (k * k * k)
			I := 8 * math.Pi / 3 * rhoC / k * (-R*R*R*cs/k + 3*R*R*sn/(k*k) + 6*R*cs/(k*k*k) - 6*sn/(k*k*k*k))
			Pc := e.kappa * (rhoC*rhoC - c.rho0*c.rho0)
			checkRel(t, "central pressure", s.CentralPressure(), Pc, tol)
			checkRel(t, "mass", s.Mass, M, tol)
			checkRel(t, "inertia", s.Inertia, I, tol)
			for i := 0; i <= 400; i++ {
				r := R * float64(i) / 400
				checkRel(t, fmt.Sprintf("ρ(%g m)", r), densityAt(s, r, false), rho(r), tol)
				checkRel(t, fmt.Sprintf("P(%g m)", r), s.Pressure(r)+e.kappa*c.rho0*c.rho0, e.kappa*rho(r)*rho(r), tol)
			}
			if t.Failed() {
				t.Logf("%d iterations", iters)
			}
		})
	}
}

// Thin layers: the offset-polytrope sphere of TestHydrostaticPolytrope with a
// surface layer of thickness 1e-1 … 1e-5 R (an ocean of 64 m on an
// Earth-sized planet at the thin end) must still match the analytic ρ(r) in
// that layer. Without lowering the piece degree in thin layers the iteration
// blows up there (see maxGrowth).
func TestHydrostaticThinLayers(t *testing.T) {
	const R, rho0, kR = 6371e3, 4000.0, 2.0
	k := kR / R
	rhoC := rho0 * kR / math.Sin(kR)
	for _, n := range []int{DefaultNodesPerLayer, 4*DefaultNodesPerLayer - 3} {
		for _, th := range []float64{1e-1, 1e-2, 1e-3, 1e-4, 1e-5} {
			t.Run(fmt.Sprintf("n=%d thickness=%g", n, th), func(t *testing.T) {
				m, _ := polytropeModel(R, rho0, kR, []float64{0.5, 1 - th})
				s, _, err := SolveHydrostatic(m, SolveOptions{NodesPerLayer: n})
				if err != nil {
					t.Fatal(err)
				}
				for i := 0; i <= 200; i++ {
					r := R * (1 - th*float64(i)/200)
					checkRel(t, fmt.Sprintf("ρ(%.9g m)", r), densityAt(s, r, false), rhoC*math.Sin(k*r)/(k*r), 1e-8)
				}
			})
		}
	}
}

// The incompressible limit: with K0 = 1e24 Pa the density changes by
// P/K0 < 1e-12, so the structure must be that of uniform layers. Two uniform
// layers (core ρc to radius a, mantle ρm to R), hand-derived from
// m(r) = 4/3 π[(ρc−ρm)a³ + ρm r³] in the mantle:
//
//	M   = 4/3 π [ρc a³ + ρm (R³ − a³)]
//	I   = 8/15 π [ρc a⁵ + ρm (R⁵ − a⁵)]
//	P_a = 4/3 πG ρm [(ρc − ρm) a³ (1/a − 1/R) + ρm (R² − a²)/2]
//	P_c = P_a + 2/3 πG ρc² a²
//
// and four layers against the closed-form Solve of constant densities.
func TestHydrostaticIncompressible(t *testing.T) {
	const K0 = 1e24
	a, R, rc, rm := 3480e3, 6371e3, 10900.0, 4400.0
	two := EOSModel{Layers: []EOSLayer{
		{Name: "core", Inner: 0, Outer: a, EOS: linearEOS{rc, K0}, Fluid: true},
		{Name: "mantle", Inner: a, Outer: R, EOS: linearEOS{rm, K0}, Fluid: true},
	}}
	s, _, err := SolveHydrostatic(two, SolveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	M := 4.0 / 3 * math.Pi * (rc*a*a*a + rm*(R*R*R-a*a*a))
	I := 8.0 / 15 * math.Pi * (rc*math.Pow(a, 5) + rm*(math.Pow(R, 5)-math.Pow(a, 5)))
	Pa := 4.0 / 3 * math.Pi * G * rm * ((rc-rm)*a*a*a*(1/a-1/R) + rm*(R*R-a*a)/2)
	Pc := Pa + 2.0/3*math.Pi*G*rc*rc*a*a
	checkRel(t, "mass", s.Mass, M, 1e-9)
	checkRel(t, "inertia", s.Inertia, I, 1e-9)
	checkRel(t, "CMB pressure", s.Pressure(a), Pa, 1e-9)
	checkRel(t, "central pressure", s.CentralPressure(), Pc, 1e-9)

	rhos := []float64{13000, 11000, 5000, 3300}
	radii := []float64{0, 1.2e6, 3.5e6, 6.3e6, 6.4e6}
	var em EOSModel
	var cm Model
	for i, rho := range rhos {
		em.Layers = append(em.Layers, EOSLayer{Name: "x", Inner: radii[i], Outer: radii[i+1], EOS: linearEOS{rho, K0}, Fluid: true})
		cm.Layers = append(cm.Layers, Layer{Name: "x", Inner: radii[i], Outer: radii[i+1], Density: Const(rho), Vp: Const(1), Fluid: true})
	}
	s4, _, err := SolveHydrostatic(em, SolveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	ref, err := Solve(cm)
	if err != nil {
		t.Fatal(err)
	}
	checkRel(t, "4-layer mass", s4.Mass, ref.Mass, 1e-9)
	checkRel(t, "4-layer I/(MR²)", s4.MoIFactor(), ref.MoIFactor(), 1e-9)
	checkRel(t, "4-layer central pressure", s4.CentralPressure(), ref.CentralPressure(), 1e-9)
	for _, r := range []float64{0.6e6, 1.2e6, 2e6, 3.5e6, 5e6, 6.35e6} {
		checkRel(t, fmt.Sprintf("4-layer P(%g m)", r), s4.Pressure(r), ref.Pressure(r), 1e-9)
	}
}

// Adams–Williamson equation (Williamson & Adams 1923, J. Washington Acad.
// Sci. 13, 413; from memory): in a chemically uniform layer in hydrostatic
// equilibrium dP/dr = −ρg and dP = (K/ρ) dρ give dρ/dr = −ρ² g / K, K the
// EOS's ρ dP/dρ. Checked at the interior nodes of every layer of the
// Earth-like model (BM3 and Vinet) and of a planet made of one BM3 material,
// solved on 65 nodes per layer, with dρ/dr from the fourth-order central
// difference (−ρ₊₂ + 8ρ₊₁ − 8ρ₋₁ + ρ₋₂)/(12h) of the nodal densities.
func TestHydrostaticAdamsWilliamson(t *testing.T) {
	pv, err := eos.NewBM3(4106, 251e9, 4.1, eos.ShearLaw{})
	must(t, err)
	single := EOSModel{Layers: []EOSLayer{{Name: "all", Inner: 0, Outer: 5000e3, EOS: pv}}}
	const n = 65
	for name, m := range map[string]EOSModel{"earth-like": earthLike(t, 0.9), "single BM3": single} {
		t.Run(name, func(t *testing.T) {
			s, _, err := SolveHydrostatic(m, SolveOptions{NodesPerLayer: n})
			if err != nil {
				t.Fatal(err)
			}
			worst := 0.0
			for _, l := range m.Layers {
				h := (l.Outer - l.Inner) / (n - 1)
				rho := func(t int) float64 {
					r := l.Inner + h*float64(t)
					return densityAt(s, r, t == 0)
				}
				for k := 2; k <= n-3; k++ {
					r := l.Inner + h*float64(k)
					got := (-rho(k+2) + 8*rho(k+1) - 8*rho(k-1) + rho(k-2)) / (12 * h)
					rk := rho(k)
					want := -rk * rk * s.Gravity(r) / l.EOS.BulkModulus(rk)
					rel := math.Abs(got-want) / math.Abs(want)
					worst = max(worst, rel)
					if rel > 1e-4 {
						t.Errorf("%s, r = %g m: dρ/dr = %.8g, −ρ²g/K = %.8g (rel. error %.2g)", l.Name, r, got, want, rel)
					}
				}
			}
			t.Logf("worst relative deviation %.2g", worst)
		})
	}
}

// Grid convergence: the moment of inertia factor changes by less than 1e-7
// when the number of pieces per layer doubles from the default (an accuracy
// target; common practice, no source); the self-consistency at return is
// checked at every node, |P_EOS(ρ(r_node)) − P(r_node)|/P_c < Tol (1e-9),
// with P the returned structure's hydrostatic pressure.
func TestHydrostaticGridConvergence(t *testing.T) {
	m := earthLike(t, 0.9)
	eosOf := map[string]eos.EOS{}
	for _, l := range m.Layers {
		eosOf[l.Name] = l.EOS
	}
	var prev *Structure
	for _, n := range []int{DefaultNodesPerLayer, 2*DefaultNodesPerLayer - 1, 4*DefaultNodesPerLayer - 3} {
		s, iters, err := SolveHydrostatic(m, SolveOptions{NodesPerLayer: n})
		if err != nil {
			t.Fatal(err)
		}
		pc := s.CentralPressure()
		worst := 0.0
		for i, pl := range s.Model.Layers {
			deg := len(pl.Density.C) - 1 // the nodes split the piece evenly
			for k := range deg + 1 {
				r := pl.Inner + (pl.Outer-pl.Inner)*float64(k)/float64(deg)
				if k == deg {
					r = pl.Outer
				}
				if i == 0 && k == 0 {
					r = 0
				}
				dev := math.Abs(eosOf[pl.Name].Pressure(pl.Density.At(r))-s.Pressure(r)) / pc
				worst = max(worst, dev)
			}
		}
		if worst >= DefaultTol {
			t.Errorf("n = %d: max |P_EOS − P|/P_c at the nodes = %.3g, want < %g", n, worst, DefaultTol)
		}
		if prev != nil {
			d := math.Abs(s.MoIFactor() - prev.MoIFactor())
			t.Logf("n = %d: %d iterations, I/(MR²) = %.12f, change %.2g, mass change %.2g, node residual %.2g",
				n, iters, s.MoIFactor(), d, s.Mass/prev.Mass-1, worst)
			if d >= 1e-7 {
				t.Errorf("n = %d: I/(MR²) changed by %.3g on doubling the pieces, want < 1e-7", n, d)
			}
		}
		prev = s
	}
}

// Super-Earths: the Earth-like model with all radii scaled by 1.5 and 2
// (≈ 4 and 14 Earth masses, central pressures 1.6 and 5.9 TPa). The iteration
// must converge without stalling at a rounding floor (see maxGrowth), and the
// moment of inertia factor must change by < 1e-7 between 33 and 65 nodes per
// layer. The masses must follow the mass–radius relation of Earth-like
// super-Earths, R/R⊕ ≈ (M/M⊕)^0.27 (Valencia, O'Connell & Sasselov 2006,
// Icarus 181, 545; exponent from memory), to 10 %.
func TestHydrostaticSuperEarth(t *testing.T) {
	const earthMass = 5.972e24 // kg, from memory
	for _, f := range []float64{1.5, 2} {
		t.Run(fmt.Sprintf("R=%gR_E", f), func(t *testing.T) {
			m := earthLike(t, 0.9)
			for i := range m.Layers {
				m.Layers[i].Inner *= f
				m.Layers[i].Outer *= f
			}
			var prev *Structure
			for _, n := range []int{DefaultNodesPerLayer, 17, 33, 65} {
				s, iters, err := SolveHydrostatic(m, SolveOptions{NodesPerLayer: n})
				if err != nil {
					t.Fatalf("n = %d: %v", n, err)
				}
				if iters > 20 {
					t.Errorf("n = %d: %d iterations", n, iters)
				}
				if n == 65 {
					d := math.Abs(s.MoIFactor() - prev.MoIFactor())
					t.Logf("M = %.3f M_E, I/(MR²) = %.6f, change 33 → 65 nodes %.2g", s.Mass/earthMass, s.MoIFactor(), d)
					if d >= 1e-7 {
						t.Errorf("I/(MR²) changed by %.3g from 33 to 65 nodes", d)
					}
					checkRel(t, "mass (kg)", s.Mass, earthMass*math.Pow(f, 1/0.27), 0.1)
				}
				prev = s
			}
		})
	}
}

// PREM-like Earth from EOS layers: mass within 2 % of Earth's 5.972e24 kg
// (from memory) and I/(MR²) within 1 % of PREM's 0.3308 (Dziewonski &
// Anderson 1981; from memory). A consistency check of the solver with
// literature EOS parameters (see earthLike), not a fit. With pure iron in the
// core the mass is more than 2 % too large: the core density deficit (Birch
// 1952) that coreFactor represents.
func TestHydrostaticEarthLike(t *testing.T) {
	s, iters, err := SolveHydrostatic(earthLike(t, 0.9), SolveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("%d iterations: M = %.5g kg, I/(MR²) = %.5f, P_c = %.1f GPa, P_CMB = %.1f GPa",
		iters, s.Mass, s.MoIFactor(), s.CentralPressure()/1e9, s.Pressure(3480e3)/1e9)
	checkRel(t, "mass", s.Mass, 5.972e24, 0.02)
	checkRel(t, "I/(MR²)", s.MoIFactor(), 0.3308, 0.01)
	for _, r := range []float64{1221.5e3, 3480e3, 5701e3} {
		found := false
		for _, b := range s.Boundary {
			found = found || b == r
		}
		if !found {
			t.Errorf("layer boundary %g m is not among the structure's boundaries", r)
		}
	}
	// Fluid outer core: vs = 0 there; solid mantle: vs > 0.
	if l := s.Model.Layers[s.LayerAt(2e6, false)]; !l.Fluid || l.Name != "outer core" || l.Viscosity != 0.01 {
		t.Errorf("layer at 2000 km: %q, fluid %v, viscosity %g", l.Name, l.Fluid, l.Viscosity)
	}
	p := s.Profile(3)
	for i, r := range p.Radius {
		if r > 3480e3 && p.Vs[i] <= 0 {
			t.Errorf("vs = %g at r = %g m in the mantle", p.Vs[i], r)
		}
		if !(p.Vp[i] > p.Vs[i]) {
			t.Errorf("vp = %g ≤ vs = %g at r = %g m", p.Vp[i], p.Vs[i], r)
		}
	}

	fe, _, err := SolveHydrostatic(earthLike(t, 1), SolveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if fe.Mass < 1.02*5.972e24 {
		t.Errorf("pure-iron core: mass %.4g kg, expected more than 2 %% above Earth's", fe.Mass)
	}
}

// Velocities at the nodes are those of the EOS moduli: vp = √((K + 4μ/3)/ρ),
// vs = √(μ/ρ) (the definitions, e.g. Aki & Richards 2002, Quantitative
// Seismology, ch. 4; from memory), with μ = 0 where the layer is fluid.
func TestHydrostaticVelocities(t *testing.T) {
	m := earthLike(t, 0.9)
	s, _, err := SolveHydrostatic(m, SolveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for _, l := range m.Layers {
		for _, f := range []float64{0, 0.5, 1} {
			r := l.Inner + f*(l.Outer-l.Inner)
			pl := s.Model.Layers[s.LayerAt(r, f == 0)]
			rho := pl.Density.At(r)
			K, mu := l.EOS.BulkModulus(rho), l.EOS.ShearModulus(rho)
			if l.Fluid {
				mu = 0
			}
			checkRel(t, l.Name+" vp", pl.Vp.At(r), math.Sqrt((K+4*mu/3)/rho), 1e-12)
			checkRel(t, l.Name+" vs", pl.Vs.At(r), math.Sqrt(mu/rho), 1e-12)
		}
	}
}

// Bad input, EOS range errors and non-convergence are errors, never panics
// or NaN results.
func TestHydrostaticErrors(t *testing.T) {
	good := func() EOSModel { m, _ := polytropeModel(6371e3, 4000, 1.5, []float64{0.5}); return m }
	// BM3 with K0′ < 4 turns over at a finite pressure (a few GPa here), far
	// below the central pressure of an Earth-sized planet.
	soft, err1 := eos.NewBM3(4000, 5e9, 3, eos.ShearLaw{})
	constant, err2 := eos.NewConstant(5000)
	must(t, errors.Join(err1, err2))
	cases := []struct {
		name   string
		model  func() EOSModel
		opt    SolveOptions
		target error  // errors.Is target, or nil
		substr string // expected in the message
	}{
		{"no layers", func() EOSModel { return EOSModel{} }, SolveOptions{}, nil, "no layers"},
		{"nil EOS", func() EOSModel { m := good(); m.Layers[1].EOS = nil; return m }, SolveOptions{}, nil, "no equation of state"},
		{"gap", func() EOSModel { m := good(); m.Layers[1].Inner += 1; return m }, SolveOptions{}, nil, "does not match"},
		{"not from centre", func() EOSModel { m := good(); m.Layers[0].Inner = 1; return m }, SolveOptions{}, nil, "r = 0"},
		{"NaN radius", func() EOSModel { m := good(); m.Layers[1].Outer = math.NaN(); return m }, SolveOptions{}, nil, "finite"},
		{"negative viscosity", func() EOSModel { m := good(); m.Layers[0].Viscosity = -1; return m }, SolveOptions{}, nil, "viscosity"},
		{"zero reference density", func() EOSModel { m := good(); m.Layers[0].EOS = linearEOS{0, 1e11}; return m }, SolveOptions{}, nil, "reference density"},
		{"negative nodes", good, SolveOptions{NodesPerLayer: -1}, nil, "nodes per layer"},
		{"negative tolerance", good, SolveOptions{Tol: -1}, nil, "tolerance"},
		{"NaN tolerance", good, SolveOptions{Tol: math.NaN()}, nil, "tolerance"},
		{"negative max iterations", good, SolveOptions{MaxIter: -3}, nil, "iterations"},
		{"too few iterations", good, SolveOptions{MaxIter: 2}, nil, "no convergence in 2 iterations"},
		// kR > π: no regular equilibrium exists (see TestHydrostaticPolytrope).
		{"no equilibrium exists", func() EOSModel { m, _ := polytropeModel(6371e3, 4000, 1.1*math.Pi, nil); return m }, SolveOptions{}, nil, "not halved"},
		{"BM3 beyond its turnover", func() EOSModel {
			m := good()
			m.Layers[0].EOS = soft
			return m
		}, SolveOptions{}, eos.ErrPressure, "layer 0"},
		{"incompressible: infinite vp", func() EOSModel {
			m := good()
			m.Layers[1].EOS = constant
			return m
		}, SolveOptions{}, eos.ErrModulus, "layer 1"},
		{"incompressible fluid: infinite vp", func() EOSModel {
			m := good()
			m.Layers[1].EOS = constant
			m.Layers[1].Fluid = true
			return m
		}, SolveOptions{}, eos.ErrModulus, "layer 1"},
		{"EOS returns NaN", func() EOSModel {
			m := good()
			m.Layers[1].EOS = nanEOS{linearEOS{4000, 1e11}}
			return m
		}, SolveOptions{}, nil, "EOS returned density NaN"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, _, err := SolveHydrostatic(c.model(), c.opt)
			if err == nil {
				t.Fatalf("no error; mass %g, I/(MR²) %g", s.Mass, s.MoIFactor())
			}
			if s != nil {
				t.Error("structure returned with an error")
			}
			if c.target != nil && !errors.Is(err, c.target) {
				t.Errorf("error %q does not wrap %v", err, c.target)
			}
			if !strings.Contains(err.Error(), c.substr) {
				t.Errorf("error %q does not contain %q", err, c.substr)
			}
		})
	}
}

// The node count is rounded up to whole quartic pieces.
func TestHydrostaticNodeRounding(t *testing.T) {
	m, _ := polytropeModel(1e6, 3000, 1, []float64{0.5})
	for _, c := range []struct{ n, pieces int }{{2, 1}, {5, 1}, {6, 2}, {9, 2}, {10, 3}, {17, 4}, {0, (DefaultNodesPerLayer - 1) / PieceDegree}} {
		s, _, err := SolveHydrostatic(m, SolveOptions{NodesPerLayer: c.n})
		if err != nil {
			t.Fatal(err)
		}
		if got := len(s.Model.Layers); got != 2*c.pieces {
			t.Errorf("NodesPerLayer %d: %d pieces, want %d", c.n, got, 2*c.pieces)
		}
	}
}

// Anderson mixing of a linear fixed point x = Ax + b is a Krylov method
// equivalent to GMRES when the depth is at least the dimension (Walker & Ni
// 2011, SIAM J. Numer. Anal. 49, 1715; from memory), so it reaches the
// solution (I − A)⁻¹b in at most dimension + 1 steps, where the plain
// iteration with spectral radius 0.9 needs hundreds.
func TestAndersonLinear(t *testing.T) {
	A := [3][3]float64{{0.5, 0.3, 0.1}, {-0.2, 0.6, 0.2}, {0.1, 0.1, 0.7}}
	b := []float64{1, 2, 3}
	F := func(x, fx []float64) {
		for i := range 3 {
			fx[i] = b[i]
			for j := range 3 {
				fx[i] += A[i][j] * x[j]
			}
		}
	}
	x := []float64{0, 0, 0}
	fx := make([]float64, 3)
	acc := newAnderson(3, 3)
	steps := 0
	for ; steps < 20; steps++ {
		F(x, fx)
		res := 0.0
		for i := range x {
			res = max(res, math.Abs(fx[i]-x[i]))
		}
		if res < 1e-12 {
			break
		}
		acc.next(x, fx)
	}
	if steps > 5 {
		t.Errorf("Anderson took %d steps, want ≤ 5", steps)
	}
	// Check the fixed point itself: (I − A) x = b.
	for i := range 3 {
		v := x[i]
		for j := range 3 {
			v -= A[i][j] * x[j]
		}
		checkRel(t, fmt.Sprintf("((I−A)x)[%d]", i), v, b[i], 1e-11)
	}
}

// BenchmarkSolveHydrostatic solves the four-layer Earth-like model of BM3 and
// Vinet layers with the default options; "iters" is the number of density
// updates.
func BenchmarkSolveHydrostatic(b *testing.B) {
	m := earthLike(b, 0.9)
	for _, n := range []int{0, 17, 33} {
		b.Run(fmt.Sprintf("nodes=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			iters := 0
			for b.Loop() {
				_, it, err := SolveHydrostatic(m, SolveOptions{NodesPerLayer: n})
				if err != nil {
					b.Fatal(err)
				}
				iters = it
			}
			b.ReportMetric(float64(iters), "iters")
		})
	}
}

// A two-layer planet of EOS layers: a liquid iron-alloy core under a
// bridgmanite mantle (parameters as in earthLike).
func ExampleSolveHydrostatic() {
	core, err := eos.NewBM3(0.9*7019, 109.7e9, 4.66, eos.Fluid())
	if err != nil {
		fmt.Println(err)
		return
	}
	mantle, err := eos.NewBM3(4106, 251e9, 4.1, eos.ShearLaw{})
	if err != nil {
		fmt.Println(err)
		return
	}
	m := EOSModel{Layers: []EOSLayer{
		{Name: "core", Inner: 0, Outer: 3480e3, EOS: core, Fluid: true},
		{Name: "mantle", Inner: 3480e3, Outer: 6371e3, EOS: mantle},
	}}
	s, _, err := SolveHydrostatic(m, SolveOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("mass %.4g kg\n", s.Mass)
	fmt.Printf("I/(MR²) %.4f\n", s.MoIFactor())
	fmt.Printf("central pressure %.1f GPa\n", s.CentralPressure()/1e9)
	fmt.Printf("density at the centre %.0f kg/m³\n", s.Model.Layers[0].Density.At(0))
	// Output:
	// mass 6.245e+24 kg
	// I/(MR²) 0.3423
	// central pressure 364.4 GPa
	// density at the centre 12367 kg/m³
}

// Layers with a prescribed density are not compressed: a model made only of them reproduces the
// closed-form Solve of the same layers (exact integration of polynomial densities; the analytic
// checks of Solve are in structure_test.go).
func TestHydrostaticPrescribedDensity(t *testing.T) {
	core, mantle := Const(8000), Linear(1e6, 4000, 3e6, 3300)
	vp := Const(8000)
	em := EOSModel{Layers: []EOSLayer{
		{Name: "core", Inner: 0, Outer: 1e6, Density: &core, Vp: &vp, Fluid: true},
		{Name: "mantle", Inner: 1e6, Outer: 3e6, Density: &mantle, Vp: &vp, Vs: &vp},
	}}
	got, _, err := SolveHydrostatic(em, SolveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want, err := Solve(Model{Layers: []Layer{
		{Name: "core", Inner: 0, Outer: 1e6, Density: core, Vp: vp, Vs: Const(0), Fluid: true},
		{Name: "mantle", Inner: 1e6, Outer: 3e6, Density: mantle, Vp: vp, Vs: vp},
	}})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"mass", got.Mass, want.Mass},
		{"I/(MR²)", got.MoIFactor(), want.MoIFactor()},
		{"P_c", got.CentralPressure(), want.CentralPressure()},
		{"P(2e6)", got.Pressure(2e6), want.Pressure(2e6)},
	} {
		if math.Abs(c.got-c.want) > 1e-12*math.Abs(c.want) {
			t.Errorf("%s = %.15g, closed form %.15g", c.name, c.got, c.want)
		}
	}
	// A prescribed density without prescribed velocities is an error, not a panic.
	em.Layers[0].Vp = nil
	if _, _, err := SolveHydrostatic(em, SolveOptions{}); err == nil {
		t.Error("prescribed density without Vp: no error")
	}
}
