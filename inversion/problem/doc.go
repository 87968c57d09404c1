// Package problem turns a config into a planet inversion the sampler can evaluate.
//
// Load reads a YAML or TOML config strictly (an unknown key is an error naming it) with the
// overrides the caller gives; it never reads the process environment. Build interprets the
// config: every quantity is a fixed number or a prior, converted to SI, and each sampled one
// becomes a named, unit-tagged parameter of a priors.Space (e.g. "core_outer_radius_km"). The
// resulting Problem implements the sampler's target interfaces (mcmc.Target, mcmc.Split,
// mcmc.Bounded, mcmc.PriorSampler): LogDensity = log prior + Gaussian log likelihood of the
// observations, from the structure solved by package forward. Input errors are *ConfigError
// values naming the file and the key.
//
// Files: config.go (config types, Load, Parse, Hash), quantity.go (fixed-or-prior values),
// problem.go (Build, layer plans, boundaries, observations), likelihood.go (Model, Solve,
// LogDensity), observables.go (the observable registry), eosconfig.go, tidesconfig.go,
// seismicconfig.go (the builders of each section), cache.go (the per-chain structure cache),
// profilegrid.go (the profile table's radius grid), truth.go (truth models mapped onto the
// parameters), synth.go (synthetic data).
package problem
