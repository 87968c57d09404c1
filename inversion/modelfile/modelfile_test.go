package modelfile

import (
	"bytes"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"plumb/forward"
	"plumb/internal/prem"
)

const header = "radius_km,density_kg_m3,vp_km_s,vs_km_s\n"

func TestReadCSVErrors(t *testing.T) {
	cases := []struct {
		name, text string
		want       []string // substrings of the error message
	}{
		{"non-numeric cell", header + "0,13000,11.2,3.6\n1000,abc,11,3\n",
			[]string{`model.csv: line 3, column density_kg_m3: "abc" is not a number`}},
		{"non-numeric after comments", "# comment\n\n" + header + "# more\n0,1,1,1\n\n1000,1,1,x1\n",
			[]string{`model.csv: line 7, column vs_km_s: "x1" is not a number`}},
		{"inf is not a number", header + "0,inf,1,1\n1,1,1,1\n", []string{`line 2, column density_kg_m3: "inf" is not a number`}},
		{"hex is not a number", header + "0,0x10,1,1\n1,1,1,1\n", []string{`"0x10" is not a number`}},
		{"empty cell", header + "0,,1,1\n1,1,1,1\n", []string{`line 2, column density_kg_m3: "" is not a number`}},
		{"overflow", header + "0,1e999,1,1\n1,1,1,1\n", []string{`line 2, column density_kg_m3: "1e999" is out of range`}},
		{"decreasing radius", header + "0,9,9,0\n100,8,8,0\n90,7,7,0\n",
			[]string{"model.csv: line 4, column radius_km", `"90"`, "must not decrease", "see line 3"}},
		{"first radius not 0", header + "10,9,9,0\n100,8,8,0\n", []string{"line 2, column radius_km", "first radius must be 0"}},
		{"three rows at one radius", header + "0,9,9,0\n100,8,8,0\n100,7,7,0\n100,6,6,0\n200,5,5,0\n",
			[]string{"line 5, column radius_km", "three rows"}},
		{"negative density", header + "0,9,9,0\n100,-8,8,0\n", []string{"line 3, column density_kg_m3", `"-8"`, "> 0"}},
		{"bad header", "radius,density,vp,vs\n0,1,1,1\n", []string{"model.csv: line 1: header must be", `got "radius,density,vp,vs"`}},
		{"header with unknown extra column", "radius_km,density_kg_m3,vp_km_s,vs_km_s,qmu\n", []string{"line 1: header must be"}},
		{"header columns out of order", "radius_km,vp_km_s,density_kg_m3,vs_km_s\n", []string{"line 1: header must be"}},
		{"wrong column count", header + "0,1,1,1\n1,1,1\n", []string{"line 3: 3 columns, but the header has 4"}},
		{"empty file", "", []string{"model.csv: no header line"}},
		{"only comments", "# nothing\n\n", []string{"no header line"}},
		{"header only", header, []string{"model.csv: need at least 2 rows, got 0"}},
		{"one row", header + "0,1,1,1\n", []string{"need at least 2 rows, got 1"}},
		{"bad quote", header + "0,\"1,1,1\n", []string{"model.csv:", "line 2"}},
		{"negative viscosity", "radius_km,density_kg_m3,vp_km_s,vs_km_s,viscosity_pa_s\n0,1,1,1,1e21\n1,1,1,1,-3\n",
			[]string{"line 3, column viscosity_pa_s", `"-3"`}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadCSV(strings.NewReader(c.text), "model.csv")
			if err == nil {
				t.Fatal("no error")
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q\n does not contain %q", err, w)
				}
			}
		})
	}
	// Row errors keep the forward.TableError in the chain.
	_, err := ReadCSV(strings.NewReader(header+"0,9,9,0\n100,8,8,0\n90,7,7,0\n"), "m.csv")
	var te *forward.TableError
	if !errors.As(err, &te) || te.Row != 3 {
		t.Errorf("error %v does not wrap a TableError for row 3", err)
	}
}

func TestReadCSVFileMissing(t *testing.T) {
	path := filepath.Join(t.TempDir(), "does-not-exist.csv")
	_, err := ReadCSVFile(path)
	if err == nil || !strings.Contains(err.Error(), path) || !errors.Is(err, os.ErrNotExist) {
		t.Errorf("error %v should name %s and be ErrNotExist", err, path)
	}
}

func TestReadCSVFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "m.csv")
	if err := os.WriteFile(path, []byte(header+"0,5000,8,4\n2000,4000,7,3.5\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	m, err := ReadCSVFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Layers) != 1 || m.Radius() != 2e6 {
		t.Errorf("got %d layers, radius %g", len(m.Layers), m.Radius())
	}
	// A bad file names its path.
	if err := os.WriteFile(path, []byte(header+"0,5000,8,4\n2000,x,7,3.5\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := ReadCSVFile(path); err == nil || !strings.HasPrefix(err.Error(), path+": line 3") {
		t.Errorf("error %v should start with %s: line 3", err, path)
	}
}

// A piecewise-linear file must equal the model built by hand from
// forward.Linear layers in SI units (km → m, km/s → m/s), with comments, blank
// lines, spaces, CRLF line ends and the viscosity column.
func TestReadCSVEqualsLinearLayers(t *testing.T) {
	text := "# test model\r\n" +
		"radius_km, density_kg_m3, vp_km_s, vs_km_s, viscosity_pa_s\r\n" +
		"0, 13088.5, 11.2622, 3.6678, 1e18\r\n" +
		"\r\n" +
		"1221.5, 12763.6, 11.0283, 3.5043, 3e18\r\n" +
		"1221.5, 12166.3, 10.3557, 0, 0.01\r\n" +
		"# the core-mantle boundary\r\n" +
		"3480, 9903.5, 8.0648, 0, 0.01\r\n" +
		"3480, 5566.5, 13.7166, 7.2647, 1e22\r\n" +
		"6371, 3300, 8.1, 4.5, 2e20\r\n"
	m, err := ReadCSV(strings.NewReader(text), "t.csv")
	if err != nil {
		t.Fatal(err)
	}
	want := []forward.Layer{
		{Inner: 0, Outer: 1221.5e3, Density: forward.Linear(0, 13088.5, 1221.5e3, 12763.6),
			Vp: forward.Linear(0, 11262.2, 1221.5e3, 11028.3), Vs: forward.Linear(0, 3667.8, 1221.5e3, 3504.3), Viscosity: 2e18},
		{Inner: 1221.5e3, Outer: 3480e3, Density: forward.Linear(1221.5e3, 12166.3, 3480e3, 9903.5),
			Vp: forward.Linear(1221.5e3, 10355.7, 3480e3, 8064.8), Vs: forward.Linear(1221.5e3, 0, 3480e3, 0), Fluid: true, Viscosity: 0.01},
		{Inner: 3480e3, Outer: 6371e3, Density: forward.Linear(3480e3, 5566.5, 6371e3, 3300),
			Vp: forward.Linear(3480e3, 13716.6, 6371e3, 8100), Vs: forward.Linear(3480e3, 7264.7, 6371e3, 4500), Viscosity: 0.5e22 + 1e20},
	}
	if len(m.Layers) != len(want) {
		t.Fatalf("%d layers, want %d", len(m.Layers), len(want))
	}
	for i, w := range want {
		g := m.Layers[i]
		if g.Inner != w.Inner || g.Outer != w.Outer || g.Fluid != w.Fluid || g.Viscosity != w.Viscosity ||
			!polyEqual(g.Density, w.Density) || !polyEqual(g.Vp, w.Vp) || !polyEqual(g.Vs, w.Vs) {
			t.Errorf("layer %d\n got %+v\nwant %+v", i, g, w)
		}
	}
}

func polyEqual(a, b forward.Poly) bool {
	if a.Scale != b.Scale || len(a.C) != len(b.C) {
		return false
	}
	for i := range a.C {
		if a.C[i] != b.C[i] {
			return false
		}
	}
	return true
}

// WriteProfileCSV → read must reproduce every profile column bit for bit, and
// the model read must be the one forward.FromTable builds from the profile.
func TestProfileRoundTrip(t *testing.T) {
	s, err := forward.Solve(prem.MustLoad(t))
	if err != nil {
		t.Fatal(err)
	}
	p := s.Profile(9)
	var buf bytes.Buffer
	if err := WriteProfileCSV(&buf, p); err != nil {
		t.Fatal(err)
	}
	text := buf.String()
	tb, err := readTable(strings.NewReader(text), "profile.csv")
	if err != nil {
		t.Fatal(err)
	}
	pairs := []struct {
		name      string
		got, want []float64
	}{
		{"radius", tb.Radius, p.Radius}, {"density", tb.Density, p.Density}, {"vp", tb.Vp, p.Vp},
		{"vs", tb.Vs, p.Vs}, {"gravity", tb.gravity, p.Gravity}, {"pressure", tb.pressure, p.Pressure},
	}
	for _, pr := range pairs {
		if len(pr.got) != len(pr.want) {
			t.Fatalf("%s: %d values, want %d", pr.name, len(pr.got), len(pr.want))
		}
		for i := range pr.want {
			if math.Float64bits(pr.got[i]) != math.Float64bits(pr.want[i]) {
				t.Errorf("%s[%d] = %.17g, want %.17g", pr.name, i, pr.got[i], pr.want[i])
			}
		}
	}
	m, err := ReadCSV(strings.NewReader(text), "profile.csv")
	if err != nil {
		t.Fatal(err)
	}
	m2, err := forward.FromTable(forward.Table{Radius: p.Radius, Density: p.Density, Vp: p.Vp, Vs: p.Vs})
	if err != nil {
		t.Fatal(err)
	}
	if len(m.Layers) != len(m2.Layers) {
		t.Fatalf("%d layers, want %d", len(m.Layers), len(m2.Layers))
	}
	for i := range m.Layers {
		a, b := m.Layers[i], m2.Layers[i]
		if a.Inner != b.Inner || a.Outer != b.Outer || a.Fluid != b.Fluid || !polyEqual(a.Density, b.Density) ||
			!polyEqual(a.Vp, b.Vp) || !polyEqual(a.Vs, b.Vs) {
			t.Errorf("layer %d differs after the round trip", i)
		}
	}
	// Human-readable output: the surface is written as 6371 (km), not 6.371e3.
	if !strings.Contains(text, "\n6371,") {
		t.Errorf("surface row not written as plain km:\n%s", text[len(text)-200:])
	}
}

// Sanity check: PREM sampled at 50 nodes per layer, written and re-read as a
// piecewise-linear table, has the mass and I/(MR²) of the polynomial PREM to
// within the linear-interpolation error (1e-3; the reference is the closed-form
// polynomial model, Dziewonski & Anderson 1981).
func TestTabulatedPREM(t *testing.T) {
	s, err := forward.Solve(prem.MustLoad(t))
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteProfileCSV(&buf, s.Profile(50)); err != nil {
		t.Fatal(err)
	}
	m, err := ReadCSV(&buf, "prem50.csv")
	if err != nil {
		t.Fatal(err)
	}
	s2, err := forward.Solve(m)
	if err != nil {
		t.Fatal(err)
	}
	if d := math.Abs(s2.Mass/s.Mass - 1); d > 1e-3 {
		t.Errorf("tabulated PREM mass %g, polynomial %g (rel. diff %g)", s2.Mass, s.Mass, d)
	}
	if d := math.Abs(s2.MoIFactor()/s.MoIFactor() - 1); d > 1e-3 {
		t.Errorf("tabulated PREM I/(MR²) %g, polynomial %g", s2.MoIFactor(), s.MoIFactor())
	}
	if d := math.Abs(s2.CentralPressure()/s.CentralPressure() - 1); d > 1e-3 {
		t.Errorf("tabulated PREM central pressure %g, polynomial %g", s2.CentralPressure(), s.CentralPressure())
	}
}

func TestWriteProfileCSVErrors(t *testing.T) {
	ok := forward.Profile{Radius: []float64{0, 1}, Density: []float64{1, 1}, Vp: []float64{1, 1},
		Vs: []float64{1, 1}, Gravity: []float64{0, 1}, Pressure: []float64{1, 0}}
	short := ok
	short.Vp = []float64{1}
	nan := ok
	nan.Pressure = []float64{math.NaN(), 0}
	for name, p := range map[string]forward.Profile{"short column": short, "NaN": nan} {
		if err := WriteProfileCSV(&bytes.Buffer{}, p); err == nil {
			t.Errorf("%s: no error", name)
		}
	}
	if err := WriteProfileCSV(&bytes.Buffer{}, ok); err != nil {
		t.Error(err)
	}
}

// formatScaled/parseScaled must round-trip every float exactly.
func TestScaledRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	vals := []float64{0, math.Copysign(0, -1), 1, -1, 6371e3, 1221.5e3, 0.1, 1e-300, 5e-324,
		math.MaxFloat64, math.SmallestNonzeroFloat64, 123456789012345678, 1.0000000000000002}
	for range 20000 {
		vals = append(vals, math.Float64frombits(rng.Uint64()))
		vals = append(vals, rng.Float64()*1e7)
	}
	for _, v := range vals {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			continue
		}
		for _, shift := range []int{0, 3} {
			s := formatScaled(v, shift)
			got, err := parseScaled(s, shift)
			// Values within 1000× of the float limits can leave the range
			// when shifted; they are not physical model values.
			if err != nil && (math.Abs(v) > 1e305 || math.Abs(v) < 1e-305) {
				continue
			}
			if err != nil || math.Float64bits(got) != math.Float64bits(v) {
				t.Fatalf("shift %d: %v → %q → %v (err %v)", shift, v, s, got, err)
			}
		}
	}
	cases := []struct {
		s     string
		shift int
		want  float64
	}{
		{"6371", 3, 6371e3}, {"6346.6", 3, 6346.6e3}, {"1.45", 3, 1450}, {".5", 3, 500}, {"5.", 3, 5000},
		{"+2E-3", 3, 2}, {"6.371e3", 3, 6371e3}, {"-0", 3, 0},
	}
	for _, c := range cases {
		got, err := parseScaled(c.s, c.shift)
		if err != nil || got != c.want {
			t.Errorf("parseScaled(%q, %d) = %v, %v; want %v", c.s, c.shift, got, err, c.want)
		}
	}
	for _, bad := range []string{"", "-", ".", "e5", "1e", "1e+", "1.2.3", "1,5", "NaN", "Inf", "0x1p3", "1_000", " 1"} {
		if _, err := parseScaled(bad, 3); err == nil {
			t.Errorf("parseScaled(%q) accepted", bad)
		}
	}
}

func FuzzReadCSV(f *testing.F) {
	f.Add(header + "0,13000,11.2,3.6\n1221.5,12700,11.0,3.5\n1221.5,12100,10.3,0\n3480,9900,8.0,0\n")
	f.Add("radius_km,density_kg_m3,vp_km_s,vs_km_s,viscosity_pa_s\n0,1,1,1,1e21\n1,1,1,1,3\n")
	f.Add("radius_km,density_kg_m3,vp_km_s,vs_km_s,gravity_m_s2,pressure_pa\n0,1,1,1,0,5\n1e-300,1e300,1,0,1,0\n")
	f.Add("# c\n\n" + header + "0,1,1,0\n0.000001,1,1e-300,0\n")
	f.Add(header + "0,\"1\n\",1,1\n")
	f.Fuzz(func(t *testing.T, text string) {
		m, err := ReadCSV(strings.NewReader(text), "fuzz.csv")
		if err != nil {
			if !strings.HasPrefix(err.Error(), "fuzz.csv") {
				t.Errorf("error %q does not name the source", err)
			}
			return
		}
		if err := m.Validate(); err != nil {
			t.Errorf("ReadCSV returned an invalid model: %v", err)
		}
		// Solving may fail for extreme numbers, but must not panic.
		if s, err := forward.Solve(m); err == nil {
			_ = s.Profile(2)
		}
	})
}
