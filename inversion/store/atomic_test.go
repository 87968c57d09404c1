package store

import (
	"bytes"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

func TestWriteFileAtomic(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "checkpoint.bin")
	for _, content := range [][]byte{[]byte("first version"), {}, bytes.Repeat([]byte{0, 1, 2}, 1<<16)} {
		if err := WriteFileAtomic(p, content, 0o640); err != nil {
			t.Fatal(err)
		}
		got, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(got, content) {
			t.Errorf("read %d bytes back, want %d", len(got), len(content))
		}
	}
	st, err := os.Stat(p)
	if err != nil {
		t.Fatal(err)
	}
	if st.Mode().Perm() != 0o640 {
		t.Errorf("permission %v, want 0640", st.Mode().Perm())
	}
	assertDir(t, dir, "checkpoint.bin")
	if err := WriteFileAtomic(dir+string(filepath.Separator), nil, 0o644); err == nil {
		t.Error("no error for a path ending in a separator")
	}
}

// TestFailedWriteLeavesOldFile checks that a write that fails halfway leaves
// the old content at the path and no temporary file.
func TestFailedWriteLeavesOldFile(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, PartName(0))
	if err := WritePart(p, sampleBatch(50, 0), nil); err != nil {
		t.Fatal(err)
	}
	old, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	err = writeAtomic(p, 0o644, func(w io.Writer) error {
		if _, err := w.Write(old[:len(old)/2]); err != nil {
			return err
		}
		return io.ErrShortWrite
	})
	if err == nil || !strings.Contains(err.Error(), p) {
		t.Fatalf("error %v does not name %s", err, p)
	}
	now, err := os.ReadFile(p)
	if err != nil || !bytes.Equal(now, old) {
		t.Errorf("old file changed by a failed write (err %v)", err)
	}
	assertDir(t, dir, PartName(0))
}

// crashEnv makes the test binary act as a writer that is killed mid-write.
const crashEnv = "PLUMB_STORE_CRASH_DIR"

// TestCrashHelper is not a test: run as a child process with crashEnv set,
// it starts an atomic write of a part, writes half the bytes, signals the
// parent through a "ready" file and waits to be killed.
func TestCrashHelper(t *testing.T) {
	dir := os.Getenv(crashEnv)
	if dir == "" {
		t.Skip("helper process only")
	}
	var full bytes.Buffer
	if err := encodeParquet(&full, sampleBatch(5000, 1), nil, writeConfig{rowGroupRows: 1000}); err != nil {
		t.Fatal(err)
	}
	_ = writeAtomic(filepath.Join(dir, PartName(1)), 0o644, func(w io.Writer) error {
		if _, err := w.Write(full.Bytes()[:full.Len()/2]); err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(dir, "ready"), nil, 0o644); err != nil {
			return err
		}
		time.Sleep(time.Minute) // killed long before this ends
		return nil
	})
	t.Fatal("helper was not killed")
}

// TestKilledWriter kills a writer process in the middle of an atomic write
// and checks that readers see only complete parts, that the leftover is a
// temporary file, and that CleanTemp removes it and nothing else.
func TestKilledWriter(t *testing.T) {
	dir := t.TempDir()
	first := sampleBatch(200, 0)
	if err := WritePart(filepath.Join(dir, PartName(0)), first, nil); err != nil {
		t.Fatal(err)
	}
	other := filepath.Join(dir, "notes.txt")
	if err := os.WriteFile(other, []byte("keep"), 0o644); err != nil {
		t.Fatal(err)
	}

	cmd := exec.Command(os.Args[0], "-test.run=^TestCrashHelper$")
	cmd.Env = append(os.Environ(), crashEnv+"="+dir)
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	deadline := time.Now().Add(30 * time.Second)
	for {
		if _, err := os.Stat(filepath.Join(dir, "ready")); err == nil {
			break
		}
		if time.Now().After(deadline) {
			_ = cmd.Process.Kill()
			_ = cmd.Wait()
			t.Fatal("helper never became ready")
		}
		time.Sleep(5 * time.Millisecond)
	}
	if err := cmd.Process.Signal(syscall.SIGKILL); err != nil {
		t.Fatal(err)
	}
	_ = cmd.Wait()
	if err := os.Remove(filepath.Join(dir, "ready")); err != nil {
		t.Fatal(err)
	}

	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var temps []string
	for _, e := range entries {
		if isTempName(e.Name()) {
			temps = append(temps, e.Name())
		}
	}
	if len(temps) != 1 || !strings.HasPrefix(temps[0], "."+PartName(1)+".") {
		t.Fatalf("temporary files after the kill: %q, want one for %s", temps, PartName(1))
	}
	if _, err := os.Stat(filepath.Join(dir, PartName(1))); !os.IsNotExist(err) {
		t.Errorf("%s exists after its writer was killed (err %v)", PartName(1), err)
	}
	// The leftover is not a readable Parquet file: this is what the
	// temporary name protects readers from.
	if _, _, err := ReadPart(filepath.Join(dir, temps[0])); err == nil {
		t.Error("the half-written temporary file reads as a valid part")
	}
	got, _, err := ReadParts(dir)
	if err != nil {
		t.Fatalf("ReadParts with a leftover temporary file: %v", err)
	}
	assertSameData(t, first, got)

	if err := CleanTemp(dir); err != nil {
		t.Fatal(err)
	}
	assertDir(t, dir, "notes.txt", PartName(0))
	if err := CleanTemp(dir); err != nil {
		t.Errorf("second CleanTemp: %v", err)
	}
}

func TestCleanTempKeepsOtherFiles(t *testing.T) {
	dir := t.TempDir()
	keep := []string{
		PartName(0),
		".hidden",
		"x" + TempSuffix,        // no leading dot
		"." + TempSuffix,        // no base name or random part
		".x" + TempSuffix,       // no random part
		TempSuffix,              // the bare suffix
		".part-00003.parquet.1", // no suffix
	}
	remove := []string{".part-00001.parquet.123" + TempSuffix, ".checkpoint.json.9" + TempSuffix}
	for _, n := range append(cloneStrings(keep), remove...) {
		if err := os.WriteFile(filepath.Join(dir, n), []byte("x"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	// A directory with a temporary-looking name is not touched.
	if err := os.Mkdir(filepath.Join(dir, ".d.1"+TempSuffix), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := CleanTemp(dir); err != nil {
		t.Fatal(err)
	}
	assertDir(t, dir, append(cloneStrings(keep), ".d.1"+TempSuffix)...)
	if err := CleanTemp(filepath.Join(dir, "missing")); err == nil || !strings.Contains(err.Error(), "missing") {
		t.Errorf("CleanTemp of a missing directory: %v", err)
	}
}

// cloneStrings returns a copy of s (so appends do not share storage).
func cloneStrings(s []string) []string { return append([]string(nil), s...) }
