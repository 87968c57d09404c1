package results

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"slices"
	"strings"
	"text/tabwriter"

	"plumb/inversion/mcmc"
	"plumb/inversion/problem"
	"plumb/inversion/runfolder"
	"plumb/priors"
)

// ParamSummary is the posterior of one continuous parameter (or derived column), output units.
type ParamSummary struct {
	Name  string   `json:"name"`
	Unit  string   `json:"unit"`
	Prior string   `json:"prior,omitempty"`
	Mean  *float64 `json:"mean"`
	SD    *float64 `json:"sd"`
	Q05   *float64 `json:"q05"`
	Q50   *float64 `json:"q50"`
	Q95   *float64 `json:"q95"`
	// RHat is the rank-normalized split-R̂ and ESSBulk / ESSTail the effective sample sizes
	// (Vehtari et al. 2021); null when undefined (e.g. a constant column).
	RHat    *float64 `json:"rhat"`
	ESSBulk *float64 `json:"ess_bulk"`
	ESSTail *float64 `json:"ess_tail"`
	// MCSEMean and MCSEQ05/Q50/Q95 are the Monte Carlo standard errors of the mean and of the
	// quantiles (Vehtari et al. 2021).
	MCSEMean *float64 `json:"mcse_mean"`
	MCSEQ05  *float64 `json:"mcse_q05"`
	MCSEQ50  *float64 `json:"mcse_q50"`
	MCSEQ95  *float64 `json:"mcse_q95"`
}

// CategorySummary is the posterior of a categorical parameter.
type CategorySummary struct {
	Name string `json:"name"`
	// Probability maps each label to its posterior probability (prior probability alongside).
	Probability map[string]float64 `json:"probability"`
	Prior       map[string]float64 `json:"prior_probability"`
}

// ObservationSummary compares an observation with its posterior predictive.
type ObservationSummary struct {
	Name          string   `json:"name"`
	Unit          string   `json:"unit"`
	Observed      float64  `json:"observed"`
	Sigma         float64  `json:"sigma"`
	PredictedMean *float64 `json:"predicted_mean"`
	PredictedSD   *float64 `json:"predicted_sd"`
	// MeanResidual is the posterior mean of (predicted − observed)/σ.
	MeanResidual *float64 `json:"mean_residual"`
}

// ChainSummary gives a chain's length and acceptance rates (sampling phase).
type ChainSummary struct {
	Chain            int      `json:"chain"`
	Draws            int64    `json:"draws"`
	Acceptance       *float64 `json:"acceptance"`
	StateAcceptance  *float64 `json:"categorical_acceptance,omitempty"`
	InvalidProposals int64    `json:"invalid_proposals"`
}

// EvidenceSummary is the log marginal likelihood of a tempered run by thermodynamic integration
// over its ladder (Lartillot & Philippe 2006), with the exchange acceptance between adjacent
// replicas (post-warm-up, averaged over chains).
type EvidenceSummary struct {
	// LogZ and StdErr are the natural-log evidence and its standard error (Monte Carlo and
	// quadrature error combined); null with Error set when it cannot be computed.
	LogZ   *float64 `json:"log_evidence"`
	StdErr *float64 `json:"log_evidence_std_err"`
	Error  string   `json:"error,omitempty"`
	// Replicas is the ladder length; ExchangeAcceptance[k] is that of replicas (k, k+1).
	Replicas           int        `json:"replicas"`
	ExchangeAcceptance []*float64 `json:"exchange_acceptance"`
}

// Summary is a run's posterior summary, as printed by `plumb summary` and saved as summary.json.
type Summary struct {
	Planet       string               `json:"planet"`
	Complete     bool                 `json:"complete"`
	Converged    bool                 `json:"stopped_by_rule,omitempty"`
	PriorOnly    bool                 `json:"prior_only,omitempty"`
	Evidence     *EvidenceSummary     `json:"evidence,omitempty"`
	Draws        int                  `json:"draws"`
	Parameters   []ParamSummary       `json:"parameters"`
	Categorical  []CategorySummary    `json:"categorical"`
	Observations []ObservationSummary `json:"observations"`
	Chains       []ChainSummary       `json:"chains"`
	Caution      string               `json:"caution"`
}

func fp(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

// Summarize summarises the posterior of an opened run folder (it reads the sample table once,
// through the folder).
func Summarize(f *runfolder.Folder) (*Summary, error) {
	if err := f.Started(); err != nil {
		return nil, err
	}
	p, cp := f.Problem, f.Checkpoint
	b, err := f.Samples()
	if err != nil {
		return nil, err
	}
	s := &Summary{Planet: p.Name, Complete: cp.Complete, Converged: cp.Converged, PriorOnly: p.PriorOnly(),
		Draws: b.Len(), Caution: runfolder.Caution, Evidence: evidenceSummary(cp.Tempered)}
	chainCol, _ := b.Int64(runfolder.ColChain)
	nChains := len(cp.Chains)
	split := func(name string) [][]float64 {
		v, _ := b.Float64(name)
		out := make([][]float64, nChains)
		for i, c := range chainCol {
			if int(c) < nChains {
				out[c] = append(out[c], v[i])
			}
		}
		return out
	}
	for _, par := range p.Space.Params {
		if labels, ok := problem.CategoricalLabels(par); ok {
			v, _ := b.String(par.Name)
			cs := CategorySummary{Name: par.Name, Probability: map[string]float64{}, Prior: map[string]float64{}}
			for i, l := range labels {
				cs.Prior[l] = math.Exp(par.Prior.LogProb(float64(i)))
				cs.Probability[l] = 0
			}
			for _, x := range v {
				cs.Probability[x] += 1 / float64(len(v))
			}
			s.Categorical = append(s.Categorical, cs)
			continue
		}
		ps := paramSummary(par.Name, par.Unit, split(par.Name))
		ps.Prior = priorString(par)
		s.Parameters = append(s.Parameters, ps)
	}
	for _, n := range p.DerivedColumns() {
		s.Parameters = append(s.Parameters, paramSummary(n, "km", split(n)))
	}
	for _, o := range p.Observations {
		v, _ := b.Float64(runfolder.PredictionPrefix + o.Observable.Key)
		m, sd := meanSD(v)
		si := o.Observable.ToSI()
		s.Observations = append(s.Observations, ObservationSummary{
			Name: o.Observable.Key, Unit: o.Observable.Unit,
			Observed: o.Value / si, Sigma: o.Sigma / si,
			PredictedMean: fp(m), PredictedSD: fp(sd),
			MeanResidual: fp((m - o.Value/si) / (o.Sigma / si)),
		})
	}
	for _, st := range cp.Chains {
		k := st.Counts
		cs := ChainSummary{Chain: st.Chain, Draws: st.Draws, InvalidProposals: k.Invalid[0] + k.Invalid[1]}
		cs.Acceptance = fp(float64(k.Accepted[1]) / float64(k.Proposed[1]))
		if k.DiscreteProposed[1] > 0 {
			cs.StateAcceptance = fp(float64(k.DiscreteAccepted[1]) / float64(k.DiscreteProposed[1]))
		}
		s.Chains = append(s.Chains, cs)
	}
	return s, nil
}

// evidenceSummary computes the evidence of a tempered run from its chains' final states (nil
// for a run without tempering).
func evidenceSummary(ts []mcmc.TemperedState) *EvidenceSummary {
	if len(ts) == 0 {
		return nil
	}
	es := &EvidenceSummary{Replicas: len(ts[0].Betas)}
	betas := make([][]float64, len(ts))
	stats := make([][]mcmc.LogLikStat, len(ts))
	for c, t := range ts {
		betas[c], stats[c] = t.Betas, t.LogLik
	}
	if z, se, err := mcmc.EvidenceLadders(betas, stats); err != nil {
		es.Error = err.Error()
	} else {
		es.LogZ, es.StdErr = fp(z), fp(se)
	}
	for k := 0; k+1 < es.Replicas; k++ {
		var prop, acc int64
		for _, t := range ts {
			if k < len(t.SwapProposed) {
				prop += t.SwapProposed[k][1]
				acc += t.SwapAccepted[k][1]
			}
		}
		es.ExchangeAcceptance = append(es.ExchangeAcceptance, fp(float64(acc)/float64(prop)))
	}
	return es
}

// priorString renders a prior in the parameter's output unit.
func priorString(par priors.Param) string {
	if par.Unit == "" {
		return par.PriorString()
	}
	return par.PriorString() + " " + par.Unit
}

// paramSummary summarises per-chain draws. Diagnostics need equal-length chains: chains of an
// interrupted run may differ by a few draws, so they are cut to the shortest for R̂ and ESS.
func paramSummary(name, unit string, chains [][]float64) ParamSummary {
	var all []float64
	short := math.MaxInt
	for _, c := range chains {
		all = append(all, c...)
		short = min(short, len(c))
	}
	m, sd := meanSD(all)
	ps := ParamSummary{Name: name, Unit: unit, Mean: fp(m), SD: fp(sd)}
	if len(all) == 0 {
		return ps
	}
	ps.Q05, ps.Q50, ps.Q95 = fp(mcmc.Quantile7(all, 0.05)), fp(mcmc.Quantile7(all, 0.5)), fp(mcmc.Quantile7(all, 0.95))
	eq := make([][]float64, len(chains))
	for i, c := range chains {
		eq[i] = c[:short]
	}
	ps.RHat, ps.ESSBulk, ps.ESSTail = fp(mcmc.RankRHat(eq)), fp(mcmc.ESSBulk(eq)), fp(mcmc.ESSTail(eq))
	ps.MCSEMean = fp(mcmc.MCSEMean(eq))
	ps.MCSEQ05, ps.MCSEQ50, ps.MCSEQ95 = fp(mcmc.MCSEQuantile(eq, 0.05)), fp(mcmc.MCSEQuantile(eq, 0.5)), fp(mcmc.MCSEQuantile(eq, 0.95))
	return ps
}

func meanSD(v []float64) (float64, float64) {
	if len(v) == 0 {
		return math.NaN(), math.NaN()
	}
	s := 0.0
	for _, x := range v {
		s += x
	}
	m := s / float64(len(v))
	ss := 0.0
	for _, x := range v {
		ss += (x - m) * (x - m)
	}
	if len(v) < 2 {
		return m, math.NaN()
	}
	return m, math.Sqrt(ss / float64(len(v)-1))
}

// JSON renders the summary as indented JSON.
func (s *Summary) JSON() ([]byte, error) {
	b, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return nil, fmt.Errorf("encode summary: %w", err)
	}
	return append(b, '\n'), nil
}

func fmtp(v *float64, f string) string {
	if v == nil {
		return "–"
	}
	return fmt.Sprintf(f, *v)
}

// WriteText prints the summary as aligned tables.
func (s *Summary) WriteText(w io.Writer) error {
	var sb strings.Builder
	state := "complete"
	if !s.Complete {
		state = "INCOMPLETE (resume to finish)"
	}
	if s.Converged {
		state = "complete (stopped by the convergence rule)"
	}
	what := "Posterior"
	if s.PriorOnly {
		what = "Prior (prior-only run: likelihood off; predictions are the prior predictive)"
	}
	fmt.Fprintf(&sb, "%s of %s: %d draws, run %s\n\n", what, s.Planet, s.Draws, state)
	tw := tabwriter.NewWriter(&sb, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "parameter\tunit\tmean\t± MCSE\tsd\t5 %\t50 %\t95 %\tR̂\tESS bulk\tESS tail\tprior")
	for _, p := range s.Parameters {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n", p.Name, p.Unit,
			fmtp(p.Mean, "%.5g"), fmtp(p.MCSEMean, "%.2g"), fmtp(p.SD, "%.3g"), fmtp(p.Q05, "%.5g"), fmtp(p.Q50, "%.5g"), fmtp(p.Q95, "%.5g"),
			fmtp(p.RHat, "%.3f"), fmtp(p.ESSBulk, "%.0f"), fmtp(p.ESSTail, "%.0f"), p.Prior)
	}
	tw.Flush()
	sb.WriteString("(± MCSE: Monte Carlo standard error of the mean; those of the quantiles are in summary.json.)\n")
	for _, c := range s.Categorical {
		fmt.Fprintf(&sb, "\n%s:", c.Name)
		keys := make([]string, 0, len(c.Probability))
		for k := range c.Probability {
			keys = append(keys, k)
		}
		slices.Sort(keys)
		for _, k := range keys {
			fmt.Fprintf(&sb, "  P(%s) = %.3f (prior %.3f)", k, c.Probability[k], c.Prior[k])
		}
		sb.WriteString("\n")
	}
	if len(s.Observations) > 0 {
		sb.WriteString("\n")
		tw = tabwriter.NewWriter(&sb, 2, 4, 2, ' ', 0)
		fmt.Fprintln(tw, "observation\tunit\tobserved\tsigma\tpredicted mean\tpredicted sd\tmean residual (σ)")
		for _, o := range s.Observations {
			fmt.Fprintf(tw, "%s\t%s\t%.6g\t%.3g\t%s\t%s\t%s\n", o.Name, o.Unit, o.Observed, o.Sigma,
				fmtp(o.PredictedMean, "%.6g"), fmtp(o.PredictedSD, "%.3g"), fmtp(o.MeanResidual, "%+.2f"))
		}
		tw.Flush()
	}
	sb.WriteString("\n")
	tw = tabwriter.NewWriter(&sb, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "chain\tdraws\tacceptance\tstate acceptance\tinvalid proposals")
	for _, c := range s.Chains {
		fmt.Fprintf(tw, "%d\t%d\t%s\t%s\t%d\n", c.Chain, c.Draws, fmtp(c.Acceptance, "%.3f"), fmtp(c.StateAcceptance, "%.3f"), c.InvalidProposals)
	}
	tw.Flush()
	if e := s.Evidence; e != nil {
		if e.LogZ != nil {
			fmt.Fprintf(&sb, "\nlog evidence (thermodynamic integration over %d replicas): %.3f ± %.3f\n", e.Replicas, *e.LogZ, *e.StdErr)
		} else {
			fmt.Fprintf(&sb, "\nlog evidence: not available (%s)\n", e.Error)
		}
		sb.WriteString("(compare model families by differences of log evidence; they depend on the prior ranges much more than the posterior does)\n")
		sb.WriteString("exchange acceptance between adjacent replicas (β = 1 first):")
		for _, a := range e.ExchangeAcceptance {
			sb.WriteString(" " + fmtp(a, "%.2f"))
		}
		sb.WriteString("\n")
	}
	fmt.Fprintf(&sb, "\nCaution: %s\n", s.Caution)
	_, err := io.WriteString(w, sb.String())
	return err
}
