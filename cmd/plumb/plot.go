package main

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/spf13/cobra"

	"plumb/forward"
	"plumb/inversion/report"
	"plumb/inversion/results"
	"plumb/inversion/runfolder"
)

// Figure size limits in pixels: below 200 px the labels no longer fit; above 8000 px a PNG
// needs hundreds of MB of memory (common practice, no source).
const (
	minFigurePx = 200
	maxFigurePx = 8000
)

func plotCmd() *cobra.Command {
	var out, format, params, pairs, truth string
	var widthPx, heightPx int
	c := &cobra.Command{
		Use:   "plot RUN_DIR",
		Short: "Draw the figures of a run (marginals, pairs, profiles, traces, levels, observations)",
		Long: "plot draws the figures of a run folder into --out (default RUN_DIR/plots) and prints the files it\n" +
			"wrote, one per line:\n" +
			"  marginals     posterior histogram of each continuous parameter with its prior density\n" +
			"  pairs         joint posterior of the core radius and core density (or the first two\n" +
			"                parameters) and of every --pairs pair, with 50 % and 90 % credible regions\n" +
			"  profiles      density, vp and vs against radius: median, 50 % and 90 % bands, --truth\n" +
			"                (skipped with a note when the run has no profiles table)\n" +
			"  traces        every chain's draws of each parameter\n" +
			"  levels        posterior vs prior probability of each categorical parameter's levels\n" +
			"  observations  predictive (predicted − observed)/σ of every observation\n" +
			"Figures are derived output: files of these names in the output folder are replaced (each is\n" +
			"written atomically); nothing else there is touched. --params selects the columns of the\n" +
			"marginal and trace figures (default: every sampled continuous parameter; derived layer radii\n" +
			"may be named too). --truth takes a layered model (.yaml/.toml, as for plumb forward) or a\n" +
			"tabulated .csv model. PNG figures are --width-px × --height-px pixels; SVG and PDF have the\n" +
			"same size at 96 dpi.",
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			dir := args[0]
			f, err := openRunDir(dir)
			if err != nil {
				return err
			}
			opt, err := plotOptions(format, params, pairs, widthPx, heightPx)
			if err != nil {
				return err
			}
			r, err := report.Load(f)
			if err != nil {
				return err
			}
			if err := checkNames(r, opt); err != nil {
				return err
			}
			if truth != "" {
				if opt.Truth, err = truthProfile(truth); err != nil {
					return err
				}
			}
			if out == "" {
				out = filepath.Join(dir, "plots")
			}
			files, err := report.DrawAll(r, out, opt, cmd.ErrOrStderr())
			for _, f := range files {
				fmt.Fprintln(cmd.OutOrStdout(), f.Path)
			}
			return err
		},
	}
	f := c.Flags()
	f.StringVar(&out, "out", "", "folder for the figures (default RUN_DIR/plots; created if missing)")
	f.StringVar(&format, "format", "png", "file format: "+strings.Join(report.Formats, ", "))
	f.StringVar(&params, "params", "", "comma-separated columns of the marginal and trace figures (default: all sampled continuous parameters)")
	f.StringVar(&pairs, "pairs", "", "comma-separated extra pairs X:Y for the pair figure, e.g. core_outer_radius_km:mantle_rho0_kg_m3")
	f.StringVar(&truth, "truth", "", "truth model drawn in the profiles figure: layered .yaml/.toml or tabulated .csv")
	f.IntVar(&widthPx, "width-px", report.DefaultWidthPx, "figure width in pixels (SVG/PDF: at 96 dpi)")
	f.IntVar(&heightPx, "height-px", report.DefaultHeightPx, "figure height in pixels (SVG/PDF: at 96 dpi)")
	return c
}

// plotOptions parses and checks the plot flags that do not need the run.
func plotOptions(format, params, pairs string, widthPx, heightPx int) (report.Options, error) {
	opt := report.Options{Format: format, WidthPx: widthPx, HeightPx: heightPx}
	if !slices.Contains(report.Formats, format) {
		return opt, inputError{fmt.Errorf("--format %q: want one of %s", format, strings.Join(report.Formats, ", "))}
	}
	for _, s := range []struct {
		flag string
		v    int
	}{{"--width-px", widthPx}, {"--height-px", heightPx}} {
		if s.v < minFigurePx || s.v > maxFigurePx {
			return opt, inputError{fmt.Errorf("%s %d: want %d to %d pixels", s.flag, s.v, minFigurePx, maxFigurePx)}
		}
	}
	if params != "" {
		for _, p := range strings.Split(params, ",") {
			p = strings.TrimSpace(p)
			if p == "" {
				return opt, inputError{fmt.Errorf("--params %q: empty parameter name", params)}
			}
			opt.Params = append(opt.Params, p)
		}
	}
	if pairs != "" {
		for _, p := range strings.Split(pairs, ",") {
			x, y, ok := strings.Cut(strings.TrimSpace(p), ":")
			x, y = strings.TrimSpace(x), strings.TrimSpace(y)
			if !ok || x == "" || y == "" {
				return opt, inputError{fmt.Errorf("--pairs %q: %q is not X:Y", pairs, p)}
			}
			opt.Pairs = append(opt.Pairs, report.Pair{X: x, Y: y})
		}
	}
	return opt, nil
}

// checkNames is an input error naming the flag and the name when --params or --pairs names a
// column the run does not have.
func checkNames(r *report.Run, opt report.Options) error {
	for _, n := range opt.Params {
		if _, ok := r.Lookup(n); !ok {
			return inputError{fmt.Errorf("--params: unknown parameter %q (continuous columns of this run: %s)",
				n, strings.Join(r.ContinuousNames(), ", "))}
		}
	}
	for _, p := range opt.Pairs {
		for _, n := range []string{p.X, p.Y} {
			if _, ok := r.Lookup(n); !ok {
				return inputError{fmt.Errorf("--pairs: unknown parameter %q (continuous columns of this run: %s)",
					n, strings.Join(r.ContinuousNames(), ", "))}
			}
		}
	}
	return nil
}

// truthProfile solves a truth model file and samples it for a profile line (the node count per
// layer gives a smooth curve through self-consistent layers).
func truthProfile(path string) (*forward.Profile, error) {
	st, _, err := solveModelFile(path)
	if err != nil {
		return nil, inputError{fmt.Errorf("--truth %s: %w", path, err)}
	}
	p := st.Profile(truthNodesPerLayer)
	return &p, nil
}

// truthNodesPerLayer is the number of profile nodes per layer of a truth model.
const truthNodesPerLayer = 64

// summaryMarkdown writes the one-page Markdown report of the run f to path, refusing to
// overwrite an existing file. Its figures go to report.FiguresDir(path), i.e.
// <report folder>/<report name>_figures/, as PNG; figure files of the same names there are
// replaced. With summary's --truth, the truth model is drawn in the profiles figure when it is a
// model file plot --truth reads.
func summaryMarkdown(cmd *cobra.Command, f *runfolder.Folder, path string) error {
	if _, err := os.Stat(path); err == nil {
		return inputError{fmt.Errorf("--markdown %s: exists; not overwriting", path)}
	} else if !errors.Is(err, os.ErrNotExist) {
		return inputError{fmt.Errorf("--markdown %s: %w", path, err)}
	}
	if st, err := os.Stat(filepath.Dir(path)); err != nil || !st.IsDir() {
		return inputError{fmt.Errorf("--markdown %s: folder %s does not exist", path, filepath.Dir(path))}
	}
	var opt report.Options
	if t, _ := cmd.Flags().GetString("truth"); t != "" {
		if p, err := truthProfile(t); err == nil {
			opt.Truth = p
		} else {
			fmt.Fprintf(cmd.ErrOrStderr(), "plumb: report without a truth profile: %v\n", err)
		}
	}
	r, err := report.Load(f)
	if err != nil {
		return err
	}
	s, err := results.Summarize(f)
	if err != nil {
		return err
	}
	figs, err := report.MarkdownReport(r, s, path, opt, cmd.ErrOrStderr())
	if err != nil {
		return err
	}
	// stderr: stdout may carry the summary as JSON.
	fmt.Fprintf(cmd.ErrOrStderr(), "plumb: wrote %s (%d figures in %s)\n", path, len(figs), report.FiguresDir(path))
	return nil
}
