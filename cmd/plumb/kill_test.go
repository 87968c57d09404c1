package main

import (
	"context"
	"errors"
	"math"
	"os"
	"os/exec"
	"os/signal"
	"path/filepath"
	"reflect"
	"strings"
	"syscall"
	"testing"
	"time"

	"plumb/inversion/store"
)

// TestMain lets the test binary stand in for the plumb binary: with PLUMB_TEST_AS_MAIN set it runs
// the CLI on its arguments, so tests can kill a real process at an arbitrary moment.
func TestMain(m *testing.M) {
	if os.Getenv("PLUMB_TEST_AS_MAIN") != "" {
		args := strings.Split(os.Getenv("PLUMB_TEST_AS_MAIN"), "\x1f")
		ctx, cancel := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
		code := runCLI(ctx, args, os.Stdout, os.Stderr)
		cancel()
		os.Exit(code)
	}
	os.Exit(m.Run())
}

func child(args ...string) *exec.Cmd {
	c := exec.Command(os.Args[0], "-test.run=^$")
	c.Env = append(os.Environ(), "PLUMB_TEST_AS_MAIN="+strings.Join(args, "\x1f"))
	return c
}

func rowsOf(t *testing.T, dir string) map[[2]int64][]any {
	t.Helper()
	b, _, err := store.ReadParts(filepath.Join(dir, "samples"))
	if err != nil {
		t.Fatal(err)
	}
	chain, _ := b.Int64("chain")
	draw, _ := b.Int64("draw")
	out := map[[2]int64][]any{}
	for i := range chain {
		var row []any
		for j := range b.Columns {
			switch d := b.Data[j].(type) {
			case []float64:
				row = append(row, math.Float64bits(d[i]))
			case []int64:
				row = append(row, d[i])
			case []string:
				row = append(row, d[i])
			}
		}
		out[[2]int64{chain[i], draw[i]}] = row
	}
	return out
}

// A run stopped by SIGINT (exit status 130 after its checkpoint) and then killed with SIGKILL at
// arbitrary moments (no chance to checkpoint) and resumed each time ends with the rows of an
// uninterrupted run, bit for bit.
func TestKillAndResume(t *testing.T) {
	if testing.Short() {
		t.Skip("spawns processes")
	}
	dir := t.TempDir()
	text := strings.NewReplacer("steps: 300", "steps: 60000", "checkpoint_every_steps: 100", "checkpoint_every_steps: 2000",
		"state: liquid", "state: {prior: categorical, values: [liquid, solid]}\n    vs_km_s: 2").Replace(smallConfig)
	cfg := write(t, dir, "c.yaml", text)
	ref := filepath.Join(dir, "ref")
	if code, _, errOut := plumb(t, "run", cfg, "--out", ref); code != 0 {
		t.Fatalf("reference run: exit %d: %s", code, errOut)
	}
	want := rowsOf(t, ref)

	out := filepath.Join(dir, "killed")
	kills, finished := 0, false
	args := []string{"run", cfg, "--out", out}
	for delay := 150 * time.Millisecond; !finished && kills < 20; delay += 40 * time.Millisecond {
		c := child(args...)
		if err := c.Start(); err != nil {
			t.Fatal(err)
		}
		done := make(chan error, 1)
		go func() { done <- c.Wait() }()
		select {
		case err := <-done:
			if err != nil {
				t.Fatalf("child %v: %v", args, err)
			}
			finished = true
		case <-time.After(delay):
			if kills == 0 {
				_ = c.Process.Signal(os.Interrupt)
				err := <-done
				var ee *exec.ExitError
				if !errors.As(err, &ee) || ee.ExitCode() != exitInterrupted {
					t.Fatalf("after SIGINT: %v, want exit status %d", err, exitInterrupted)
				}
			} else {
				_ = c.Process.Signal(syscall.SIGKILL)
				<-done
			}
			kills++
		}
		args = []string{"resume", out}
	}
	if code, _, errOut := plumb(t, "resume", out); code != 0 {
		t.Fatalf("final resume: exit %d: %s", code, errOut)
	}
	t.Logf("killed %d times", kills)
	if kills == 0 {
		t.Fatal("the run finished before it could be killed: the test proves nothing")
	}
	got := rowsOf(t, out)
	if len(got) != len(want) || !reflect.DeepEqual(got, want) {
		t.Fatalf("rows after %d kills: %d rows, want %d, equal=%v", kills, len(got), len(want), reflect.DeepEqual(got, want))
	}
}
