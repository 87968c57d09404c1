// Command plumb infers the interior structure of a rocky planet or moon from global
// measurements by Markov chain Monte Carlo over layered interior models.
//
// Usage:
//
//	plumb run CONFIG [--out RUN_DIR]   sample the posterior, write a run folder
//	plumb resume RUN_DIR               continue an interrupted run exactly
//	plumb summary RUN_DIR              posterior table (and summary.json)
//	plumb check CONFIG                 validate a config, print parameters and observations
//	plumb forward --model FILE.csv     evaluate one tabulated interior model
//
// Exit status: 0 success, 1 failure, 2 bad input (config, model file, usage), 130 interrupted
// (checkpoint written; resume with plumb resume).
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"plumb/inversion/problem"
	"plumb/inversion/run"
	"plumb/inversion/runfolder"
	"strings"
	"syscall"

	"github.com/spf13/cobra"
)

// Exit statuses.
const (
	exitOK          = 0
	exitFailure     = 1
	exitBadInput    = 2
	exitInterrupted = 130
)

func main() {
	ctx, cancel := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	code := runCLI(ctx, os.Args[1:], os.Stdout, os.Stderr)
	cancel()
	os.Exit(code)
}

// inputError marks an error caused by the user's input (exit status 2).
type inputError struct{ err error }

func (e inputError) Error() string { return e.err.Error() }
func (e inputError) Unwrap() error { return e.err }

// runCLI executes the CLI with args and returns the exit status; it never panics on bad input.
func runCLI(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	root := newRoot(ctx, stdout, stderr)
	root.SetArgs(args)
	err := root.Execute()
	if err == nil {
		return exitOK
	}
	msg := strings.Join(strings.Fields(err.Error()), " ")
	fmt.Fprintf(stderr, "plumb: %s\n", msg)
	var ce *problem.ConfigError
	var ie inputError
	switch {
	case errors.Is(err, run.ErrInterrupted):
		return exitInterrupted
	case errors.As(err, &ce), errors.As(err, &ie), errors.Is(err, run.ErrRunDirNotEmpty), isUsage(err):
		return exitBadInput
	}
	return exitFailure
}

// usageError marks command-line misuse detected by cobra.
type usageError struct{ err error }

func (e usageError) Error() string { return e.err.Error() }

func isUsage(err error) bool {
	var u usageError
	return errors.As(err, &u)
}

func newRoot(ctx context.Context, stdout, stderr io.Writer) *cobra.Command {
	root := &cobra.Command{
		Use:   "plumb",
		Short: "Bayesian inference of planetary interior structure",
		Long: "plumb samples layered interior models of a rocky planet or moon with Markov chain Monte Carlo,\n" +
			"evaluates each with physical forward models and writes the posterior ensemble to Parquet.\n\n" +
			"Caution: " + runfolder.Caution,
		SilenceUsage:  true,
		SilenceErrors: true,
		Version:       runfolder.Version,
	}
	root.SetOut(stdout)
	root.SetErr(stderr)
	root.SetContext(ctx)
	root.SetFlagErrorFunc(func(_ *cobra.Command, err error) error { return usageError{err} })
	root.AddCommand(runCmd(), resumeCmd(), summaryCmd(), checkCmd(), forwardCmd(), plotCmd(), synthCmd())
	for _, c := range root.Commands() {
		c.Args = wrapArgs(c.Args)
	}
	return root
}

// wrapArgs marks positional-argument errors as usage errors.
func wrapArgs(f cobra.PositionalArgs) cobra.PositionalArgs {
	if f == nil {
		return nil
	}
	return func(cmd *cobra.Command, args []string) error {
		if err := f(cmd, args); err != nil {
			return usageError{err}
		}
		return nil
	}
}
