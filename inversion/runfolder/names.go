package runfolder

import (
	"plumb/inversion/problem"
	"plumb/inversion/store"
)

// Version is plumb's version, recorded in every output file.
const Version = "0.1.0"

// SchemaVersion numbers the layout of the run folder and of the Parquet tables.
const SchemaVersion = 1

// Caution travels with every result: it is written into the Parquet metadata and the summary.
const Caution = "A posterior is conditional on the priors and on the model family (number and kind of layers, " +
	"equations of state, observables used); change them and it changes. plumb is a planetary-structure " +
	"research tool, not a hazard-assessment tool."

// Files and sub-folders of a run folder.
const (
	ConfigFile     = "config.yaml"
	CheckpointFile = "checkpoint.json"
	SamplesDir     = "samples"
	StatsDir       = "sample_stats"
	ProfilesDir    = "profiles"
	SummaryFile    = "summary.json"
)

// PartDirs are the sub-folders holding Parquet parts, samples first: a part of the others
// accompanies the samples part of the same name.
var PartDirs = []string{SamplesDir, StatsDir, ProfilesDir}

// Column names every sample table has. chain and draw are 0-based.
const (
	ColChain         = "chain"
	ColDraw          = "draw"
	ColLogPrior      = "log_prior"
	ColLogLikelihood = "log_likelihood"
	ColLogPosterior  = "log_posterior"
)

// PredictionPrefix starts the column name of a predicted observable, e.g. "pred_mass_kg".
const PredictionPrefix = "pred_"

// SampleColumns lays out the sample table of a problem: the fixed columns (chain, draw, log
// prior, log likelihood, log posterior), then one per parameter (in output units; categorical
// parameters as their label), one per predicted observable and one per derived layer radius (km).
func SampleColumns(p *problem.Problem) []store.Column {
	var cols []store.Column
	add := func(name string, k store.Kind, unit string) {
		cols = append(cols, store.Column{Name: name, Kind: k, Unit: unit})
	}
	add(ColChain, store.Int64, "")
	add(ColDraw, store.Int64, "")
	add(ColLogPrior, store.Float64, "")
	add(ColLogLikelihood, store.Float64, "")
	add(ColLogPosterior, store.Float64, "")
	for _, par := range p.Space.Params {
		if par.Levels() > 0 {
			add(par.Name, store.String, "")
		} else {
			add(par.Name, store.Float64, par.Unit)
		}
	}
	for _, o := range p.Observations {
		add(PredictionPrefix+o.Observable.Key, store.Float64, o.Observable.Unit)
	}
	for _, n := range p.DerivedColumns() {
		add(n, store.Float64, "km")
	}
	return cols
}

// Columns of the profile table (long format: one row per profiled draw and grid radius; chain and
// draw as in the sample table).
const (
	ColRadiusKm    = "radius_km"
	ColLayer       = "layer"
	ColDensity     = "density_kg_m3"
	ColVp          = "vp_km_s"
	ColVs          = "vs_km_s"
	ColGravity     = "gravity_m_s2"
	ColPressureGPa = "pressure_gpa"
)

// ProfileColumns lays out the profile table.
func ProfileColumns() []store.Column {
	return []store.Column{
		{Name: ColChain, Kind: store.Int64},
		{Name: ColDraw, Kind: store.Int64},
		{Name: ColRadiusKm, Kind: store.Float64, Unit: "km"},
		{Name: ColLayer, Kind: store.String},
		{Name: ColDensity, Kind: store.Float64, Unit: "kg/m3"},
		{Name: ColVp, Kind: store.Float64, Unit: "km/s"},
		{Name: ColVs, Kind: store.Float64, Unit: "km/s"},
		{Name: ColGravity, Kind: store.Float64, Unit: "m/s2"},
		{Name: ColPressureGPa, Kind: store.Float64, Unit: "GPa"},
	}
}

// Columns of the sample_stats table of a tempered run: one row per chain and replica at each
// checkpoint, cumulative to that checkpoint.
const (
	ColIteration         = "iteration"
	ColReplica           = "replica"
	ColBeta              = "beta"
	ColExchangeProposed  = "exchange_proposed"
	ColExchangeAccepted  = "exchange_accepted"
	ColExchangeProposedW = "exchange_proposed_warmup"
	ColExchangeAcceptedW = "exchange_accepted_warmup"
	ColLogLikMean        = "log_likelihood_mean"
	ColLogLikSweeps      = "log_likelihood_sweeps"
)

// StatsColumns lays out the sample_stats table. Exchange counts are those of the pair (replica,
// replica + 1) — 0 for the hottest replica — after warm-up and during it; the log-likelihood mean
// is over the post-warm-up sweeps (0 with log_likelihood_sweeps = 0 before), the integrand of the
// thermodynamic-integration evidence.
func StatsColumns() []store.Column {
	return []store.Column{
		{Name: ColChain, Kind: store.Int64},
		{Name: ColIteration, Kind: store.Int64, Unit: "sweeps"},
		{Name: ColReplica, Kind: store.Int64},
		{Name: ColBeta, Kind: store.Float64},
		{Name: ColExchangeProposed, Kind: store.Int64},
		{Name: ColExchangeAccepted, Kind: store.Int64},
		{Name: ColExchangeProposedW, Kind: store.Int64},
		{Name: ColExchangeAcceptedW, Kind: store.Int64},
		{Name: ColLogLikMean, Kind: store.Float64},
		{Name: ColLogLikSweeps, Kind: store.Int64},
	}
}
