package problem

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strings"

	"github.com/spf13/viper"
	"go.yaml.in/yaml/v3"

	"plumb/inversion/mcmc"
)

// Config is a run configuration as written by the user (YAML or TOML). Quantities that may be
// fixed or carry a prior are decoded as raw values (any) and interpreted by Build, which knows the
// key path of each and so can say exactly where a value is wrong.
type Config struct {
	// Planet holds the body's name and radius.
	Planet PlanetConfig `mapstructure:"planet" json:"planet" yaml:"planet"`
	// Layers are listed from the centre outward.
	Layers []LayerConfig `mapstructure:"layers" json:"layers" yaml:"layers"`
	// Constraints are optional structural constraints (a violated one makes the prior zero).
	Constraints ConstraintConfig `mapstructure:"constraints" json:"constraints" yaml:"constraints"`
	// Tides sets the tidal forcing for the k2, h2 and tidal_q observables.
	Tides TidesConfig `mapstructure:"tides" json:"tides" yaml:"tides"`
	// Seismic holds seismic events and their travel-time picks.
	Seismic SeismicConfig `mapstructure:"seismic" json:"seismic" yaml:"seismic"`
	// Observations maps an observable key (unit in the name) to its measured value and 1σ.
	Observations map[string]ObservationConfig `mapstructure:"observations" json:"observations" yaml:"observations"`
	// Sampler sets the Markov chains.
	Sampler SamplerConfig `mapstructure:"sampler" json:"sampler" yaml:"sampler"`
	// Output sets the run folder and checkpointing.
	Output OutputConfig `mapstructure:"output" json:"output" yaml:"output"`
}

// PlanetConfig describes the body as a whole.
type PlanetConfig struct {
	// Name is free text, for reports.
	Name string `mapstructure:"name" json:"name" yaml:"name"`
	// RadiusKm is a number (fixed) or a prior mapping.
	RadiusKm any `mapstructure:"radius_km" json:"radius_km" yaml:"radius_km"`
}

// LayerConfig is one shell. Each property is a number, a prior mapping ({prior: uniform, min:, max:}),
// or for density_kg_m3, vp_km_s and vs_km_s a linear gradient {inner: …, outer: …} whose two ends
// are each a number or a prior mapping.
type LayerConfig struct {
	// Name is unique and column-safe (letters, digits, underscore); it prefixes parameter names.
	Name string `mapstructure:"name" json:"name" yaml:"name"`
	// OuterRadiusKm places the layer's top; ThicknessKm gives its thickness below the layer
	// above's bottom (or the surface). Exactly one per layer, except that the outermost layer may
	// give neither (it extends to the surface).
	OuterRadiusKm any `mapstructure:"outer_radius_km" json:"outer_radius_km,omitempty" yaml:"outer_radius_km,omitempty"`
	ThicknessKm   any `mapstructure:"thickness_km" json:"thickness_km,omitempty" yaml:"thickness_km,omitempty"`
	DensityKgM3   any `mapstructure:"density_kg_m3" json:"density_kg_m3" yaml:"density_kg_m3"`
	VpKmS         any `mapstructure:"vp_km_s" json:"vp_km_s" yaml:"vp_km_s"`
	VsKmS         any `mapstructure:"vs_km_s" json:"vs_km_s" yaml:"vs_km_s"`
	// State is "liquid", "solid" (default) or a categorical prior over them.
	State any `mapstructure:"state" json:"state,omitempty" yaml:"state,omitempty"`
	// EOS, instead of density_kg_m3/vp_km_s/vs_km_s, gives the layer an equation of state:
	// density and moduli then follow from the hydrostatic pressure (see eosconfig.go).
	EOS any `mapstructure:"eos" json:"eos,omitempty" yaml:"eos,omitempty"`
	// ViscosityPaS is the layer's viscosity; with tides.period_h it makes the layer respond
	// anelastically.
	ViscosityPaS any `mapstructure:"viscosity_pa_s" json:"viscosity_pa_s,omitempty" yaml:"viscosity_pa_s,omitempty"`
	// Rheology is "maxwell" (default when a viscosity is given) or "andrade", which also takes
	// AndradeAlpha (0 < α < 1) and AndradeZeta (ζ > 0, Andrade time / Maxwell time).
	Rheology     string `mapstructure:"rheology" json:"rheology,omitempty" yaml:"rheology,omitempty"`
	AndradeAlpha any    `mapstructure:"andrade_alpha" json:"andrade_alpha,omitempty" yaml:"andrade_alpha,omitempty"`
	AndradeZeta  any    `mapstructure:"andrade_zeta" json:"andrade_zeta,omitempty" yaml:"andrade_zeta,omitempty"`
}

// TidesConfig sets the tidal forcing.
type TidesConfig struct {
	// PeriodH is the forcing period in hours. Without it the Love numbers are static and
	// elastic; with it, layers with a viscosity respond anelastically (Maxwell or Andrade) and
	// k2/h2 are the real parts of the complex response.
	PeriodH any `mapstructure:"period_h" json:"period_h,omitempty" yaml:"period_h,omitempty"`
}

// ConstraintConfig holds optional structural constraints.
type ConstraintConfig struct {
	// DensityIncreasesWithDepth rejects models whose density decreases anywhere with depth.
	DensityIncreasesWithDepth bool `mapstructure:"density_increases_with_depth" json:"density_increases_with_depth" yaml:"density_increases_with_depth"`
}

// ObservationConfig is one measured value with its 1σ uncertainty, in the unit of its key.
type ObservationConfig struct {
	// Value is the measured value.
	Value any `mapstructure:"value" json:"value" yaml:"value"`
	// Sigma is the 1σ uncertainty (> 0).
	Sigma any `mapstructure:"sigma" json:"sigma" yaml:"sigma"`
}

// SamplerConfig sets the chains.
type SamplerConfig struct {
	// Chains is the number of independent chains.
	Chains int `mapstructure:"chains" json:"chains" yaml:"chains"`
	// WarmupSteps are adaptation sweeps per chain, not written.
	WarmupSteps int64 `mapstructure:"warmup_steps" json:"warmup_steps" yaml:"warmup_steps"`
	// Steps are the sweeps per chain after warm-up.
	Steps int64 `mapstructure:"steps" json:"steps" yaml:"steps"`
	// Thin keeps every Thin-th sweep as a draw.
	Thin int64 `mapstructure:"thin" json:"thin" yaml:"thin"`
	// Seed seeds every chain's generator (through a hash of seed and chain index).
	Seed uint64 `mapstructure:"seed" json:"seed" yaml:"seed"`
	// Workers is the number of goroutines running chains (0: one per core). It does not change
	// the output.
	Workers int `mapstructure:"workers" json:"workers" yaml:"workers"`
	// Independence is the probability that a post-warm-up sweep moves the continuous parameters
	// by an independence proposal (a multivariate t fitted to the warm-up) instead of the random
	// walk; 0 turns these moves off.
	Independence float64 `mapstructure:"independence" json:"independence" yaml:"independence"`
	// Anneal is the fraction of warm-up over which each chain switches the likelihood on
	// gradually (prior × likelihood^β, β from 10⁻⁶ to 1), so that chains started in the prior find
	// the posterior's main basin instead of a local trap (mcmc.Config.Anneal). Not used by
	// tempered chains or prior-only runs.
	Anneal float64 `mapstructure:"anneal" json:"anneal" yaml:"anneal"`
	// PoolWarmup refits every chain's proposals at the end of warm-up from the warm-up moments of
	// all chains together (mcmc.PoolWarmup), so that no chain keeps a proposal adapted to the
	// sliver of the posterior it happened to see.
	PoolWarmup bool `mapstructure:"pool_warmup" json:"pool_warmup" yaml:"pool_warmup"`
	// EventBlocks moves each seismic event's sampled source parameters (distance, depth, origin
	// time) as a block of their own every sweep, besides the joint move: one more model
	// evaluation per event and sweep, for events whose depth (or distance) is weakly constrained.
	EventBlocks bool `mapstructure:"event_blocks" json:"event_blocks,omitempty" yaml:"event_blocks,omitempty"`
	// PriorOnly switches the likelihood off: the chains sample the prior (restricted to models
	// whose observables can all be computed), and the predictions are the prior predictive.
	PriorOnly bool `mapstructure:"prior_only" json:"prior_only,omitempty" yaml:"prior_only,omitempty"`
	// Stop, when set, ends the run early at a checkpoint once every parameter has converged.
	Stop *StopConfig `mapstructure:"stop" json:"stop,omitempty" yaml:"stop,omitempty"`
	// Tempering, when set, runs every chain as a ladder of tempered replicas (parallel
	// tempering); only the β = 1 replica's draws are written.
	Tempering *TemperingConfig `mapstructure:"tempering" json:"tempering,omitempty" yaml:"tempering,omitempty"`
}

// TemperingConfig sets parallel tempering: Replicas replicas per chain at inverse temperatures
// from 1 (the posterior) down to 0 (the prior), with exchange moves between neighbours. The
// interior temperatures start geometric in β down to BetaMin and adapt during warm-up toward
// equal exchange acceptance unless AdaptLadder is false. The ladder also gives the evidence
// (log marginal likelihood) by thermodynamic integration, reported by plumb summary.
type TemperingConfig struct {
	// Replicas is the number of replicas per chain (≥ 2; 6–12 is typical).
	Replicas int `mapstructure:"replicas" json:"replicas" yaml:"replicas"`
	// BetaMin is the smallest non-zero β of the initial ladder, in (0, 1) (default 1e-3).
	BetaMin float64 `mapstructure:"beta_min" json:"beta_min,omitempty" yaml:"beta_min,omitempty"`
	// AdaptLadder (default true) adapts the ladder during warm-up.
	AdaptLadder *bool `mapstructure:"adapt_ladder" json:"adapt_ladder,omitempty" yaml:"adapt_ladder,omitempty"`
}

// TemperConfig converts the config section to the sampler's settings.
func (t *TemperingConfig) TemperConfig() mcmc.TemperConfig {
	return mcmc.TemperConfig{Replicas: t.Replicas, BetaMin: t.BetaMin, AdaptLadder: t.AdaptLadder == nil || *t.AdaptLadder}
}

// StopConfig is the optional stopping rule: after warm-up, at every checkpoint, the run ends when
// the rank-normalized split-R̂ of every continuous parameter is below RHatBelow and its bulk-ESS
// above ESSAbove (or when the step budget runs out).
type StopConfig struct {
	// RHatBelow is the R̂ threshold (> 1; 1.01 is the common recommendation).
	RHatBelow float64 `mapstructure:"rhat_below" json:"rhat_below" yaml:"rhat_below"`
	// ESSAbove is the bulk-ESS threshold (> 0).
	ESSAbove float64 `mapstructure:"ess_above" json:"ess_above" yaml:"ess_above"`
}

// OutputConfig sets the run folder.
type OutputConfig struct {
	// Dir is the run folder, relative to the config file's folder unless absolute.
	Dir string `mapstructure:"dir" json:"dir" yaml:"dir"`
	// CheckpointEverySteps is the number of sweeps between checkpoints (and Parquet parts).
	CheckpointEverySteps int64 `mapstructure:"checkpoint_every_steps" json:"checkpoint_every_steps" yaml:"checkpoint_every_steps"`
	// LogEverySeconds is the interval of progress lines when not on a terminal.
	LogEverySeconds float64 `mapstructure:"log_every_s" json:"log_every_s" yaml:"log_every_s"`
	// Profiles sets the radial-profile table (profiles/).
	Profiles ProfilesConfig `mapstructure:"profiles" json:"profiles" yaml:"profiles"`
}

// ProfilesConfig sets the profile ensemble: density, vp, vs, g and P of every EveryDraws-th
// kept draw on a fixed radius grid, written as the profiles/ Parquet table.
type ProfilesConfig struct {
	// EveryDraws profiles the draws whose index is a multiple of it (0: no profile table).
	EveryDraws int64 `mapstructure:"every_draws" json:"every_draws" yaml:"every_draws"`
	// RadiusStepKm is the grid step (km); 0 chooses the planet's largest possible radius / 200,
	// rounded down to 1, 2 or 5 × 10^k km.
	RadiusStepKm float64 `mapstructure:"radius_step_km" json:"radius_step_km" yaml:"radius_step_km"`
}

// ConfigError is an input error: it names the file and the key. The CLI exits with status 2.
type ConfigError struct {
	// File is the config (or model) file.
	File string
	// Key is the key path, e.g. "layers[1].density_kg_m3" (may be empty).
	Key string
	// Msg says what is wrong.
	Msg string
}

func (e *ConfigError) Error() string {
	if e.Key == "" {
		return fmt.Sprintf("%s: %s", e.File, e.Msg)
	}
	return fmt.Sprintf("%s: %s: %s", e.File, e.Key, e.Msg)
}

// defaultSettings are the sampler and output settings a config may omit.
var defaultSettings = map[string]any{
	"sampler.chains":                 4,
	"sampler.warmup_steps":           2000,
	"sampler.steps":                  10000,
	"sampler.thin":                   1,
	"sampler.seed":                   1,
	"sampler.workers":                0,
	"sampler.independence":           0.5,
	"sampler.anneal":                 0.25,
	"sampler.pool_warmup":            true,
	"sampler.event_blocks":           false,
	"sampler.prior_only":             false,
	"output.dir":                     "run",
	"output.checkpoint_every_steps":  1000,
	"output.log_every_s":             10.0,
	"output.profiles.every_draws":    10,
	"output.profiles.radius_step_km": 0.0,
}

// Load reads a config file (YAML, or TOML by extension) strictly: an unknown key is an error.
// overrides (key path → value, e.g. "sampler.seed" → 7) replace the file's values; the package
// never reads the process environment — the command line turns flags and environment variables
// into overrides (see DefaultKeys).
func Load(path string, overrides map[string]any) (*Config, error) {
	v := viper.New()
	for k, d := range defaultSettings {
		v.SetDefault(k, d)
	}
	var c Config
	if err := readStrict(v, path, overrides, &c); err != nil {
		return nil, err
	}
	return &c, nil
}

// Parse reads a YAML config from memory, as Load reads a file (defaults applied, strictly, no
// overrides); file names it in errors. It is how a new run builds its problem from exactly the
// text it writes to the run folder.
func Parse(data []byte, file string) (*Config, error) {
	v := viper.New()
	for k, d := range defaultSettings {
		v.SetDefault(k, d)
	}
	v.SetConfigType("yaml")
	if err := v.ReadConfig(bytes.NewReader(data)); err != nil {
		return nil, &ConfigError{File: file, Msg: oneLine(strings.TrimPrefix(err.Error(), "While parsing config: "))}
	}
	var c Config
	if err := v.UnmarshalExact(&c); err != nil {
		return nil, decodeError(file, err)
	}
	return &c, nil
}

// DefaultKeys lists, sorted, the key paths that have a default (the sampler and output keys a
// config may omit, e.g. "sampler.seed"): the keys a caller may override without the file
// naming them.
func DefaultKeys() []string {
	keys := make([]string, 0, len(defaultSettings))
	for k := range defaultSettings {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// ModelFile is a layered interior model with fixed values, for plumb forward: the planet and
// layers sections of a config, nothing else.
type ModelFile struct {
	// Planet holds the body's name and radius (fixed).
	Planet PlanetConfig `mapstructure:"planet"`
	// Layers are listed from the centre outward, every property fixed.
	Layers []LayerConfig `mapstructure:"layers"`
	// Seismic may hold the true sources of seismic events when the file is the truth of a
	// synthetic run (see LoadTruth); a forward evaluation ignores it.
	Seismic struct {
		Events []map[string]any `mapstructure:"events"`
	} `mapstructure:"seismic"`
}

// LoadModel reads a layered model file (YAML or TOML, strict) and builds it as a problem with no
// sampled parameters and no observations; Problem.Solve(nil) then gives its structure. A prior
// anywhere in the file is an error naming its key.
func LoadModel(path string) (*Problem, error) {
	var m ModelFile
	if err := readStrict(viper.New(), path, nil, &m); err != nil {
		return nil, err
	}
	return buildFixed(path, m.Planet, m.Layers, "a model file")
}

// buildFixed builds a planet and its layers, every value fixed (a model file, a truth), as a
// problem with no sampled parameters and no observations; what names the file kind in the error
// for a prior.
func buildFixed(path string, planet PlanetConfig, layers []LayerConfig, what string) (*Problem, error) {
	c := &Config{Planet: planet, Layers: layers,
		Sampler: SamplerConfig{Chains: 1, Steps: 1, Thin: 1}, Output: OutputConfig{CheckpointEverySteps: 1, LogEverySeconds: 1}}
	p, err := Build(c, path)
	if err != nil {
		return nil, err
	}
	if p.Dim() > 0 {
		return nil, &ConfigError{File: path, Key: p.keys[0], Msg: what + " takes fixed values, not priors"}
	}
	return p, nil
}

// readStrict reads a YAML/TOML file into out with viper, after applying overrides; unknown keys
// are errors naming them.
func readStrict(v *viper.Viper, path string, overrides map[string]any, out any) error {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".yaml", ".yml":
		v.SetConfigType("yaml")
	case ".toml":
		v.SetConfigType("toml")
	default:
		return &ConfigError{File: path, Msg: "unknown file format (want .yaml, .yml or .toml)"}
	}
	f, err := os.Open(path)
	if err != nil {
		return &ConfigError{File: path, Msg: describeOpenError(err)}
	}
	defer f.Close()
	if err := v.ReadConfig(f); err != nil {
		return &ConfigError{File: path, Msg: oneLine(strings.TrimPrefix(err.Error(), "While parsing config: "))}
	}
	for k, o := range overrides {
		v.Set(k, o)
	}
	if err := v.UnmarshalExact(out); err != nil {
		return decodeError(path, err)
	}
	return nil
}

func describeOpenError(err error) string {
	switch {
	case errors.Is(err, os.ErrNotExist):
		return "no such file"
	case errors.Is(err, os.ErrPermission):
		return "permission denied"
	}
	return oneLine(err.Error())
}

var (
	invalidKeys = regexp.MustCompile(`'([^']*)' has invalid keys: (.*)`)
	fieldErr    = regexp.MustCompile(`^'([^']*)' (.*)$`)
)

// decodeError turns a mapstructure error into a one-line ConfigError naming the key.
func decodeError(file string, err error) error {
	msg := strings.TrimPrefix(err.Error(), "decoding failed due to the following error(s):")
	var lines []string
	for _, l := range strings.Split(msg, "\n") {
		if l = strings.TrimSpace(l); l != "" {
			lines = append(lines, l)
		}
	}
	if len(lines) == 0 {
		return &ConfigError{File: file, Msg: oneLine(err.Error())}
	}
	// Report the first problem; one clear line beats a list.
	l := lines[0]
	if m := invalidKeys.FindStringSubmatch(l); m != nil {
		keys := strings.Split(m[2], ", ")
		word := "unknown key"
		if len(keys) > 1 {
			word = "unknown keys"
		}
		return &ConfigError{File: file, Key: m[1], Msg: fmt.Sprintf("%s %q", word, strings.Join(keys, ", "))}
	}
	if m := fieldErr.FindStringSubmatch(l); m != nil {
		return &ConfigError{File: file, Key: m[1], Msg: m[2]}
	}
	return &ConfigError{File: file, Msg: l}
}

func oneLine(s string) string { return strings.Join(strings.Fields(s), " ") }

// Hash is the SHA-256 of the config's canonical JSON form, leaving out what cannot change the
// draws (worker count, output folder, log interval, checkpoint interval). A resumed run must have
// the same hash.
func (c *Config) Hash() string {
	h := *c
	h.Sampler.Workers = 0
	h.Output = OutputConfig{}
	b, err := json.Marshal(h)
	if err != nil { // values come from YAML/TOML decoding: always marshallable
		panic(fmt.Sprintf("inversion: config hash: %v", err))
	}
	s := sha256.Sum256(b)
	return hex.EncodeToString(s[:])
}

// YAML renders the resolved config (after environment and flag overrides) for the run folder.
func (c *Config) YAML() ([]byte, error) {
	b, err := yaml.Marshal(c)
	if err != nil {
		return nil, fmt.Errorf("render config: %w", err)
	}
	return b, nil
}
