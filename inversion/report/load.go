package report

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"plumb/inversion/problem"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
	"plumb/priors"
)

// Column names of the samples and profiles tables used here.
const (
	colChain = runfolder.ColChain
	colDraw  = runfolder.ColDraw
)

// Run is a run folder loaded for reporting.
type Run struct {
	// Folder is the opened run folder the rest was read from.
	Folder *runfolder.Folder
	// Dir is the run folder's path.
	Dir string
	// Config and Problem are the run's resolved config and the problem built from it.
	Config  *problem.Config
	Problem *problem.Problem
	// Checkpoint is the run's checkpoint (never nil: Load refuses a run without one).
	Checkpoint *runfolder.Checkpoint
	// Samples is the whole sample table.
	Samples *store.Batch
	// Profiles is the whole profiles table, nil when the run has none.
	Profiles *store.Batch

	// chains is the number of chains (from the checkpoint).
	chains int
}

// Param describes one continuous column that can be plotted: a sampled parameter (with its
// prior) or a derived layer radius (no prior).
type Param struct {
	// Name is the column name, e.g. "core_outer_radius_km".
	Name string
	// Unit is the output unit ("" for a dimensionless quantity).
	Unit string
	// Prior is the prior in SI units; nil for a derived column.
	Prior priors.Dist
	// ToUnit converts an SI value to the output unit (1 for derived columns, which are stored
	// in output units and have no SI prior).
	ToUnit float64
}

// Load prepares the opened run folder f for reporting: it reads its samples and, if present,
// its profiles (through f, so once per command). A run without a checkpoint or without draws is
// an error.
func Load(f *runfolder.Folder) (*Run, error) {
	if err := f.Started(); err != nil {
		return nil, err
	}
	dir := f.Dir
	b, err := f.Samples()
	if err != nil {
		return nil, err
	}
	if b.Len() == 0 {
		return nil, fmt.Errorf("%s: the run has no draws yet", dir)
	}
	r := &Run{Folder: f, Dir: dir, Config: f.Config, Problem: f.Problem, Checkpoint: f.Checkpoint, Samples: b, chains: len(f.Checkpoint.Chains)}
	chain, ok := b.Int64(runfolder.ColChain)
	if !ok {
		return nil, fmt.Errorf("%s: samples lack the %s column", dir, runfolder.ColChain)
	}
	for _, c := range chain {
		r.chains = max(r.chains, int(c)+1)
	}
	if r.Profiles, err = f.Profiles(); err != nil {
		return nil, err
	}
	return r, nil
}

// Chains returns the number of chains.
func (r *Run) Chains() int { return r.chains }

// fixedColumns are the bookkeeping columns of every sample table.
var fixedColumns = []string{runfolder.ColChain, runfolder.ColDraw, runfolder.ColLogPrior,
	runfolder.ColLogLikelihood, runfolder.ColLogPosterior}

// Continuous lists the continuous sampled parameters in problem order, then the derived layer
// radii (float columns of the sample table that are neither bookkeeping, parameters nor
// predictions).
func (r *Run) Continuous() []Param {
	var out []Param
	known := map[string]bool{}
	for _, par := range r.Problem.Space.Params {
		known[par.Name] = true
		if par.Levels() > 0 {
			continue
		}
		out = append(out, Param{Name: par.Name, Unit: par.Unit, Prior: par.Prior, ToUnit: par.ToUnit})
	}
	for _, c := range r.Samples.Columns {
		if c.Kind != store.Float64 || known[c.Name] || slices.Contains(fixedColumns, c.Name) ||
			strings.HasPrefix(c.Name, runfolder.PredictionPrefix) {
			continue
		}
		out = append(out, Param{Name: c.Name, Unit: c.Unit, ToUnit: 1})
	}
	return out
}

// Sampled returns the continuous sampled parameters (those with a prior).
func (r *Run) Sampled() []Param {
	var out []Param
	for _, p := range r.Continuous() {
		if p.Prior != nil {
			out = append(out, p)
		}
	}
	return out
}

// Lookup finds a continuous column by name.
func (r *Run) Lookup(name string) (Param, bool) {
	for _, p := range r.Continuous() {
		if p.Name == name {
			return p, true
		}
	}
	return Param{}, false
}

// ContinuousNames lists the names of Continuous, for messages.
func (r *Run) ContinuousNames() []string {
	var out []string
	for _, p := range r.Continuous() {
		out = append(out, p.Name)
	}
	return out
}

// values returns the whole column name (all chains, table order).
func (r *Run) values(name string) []float64 {
	v, _ := r.Samples.Float64(name)
	return v
}

// byChain splits column name by chain, in draw order within each chain.
func (r *Run) byChain(name string) [][]float64 {
	v := r.values(name)
	chain, _ := r.Samples.Int64(runfolder.ColChain)
	out := make([][]float64, r.chains)
	for i, c := range chain {
		out[c] = append(out[c], v[i])
	}
	return out
}

// DefaultPair returns the default pair of the pair plot: the core layer's outer radius against
// its density (a density, density gradient end or EOS zero-pressure density parameter). The core
// layer is seismic.core_layer when set, else the innermost layer. If either is missing, the
// first two continuous parameters; ok is false when there are fewer than two.
func (r *Run) DefaultPair() (x, y string, ok bool) {
	core := ""
	if r.Config.Seismic.CoreLayer != "" {
		core = r.Config.Seismic.CoreLayer
	} else if len(r.Config.Layers) > 0 {
		core = r.Config.Layers[0].Name
	}
	params := r.Continuous()
	radius, density := "", ""
	for _, p := range params {
		if !strings.HasPrefix(p.Name, core+"_") {
			continue
		}
		rest := strings.TrimPrefix(p.Name, core+"_")
		switch {
		case rest == "outer_radius_km" && radius == "":
			radius = p.Name
		case (strings.HasPrefix(rest, "density") || strings.HasPrefix(rest, "rho0")) && density == "":
			density = p.Name
		}
	}
	if core != "" && radius != "" && density != "" {
		return radius, density, true
	}
	if len(params) < 2 {
		return "", "", false
	}
	return params[0].Name, params[1].Name, true
}

// Categorical describes a categorical parameter.
type Categorical struct {
	// Name is the parameter (column) name, e.g. "core_state".
	Name string
	// Labels are the levels; Prior[i] and Posterior[i] their prior and posterior probabilities.
	Labels           []string
	Prior, Posterior []float64
}

// Categoricals returns every categorical parameter with its prior and posterior probabilities.
func (r *Run) Categoricals() []Categorical {
	var out []Categorical
	for _, par := range r.Problem.Space.Params {
		c, ok := par.Prior.(priors.Categorical)
		if !ok {
			continue
		}
		v, _ := r.Samples.String(par.Name)
		cat := Categorical{Name: par.Name, Labels: c.Labels,
			Prior: make([]float64, len(c.Labels)), Posterior: make([]float64, len(c.Labels))}
		idx := map[string]int{}
		for i, l := range c.Labels {
			idx[l] = i
			cat.Prior[i] = math.Exp(par.Prior.LogProb(float64(i)))
		}
		for _, s := range v {
			if i, ok := idx[s]; ok {
				cat.Posterior[i] += 1 / float64(len(v))
			}
		}
		out = append(out, cat)
	}
	return out
}
