// Package priors holds the one-dimensional prior distributions of the
// sampled parameters and the ordered parameter space built from them.
//
// The package deals with probability only: it knows nothing about planets.
// All values are in SI units; each Param carries the factor that converts a
// value to its output unit. Random numbers always come from a *rand.Rand
// (math/rand/v2) supplied by the caller; nothing here uses a global
// generator or holds package-level mutable state.
//
// Distributions are plain value types. Build them with the NewXxx
// constructors, which validate their arguments and return descriptive
// errors; treat the results as immutable.
package priors
