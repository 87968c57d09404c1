package runfolder

import (
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"

	"plumb/inversion/mcmc"
	"plumb/inversion/store"
)

// Checkpoint is the state of a run that survives a crash: written atomically, only after the
// Parquet parts it lists are complete.
type Checkpoint struct {
	// SchemaVersion, PlumbVersion and GoVersion record what wrote it; math/rand/v2 streams are not
	// promised across Go releases, so a resume under another Go version is warned about.
	SchemaVersion int    `json:"schema_version"`
	PlumbVersion  string `json:"plumb_version"`
	GoVersion     string `json:"go_version"`
	// ConfigSHA256 is Config.Hash of the run's config; a resume with another config is refused.
	ConfigSHA256 string `json:"config_sha256"`
	// Seed is the run seed.
	Seed uint64 `json:"seed"`
	// Parts lists the complete sample parts (file names in samples/), in order.
	Parts []string `json:"parts"`
	// NextPart is the index of the next part file.
	NextPart int `json:"next_part"`
	// Chains holds every chain's full state (with tempering: the β = 1 replica's, for readers
	// such as the summary; Tempered is then what a resume restores).
	Chains []mcmc.State `json:"chains"`
	// Tempered holds every tempered chain's full state (replicas, ladder, exchange counters).
	Tempered []mcmc.TemperedState `json:"tempered,omitempty"`
	// Complete is true once every chain has run all its sweeps, or the stopping rule has ended
	// the run (Converged).
	Complete bool `json:"complete"`
	// Converged is true when the stopping rule (sampler.stop) ended the run at a checkpoint.
	Converged bool `json:"converged,omitempty"`
	// PooledAt lists the sweeps at which the chains' warm-up was pooled (sampler.pool_warmup).
	PooledAt []int64 `json:"pooled_at,omitempty"`
}

// ReadCheckpoint reads the checkpoint of the run folder dir; it returns (nil, nil) if there is
// none yet.
func ReadCheckpoint(dir string) (*Checkpoint, error) {
	path := filepath.Join(dir, CheckpointFile)
	b, err := os.ReadFile(path)
	if errors.Is(err, os.ErrNotExist) {
		return nil, nil
	}
	if err != nil {
		return nil, fmt.Errorf("read checkpoint: %w", err)
	}
	var c Checkpoint
	if err := json.Unmarshal(b, &c); err != nil {
		return nil, fmt.Errorf("%s: corrupt checkpoint: %w", path, err)
	}
	return &c, nil
}

// WriteCheckpoint writes cp as the checkpoint of the run folder dir, atomically.
func WriteCheckpoint(dir string, cp *Checkpoint) error {
	b, err := json.MarshalIndent(cp, "", " ")
	if err != nil {
		return fmt.Errorf("encode checkpoint: %w", err)
	}
	if err := store.WriteFileAtomic(filepath.Join(dir, CheckpointFile), b, 0o644); err != nil {
		return fmt.Errorf("write checkpoint: %w", err)
	}
	return nil
}
