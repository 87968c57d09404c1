// Package mcmc is a generic Markov chain Monte Carlo sampler. It samples any log density over a
// vector whose coordinates are either continuous or discrete (categorical levels 0..K−1) and
// knows nothing of what the coordinates mean: the same code samples a Gaussian in a test and a
// physical model in a run.
//
// A density is a Target (its dimension, the number of levels of each coordinate, and LogDensity,
// which may also fill derived values recorded with every draw). Optional interfaces let a target
// say more: Bounded (a box outside which the density is zero), Split (log prior + log
// likelihood, for annealed warm-up and tempering) and PriorSampler (exact draws from the prior).
//
// NewChain starts chain c of a run from a seed; Chain.Advance runs sweeps and hands each kept
// draw to a callback. One sweep is an adaptive random-walk Metropolis move of all continuous
// coordinates together, one such move per extra block (Config.Blocks) and one Metropolis move per
// discrete coordinate; after warm-up a share of the continuous moves can be independence moves
// (Config.Independence). The proposals adapt during warm-up only and are frozen afterwards.
// PoolWarmup fits the independence proposals of several chains from their warm-ups together.
//
// A chain is a value with one serialisable State (position, log density, recorded derived values,
// random-generator state, adaptation state and counters), so a run can be checkpointed at any step
// and resumed bit for bit (Chain.State, Restore). Every random number of chain c comes from its
// own generator, seeded from the run seed by Seeds, so the draws do not depend on how chains are
// scheduled.
//
// Tempered runs parallel tempering over a Split target; Evidence and EvidenceLadders estimate the
// log marginal likelihood from its replicas. The diagnostics (RankRHat, ESSBulk, ESSTail, the
// MCSE functions, Autocorrelation, Quantile7) take draws[chain][iteration] of one scalar quantity.
package mcmc
