package priors

import (
	"math"
	"strings"
	"testing"
)

// testSpace is a six-parameter space mixing every sampled kind.
func testSpace() Space {
	return Space{Params: []Param{
		{Name: "core_outer_radius_km", Unit: "km", ToUnit: 1e-3, Prior: mustDist(NewUniform(1e6, 3e6))},
		{Name: "mantle_density_kg_m3", Unit: "kg/m3", ToUnit: 1, Prior: mustDist(NewNormal(3300, 100))},
		{Name: "crust_thickness_km", Unit: "km", ToUnit: 1e-3, Prior: mustDist(NewTruncNormal(4e4, 2e4, 0, 1.5e5))},
		{Name: "viscosity_pa_s", Unit: "Pa s", ToUnit: 1, Prior: mustDist(NewLogUniform(1e19, 1e23))},
		{Name: "core_alloy", Unit: "", ToUnit: 1, Prior: mustDist(NewCategorical([]string{"fe", "fes", "fesi"}, []float64{2, 1, 1}))},
		{Name: "core_temperature_k", Unit: "K", ToUnit: 1, Prior: mustDist(NewTruncNormal(2000, 300, 1900, 2100))},
	}}
}

func TestSpaceBasics(t *testing.T) {
	s := testSpace()
	if err := s.Validate(); err != nil {
		t.Fatalf("Validate: %v", err)
	}
	if s.Dim() != 6 {
		t.Errorf("Dim = %d", s.Dim())
	}
	if i := s.Index("viscosity_pa_s"); i != 3 {
		t.Errorf("Index = %d, want 3", i)
	}
	if i := s.Index("nope"); i != -1 {
		t.Errorf("Index(absent) = %d, want -1", i)
	}
	want := []int{0, 0, 0, 0, 3, 0}
	for i, l := range s.Levels() {
		if l != want[i] {
			t.Errorf("Levels()[%d] = %d, want %d", i, l, want[i])
		}
	}
	if names := s.Names(); len(names) != 6 || names[4] != "core_alloy" {
		t.Errorf("Names = %v", names)
	}
	if got := s.Params[0].String(); got != "core_outer_radius_km ~ uniform(1000, 3000) km" {
		t.Errorf("Param.String = %q", got)
	}
	if got := s.Params[2].String(); got != "crust_thickness_km ~ normal(40, 20) on [0, 150] km" {
		t.Errorf("Param.String = %q", got)
	}
}

// A prior in a converted unit prints as written: degrees → radians → degrees is not exact in
// floating point.
func TestParamStringRoundsConversion(t *testing.T) {
	deg := math.Pi / 180
	u, err := NewUniform(10*deg, 120*deg)
	if err != nil {
		t.Fatal(err)
	}
	p := Param{Name: "quake_distance_deg", Unit: "deg", ToUnit: 1 / deg, Prior: u}
	if got := p.String(); got != "quake_distance_deg ~ uniform(10, 120) deg" {
		t.Errorf("got %q", got)
	}
}

func TestSpaceLogPrior(t *testing.T) {
	s := testSpace()
	x := []float64{2e6, 3350, 3e4, 1e21, 1, 2050}
	want := 0.0
	for i, p := range s.Params {
		want += p.Prior.LogProb(x[i])
	}
	if math.IsInf(want, 0) || math.IsNaN(want) {
		t.Fatalf("test point not inside the support: %v", want)
	}
	if got := s.LogPrior(x); got != want {
		t.Errorf("LogPrior = %v, want Σ LogProb = %v", got, want)
	}
	bad := []struct {
		name string
		i    int
		v    float64
	}{
		{"uniform below", 0, 0.99e6},
		{"uniform above", 0, 3.01e6},
		{"normal NaN", 1, math.NaN()},
		{"trunc below", 2, -1},
		{"loguniform above", 3, 2e23},
		{"categorical non-integer", 4, 1.5},
		{"categorical out of range", 4, 3},
		{"categorical negative", 4, -1},
		{"categorical NaN", 4, math.NaN()},
		{"narrow trunc above", 5, 2100.0001},
	}
	for _, tc := range bad {
		y := append([]float64(nil), x...)
		y[tc.i] = tc.v
		if lp := s.LogPrior(y); !math.IsInf(lp, -1) {
			t.Errorf("%s: LogPrior = %v, want -Inf", tc.name, lp)
		}
	}
	if lp := s.LogPrior(x[:5]); !math.IsInf(lp, -1) {
		t.Errorf("short x: LogPrior = %v, want -Inf", lp)
	}
}

func TestSpaceSample(t *testing.T) {
	s := testSpace()
	r := newRand(5, 6)
	x := make([]float64, s.Dim())
	for range 2000 {
		s.Sample(r, x)
		for i, p := range s.Params {
			lo, hi := p.Prior.Support()
			if !(x[i] >= lo && x[i] <= hi) {
				t.Fatalf("%s = %v outside [%v, %v]", p.Name, x[i], lo, hi)
			}
		}
		if lp := s.LogPrior(x); math.IsInf(lp, 0) || math.IsNaN(lp) {
			t.Fatalf("LogPrior of a prior draw = %v", lp)
		}
	}
}

func TestLogPriorDoesNotAllocate(t *testing.T) {
	s := testSpace()
	x := []float64{2e6, 3350, 3e4, 1e21, 1, 2050}
	if n := testing.AllocsPerRun(100, func() { s.LogPrior(x) }); n != 0 {
		t.Errorf("LogPrior allocates %v times per call", n)
	}
}

func TestSpaceValidateErrors(t *testing.T) {
	u := mustDist(NewUniform(0, 1))
	var nilPtr *Uniform
	p := func(name string, d Dist) Param { return Param{Name: name, ToUnit: 1, Prior: d} }
	tests := []struct {
		name   string
		params []Param
		want   string
	}{
		{"empty name", []Param{p("", u)}, "parameter 1: name is empty"},
		{"duplicate", []Param{p("a", u), p("b", u), p("a", u)}, `parameter 3 ("a"): name already used by parameter 1`},
		{"bad char", []Param{p("core radius", u)}, `contains ' '`},
		{"leading digit", []Param{p("1st", u)}, "starts with a digit"},
		{"nil prior", []Param{p("a", nil)}, "no prior given"},
		{"typed nil prior", []Param{p("a", nilPtr)}, "no prior given"},
		{"fixed prior", []Param{p("a", Fixed{Value: 1})}, "fixed value"},
		{"invalid literal", []Param{p("a", Uniform{Min: 3, Max: 1})}, `parameter 1 ("a"): uniform prior: min (3) must be less than max (1)`},
		{"invalid trunc literal", []Param{p("a", TruncNormal{Mu: 0, Sigma: 1, Min: 50, Max: 60})}, "negligible mass"},
		{"zero ToUnit", []Param{{Name: "a", Prior: u}}, "ToUnit is 0"},
		{"NaN ToUnit", []Param{{Name: "a", ToUnit: math.NaN(), Prior: u}}, "ToUnit is NaN"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := Space{Params: tc.params}.Validate()
			if err == nil {
				t.Fatalf("no error, want %q", tc.want)
			}
			if !strings.Contains(err.Error(), tc.want) {
				t.Errorf("error %q does not contain %q", err, tc.want)
			}
		})
	}
}

// BenchmarkLogPrior measures the per-step prior cost of a six-parameter
// space (uniform, normal, wide and narrow truncated normals, log-uniform,
// categorical).
func BenchmarkLogPrior(b *testing.B) {
	s := testSpace()
	x := []float64{2e6, 3350, 3e4, 1e21, 1, 2050}
	b.ReportAllocs()
	sum := 0.0
	for b.Loop() {
		sum += s.LogPrior(x)
	}
	if math.IsNaN(sum) {
		b.Fatal("NaN")
	}
}

// BenchmarkSample measures drawing a full six-parameter point.
func BenchmarkSample(b *testing.B) {
	s := testSpace()
	r := newRand(1, 2)
	x := make([]float64, s.Dim())
	b.ReportAllocs()
	for b.Loop() {
		s.Sample(r, x)
	}
}
