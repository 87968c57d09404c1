// Package testfix is test support: it reads the shared config fixtures of testdata/configs/
// (listed in testdata/configs/README.md), located from this source file, so that tests of
// several packages use one copy of each instead of inline YAML of their own.
package testfix

import (
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// Dir returns the absolute path of testdata/configs.
func Dir() string {
	_, file, _, ok := runtime.Caller(0)
	if !ok {
		panic("testfix: cannot locate the source file")
	}
	return filepath.Join(filepath.Dir(file), "..", "..", "testdata", "configs")
}

// Path returns the absolute path of the fixture name.
func Path(name string) string { return filepath.Join(Dir(), name) }

// MustRead returns the text of the fixture name; it panics when the file cannot be read (a
// broken checkout), which fails the test binary at start-up with the file named.
func MustRead(name string) string {
	b, err := os.ReadFile(Path(name))
	if err != nil {
		panic("testfix: " + err.Error())
	}
	return string(b)
}

// Write writes text to a file name in a fresh temporary folder of t and returns its path.
func Write(t testing.TB, name, text string) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

// Edit applies old/new replacement pairs to a fixture's text in turn; each old must occur exactly
// once (it panics otherwise, so that a changed fixture cannot silently stop a test's edit).
func Edit(text string, pairs ...string) string {
	if len(pairs)%2 != 0 {
		panic("testfix.Edit: odd number of arguments")
	}
	for i := 0; i < len(pairs); i += 2 {
		if n := strings.Count(text, pairs[i]); n != 1 {
			panic(fmt.Sprintf("testfix.Edit: %q occurs %d times, want once", pairs[i], n))
		}
		text = strings.Replace(text, pairs[i], pairs[i+1], 1)
	}
	return text
}
