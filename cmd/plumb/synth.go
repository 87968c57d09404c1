package main

import (
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"plumb/inversion/problem"
	"plumb/inversion/results"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
)

// synthCmd writes a copy of a run config whose observation values and pick times are computed
// from a truth model (plus Gaussian noise with the config's uncertainties).
func synthCmd() *cobra.Command {
	var truth, out string
	var seed uint64
	var noiseFree bool
	c := &cobra.Command{
		Use:   "synth CONFIG --truth FILE [--seed N | --noise-free] [--out FILE]",
		Short: "Write a copy of a config with synthetic observations computed from a truth model",
		Long: "synth computes every observation and seismic pick of CONFIG (a YAML run config; its sigma and\n" +
			"sigma_s give the uncertainties, its values are replaced) from the truth model FILE with the\n" +
			"inversion's own forward evaluation, adds Gaussian noise N(0, sigma²) — from --seed, by default\n" +
			"the config's sampler.seed, through a hashed generator of its own — unless --noise-free, and\n" +
			"writes the config with only those values changed (comments and layout kept) to --out or stdout.\n" +
			"FILE is a layered truth (the planet and layers sections of a config, every value fixed, plus\n" +
			"seismic.events with the true sources) or a tabulated CSV model (no picks then).",
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			f := cmd.Flags()
			if truth == "" {
				return usageError{fmt.Errorf("synth: --truth FILE is required")}
			}
			if noiseFree && f.Changed("seed") {
				return usageError{fmt.Errorf("synth: give --seed or --noise-free, not both")}
			}
			if out != "" {
				if _, err := os.Stat(out); err == nil {
					return inputError{fmt.Errorf("%s: exists; not overwriting", out)}
				}
			}
			path := args[0]
			if ext := strings.ToLower(filepath.Ext(path)); ext != ".yaml" && ext != ".yml" {
				// The values are spliced into the YAML text so that comments and layout survive;
				// TOML would need a writer of its own.
				return inputError{fmt.Errorf("%s: synth rewrites YAML configs only (convert this one to YAML)", path)}
			}
			cfg, err := problem.Load(path, configOverrides(nil))
			if err != nil {
				return err
			}
			p, err := problem.Build(cfg, path)
			if err != nil {
				return err
			}
			src, err := os.ReadFile(path)
			if err != nil {
				return inputError{fmt.Errorf("%s: %w", path, err)}
			}
			pred, err := problem.TruthPredictions(truth, p)
			if err != nil {
				return err
			}
			var r *rand.Rand
			noise := "noise-free"
			if !noiseFree {
				if !f.Changed("seed") {
					seed = cfg.Sampler.Seed // as plumb run resolves it (PLUMB_SAMPLER_SEED included)
				}
				r = problem.SynthRand(seed)
				noise = fmt.Sprintf("noise seed %d", seed)
			}
			b, err := problem.ReplaceObservations(src, path, p, problem.AddNoise(p, pred, r))
			if err != nil {
				return err
			}
			if out == "" {
				if _, err := cmd.OutOrStdout().Write(b); err != nil {
					return fmt.Errorf("write config: %w", err)
				}
			} else if err := store.WriteFileAtomic(out, b, 0o644); err != nil {
				return fmt.Errorf("write %s: %w", out, err)
			}
			fmt.Fprintf(cmd.ErrOrStderr(), "synth: %d observations from truth %s, %s\n", len(pred), truth, noise)
			if x, err := problem.LoadTruth(truth, p); err == nil && math.IsInf(p.Space.LogPrior(x), -1) {
				fmt.Fprintf(cmd.ErrOrStderr(), "synth: note: the truth lies outside the config's prior support\n")
			}
			return nil
		},
	}
	fl := c.Flags()
	fl.StringVar(&truth, "truth", "", "truth model: layered YAML/TOML (every value fixed) or tabulated CSV")
	fl.Uint64Var(&seed, "seed", 0, "seed of the noise (default: the config's sampler.seed)")
	fl.BoolVar(&noiseFree, "noise-free", false, "write the truth's exact predictions, without noise")
	fl.StringVar(&out, "out", "", "write the config here (refuses to overwrite) instead of stdout")
	return c
}

// summaryTruth prints where the truth in truthPath falls in the posterior of the run f: per
// parameter the true value, its posterior quantile and whether it lies in the central 90 %
// interval; per categorical parameter the posterior probability of the true level.
func summaryTruth(w io.Writer, f *runfolder.Folder, truthPath string, asJSON bool) error {
	tc, err := results.CompareTruth(f, truthPath)
	if err != nil {
		return err
	}
	if asJSON {
		b, err := tc.JSON()
		if err != nil {
			return err
		}
		_, err = w.Write(b)
		return err
	}
	if _, err := io.WriteString(w, "\n"); err != nil {
		return err
	}
	return tc.WriteText(w)
}
