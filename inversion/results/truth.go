package results

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"

	"plumb/inversion/mcmc"
	"plumb/inversion/problem"
	"plumb/inversion/runfolder"
)

// TruthParam places the true value of one continuous parameter (or derived layer radius) in its
// posterior, in output units.
type TruthParam struct {
	Name string `json:"name"`
	Unit string `json:"unit"`
	// Truth is the true value.
	Truth float64 `json:"truth"`
	// Quantile is the fraction of posterior draws below the truth, ties counted half.
	Quantile float64 `json:"posterior_quantile"`
	// Q05 and Q95 bound the central 90 % credible interval (type-7 quantiles, as in the summary).
	Q05 float64 `json:"q05"`
	Q95 float64 `json:"q95"`
	// InCentral90 reports Q05 ≤ Truth ≤ Q95.
	InCentral90 bool `json:"in_central_90"`
	// Derived marks a layer radius that is computed, not sampled.
	Derived bool `json:"derived,omitempty"`
}

// TruthLevel gives the posterior probability of the true level of a categorical parameter.
type TruthLevel struct {
	Name        string  `json:"name"`
	Truth       string  `json:"truth"`
	Probability float64 `json:"posterior_probability"`
}

// TruthComparison is where a truth falls in a run's posterior (plumb summary --truth).
type TruthComparison struct {
	// TruthFile is the truth's path.
	TruthFile string `json:"truth_file"`
	// Draws is the number of posterior draws compared.
	Draws       int          `json:"draws"`
	Parameters  []TruthParam `json:"parameters"`
	Categorical []TruthLevel `json:"categorical"`
	// Covered counts the Parameters whose truth lies in the central 90 % interval.
	Covered int `json:"in_central_90"`
}

// TruthQuantile returns the fraction of draws below v, counting draws equal to v as half: the
// posterior quantile at which v falls (0.5 for a constant column equal to v).
func TruthQuantile(draws []float64, v float64) float64 {
	if len(draws) == 0 {
		return math.NaN()
	}
	below, tie := 0, 0
	for _, d := range draws {
		switch {
		case d < v:
			below++
		case d == v:
			tie++
		}
	}
	return (float64(below) + 0.5*float64(tie)) / float64(len(draws))
}

// CompareTruth reads the layered truth at truthPath (mapped onto the run's
// parameters by LoadTruth) and places every true value in the posterior draws: continuous
// parameters and derived layer radii get their posterior quantile and whether they lie in the
// central 90 % interval, categorical parameters the posterior probability of the true level.
func CompareTruth(f *runfolder.Folder, truthPath string) (*TruthComparison, error) {
	dir, p := f.Dir, f.Problem
	x, err := problem.LoadTruth(truthPath, p)
	if err != nil {
		return nil, err
	}
	b, err := f.Samples()
	if err != nil {
		return nil, err
	}
	if b.Len() == 0 {
		return nil, fmt.Errorf("%s: no posterior draws yet", dir)
	}
	tc := &TruthComparison{TruthFile: truthPath, Draws: b.Len()}
	place := func(name, unit string, truth float64, derived bool) error {
		v, ok := b.Float64(name)
		if !ok {
			return fmt.Errorf("%s: samples have no column %s", dir, name)
		}
		tp := TruthParam{Name: name, Unit: unit, Truth: truth, Quantile: TruthQuantile(v, truth),
			Q05: mcmc.Quantile7(v, 0.05), Q95: mcmc.Quantile7(v, 0.95), Derived: derived}
		tp.InCentral90 = tp.Q05 <= truth && truth <= tp.Q95
		if tp.InCentral90 {
			tc.Covered++
		}
		tc.Parameters = append(tc.Parameters, tp)
		return nil
	}
	for i, par := range p.Space.Params {
		if labels, ok := problem.CategoricalLabels(par); ok {
			v, ok := b.String(par.Name)
			if !ok {
				return nil, fmt.Errorf("%s: samples have no column %s", dir, par.Name)
			}
			l := labels[int(x[i])]
			n := 0
			for _, s := range v {
				if s == l {
					n++
				}
			}
			tc.Categorical = append(tc.Categorical, TruthLevel{Name: par.Name, Truth: l, Probability: float64(n) / float64(len(v))})
			continue
		}
		if err := place(par.Name, par.Unit, x[i]*par.ToUnit, false); err != nil {
			return nil, err
		}
	}
	r, _ := p.DerivedRadii(x) // valid: LoadTruth solved the model at x
	for i, name := range p.DerivedColumns() {
		if err := place(name, "km", r[i]/1e3, true); err != nil {
			return nil, err
		}
	}
	return tc, nil
}

// WriteText prints the comparison as a table.
func (tc *TruthComparison) WriteText(w io.Writer) error {
	var sb strings.Builder
	fmt.Fprintf(&sb, "Truth %s against %d posterior draws\n\n", tc.TruthFile, tc.Draws)
	tw := tabwriter.NewWriter(&sb, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "parameter\tunit\ttruth\tposterior quantile\t5 %\t95 %\tin central 90 %")
	for _, p := range tc.Parameters {
		in := "yes"
		if !p.InCentral90 {
			in = "NO"
		}
		name := p.Name
		if p.Derived {
			name += " (derived)"
		}
		fmt.Fprintf(tw, "%s\t%s\t%.6g\t%.3f\t%.5g\t%.5g\t%s\n", name, p.Unit, p.Truth, p.Quantile, p.Q05, p.Q95, in)
	}
	tw.Flush()
	fmt.Fprintf(&sb, "%d of %d true values in their central 90 %% interval\n", tc.Covered, len(tc.Parameters))
	for _, c := range tc.Categorical {
		fmt.Fprintf(&sb, "%s: truth %s, posterior probability %.3f\n", c.Name, c.Truth, c.Probability)
	}
	_, err := io.WriteString(w, sb.String())
	return err
}

// JSON renders the comparison as indented JSON.
func (tc *TruthComparison) JSON() ([]byte, error) {
	b, err := json.MarshalIndent(tc, "", "  ")
	if err != nil {
		return nil, fmt.Errorf("encode truth comparison: %w", err)
	}
	return append(b, '\n'), nil
}
