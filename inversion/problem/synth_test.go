package problem

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// demoTruth is runs/demo/truth.yaml, which holds the quakes' true sources too (distances 38°,
// 64°, 85°; depths as in runs/demo/config.yaml).
func demoTruth(testing.TB) string {
	return filepath.Join("..", "..", "runs", "demo", "truth.yaml")
}

func loadDemo(t testing.TB) (*Config, *Problem, string) {
	t.Helper()
	path := filepath.Join("..", "..", "runs", "demo", "config.yaml")
	cfg, err := Load(path, nil)
	if err != nil {
		t.Fatal(err)
	}
	p, err := Build(cfg, path)
	if err != nil {
		t.Fatal(err)
	}
	return cfg, p, path
}

// A noise-free synth of the demo from its truth reproduces the demo's data to the digits they were
// rounded to (runs/demo/README.md: mass 1.33343e24 kg, I/(MR²) 0.3502, k2 0.173, the picks to
// 0.1 s, all computed with plumb forward from the truth and rounded) — an independent check of
// the demo's data through the inversion's own forward evaluation.
func TestSynthDemoNoiseFreeReproducesData(t *testing.T) {
	_, p, path := loadDemo(t)
	pred, err := TruthPredictions(demoTruth(t), p)
	if err != nil {
		t.Fatal(err)
	}
	// Half a unit of the last digit given in config.yaml, per observation.
	halfUnit := map[string]float64{"mass_kg": 0.5e19, "moi_factor": 0.5e-4, "k2": 0.5e-3}
	for i, o := range p.Observations {
		h, ok := halfUnit[o.Observable.Key]
		if !ok {
			h = 0.05 // picks: 0.1 s
		}
		got := pred[i] / o.Observable.ToSI()
		want := o.Value / o.Observable.ToSI()
		t.Logf("%s: truth %.10g, demo data %g", o.Observable.Key, got, want)
		if math.Abs(got-want) > h*(1+1e-9) {
			t.Errorf("%s: truth gives %.10g, the demo's data %g: differ by more than the rounding (%g)", o.Observable.Key, got, want, h)
		}
	}
	src, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	out, err := ReplaceObservations(src, path, p, AddNoise(p, pred, nil))
	if err != nil {
		t.Fatal(err)
	}
	// Only the replaced numbers change: every line that holds no observation value is unchanged.
	a, b := strings.Split(string(src), "\n"), strings.Split(string(out), "\n")
	if len(a) != len(b) {
		t.Fatalf("%d lines became %d", len(a), len(b))
	}
	changed := 0
	for i := range a {
		if a[i] != b[i] {
			changed++
			if !strings.Contains(a[i], "value:") && !strings.Contains(a[i], "time_s:") {
				t.Errorf("line %d changed:\n%s\n%s", i+1, a[i], b[i])
			}
		}
	}
	if changed != len(p.Observations) {
		t.Errorf("%d lines changed, want %d (one per observation)", changed, len(p.Observations))
	}
}

// The noise is N(0, σ²) per observation: over many seeds the standardised residuals of every
// observation have mean 0 and variance 1 (tolerance: 4 standard errors, √(1/n) for the mean and
// √(2/n) for the variance of a normal sample), are uncorrelated between observations, and the same
// seed gives the same values bit for bit.
func TestAddNoiseStatistics(t *testing.T) {
	_, p, _ := loadDemo(t)
	pred, err := TruthPredictions(demoTruth(t), p)
	if err != nil {
		t.Fatal(err)
	}
	const n = 4000
	k := len(p.Observations)
	sum, sum2 := make([]float64, k), make([]float64, k)
	cross := 0.0 // Σ z0·z1: first two observations
	for seed := range uint64(n) {
		v := AddNoise(p, pred, SynthRand(seed))
		for i, o := range p.Observations {
			z := (v[i] - pred[i]) / o.Sigma
			sum[i] += z
			sum2[i] += z * z
		}
		cross += (v[0] - pred[0]) / p.Observations[0].Sigma * (v[1] - pred[1]) / p.Observations[1].Sigma
	}
	for i, o := range p.Observations {
		m := sum[i] / n
		va := sum2[i]/n - m*m
		if math.Abs(m) > 4/math.Sqrt(n) || math.Abs(va-1) > 4*math.Sqrt(2.0/n) {
			t.Errorf("%s: residual mean %.4f, variance %.4f; want 0 ± %.3f, 1 ± %.3f", o.Observable.Key, m, va, 4/math.Sqrt(n), 4*math.Sqrt(2.0/n))
		}
	}
	if r := cross / n; math.Abs(r) > 4/math.Sqrt(n) {
		t.Errorf("correlation of the first two residuals %.4f", r)
	}
	a, b := AddNoise(p, pred, SynthRand(7)), AddNoise(p, pred, SynthRand(7))
	c := AddNoise(p, pred, SynthRand(8))
	for i := range a {
		if a[i] != b[i] {
			t.Fatalf("seed 7 twice: %v ≠ %v", a[i], b[i])
		}
		if a[i] == c[i] {
			t.Errorf("seeds 7 and 8 give the same %s", p.Observations[i].Observable.Key)
		}
	}
	if nf := AddNoise(p, pred, nil); !slicesEqual(nf, pred) {
		t.Error("noise-free values differ from the predictions")
	}
}

func slicesEqual(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// The rewritten config reads back with exactly the values written (shortest round-trip form), and
// the same inputs give the same bytes.
func TestReplaceObservationsRoundTrip(t *testing.T) {
	_, p, path := loadDemo(t)
	src, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	pred, err := TruthPredictions(demoTruth(t), p)
	if err != nil {
		t.Fatal(err)
	}
	vals := AddNoise(p, pred, SynthRand(11))
	out, err := ReplaceObservations(src, path, p, vals)
	if err != nil {
		t.Fatal(err)
	}
	again, _ := ReplaceObservations(src, path, p, vals)
	if !bytes.Equal(out, again) {
		t.Error("same inputs, different bytes")
	}
	synth := filepath.Join(t.TempDir(), "synth.yaml")
	if err := os.WriteFile(synth, out, 0o644); err != nil {
		t.Fatal(err)
	}
	c, err := Load(synth, nil)
	if err != nil {
		t.Fatal(err)
	}
	q, err := Build(c, synth)
	if err != nil {
		t.Fatal(err)
	}
	for i, o := range q.Observations {
		if o.Observable.Key != p.Observations[i].Observable.Key || o.Value != vals[i] || o.Sigma != p.Observations[i].Sigma {
			t.Errorf("%s: read back %v ± %v, wrote %v ± %v", o.Observable.Key, o.Value, o.Sigma, vals[i], p.Observations[i].Sigma)
		}
	}
	// TOML configs are refused with a one-line input error.
	if _, err := ReplaceObservations(src, "c.toml", p, vals); err == nil || !strings.Contains(err.Error(), "YAML configs only") {
		t.Errorf("TOML: %v", err)
	}
	// A value behind an anchor cannot be spliced in place.
	anch := strings.Replace(string(src), "moi_factor: {value: 0.3502, sigma: 0.003}", "moi_factor: &m {value: 0.3502, sigma: 0.003}", 1)
	anch = strings.Replace(anch, "k2: {value: 0.173, sigma: 0.01}", "k2: *m", 1)
	if _, err := ReplaceObservations([]byte(anch), path, p, vals); err == nil {
		t.Error("aliased observation: no error")
	}
}
