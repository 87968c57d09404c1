package report

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strings"

	"plumb/inversion/results"
	"plumb/inversion/store"
)

// figureCaptions say in a sentence what each figure shows.
var figureCaptions = map[string]string{
	"marginals":    "Marginal posterior of each continuous parameter (histogram) with its prior density (dashed).",
	"pairs":        "Joint posterior of parameter pairs: 2-D histogram of the draws with the 50 % (solid) and 90 % (dashed) credible regions.",
	"profiles":     "Radial profiles of density, vp and vs: pointwise posterior median with 50 % and 90 % credible bands.",
	"traces":       "Trace of every chain (value against draw index); well-mixed chains overlap without trends.",
	"levels":       "Posterior probability of each level of the categorical parameters (dark) beside the prior probability (light).",
	"observations": "Predictive distribution of every observation as (predicted − observed)/σ: median, 50 % box, 90 % line; the band is ±1σ.",
}

// WriteMarkdown writes the one-page Markdown report of run r: title with the planet and the
// run's state, run facts, the parameter table, categorical probabilities, the observation fit,
// the evidence when the run has one, the figures (figs, linked relative to the folder reportDir
// the report is written to) and the caution.
func WriteMarkdown(w io.Writer, r *Run, s *results.Summary, figs []Written, reportDir string) error {
	var b bytes.Buffer
	state := "complete"
	switch {
	case s.Converged:
		state = "complete (stopped by the convergence rule)"
	case !s.Complete:
		state = "INCOMPLETE (resume to finish)"
	}
	what := "Posterior"
	if s.PriorOnly {
		what = "Prior"
	}
	fmt.Fprintf(&b, "# %s of %s — run %s\n\n", what, mdText(s.Planet), state)
	if s.PriorOnly {
		b.WriteString("**Prior-only run:** the likelihood was off; the predictions are the prior predictive.\n\n")
	}

	if note := convergenceNote(s); note != "" {
		b.WriteString(note + "\n\n")
	}

	cp, sc := r.Checkpoint, r.Config.Sampler
	b.WriteString("## Run\n\n| | |\n|---|---|\n")
	fmt.Fprintf(&b, "| run folder | `%s` |\n", r.Dir)
	fmt.Fprintf(&b, "| chains | %d |\n", len(s.Chains))
	perChain := make([]string, len(s.Chains))
	for i, c := range s.Chains {
		perChain[i] = fmt.Sprint(c.Draws)
	}
	fmt.Fprintf(&b, "| draws | %d (per chain: %s) |\n", s.Draws, strings.Join(perChain, ", "))
	fmt.Fprintf(&b, "| sweeps per chain | %d warm-up + %d, thin %d |\n", sc.WarmupSteps, sc.Steps, sc.Thin)
	if t := sc.Tempering; t != nil {
		fmt.Fprintf(&b, "| tempering | %d replicas per chain |\n", t.Replicas)
	}
	fmt.Fprintf(&b, "| seed | %d |\n", cp.Seed)
	fmt.Fprintf(&b, "| config hash (SHA-256) | `%s` |\n", cp.ConfigSHA256)
	fmt.Fprintf(&b, "| plumb / Go | %s / %s |\n\n", cp.PlumbVersion, cp.GoVersion)

	b.WriteString("## Parameters\n\n")
	b.WriteString("| parameter | unit | mean | sd | 5 % | 50 % | 95 % | R̂ | ESS bulk | ESS tail | prior |\n")
	b.WriteString("|---|---|--:|--:|--:|--:|--:|--:|--:|--:|---|\n")
	for _, p := range s.Parameters {
		prior := p.Prior
		if prior == "" {
			prior = "(derived)"
		}
		fmt.Fprintf(&b, "| `%s` | %s | %s | %s | %s | %s | %s | %s | %s | %s | %s |\n", p.Name, mdText(p.Unit),
			num(p.Mean, "%.5g"), num(p.SD, "%.3g"), num(p.Q05, "%.5g"), num(p.Q50, "%.5g"), num(p.Q95, "%.5g"),
			num(p.RHat, "%.3f"), num(p.ESSBulk, "%.0f"), num(p.ESSTail, "%.0f"), mdText(prior))
	}
	b.WriteString("\nR̂: rank-normalized split-R̂; ESS: bulk and tail effective sample sizes (Vehtari et al. 2021).\n\n")

	if len(s.Categorical) > 0 {
		b.WriteString("## Categorical parameters\n\n| parameter | level | posterior probability | prior probability |\n|---|---|--:|--:|\n")
		for _, c := range r.Categoricals() {
			for i, l := range c.Labels {
				fmt.Fprintf(&b, "| `%s` | %s | %.3f | %.3f |\n", c.Name, mdText(l), c.Posterior[i], c.Prior[i])
			}
		}
		b.WriteString("\n")
	}

	if len(s.Observations) > 0 {
		b.WriteString("## Observations\n\n| observation | unit | observed | σ | predicted mean | predicted sd | mean residual (σ) |\n|---|---|--:|--:|--:|--:|--:|\n")
		for _, o := range s.Observations {
			fmt.Fprintf(&b, "| `%s` | %s | %.6g | %.3g | %s | %s | %s |\n", o.Name, mdText(o.Unit), o.Observed, o.Sigma,
				num(o.PredictedMean, "%.6g"), num(o.PredictedSD, "%.3g"), num(o.MeanResidual, "%+.2f"))
		}
		b.WriteString("\n")
	}

	if e := s.Evidence; e != nil {
		b.WriteString("## Evidence\n\n")
		if e.LogZ != nil {
			fmt.Fprintf(&b, "log evidence (thermodynamic integration over %d replicas): %.3f ± %s\n\n", e.Replicas, *e.LogZ, num(e.StdErr, "%.3f"))
		} else {
			fmt.Fprintf(&b, "log evidence: not available (%s)\n\n", mdText(e.Error))
		}
		b.WriteString("Compare model families by differences of log evidence; they depend on the prior ranges much more than the posterior does.\n\n")
	}

	if len(figs) > 0 {
		b.WriteString("## Figures\n\n")
		for _, f := range figs {
			rel, err := filepath.Rel(reportDir, f.Path)
			if err != nil {
				return fmt.Errorf("link figure %s: %w", f.Path, err)
			}
			fmt.Fprintf(&b, "### %s\n\n![%s](%s)\n\n%s\n\n", mdText(f.Title), mdText(f.Title), linkTarget(filepath.ToSlash(rel)), figureCaptions[f.Name])
		}
	}
	fmt.Fprintf(&b, "---\n\n**Caution.** %s\n", mdText(s.Caution))
	_, err := w.Write(b.Bytes())
	return err
}

// Convergence thresholds of the report's warning: rank-normalized split-R̂ below 1.01 and bulk-ESS
// above 400 (Vehtari et al. 2021, section 4).
const (
	rhatLimit = 1.01
	essLimit  = 400
)

// convergenceNote warns, in one line, when some parameter's R̂ or bulk-ESS misses the
// thresholds; "" when all meet them.
func convergenceNote(s *results.Summary) string {
	worstR, worstRName, leastESS, leastESSName := 0.0, "", math.Inf(1), ""
	for _, p := range s.Parameters {
		if p.RHat != nil && *p.RHat > worstR {
			worstR, worstRName = *p.RHat, p.Name
		}
		if p.ESSBulk != nil && *p.ESSBulk < leastESS {
			leastESS, leastESSName = *p.ESSBulk, p.Name
		}
	}
	var parts []string
	if worstR >= rhatLimit {
		parts = append(parts, fmt.Sprintf("R̂ up to %.3f (`%s`; want < %g)", worstR, worstRName, rhatLimit))
	}
	if leastESS <= essLimit {
		parts = append(parts, fmt.Sprintf("bulk-ESS down to %.0f (`%s`; want > %d)", leastESS, leastESSName, essLimit))
	}
	if len(parts) == 0 {
		return ""
	}
	return "**Warning: the chains have not converged** — " + strings.Join(parts, ", ") +
		". Quantiles and figures below are not reliable; run longer or look at the trace figure."
}

// num formats an optional number, "–" when undefined.
func num(v *float64, f string) string {
	if v == nil {
		return "–"
	}
	return fmt.Sprintf(f, *v)
}

// mdText escapes the characters that would break a table cell or start emphasis.
func mdText(s string) string {
	return strings.NewReplacer("|", `\|`, "_", `\_`, "*", `\*`, "<", "&lt;", "`", "\\`").Replace(s)
}

// linkTarget writes a link destination, in angle brackets when it holds spaces or parentheses
// (CommonMark).
func linkTarget(p string) string {
	if strings.ContainsAny(p, " ()") {
		return "<" + p + ">"
	}
	return p
}

// FiguresDir is the folder the report at reportPath keeps its figures in:
// <report folder>/<report name without extension>_figures.
func FiguresDir(reportPath string) string {
	base := strings.TrimSuffix(filepath.Base(reportPath), filepath.Ext(reportPath))
	return filepath.Join(filepath.Dir(reportPath), base+"_figures")
}

// MarkdownReport writes the report of the loaded run r, whose summary is s, to reportPath
// (atomically): it draws the figures as PNG into FiguresDir(reportPath) (replacing figure files of the
// same names) and writes the Markdown. opt.Format and the size are forced to PNG at the default
// size when unset. It returns the figures written.
func MarkdownReport(r *Run, s *results.Summary, reportPath string, opt Options, notes io.Writer) ([]Written, error) {
	opt.Format = "png"
	figs, err := DrawAll(r, FiguresDir(reportPath), opt, notes)
	if err != nil {
		return nil, err
	}
	var b bytes.Buffer
	if err := WriteMarkdown(&b, r, s, figs, filepath.Dir(reportPath)); err != nil {
		return nil, err
	}
	if err := store.WriteFileAtomic(reportPath, b.Bytes(), 0o644); err != nil {
		return nil, fmt.Errorf("write report: %w", err)
	}
	return figs, nil
}
