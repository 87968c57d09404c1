package tides

import (
	"math"
	"math/cmplx"
	"strings"
	"testing"

	"plumb/forward"
	"plumb/internal/prem"
)

// m2Period is the period of the principal lunar semidiurnal tide M2,
// 12.4206 h (Doodson 1921 tidal constituents; from memory).
const m2Period = 12.4206 * 3600

// checkRelC checks the real and the imaginary part of got separately, each
// relative to the corresponding part of want.
func checkRelC(t *testing.T, what string, got, want complex128, tol float64) {
	t.Helper()
	checkRel(t, "Re "+what, real(got), real(want), tol)
	checkRel(t, "Im "+what, imag(got), imag(want), tol)
}

// kelvinComplex returns the Kelvin Love numbers of a homogeneous
// incompressible sphere (see TestKelvinSphere for the source) with the
// complex shear modulus mu (correspondence principle; Peltier 1974, Efroimsky
// 2012, from memory): k_n = 3/(2(n−1)) / (1 + (2n²+4n+3) μ̃/(nρgR)), etc.
func kelvinComplex(n int, mu complex128, rho float64, s *forward.Structure) (k, h, l complex128) {
	fn := float64(n)
	z := 1 + complex((2*fn*fn+4*fn+3)/(fn*rho*s.SurfaceGravity()*s.Radius()), 0)*mu
	return complex(3/(2*(fn-1)), 0) / z, complex((2*fn+1)/(2*(fn-1)), 0) / z, complex(3/(2*fn*(fn-1)), 0) / z
}

// maxwellModulus is the Maxwell complex modulus in the form iωημ/(μ + iωη)
// (Peltier 1974; Efroimsky 2012; from memory), independent of the form used
// in the code.
func maxwellModulus(mu, eta, omega float64) complex128 {
	iwe := complex(0, omega*eta)
	return iwe * complex(mu, 0) / (complex(mu, 0) + iwe)
}

// andradeModulus is 1/J̃ with the Andrade compliance J̃ = 1/μ + 1/(iωη) +
// Γ(1+α)/μ · (ωτ_A)^(−α) e^(−iπα/2), τ_A = ζη/μ (Efroimsky 2012;
// Castillo-Rogez et al. 2011; from memory), written in polar form.
func andradeModulus(mu, eta, alpha, zeta, omega float64) complex128 {
	tau := zeta * eta / mu
	tr := math.Gamma(1+alpha) / mu * math.Pow(omega*tau, -alpha)
	J := complex(1/mu, 0) + 1/complex(0, omega*eta) + cmplx.Rect(tr, -math.Pi*alpha/2)
	return 1 / J
}

const (
	kelvinRho = 5500.0
	kelvinVs  = 3000.0
	kelvinVp  = 3e7 // nearly incompressible, as in TestKelvinSphere
)

func kelvinStructure(t testing.TB) *forward.Structure {
	return solve(t, homogeneous(kelvinRho, kelvinVp, kelvinVs, false))
}

// Homogeneous incompressible Maxwell sphere against the Kelvin formula with
// the complex modulus, ωη/μ from 0.01 to 100, degrees 2 and 3.
func TestKelvinMaxwell(t *testing.T) {
	s := kelvinStructure(t)
	mu := kelvinRho * kelvinVs * kelvinVs
	omega := 2 * math.Pi / m2Period
	cases := []struct {
		n   int
		wtm float64 // ωη/μ
	}{
		{2, 0.01}, {2, 0.1}, {2, 0.3}, {2, 1}, {2, 3}, {2, 10}, {2, 100}, {3, 1}, {3, 10},
	}
	for _, c := range cases {
		eta := c.wtm * mu / omega
		k, h, l, err := ComplexLove(s, c.n, m2Period, []Rheology{{Kind: Maxwell, Viscosity: eta}})
		if err != nil {
			t.Fatal(err)
		}
		wk, wh, wl := kelvinComplex(c.n, maxwellModulus(mu, eta, omega), kelvinRho, s)
		checkRelC(t, "k", k, wk, 1e-4)
		checkRelC(t, "h", h, wh, 1e-4)
		checkRelC(t, "l", l, wl, 1e-4)
	}
}

// Same for the Andrade rheology.
func TestKelvinAndrade(t *testing.T) {
	s := kelvinStructure(t)
	mu := kelvinRho * kelvinVs * kelvinVs
	omega := 2 * math.Pi / m2Period
	cases := []struct {
		wtm, alpha, zeta float64
	}{
		{0.01, 0.3, 1}, {0.1, 0.2, 1}, {1, 0.3, 1}, {1, 0.4, 10}, {10, 0.3, 1}, {100, 0.2, 1}, {100, 0.4, 0.1},
	}
	for _, c := range cases {
		eta := c.wtm * mu / omega
		rh := []Rheology{{Kind: Andrade, Viscosity: eta, Alpha: c.alpha, Zeta: c.zeta}}
		k, h, l, err := ComplexLove(s, 2, m2Period, rh)
		if err != nil {
			t.Fatal(err)
		}
		wk, wh, wl := kelvinComplex(2, andradeModulus(mu, eta, c.alpha, c.zeta, omega), kelvinRho, s)
		checkRelC(t, "k", k, wk, 1e-4)
		checkRelC(t, "h", h, wh, 1e-4)
		checkRelC(t, "l", l, wl, 1e-4)
	}
}

func allMaxwell(m forward.Model, eta float64) []Rheology {
	rh := make([]Rheology, len(m.Layers))
	for i := range rh {
		rh[i] = Rheology{Kind: Maxwell, Viscosity: eta}
	}
	return rh
}

// η → ∞ (and elastic rheology) reproduces the elastic Love numbers
// (correspondence principle: μ̃ → μ; Peltier 1974, from memory), here for the
// five-layer model with fluid outer core, PREM without and with ocean.
func TestElasticLimit(t *testing.T) {
	models := []struct {
		name string
		m    forward.Model
	}{
		{"Earth-like", earthLike(1, false)},
		{"fluid centre", fluidCentre(false)},
		{"PREM", prem.MustLoadWithoutOcean(t)},
		{"PREM with ocean", prem.MustLoad(t)},
	}
	for _, c := range models {
		s := solve(t, c.m)
		k0, h0, l0, err := Love(s, 2)
		if err != nil {
			t.Fatal(err)
		}
		for _, rh := range [][]Rheology{nil, make([]Rheology, len(c.m.Layers)), allMaxwell(c.m, 1e40)} {
			k, h, l, err := ComplexLove(s, 2, m2Period, rh)
			if err != nil {
				t.Fatal(err)
			}
			for _, p := range []struct {
				what string
				got  complex128
				want float64
			}{{"k", k, k0}, {"h", h, h0}, {"l", l, l0}} {
				if math.IsNaN(p.want) {
					if !cmplx.IsNaN(p.got) {
						t.Errorf("%s: %s = %g, want NaN", c.name, p.what, p.got)
					}
					continue
				}
				if d := cmplx.Abs(p.got - complex(p.want, 0)); !(d <= 1e-7) {
					t.Errorf("%s (%d rheologies): %s = %.10g, elastic %.10g (diff %.2g)", c.name, len(rh), p.what, p.got, p.want, d)
				}
			}
		}
	}
}

// η → 0: the homogeneous sphere relaxes to the fluid limit k2 = 3/2,
// h2 = 5/2 (Love 1911, ch. VII, from memory); ωη/μ = 1e-5 leaves
// 19|μ̃|/(2ρgR) ≈ 1.4e-5, checked to 1e-4.
func TestFluidLimit(t *testing.T) {
	s := kelvinStructure(t)
	mu := kelvinRho * kelvinVs * kelvinVs
	omega := 2 * math.Pi / m2Period
	for _, kind := range []RheologyKind{Maxwell, Andrade} {
		rh := []Rheology{{Kind: kind, Viscosity: 1e-5 * mu / omega, Alpha: 0.3, Zeta: 1}}
		k, h, _, err := ComplexLove(s, 2, m2Period, rh)
		if err != nil {
			t.Fatal(err)
		}
		if d := cmplx.Abs(k - 1.5); !(d <= 1e-4*1.5) {
			t.Errorf("%v: k2 = %g, want 3/2 (diff %.2g)", kind, k, d)
		}
		if d := cmplx.Abs(h - 2.5); !(d <= 1e-4*2.5) {
			t.Errorf("%v: h2 = %g, want 5/2 (diff %.2g)", kind, h, d)
		}
	}
}

// Sign and dissipation peak. Under exp(iωt) a dissipative body lags: Im k2 < 0,
// δ > 0, Q > 0. For the Maxwell Kelvin sphere, with A = 19μ/(2ρgR) and
// w = ωη/μ, the formula of TestKelvinMaxwell gives
// Im k2 = −(3/2) A w/(1 + w²(1+A)²) and Q = √(1+w²)√(1+w²(1+A)²)/(A w),
// minimal at w = (1+A)^(−1/2) (derived here from the Kelvin formula): Q
// falls monotonically as η decreases from 10⁴ μ/ω towards that minimum and
// rises again below it.
func TestLagAndQ(t *testing.T) {
	s := kelvinStructure(t)
	mu := kelvinRho * kelvinVs * kelvinVs
	omega := 2 * math.Pi / m2Period
	A := 19 * mu / (2 * kelvinRho * s.SurfaceGravity() * s.Radius())
	wMin := 1 / math.Sqrt(1+A)
	var qs, ws []float64
	for e := 4.0; e >= -3; e -= 0.25 {
		w := math.Pow(10, e)
		for _, kind := range []RheologyKind{Maxwell, Andrade} {
			rh := []Rheology{{Kind: kind, Viscosity: w * mu / omega, Alpha: 0.3, Zeta: 1}}
			k, _, _, err := ComplexLove(s, 2, m2Period, rh)
			if err != nil {
				t.Fatal(err)
			}
			q, d := QualityFactor(k), PhaseLag(k)
			if !(imag(k) < 0) || !(d > 0 && d < math.Pi) || !(q > 0) || math.IsInf(q, 0) {
				t.Errorf("%v ωη/μ = %g: k2 = %g, δ = %g, Q = %g; want Im k2 < 0, 0 < δ < π, 0 < Q < ∞", kind, w, k, d, q)
			}
			if math.Abs(q*math.Sin(d)-1) > 1e-12 {
				t.Errorf("%v: Q sin δ = %g, want 1", kind, q*math.Sin(d))
			}
			if kind == Maxwell {
				qs, ws = append(qs, q), append(ws, w)
			}
		}
	}
	for i := 1; i < len(qs); i++ {
		falling := ws[i] >= wMin*1.2
		rising := ws[i-1] <= wMin/1.2
		if falling && !(qs[i] < qs[i-1]) {
			t.Errorf("ωη/μ %g → %g: Q %g → %g, want falling towards the peak at %g", ws[i-1], ws[i], qs[i-1], qs[i], wMin)
		}
		if rising && !(qs[i] > qs[i-1]) {
			t.Errorf("ωη/μ %g → %g: Q %g → %g, want rising below the peak at %g", ws[i-1], ws[i], qs[i-1], qs[i], wMin)
		}
	}
	// Andrade adds transient creep: more dissipation than Maxwell with the
	// same η where the Andrade term dominates (ωτ_M ≫ 1; common practice,
	// no source).
	eta := 1e3 * mu / omega
	km, _, _, err1 := ComplexLove(s, 2, m2Period, []Rheology{{Kind: Maxwell, Viscosity: eta}})
	ka, _, _, err2 := ComplexLove(s, 2, m2Period, []Rheology{{Kind: Andrade, Viscosity: eta, Alpha: 0.3, Zeta: 1}})
	if err1 != nil || err2 != nil {
		t.Fatal(err1, err2)
	}
	if !(QualityFactor(ka) < QualityFactor(km)) {
		t.Errorf("ωη/μ = 1e3: Andrade Q = %g not below Maxwell Q = %g", QualityFactor(ka), QualityFactor(km))
	}
	if q := QualityFactor(1.5); !math.IsInf(q, 1) {
		t.Errorf("Q of a real k = %g, want +Inf", q)
	}
}

// Halving the tolerance changes the complex k2 of the layered model with
// Maxwell mantle by less than 1e-7 (common practice, no source).
func TestComplexConvergence(t *testing.T) {
	m := earthLike(1, false)
	s := solve(t, m)
	rh := benchRheology(m)
	for _, tol := range []float64{1e-6, DefaultTol, 1e-11} {
		k1, _, _, err1 := ComplexLoveTol(s, 2, m2Period, rh, tol)
		k2, _, _, err2 := ComplexLoveTol(s, 2, m2Period, rh, tol/2)
		if err1 != nil || err2 != nil {
			t.Fatal(err1, err2)
		}
		if d := cmplx.Abs(k1 - k2); !(d < 1e-7) {
			t.Errorf("k2 = %.12f at tol %g, %.12f at tol %g (diff %.2g)", k1, tol, k2, tol/2, d)
		}
		if !(imag(k1) < 0) {
			t.Errorf("Earth-like: Im k2 = %g, want < 0 (lag)", imag(k1))
		}
	}
}

func TestComplexErrors(t *testing.T) {
	good := kelvinStructure(t)
	one := func(r Rheology) []Rheology { return []Rheology{r} }
	cases := []struct {
		name   string
		s      *forward.Structure
		n      int
		period float64
		rh     []Rheology
		want   string
	}{
		{"nil structure", nil, 2, m2Period, nil, "no structure"},
		{"degree 1", good, 1, m2Period, nil, "got 1"},
		{"zero period", good, 2, 0, nil, "period"},
		{"negative period", good, 2, -1, nil, "period"},
		{"NaN period", good, 2, math.NaN(), nil, "period"},
		{"infinite period", good, 2, math.Inf(1), nil, "period"},
		{"too many rheologies", good, 2, m2Period, make([]Rheology, 2), "2 rheologies for 1 layers"},
		{"unknown kind", good, 2, m2Period, one(Rheology{Kind: 7}), "unknown rheology kind 7"},
		{"Maxwell zero viscosity", good, 2, m2Period, one(Rheology{Kind: Maxwell}), `layer 0 ("all"): maxwell viscosity`},
		{"Maxwell negative viscosity", good, 2, m2Period, one(Rheology{Kind: Maxwell, Viscosity: -1}), "viscosity"},
		{"Maxwell NaN viscosity", good, 2, m2Period, one(Rheology{Kind: Maxwell, Viscosity: math.NaN()}), "viscosity"},
		{"Maxwell infinite viscosity", good, 2, m2Period, one(Rheology{Kind: Maxwell, Viscosity: math.Inf(1)}), "viscosity"},
		{"Andrade zero viscosity", good, 2, m2Period, one(Rheology{Kind: Andrade, Alpha: 0.3, Zeta: 1}), "andrade viscosity"},
		{"Andrade α = 0", good, 2, m2Period, one(Rheology{Kind: Andrade, Viscosity: 1e20, Zeta: 1}), "exponent"},
		{"Andrade α = 1", good, 2, m2Period, one(Rheology{Kind: Andrade, Viscosity: 1e20, Alpha: 1, Zeta: 1}), "exponent"},
		{"Andrade NaN α", good, 2, m2Period, one(Rheology{Kind: Andrade, Viscosity: 1e20, Alpha: math.NaN(), Zeta: 1}), "exponent"},
		{"Andrade ζ = 0", good, 2, m2Period, one(Rheology{Kind: Andrade, Viscosity: 1e20, Alpha: 0.3}), "ζ"},
		{"Andrade ζ = Inf", good, 2, m2Period, one(Rheology{Kind: Andrade, Viscosity: 1e20, Alpha: 0.3, Zeta: math.Inf(1)}), "ζ"},
		{"zero bulk modulus", solve(t, homogeneous(5500, 4000, 4000, false)), 2, m2Period, nil, "vp² > 4vs²/3"},
		{"rigidity vanishing inside", solve(t, vanishingRigidity()), 2, m2Period, one(Rheology{Kind: Maxwell, Viscosity: 1e20}), `layer 0 ("all")`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			k, h, l, err := ComplexLove(c.s, c.n, c.period, c.rh)
			if err == nil {
				t.Fatalf("no error; k = %g, h = %g, l = %g", k, h, l)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q does not mention %q", err, c.want)
			}
			if !cmplx.IsNaN(k) || !cmplx.IsNaN(h) || !cmplx.IsNaN(l) {
				t.Errorf("error %v returned with k = %g, h = %g, l = %g; want NaN", err, k, h, l)
			}
		})
	}
}

// benchRheology gives the Earth-like model a Maxwell lower mantle
// (η = 1e22 Pa s), an Andrade upper mantle (η = 1e20 Pa s, α = 0.3, ζ = 1)
// and an elastic core and crust.
func benchRheology(m forward.Model) []Rheology {
	rh := make([]Rheology, len(m.Layers))
	rh[2] = Rheology{Kind: Maxwell, Viscosity: 1e22}
	rh[3] = Rheology{Kind: Andrade, Viscosity: 1e20, Alpha: 0.3, Zeta: 1}
	return rh
}

// BenchmarkComplexLove computes the complex k2, h2, l2 of the five-layer
// Earth-like model at the M2 period.
func BenchmarkComplexLove(b *testing.B) {
	m := earthLike(1, false)
	s := solve(b, m)
	rh := benchRheology(m)
	b.ReportAllocs()
	for b.Loop() {
		if _, _, _, err := ComplexLove(s, 2, m2Period, rh); err != nil {
			b.Fatal(err)
		}
	}
}
