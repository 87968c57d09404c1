package report

import (
	"bytes"
	"context"
	"errors"
	"image"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"

	"plumb/internal/testfix"
	"plumb/inversion/mcmc"
	"plumb/inversion/problem"
	"plumb/inversion/results"
	"plumb/inversion/run"
	"plumb/inversion/runfolder"
	"plumb/priors"
)

// testConfig is the shared three-layer fixture (no EOS, so a run takes well under a second)
// made to show every kind of figure content: uniform, normal and log-uniform priors, a density
// gradient, a categorical core state with unequal prior weights, a derived layer radius, two
// observations and a profiles table.
var testConfig = testfix.Edit(testfix.MustRead("three_layers.yaml"),
	"values: [liquid, solid]}", "values: [liquid, solid], weights: [3, 1]}",
	"  checkpoint_every_steps: 100\n", "  checkpoint_every_steps: 200\n  profiles: {every_draws: 5, radius_step_km: 50}\n")

// newRun samples text into a fresh run folder and loads it.
func newRun(t *testing.T, text string) *Run {
	t.Helper()
	dir := t.TempDir()
	path := filepath.Join(dir, "c.yaml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	cfg, err := problem.Load(path, nil)
	if err != nil {
		t.Fatal(err)
	}
	f, err := run.Start(context.Background(), cfg, path, filepath.Join(dir, "run"), run.Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	r, err := Load(f)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// A density histogram integrates to one over its range, and each bin's density is its count
// over N·width.
func TestHistogramIsADensity(t *testing.T) {
	s := []float64{0, 0.1, 0.15, 0.5, 0.9, 1}
	d := histogram(s, 0, 1, 4)
	want := []float64{3 / 1.5, 0, 1 / 1.5, 2 / 1.5} // 1 is in the last, closed bin
	for k := range d {
		if math.Abs(d[k]-want[k]) > 1e-12 {
			t.Errorf("bin %d: %g, want %g", k, d[k], want[k])
		}
	}
	if got := sum(d) * 0.25; math.Abs(got-1) > 1e-12 {
		t.Errorf("integral %g", got)
	}
}

// The prior density in output units is the SI density times the Jacobian 1/ToUnit: a uniform
// prior over 500–2500 km has density 1/2000 per km, and any prior integrates to one over the
// output unit.
func TestPriorDensityJacobian(t *testing.T) {
	u, _ := priors.NewUniform(5e5, 2.5e6)
	n, _ := priors.NewNormal(3.6e6, 1e5) // SI: m
	cases := []struct {
		name   string
		p      Param
		at     float64
		want   float64
		lo, hi float64
	}{
		{"uniform km", Param{Prior: u, ToUnit: 1e-3}, 1000, 1.0 / 2000, 500, 2500},
		{"normal km", Param{Prior: n, ToUnit: 1e-3}, 3600, 1 / (100 * math.Sqrt(2*math.Pi)), 3000, 4200},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := c.p.PriorDensity(c.at); math.Abs(got-c.want) > 1e-12*c.want {
				t.Errorf("density %g, want %g", got, c.want)
			}
			const steps = 20000
			h, total := (c.hi-c.lo)/steps, 0.0
			for k := range steps {
				total += c.p.PriorDensity(c.lo+(float64(k)+0.5)*h) * h
			}
			if math.Abs(total-1) > 1e-4 {
				t.Errorf("integral %g, want 1", total)
			}
		})
	}
	if !math.IsNaN((Param{ToUnit: 1}).PriorDensity(1)) {
		t.Error("a derived column has a prior density")
	}
}

func TestNiceTicks(t *testing.T) {
	cases := []struct {
		lo, hi float64
		want   []string
	}{
		{0, 4200, []string{"0", "1000", "2000", "3000", "4000"}},
		{-3, 3, []string{"-3", "-2", "-1", "0", "1", "2", "3"}},
		{0.3, 0.4, []string{"0.3", "0.32", "0.34", "0.36", "0.38", "0.4"}},
		{1.33e24, 1.336e24, []string{"1.33e+24", "1.331e+24", "1.332e+24", "1.333e+24", "1.334e+24", "1.335e+24", "1.336e+24"}},
	}
	for _, c := range cases {
		var got []string
		for _, tk := range (niceTicks{}).Ticks(c.lo, c.hi) {
			if tk.Label != "" {
				got = append(got, tk.Label)
			}
			if tk.Value < c.lo || tk.Value > c.hi {
				t.Errorf("[%g, %g]: tick %g outside", c.lo, c.hi, tk.Value)
			}
		}
		if !slices.Equal(got, c.want) {
			t.Errorf("[%g, %g]: labels %q, want %q", c.lo, c.hi, got, c.want)
		}
	}
}

// The highest-density levels of a grid hold at least the asked share of the total.
func TestCredibleLevels(t *testing.T) {
	g := &counts2D{dx: 1, dy: 1, z: [][]float64{{1, 2, 1}, {2, 10, 2}, {1, 2, 1}}} // total 22
	lv := g.credibleLevels(0.5, 0.9)
	// Sorted: 10, 2, 2, 2, 2, 1, … The centre alone holds 10/22 < 0.5, with one 2 it holds
	// 12/22 ≥ 0.5; all four 2s give 18/22 < 0.9, so 90 % needs the corners (1).
	if lv[0] != 2 || lv[1] != 1 {
		t.Errorf("levels %v, want [2 1]", lv)
	}
}

func TestRunFigures(t *testing.T) {
	r := newRun(t, testConfig)

	// Columns, default pair, categorical probabilities.
	if x, y, ok := r.DefaultPair(); !ok || x != "core_outer_radius_km" || y != "core_density_kg_m3" {
		t.Errorf("default pair %s, %s, %v", x, y, ok)
	}
	if _, ok := r.Lookup("mantle_outer_radius_km"); !ok {
		t.Error("the derived radius column is not plottable")
	}
	if slices.ContainsFunc(r.Sampled(), func(p Param) bool { return p.Name == "mantle_outer_radius_km" }) {
		t.Error("a derived column is among the sampled parameters")
	}
	s, err := results.Summarize(r.Folder)
	if err != nil {
		t.Fatal(err)
	}
	cats := r.Categoricals()
	if len(cats) != 1 || cats[0].Name != "core_state" {
		t.Fatalf("categoricals %+v", cats)
	}
	for i, l := range cats[0].Labels {
		if math.Abs(cats[0].Posterior[i]-s.Categorical[0].Probability[l]) > 1e-12 ||
			math.Abs(cats[0].Prior[i]-s.Categorical[0].Prior[l]) > 1e-12 {
			t.Errorf("%s: %g/%g, summary %g/%g", l, cats[0].Posterior[i], cats[0].Prior[i],
				s.Categorical[0].Probability[l], s.Categorical[0].Prior[l])
		}
	}
	if math.Abs(cats[0].Prior[0]-0.75) > 1e-12 {
		t.Errorf("prior P(liquid) %g, want 3/4", cats[0].Prior[0])
	}

	// Observation fit: the median of (pred − obs)/σ recomputed from the column.
	fits := r.ObservationFits()
	for i, o := range r.Problem.Observations {
		pred, _ := r.Samples.Float64(runfolder.PredictionPrefix + o.Observable.Key)
		z := make([]float64, len(pred))
		si := o.Observable.ToSI()
		for k, v := range pred {
			z[k] = (v - o.Value/si) / (o.Sigma / si)
		}
		for k, p := range fitQuantiles {
			if want := mcmc.Quantile7(z, p); math.Abs(fits[i].Q[k]-want) > 1e-9*math.Max(1, math.Abs(want)) {
				t.Errorf("%s q%g: %g, want %g", o.Observable.Key, p, fits[i].Q[k], want)
			}
		}
	}

	// Profiles: the crust density is fixed, so every quantile at the surface is 2800 kg/m3;
	// at the centre the profile density is the core density parameter of the profiled draws.
	b, err := r.Bands(runfolder.ColDensity)
	if err != nil {
		t.Fatal(err)
	}
	if b.RadiusKm[0] != 0 || b.RadiusKm[len(b.RadiusKm)-1] != 3000 {
		t.Errorf("radius grid %g … %g", b.RadiusKm[0], b.RadiusKm[len(b.RadiusKm)-1])
	}
	last := len(b.RadiusKm) - 1
	for k := range fitQuantiles {
		if b.Q[k][last] != 2800 {
			t.Errorf("surface density quantile %d: %g", k, b.Q[k][last])
		}
		for i := range b.RadiusKm {
			if k > 0 && b.Q[k][i] < b.Q[k-1][i] {
				t.Fatalf("r=%g: quantiles not ordered", b.RadiusKm[i])
			}
		}
	}
	draws, _ := r.Samples.Int64(colDraw)
	coreRho := r.values("core_density_kg_m3")
	var profiled []float64
	for i, d := range draws {
		if d%5 == 0 {
			profiled = append(profiled, coreRho[i])
		}
	}
	if got, want := b.Q[2][0], mcmc.Quantile7(profiled, 0.5); math.Abs(got-want) > 1e-9*want {
		t.Errorf("central density median %g, core density median of profiled draws %g", got, want)
	}

	// Every figure renders in every format at the asked size and is not blank.
	var notes bytes.Buffer
	figs, err := Figures(r, Options{Pairs: []Pair{{"crust_thickness_km", "mantle_outer_radius_km"}}}, &notes)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, f := range figs {
		names = append(names, f.Name)
	}
	if want := []string{"marginals", "pairs", "profiles", "traces", "levels", "observations"}; !slices.Equal(names, want) {
		t.Errorf("figures %v, want %v (notes %q)", names, want, notes.String())
	}
	for _, f := range figs {
		b, err := f.Render("png", 640, 480)
		if err != nil {
			t.Fatal(err)
		}
		checkPNG(t, f.Name, b, 640, 480)
		for format, magic := range map[string]string{"svg": "<?xml", "pdf": "%PDF-"} {
			v, err := f.Render(format, 640, 480)
			if err != nil {
				t.Fatal(err)
			}
			if !bytes.HasPrefix(v, []byte(magic)) {
				t.Errorf("%s.%s starts %q", f.Name, format, v[:min(10, len(v))])
			}
			// Deterministic output, including the PDF whose dates are pinned.
			if v2, _ := f.Render(format, 640, 480); !bytes.Equal(v, v2) {
				t.Errorf("%s.%s differs between two renderings", f.Name, format)
			}
		}
	}
	if _, err := figs[0].Render("gif", 640, 480); err == nil {
		t.Error("format gif accepted")
	}
	if _, err := Marginals(r, []string{"core_radius"}); err == nil || !strings.Contains(err.Error(), "core_radius") {
		t.Errorf("unknown parameter: %v", err)
	}
	if n, err := r.Check(Options{Pairs: []Pair{{"core_outer_radius_km", "nope"}}}); n != "nope" || err == nil {
		t.Errorf("Check: %q %v", n, err)
	}

	// The fallback pair when the core layer has no radius/density parameters.
	r.Config.Layers[0].Name = "inner"
	if x, y, ok := r.DefaultPair(); !ok || x != r.Continuous()[0].Name || y != r.Continuous()[1].Name {
		t.Errorf("fallback pair %s, %s, %v", x, y, ok)
	}
	r.Config.Layers[0].Name = "core"

	// The Markdown report names every parameter and links figure files that exist.
	report := filepath.Join(t.TempDir(), "my report.md")
	s, err = results.Summarize(r.Folder)
	if err != nil {
		t.Fatal(err)
	}
	written, err := MarkdownReport(r, s, report, Options{}, &notes)
	if err != nil {
		t.Fatal(err)
	}
	md, err := os.ReadFile(report)
	if err != nil {
		t.Fatal(err)
	}
	text := string(md)
	for _, p := range s.Parameters {
		if !strings.Contains(text, "`"+p.Name+"`") {
			t.Errorf("report lacks parameter %s", p.Name)
		}
	}
	for _, w := range []string{"`core_state`", "`mass_kg`", "Testa", "run complete", runfolder.Caution, r.Checkpoint.ConfigSHA256} {
		if !strings.Contains(text, w) {
			t.Errorf("report lacks %q", w)
		}
	}
	links := regexp.MustCompile(`!\[[^\]]*\]\(<?([^)>]+)>?\)`).FindAllStringSubmatch(text, -1)
	if len(links) != len(written) || len(links) != 6 {
		t.Errorf("%d image links, %d figures written", len(links), len(written))
	}
	for _, l := range links {
		p := filepath.Join(filepath.Dir(report), filepath.FromSlash(l[1]))
		b, err := os.ReadFile(p)
		if err != nil {
			t.Errorf("link %s: %v", l[1], err)
			continue
		}
		checkPNG(t, p, b, DefaultWidthPx, DefaultHeightPx)
	}
}

// A run without a profiles table draws every other figure and notes the missing one.
func TestNoProfilesTable(t *testing.T) {
	text := strings.Replace(testConfig, "every_draws: 5", "every_draws: 0", 1)
	text = strings.Replace(text, "steps: 600", "steps: 200", 1)
	r := newRun(t, text)
	if r.Profiles != nil {
		t.Fatal("profiles table present")
	}
	var notes bytes.Buffer
	figs, err := Figures(r, Options{}, &notes)
	if err != nil {
		t.Fatal(err)
	}
	if len(figs) != 5 || !strings.Contains(notes.String(), "skipped the profiles figure: run ") || strings.Count(notes.String(), "\n") != 1 {
		t.Errorf("%d figures, notes %q", len(figs), notes.String())
	}
	if _, err := Profiles(r, nil); !errors.Is(err, ErrNothingToDraw) {
		t.Errorf("Profiles without a table: %v", err)
	}
}

// checkPNG decodes b as a PNG of w×h pixels that is not blank (its grey levels vary).
func checkPNG(t *testing.T, name string, b []byte, w, h int) {
	t.Helper()
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatalf("%s: %v", name, err)
	}
	if got := img.Bounds(); got != image.Rect(0, 0, w, h) {
		t.Errorf("%s: bounds %v, want %d×%d", name, got, w, h)
	}
	var s, ss float64
	n := 0
	for y := 0; y < h; y += 2 {
		for x := 0; x < w; x += 2 {
			r, g, bl, _ := img.At(x, y).RGBA()
			v := float64(r+g+bl) / 3
			s += v
			ss += v * v
			n++
		}
	}
	if m := s / float64(n); ss/float64(n)-m*m <= 0 {
		t.Errorf("%s: blank image", name)
	}
}

// A single peak gives one closed contour crossing each grid edge from the peak where linear
// interpolation reaches the level: here 5 between 10 and 2, 5/8 of the way.
func TestContourLines(t *testing.T) {
	g := &counts2D{x0: 0, dx: 1, y0: 0, dy: 1, z: [][]float64{{1, 2, 1}, {2, 10, 2}, {1, 2, 1}}}
	lines := contourLines(g, 5)
	if len(lines) != 1 {
		t.Fatalf("%d lines, want 1", len(lines))
	}
	l := lines[0]
	if len(l) != 5 || l[0] != l[4] {
		t.Fatalf("not a closed 4-point loop: %v", l)
	}
	for _, p := range l {
		dx, dy := math.Abs(p.X-1.5), math.Abs(p.Y-1.5)
		if math.Abs(dx+dy-0.625) > 1e-12 || math.Min(dx, dy) != 0 {
			t.Errorf("point %v, want 0.625 from the peak (1.5, 1.5) along a grid line", p)
		}
	}
	// Two separate peaks give two lines; the padding closes a line at the grid's border.
	g2 := &counts2D{dx: 1, dy: 1, z: [][]float64{{9, 0, 9}}}
	if n := len(contourLines(g2, 5)); n != 2 {
		t.Errorf("two peaks: %d lines", n)
	}
}

func TestConvergenceNote(t *testing.T) {
	f := func(v float64) *float64 { return &v }
	cases := []struct {
		name string
		rhat []*float64
		ess  []*float64
		want []string // "" entries: no note
	}{
		{"converged", []*float64{f(1.001), f(1.005)}, []*float64{f(1200), f(800)}, nil},
		{"rhat", []*float64{f(1.001), f(1.3)}, []*float64{f(1200), f(800)}, []string{"R̂ up to 1.300", "`b`"}},
		{"ess", []*float64{f(1.001), f(1.002)}, []*float64{f(90), f(800)}, []string{"bulk-ESS down to 90", "`a`"}},
		{"undefined", []*float64{nil, f(1.002)}, []*float64{nil, f(800)}, nil},
	}
	for _, c := range cases {
		s := &results.Summary{}
		for i := range c.rhat {
			s.Parameters = append(s.Parameters, results.ParamSummary{Name: string(rune('a' + i)), RHat: c.rhat[i], ESSBulk: c.ess[i]})
		}
		got := convergenceNote(s)
		if (got == "") != (c.want == nil) {
			t.Errorf("%s: note %q", c.name, got)
		}
		for _, w := range c.want {
			if !strings.Contains(got, w) {
				t.Errorf("%s: note %q lacks %q", c.name, got, w)
			}
		}
	}
}
