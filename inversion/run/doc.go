// Package run samples a problem into a run folder and resumes it exactly.
//
// Start writes the resolved config into a new folder and runs its chains; Resume continues an
// opened folder from its checkpoint. Chains advance on a pool of goroutines to a common
// checkpoint boundary; their buffered draws are written as the next Parquet part of samples/
// (with the accompanying profiles/ and sample_stats/ parts), then the checkpoint that lists them.
// Each chain depends only on its own random stream, so the output does not depend on the number
// of workers, and a resumed run equals an uninterrupted one. Nothing here reads the process
// environment or summarises a run: readers open the folder through package runfolder.
package run
