package main

import (
	"bytes"
	"image"
	"image/png"
	"os"
	"path/filepath"
	"plumb/internal/testfix"
	"regexp"
	"strings"
	"testing"
)

// plotConfig is the two-layer fixture made a quick closed-form run with a categorical core state
// and a profiles table.
var plotConfig = testfix.Edit(testfix.MustRead("two_layers.yaml"),
	"planet: {name: Testa,", "planet: {name: Plotta,",
	"    vp_km_s: 5\n    state: liquid\n", "    vp_km_s: 5\n    vs_km_s: 2\n    state: {prior: categorical, values: [liquid, solid]}\n",
	"steps: 300, thin: 1, seed: 3}", "steps: 400, thin: 1, seed: 5}",
	"output: {checkpoint_every_steps: 100}\n", "output:\n  checkpoint_every_steps: 100\n  profiles: {every_draws: 10, radius_step_km: 50}\n")

// truthModel is a layered model file (the truth for --truth): the two-layer fixture's truth.
var truthModel = testfix.MustRead("two_layers_truth.yaml")

// newPlotRun runs plotConfig into a temp folder and returns the run folder.
func newPlotRun(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	out := filepath.Join(dir, "run")
	if code, _, stderr := plumb(t, "run", write(t, dir, "c.yaml", plotConfig), "--out", out); code != 0 {
		t.Fatalf("run: exit %d: %s", code, stderr)
	}
	return out
}

// decodePNG checks that path is a w×h PNG whose pixels are not all the same.
func decodePNG(t *testing.T, path string, w, h int) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if b := img.Bounds(); b != image.Rect(0, 0, w, h) {
		t.Errorf("%s: %v, want %d×%d", path, b, w, h)
	}
	var s, ss float64
	for y := 0; y < h; y++ {
		for x := 0; x < w; x++ {
			r, _, _, _ := img.At(x, y).RGBA()
			s += float64(r)
			ss += float64(r) * float64(r)
		}
	}
	n := float64(w * h)
	if ss/n-(s/n)*(s/n) <= 0 {
		t.Errorf("%s: blank", path)
	}
}

func TestPlot(t *testing.T) {
	run := newPlotRun(t)
	dir := t.TempDir()
	truth := write(t, dir, "truth.yaml", truthModel)
	want := []string{"marginals", "pairs", "profiles", "traces", "levels", "observations"}

	// PNG at a chosen size, into RUN_DIR/plots by default.
	code, stdout, stderr := plumb(t, "plot", run, "--width-px", "640", "--height-px", "480", "--truth", truth,
		"--params", "core_outer_radius_km,core_density_kg_m3", "--pairs", "mantle_density_kg_m3:core_density_kg_m3")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	files := strings.Fields(stdout)
	if len(files) != len(want) {
		t.Fatalf("printed %q", stdout)
	}
	for i, f := range files {
		if f != filepath.Join(run, "plots", want[i]+".png") {
			t.Errorf("file %d: %s", i, f)
		}
		decodePNG(t, f, 640, 480)
	}
	withTruth, _ := os.ReadFile(filepath.Join(run, "plots", "profiles.png"))

	// Replacing the figures is allowed; without --truth the profiles figure differs.
	out := filepath.Join(dir, "again")
	if code, _, stderr := plumb(t, "plot", run, "--out", out, "--width-px", "640", "--height-px", "480"); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	without, _ := os.ReadFile(filepath.Join(out, "profiles.png"))
	if bytes.Equal(withTruth, without) || len(without) == 0 {
		t.Error("the truth line did not change the profiles figure")
	}

	// Vector formats.
	for format, magic := range map[string]string{"svg": "<?xml", "pdf": "%PDF-"} {
		out := filepath.Join(dir, format)
		code, stdout, stderr := plumb(t, "plot", run, "--out", out, "--format", format)
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", format, code, stderr)
		}
		for _, f := range strings.Fields(stdout) {
			b, err := os.ReadFile(f)
			if err != nil || !strings.HasSuffix(f, "."+format) || !bytes.HasPrefix(b, []byte(magic)) {
				t.Errorf("%s: %v, starts %q", f, err, b[:min(8, len(b))])
			}
		}
		if n := len(strings.Fields(stdout)); n != len(want) {
			t.Errorf("%s: %d files", format, n)
		}
	}
}

func TestPlotBadFlags(t *testing.T) {
	run := newPlotRun(t)
	dir := t.TempDir()
	bad := write(t, dir, "bad.yaml", strings.Replace(truthModel, "1500", "{prior: uniform, min: 1, max: 2}", 1))
	cases := []struct {
		name string
		args []string
		want []string
	}{
		{"format", []string{"--format", "gif"}, []string{"--format", "gif"}},
		{"unknown param", []string{"--params", "core_radius_km"}, []string{"--params", "core_radius_km"}},
		{"empty param", []string{"--params", "core_outer_radius_km,"}, []string{"--params", "empty"}},
		{"pair syntax", []string{"--pairs", "core_outer_radius_km"}, []string{"--pairs", "X:Y"}},
		{"unknown pair", []string{"--pairs", "core_outer_radius_km:nope"}, []string{"--pairs", "nope"}},
		{"missing truth", []string{"--truth", filepath.Join(dir, "none.yaml")}, []string{"--truth", "none.yaml"}},
		{"truth with a prior", []string{"--truth", bad}, []string{"--truth", "bad.yaml"}},
		{"width", []string{"--width-px", "0"}, []string{"--width-px", "0"}},
		{"height", []string{"--height-px", "90000"}, []string{"--height-px", "90000"}},
		{"not a number", []string{"--width-px", "wide"}, []string{"wide"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, stdout, stderr := plumb(t, append([]string{"plot", run, "--out", filepath.Join(dir, "x")}, c.args...)...)
			if code != 2 {
				t.Errorf("exit %d, want 2 (%q)", code, stderr)
			}
			if lines := strings.Split(strings.TrimRight(stderr, "\n"), "\n"); len(lines) != 1 {
				t.Errorf("stderr has %d lines: %q", len(lines), stderr)
			}
			for _, w := range c.want {
				if !strings.Contains(stderr, w) {
					t.Errorf("stderr %q lacks %q", stderr, w)
				}
			}
			if stdout != "" {
				t.Errorf("stdout %q", stdout)
			}
		})
	}
	if _, err := os.Stat(filepath.Join(dir, "x")); err == nil {
		t.Error("a refused plot created its output folder")
	}
	if code, _, _ := plumb(t, "plot", dir); code != 2 {
		t.Errorf("plot of a folder that is not a run: exit %d", code)
	}
}

func TestSummaryMarkdown(t *testing.T) {
	run := newPlotRun(t)
	dir := t.TempDir()
	report := filepath.Join(dir, "veyra.md")
	code, stdout, stderr := plumb(t, "summary", run, "--json", "--markdown", report)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	if !strings.HasPrefix(stdout, "{") {
		t.Errorf("stdout is not the JSON summary: %.40q", stdout)
	}
	md, err := os.ReadFile(report)
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []string{"`core_outer_radius_km`", "`core_density_kg_m3`", "`mantle_density_kg_m3`", "`core_state`",
		"`mass_kg`", "`moi_factor`", "Plotta", "Caution"} {
		if !strings.Contains(string(md), w) {
			t.Errorf("report lacks %s", w)
		}
	}
	links := regexp.MustCompile(`!\[[^\]]*\]\(([^)]+)\)`).FindAllStringSubmatch(string(md), -1)
	if len(links) != 6 {
		t.Errorf("%d figure links", len(links))
	}
	for _, l := range links {
		if !strings.HasPrefix(l[1], "veyra_figures/") {
			t.Errorf("link %s not in veyra_figures/", l[1])
		}
		decodePNG(t, filepath.Join(dir, l[1]), 1200, 900)
	}
	// A second report to the same file is refused and leaves it alone.
	code, _, stderr = plumb(t, "summary", run, "--markdown", report)
	if code != 2 || !strings.Contains(stderr, "--markdown") || !strings.Contains(stderr, "veyra.md") {
		t.Errorf("overwrite: exit %d, %q", code, stderr)
	}
	if again, _ := os.ReadFile(report); !bytes.Equal(again, md) {
		t.Error("the refused report changed the file")
	}
}
