package run

import (
	"context"
	"path/filepath"
	"testing"

	"plumb/internal/testfix"
	"plumb/inversion/problem"
	"plumb/inversion/results"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
)

// testConfig is the shared three-layer fixture (testdata/configs/three_layers.yaml).
var testConfig = testfix.MustRead("three_layers.yaml")

// writeConfig writes a config text to a temporary file and returns its path.
func writeConfig(t testing.TB, name, text string) string { return testfix.Write(t, name, text) }

// mustLoad writes and loads a config text.
func mustLoad(t *testing.T, text string) *problem.Config {
	t.Helper()
	c, err := problem.Load(writeConfig(t, "c.yaml", text), nil)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// startRun runs a config text to completion in a fresh folder and returns the folder.
func startRun(t *testing.T, text string, workers int) string {
	t.Helper()
	path := writeConfig(t, "c.yaml", text)
	cfg, err := problem.Load(path, nil)
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "run")
	if _, err := Start(context.Background(), cfg, path, dir, Options{Workers: workers}); err != nil {
		t.Fatal(err)
	}
	return dir
}

// resume opens the run folder dir and resumes it.
func resume(ctx context.Context, dir string, opt Options) error {
	f, err := runfolder.Open(dir)
	if err != nil {
		return err
	}
	_, err = Resume(ctx, f, opt)
	return err
}

// summarize opens the run folder dir and summarises it.
func summarize(dir string) (*results.Summary, error) {
	f, err := runfolder.Open(dir)
	if err != nil {
		return nil, err
	}
	return results.Summarize(f)
}

// readSamples reads the whole sample table of the run folder dir.
func readSamples(t *testing.T, dir string) *store.Batch {
	t.Helper()
	b, _, err := store.ReadParts(filepath.Join(dir, runfolder.SamplesDir))
	if err != nil {
		t.Fatal(err)
	}
	return b
}
