// Package results reads an opened run folder into numbers a researcher reports: the posterior
// summary of every parameter, layer state and observation (Summarize, saved as summary.json and
// printed as tables), and where a synthetic run's truth falls in its posterior (CompareTruth).
// It reads; it never samples, and it does not import the run loop.
package results
