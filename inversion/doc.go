// Package inversion holds no code of its own: its sub-packages are the steps from a config to a
// posterior, one hand-off each, with imports pointing one way (from the readers and the CLI down
// to the engine):
//
//	problem    config → a target the sampler can evaluate: config types and validation, the
//	           builders of layers, equations of state, rheologies and seismic picks, the
//	           observables, the likelihood, truths and synthetic data
//	mcmc       generic sampling of any log density (adaptive Metropolis, independence moves,
//	           tempering, evidence) and its diagnostics (R̂, ESS, MCSE, quantiles)
//	store      Parquet parts with run-time schemas, atomic writes
//	runfolder  the run folder's names and format (config, checkpoint, tables) and Open, the one
//	           way every reader opens a folder
//	run        the run loop and its writers: start, resume, checkpoints, sample/profile/ladder parts
//	results    readers: the posterior summary and the truth comparison of an opened folder
//	report     readers: figures and the Markdown report of an opened folder
//	modelfile  the tabulated-model CSV
//
// DEVELOPERS.md lists what each package knows and must not know, and where to change what.
package inversion
