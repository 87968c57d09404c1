// Package runfolder is the format of a plumb run folder and the one way to open it.
//
// A run folder holds:
//
//	config.yaml        the resolved config (after flag and environment overrides); a resume
//	                   refuses to continue if it changes
//	checkpoint.json    the state that survives a crash (Checkpoint), written atomically after
//	                   the parts it lists
//	samples/           part-NNNNN.parquet: one row per kept draw (SampleColumns)
//	profiles/          part-NNNNN.parquet: radial profiles of every n-th draw (ProfileColumns)
//	sample_stats/      part-NNNNN.parquet: ladder state of tempered runs (StatsColumns)
//	summary.json       the posterior summary (written by the readers, not by the run)
//
// A part of profiles/ or sample_stats/ carries the name of the samples/ part it accompanies and
// is written before it. Open reads the config (strictly, without any override), builds the
// problem once and reads the checkpoint; the tables are read on first use and kept, so that a
// command reads a folder once whatever it prints. The package knows the names and the layout; it
// neither samples (package run writes folders) nor summarises (package results reads them).
package runfolder
