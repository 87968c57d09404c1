package layout

import (
	"bufio"
	"bytes"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"testing"
)

// pkgInfo is what `go list -json` says of one package (the fields used here).
type pkgInfo struct {
	ImportPath string
	Dir        string
	Deps       []string // non-test dependencies, transitive
	GoFiles    []string
}

// listPackages runs `go list -json -deps=false ./...` from the module root.
func listPackages(t *testing.T) []pkgInfo {
	t.Helper()
	goBin := filepath.Join(runtime.GOROOT(), "bin", "go")
	cmd := exec.Command(goBin, "list", "-json", "./...")
	cmd.Dir = moduleRoot(t)
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("go list: %v", err)
	}
	var pkgs []pkgInfo
	dec := json.NewDecoder(bytes.NewReader(out))
	for dec.More() {
		var p pkgInfo
		if err := dec.Decode(&p); err != nil {
			t.Fatal(err)
		}
		pkgs = append(pkgs, p)
	}
	if len(pkgs) < 10 {
		t.Fatalf("go list found %d packages: wrong folder?", len(pkgs))
	}
	return pkgs
}

func moduleRoot(t *testing.T) string {
	_, file, _, ok := runtime.Caller(0)
	if !ok {
		t.Fatal("cannot locate the test file")
	}
	return filepath.Join(filepath.Dir(file), "..", "..")
}

// within reports whether import path p is pkg or below it.
func within(p, pkg string) bool { return p == pkg || strings.HasPrefix(p, pkg+"/") }

// TestImportRules checks the one-way imports of the design on the non-test code: physics and
// probability know nothing of each other or of inversions; the generic sampler and store know no
// planet; the readers (summary, truth comparison, figures, report) never import the run loop.
func TestImportRules(t *testing.T) {
	rules := []struct {
		pkg       string // the package and everything below it
		forbidden []string
		why       string
	}{
		{"plumb/forward", []string{"plumb/priors", "plumb/inversion"}, "physics knows no probability and no inversion"},
		{"plumb/priors", []string{"plumb/forward", "plumb/inversion"}, "probability knows no physics"},
		{"plumb/inversion/mcmc", []string{"plumb/forward", "plumb/priors", "plumb/inversion/problem", "plumb/inversion/runfolder"}, "the sampler is generic"},
		{"plumb/inversion/store", []string{"plumb/forward", "plumb/priors", "plumb/inversion/problem", "plumb/inversion/runfolder"}, "the store knows no column's meaning"},
		{"plumb/inversion/problem", []string{"plumb/inversion/runfolder", "plumb/inversion/run", "plumb/inversion/results", "plumb/inversion/report"}, "the problem knows no run folder"},
		{"plumb/inversion/runfolder", []string{"plumb/inversion/run", "plumb/inversion/results", "plumb/inversion/report"}, "the folder format is below its writers and readers"},
		{"plumb/inversion/results", []string{"plumb/inversion/run", "plumb/inversion/report"}, "readers do not import the run loop"},
		{"plumb/inversion/report", []string{"plumb/inversion/run"}, "readers do not import the run loop"},
		{"plumb/inversion/run", []string{"plumb/inversion/results", "plumb/inversion/report"}, "the run loop does not depend on its readers"},
	}
	pkgs := listPackages(t)
	checked := 0
	for _, p := range pkgs {
		for _, r := range rules {
			if !within(p.ImportPath, r.pkg) {
				continue
			}
			checked++
			for _, d := range p.Deps {
				if slices.ContainsFunc(r.forbidden, func(f string) bool { return within(d, f) }) {
					t.Errorf("%s imports %s: %s", p.ImportPath, d, r.why)
				}
			}
		}
	}
	if checked < len(rules) {
		t.Fatalf("only %d packages matched %d rules: a package was renamed without its rule", checked, len(rules))
	}
}

// TestEnvironmentOnlyInCmd checks that no non-test Go file outside cmd/ reads the process
// environment (os.Getenv, os.LookupEnv, os.Environ, viper's AutomaticEnv/BindEnv/SetEnvPrefix):
// the engine is a function of its config; flags and environment variables become overrides in
// cmd alone.
func TestEnvironmentOnlyInCmd(t *testing.T) {
	banned := []string{"os.Getenv(", "os.LookupEnv(", "os.Environ(", ".AutomaticEnv(", ".BindEnv(", ".SetEnvPrefix("}
	for _, p := range listPackages(t) {
		if within(p.ImportPath, "plumb/cmd") {
			continue
		}
		for _, f := range p.GoFiles {
			path := filepath.Join(p.Dir, f)
			b, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			sc := bufio.NewScanner(bytes.NewReader(b))
			for n := 1; sc.Scan(); n++ {
				line := sc.Text()
				if i := strings.Index(line, "//"); i >= 0 {
					line = line[:i]
				}
				for _, w := range banned {
					if strings.Contains(line, w) {
						t.Errorf("%s:%d reads the environment (%s); only cmd/ may", path, n, strings.TrimSuffix(w, "("))
					}
				}
			}
		}
	}
}
