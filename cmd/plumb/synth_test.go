package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"plumb/internal/testfix"
	"strings"
	"testing"
)

// smallTruth is the truth of smallConfig (testdata/configs/two_layers_truth.yaml).
var smallTruth = testfix.MustRead("two_layers_truth.yaml")

// synth writes configs that plumb run accepts as they are; the same seed gives the same bytes,
// the default seed is the config's sampler.seed; --out never overwrites; summary --truth reports
// where the truth falls.
func TestSynthRunSummaryTruth(t *testing.T) {
	dir := t.TempDir()
	cfg := write(t, dir, "c.yaml", smallConfig)
	truth := write(t, dir, "truth.yaml", smallTruth)
	synth := func(args ...string) string {
		t.Helper()
		code, out, errOut := plumb(t, append([]string{"synth", cfg, "--truth", truth}, args...)...)
		if code != 0 {
			t.Fatalf("synth %v: exit %d: %s", args, code, errOut)
		}
		return out
	}
	a, b, c := synth("--seed", "5"), synth("--seed", "5"), synth("--seed", "6")
	if a != b {
		t.Error("same seed, different output")
	}
	if a == c {
		t.Error("seeds 5 and 6 give the same output")
	}
	if synth() != synth("--seed", "3") { // smallConfig has sampler.seed 3
		t.Error("the default seed is not the config's sampler.seed")
	}
	nf := synth("--noise-free")
	// Only the two observation lines differ from the input.
	diff := 0
	in, outl := strings.Split(smallConfig, "\n"), strings.Split(nf, "\n")
	for i := range in {
		if in[i] != outl[i] {
			diff++
		}
	}
	if len(in) != len(outl) || diff != 2 {
		t.Errorf("%d of %d lines changed (want 2):\n%s", diff, len(in), nf)
	}
	out := filepath.Join(dir, "synth.yaml")
	synth("--out", out)
	written, _ := os.ReadFile(out)
	if string(written) != synth() {
		t.Error("--out and stdout differ")
	}
	code, _, errOut := plumb(t, "synth", cfg, "--truth", truth, "--out", out, "--seed", "9")
	if after, _ := os.ReadFile(out); code != 2 || !strings.Contains(errOut, "exists; not overwriting") || !bytes.Equal(after, written) {
		t.Errorf("overwrite: exit %d, %q, file changed %v", code, errOut, !bytes.Equal(after, written))
	}
	run := filepath.Join(dir, "run")
	if code, _, errOut := plumb(t, "run", out, "--out", run); code != 0 {
		t.Fatalf("run of the synthetic config: exit %d: %s", code, errOut)
	}
	code, text, errOut := plumb(t, "summary", run, "--truth", truth)
	if code != 0 {
		t.Fatalf("summary --truth: exit %d: %s", code, errOut)
	}
	for _, w := range []string{"posterior quantile", "core_outer_radius_km", "mantle_density_kg_m3", "in their central 90 % interval"} {
		if !strings.Contains(text, w) {
			t.Errorf("summary --truth lacks %q", w)
		}
	}
	code, js, errOut := plumb(t, "summary", run, "--truth", truth, "--json")
	if code != 0 {
		t.Fatalf("summary --truth --json: exit %d: %s", code, errOut)
	}
	// summaryCmd prints the summary's JSON first; the truth comparison is the last document.
	// With --json and --truth the output is one JSON document {"summary": …, "truth": …}.
	var doc struct {
		Summary map[string]any `json:"summary"`
		Truth   map[string]any `json:"truth"`
	}
	dec := json.NewDecoder(strings.NewReader(js))
	if err := dec.Decode(&doc); err != nil {
		t.Fatalf("JSON: %v", err)
	}
	if dec.More() {
		t.Errorf("more than one JSON document on stdout")
	}
	ps, _ := doc.Truth["parameters"].([]any)
	if doc.Truth["truth_file"] != truth || len(ps) != 3 || doc.Summary["planet"] != "Testa" {
		t.Errorf("summary/truth JSON: %v", doc)
	}
}

// Bad input: exit status 2 and one line on stderr naming the file, key or flag.
func TestSynthBadInput(t *testing.T) {
	dir := t.TempDir()
	cfg := write(t, dir, "c.yaml", smallConfig)
	truth := write(t, dir, "truth.yaml", smallTruth)
	toml := write(t, dir, "c.toml", "[planet]\nname = \"T\"\nradius_km = 3000\n")
	renamed := write(t, dir, "renamed.yaml", strings.Replace(smallTruth, "name: mantle", "name: shell", 1))
	prior := write(t, dir, "prior.yaml", strings.Replace(smallTruth, "density_kg_m3: 8000", "density_kg_m3: {prior: uniform, min: 1, max: 2}", 1))
	cases := []struct {
		name string
		args []string
		want []string
	}{
		{"no truth flag", []string{"synth", cfg}, []string{"--truth"}},
		{"bad seed", []string{"synth", cfg, "--truth", truth, "--seed", "abc"}, []string{"--seed"}},
		{"negative seed", []string{"synth", cfg, "--truth", truth, "--seed", "-1"}, []string{"--seed"}},
		{"seed and noise-free", []string{"synth", cfg, "--truth", truth, "--seed", "1", "--noise-free"}, []string{"--seed", "--noise-free"}},
		{"missing truth file", []string{"synth", cfg, "--truth", filepath.Join(dir, "none.yaml")}, []string{"none.yaml", "no such file"}},
		{"missing truth key", []string{"synth", cfg, "--truth", renamed}, []string{"renamed.yaml", "layers", `no layer named "mantle"`, "mantle_density_kg_m3"}},
		{"prior in truth", []string{"synth", cfg, "--truth", prior}, []string{"prior.yaml", "layers[0].density_kg_m3", "fixed values"}},
		{"toml config", []string{"synth", toml, "--truth", truth}, []string{"c.toml", "YAML configs only"}},
		{"summary of no run", []string{"summary", dir, "--truth", truth}, []string{"not a run folder"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, out, errOut := plumb(t, c.args...)
			if code != 2 {
				t.Errorf("exit %d, want 2 (stderr %q)", code, errOut)
			}
			if out != "" {
				t.Errorf("stdout %q, want nothing", out)
			}
			if strings.Count(errOut, "\n") != 1 || !strings.HasPrefix(errOut, "plumb: ") {
				t.Errorf("stderr %q: want one line", errOut)
			}
			for _, w := range c.want {
				if !strings.Contains(errOut, w) {
					t.Errorf("stderr %q lacks %q", errOut, w)
				}
			}
		})
	}
}
