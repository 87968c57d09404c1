package problem

import (
	"errors"
	"math"
	"strings"
	"testing"

	"plumb/forward"
	"plumb/forward/eos"
	"plumb/forward/tides"
)

const eosConfig = `planet: {name: Testa, radius_km: 4200}
layers:
  - name: core
    outer_radius_km: {prior: uniform, min: 1500, max: 2500}
    eos: {kind: vinet, rho0_kg_m3: {prior: uniform, min: 6500, max: 8200}, k0_gpa: 160, k0_prime: 5.4}
    state: liquid
  - name: mantle
    eos:
      kind: bm3
      rho0_kg_m3: 3300
      k0_gpa: {prior: uniform, min: 100, max: 160}
      k0_prime: 4.2
      shear: {law: finite_strain, mu0_gpa: 80, mu0_prime: 1.5}
  - name: crust
    thickness_km: 40
    density_kg_m3: {inner: 2900, outer: 2800}
    vp_km_s: 6.2
    vs_km_s: 3.5
constraints: {density_increases_with_depth: true}
observations:
  mass_kg: {value: 1.2e24, sigma: 1.2e21}
  moi_factor: {value: 0.36, sigma: 0.003}
  k2: {value: 0.2, sigma: 0.02}
sampler: {chains: 2, warmup_steps: 50, steps: 100, thin: 1, seed: 2}
`

// An EOS config solves to exactly the structure forward.SolveHydrostatic gives for the same
// layers built by hand (the physics itself is checked in forward and forward/eos).
func TestEOSConfig(t *testing.T) {
	p := buildConfig(t, eosConfig)
	want := []string{"core_outer_radius_km", "core_rho0_kg_m3", "mantle_k0_gpa"}
	if strings.Join(p.Space.Names(), ",") != strings.Join(want, ",") {
		t.Fatalf("parameters %v, want %v", p.Space.Names(), want)
	}
	x := []float64{2000e3, 7400, 130e9}
	st, err := p.Solve(x)
	if err != nil {
		t.Fatal(err)
	}
	core, _ := eos.NewVinet(7400, 160e9, 5.4, eos.Fluid())
	sh, _ := eos.NewFiniteStrainShear(80e9, 1.5)
	mantle, _ := eos.NewBM3(3300, 130e9, 4.2, sh)
	crustRho := forward.Linear(4160e3, 2900, 4200e3, 2800)
	vp, vs := forward.Const(6200), forward.Const(3500)
	ref, _, err := forward.SolveHydrostatic(forward.EOSModel{Layers: []forward.EOSLayer{
		{Name: "core", Inner: 0, Outer: 2000e3, EOS: core, Fluid: true},
		{Name: "mantle", Inner: 2000e3, Outer: 4160e3, EOS: mantle},
		{Name: "crust", Inner: 4160e3, Outer: 4200e3, Density: &crustRho, Vp: &vp, Vs: &vs},
	}}, forward.SolveOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if st.Mass != ref.Mass || st.MoIFactor() != ref.MoIFactor() || st.CentralPressure() != ref.CentralPressure() {
		t.Errorf("config structure M %g I %g Pc %g, by hand %g %g %g", st.Mass, st.MoIFactor(), st.CentralPressure(),
			ref.Mass, ref.MoIFactor(), ref.CentralPressure())
	}
	// Compression: the core's central density exceeds its zero-pressure density.
	if rc := st.Model.Layers[0].Density.At(0); !(rc > 7400) {
		t.Errorf("central density %g not compressed above ρ0 = 7400", rc)
	}
	der := make([]float64, p.NumDerived())
	if lp := p.LogDensity(x, der); math.IsInf(lp, 0) || math.IsNaN(lp) {
		t.Errorf("log density %g", lp)
	}
	// The recorded k2 prediction is the tidal model's value for this structure.
	k2, _, _, err := tides.Love(ref, 2)
	if err != nil {
		t.Fatal(err)
	}
	if got := der[2+2]; got != k2 {
		t.Errorf("pred k2 %g, tides.Love %g", got, k2)
	}
	if der[len(der)-1] != 4160e3 {
		t.Errorf("derived mantle top %g m, want 4160e3", der[len(der)-1])
	}
	// A mantle so soft (K0 = 1 MPa, outside the prior, so Solve is called directly) that its own
	// weight would compress it beyond the EOS's range is not a physical model: an error from the
	// solver (LogDensity turns every Solve error into −Inf), no panic.
	if st, err := p.Solve([]float64{2000e3, 7400, 1e6}); err == nil || errors.Is(err, ErrConstraint) {
		t.Errorf("unsolvable model: structure %v, error %v; want a solver error", st != nil, err)
	}
	// A core lighter than the mantle violates the density constraint: prior zero, not a crash.
	if _, err := p.Solve([]float64{2000e3, 3000, 130e9}); !errors.Is(err, ErrConstraint) {
		t.Errorf("light core: %v, want ErrConstraint", err)
	}
}

func TestEOSConfigErrors(t *testing.T) {
	cases := []configEdit{
		{"eos and density", "    state: liquid", "    state: liquid\n    density_kg_m3: 3", "layers[0].density_kg_m3"},
		{"unknown kind", "kind: vinet", "kind: murnaghan", "layers[0].eos.kind"},
		{"unknown eos key", "k0_prime: 5.4}", "k0_prime: 5.4, t0_k: 300}", `"t0_k"`},
		{"unknown shear law", "law: finite_strain", "law: elastic", "layers[1].eos.shear.law"},
		{"missing k0", "k0_gpa: 160, ", "", "layers[0].eos.k0_gpa"},
		{"k2 without shear for a core that can be solid", "    state: liquid\n", "    state: {prior: categorical, values: [liquid, solid]}\n", "layers[0].eos.shear"},
	}
	checkEdits(t, eosConfig, cases)
}

// BenchmarkLogDensityEOS times one posterior evaluation with a self-consistent 3-layer solve.
func BenchmarkLogDensityEOS(b *testing.B) {
	p := buildConfig(b, eosConfig)
	x := []float64{2000e3, 7400, 130e9}
	der := make([]float64, p.NumDerived())
	b.ReportAllocs()
	for b.Loop() {
		p.LogDensity(x, der)
	}
}

// configEdit is a bad-input case: replace old by new in a valid config; the error must be a
// ConfigError naming want.
type configEdit struct{ name, old, new, want string }

func checkEdits(t *testing.T, base string, cases []configEdit) {
	t.Helper()
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			text := strings.Replace(base, tc.old, tc.new, 1)
			if text == base {
				t.Fatal("edit did not apply")
			}
			path := writeConfig(t, "bad.yaml", text)
			cfg, err := Load(path, nil)
			if err == nil {
				_, err = Build(cfg, path)
			}
			var ce *ConfigError
			if !errors.As(err, &ce) || !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %v, want a ConfigError naming %s", err, tc.want)
			}
		})
	}
}
