package results

import (
	"context"
	"path/filepath"
	"testing"

	"plumb/internal/testfix"
	"plumb/inversion/problem"
	"plumb/inversion/run"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
)

// startRun runs a config text to completion in a fresh folder and returns the opened folder.
func startRun(t *testing.T, text string, workers int) *runfolder.Folder {
	t.Helper()
	path := testfix.Write(t, "c.yaml", text)
	cfg, err := problem.Load(path, nil)
	if err != nil {
		t.Fatal(err)
	}
	dir := filepath.Join(t.TempDir(), "run")
	if _, err := run.Start(context.Background(), cfg, path, dir, run.Options{Workers: workers}); err != nil {
		t.Fatal(err)
	}
	f, err := runfolder.Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// readSamples reads the sample table of the folder directly (not through the folder's cache).
func readSamples(t *testing.T, f *runfolder.Folder) *store.Batch {
	t.Helper()
	b, _, err := store.ReadParts(filepath.Join(f.Dir, runfolder.SamplesDir))
	if err != nil {
		t.Fatal(err)
	}
	return b
}
