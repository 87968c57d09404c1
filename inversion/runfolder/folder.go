package runfolder

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strconv"

	"plumb/inversion/problem"
	"plumb/inversion/store"
)

// Folder is an opened run folder: its resolved config, the problem built from it and its
// checkpoint, with the Parquet tables read on first use.
type Folder struct {
	// Dir is the run folder's path.
	Dir string
	// Config is the run's resolved config (config.yaml, read without overrides).
	Config *problem.Config
	// Problem is built from Config.
	Problem *problem.Problem
	// Checkpoint is the last checkpoint; nil when the run has not written one yet.
	Checkpoint *Checkpoint

	samples, profiles, stats *store.Batch
}

// ErrNotRunFolder is returned (wrapped) by Open for a folder without a resolved config.
var ErrNotRunFolder = errors.New("not a run folder")

// Open reads the run folder dir: its config (strictly, with no override: a run is read with its
// own config), the problem built from it, and its checkpoint if there is one.
func Open(dir string) (*Folder, error) {
	path := filepath.Join(dir, ConfigFile)
	if _, err := os.Stat(path); err != nil {
		return nil, fmt.Errorf("%s: %w (no %s)", dir, ErrNotRunFolder, ConfigFile)
	}
	cfg, err := problem.Load(path, nil)
	if err != nil {
		return nil, err
	}
	p, err := problem.Build(cfg, path)
	if err != nil {
		return nil, err
	}
	cp, err := ReadCheckpoint(dir)
	if err != nil {
		return nil, err
	}
	return &Folder{Dir: dir, Config: cfg, Problem: p, Checkpoint: cp}, nil
}

// New returns the folder dir with values already in memory (the run loop's, at its end), so
// that a command that has just run does not read them again.
func New(dir string, cfg *problem.Config, p *problem.Problem, cp *Checkpoint) *Folder {
	return &Folder{Dir: dir, Config: cfg, Problem: p, Checkpoint: cp}
}

// Started returns an error unless the run has written its first checkpoint.
func (f *Folder) Started() error {
	if f.Checkpoint == nil {
		return fmt.Errorf("%s: no checkpoint: the run has not started", f.Dir)
	}
	return nil
}

// Samples returns the whole sample table (all parts, in part order), read once.
func (f *Folder) Samples() (*store.Batch, error) {
	if f.samples == nil {
		b, _, err := store.ReadParts(filepath.Join(f.Dir, SamplesDir))
		if err != nil {
			return nil, fmt.Errorf("%s: read samples: %w", f.Dir, err)
		}
		f.samples = b
	}
	return f.samples, nil
}

// Profiles returns the whole profile table, read once; nil (no error) when the run has none.
func (f *Folder) Profiles() (*store.Batch, error) {
	if f.profiles == nil {
		b, err := f.optional(ProfilesDir)
		if err != nil || b == nil {
			return nil, err
		}
		f.profiles = b
	}
	return f.profiles, nil
}

// Stats returns the whole sample_stats table of a tempered run, read once; nil (no error) when
// the run has none.
func (f *Folder) Stats() (*store.Batch, error) {
	if f.stats == nil {
		b, err := f.optional(StatsDir)
		if err != nil || b == nil {
			return nil, err
		}
		f.stats = b
	}
	return f.stats, nil
}

// optional reads the table of sub-folder sub; nil when the folder does not exist or is empty.
func (f *Folder) optional(sub string) (*store.Batch, error) {
	dir := filepath.Join(f.Dir, sub)
	if _, err := os.Stat(dir); errors.Is(err, os.ErrNotExist) {
		return nil, nil
	} else if err != nil {
		return nil, fmt.Errorf("%s: %w", f.Dir, err)
	}
	b, _, err := store.ReadParts(dir)
	if errors.Is(err, store.ErrNoParts) {
		return nil, nil
	}
	if err != nil {
		return nil, fmt.Errorf("%s: read %s: %w", f.Dir, sub, err)
	}
	if b.Len() == 0 {
		return nil, nil
	}
	return b, nil
}

// Metadata is the key-value metadata of every Parquet part of the folder: versions, the config's
// hash and text, the seed and the caution. It reads config.yaml.
func (f *Folder) Metadata() (map[string]string, error) {
	y, err := os.ReadFile(filepath.Join(f.Dir, ConfigFile))
	if err != nil {
		return nil, fmt.Errorf("read resolved config: %w", err)
	}
	return map[string]string{
		"plumb.version":        Version,
		"plumb.schema_version": strconv.Itoa(SchemaVersion),
		"plumb.config_sha256":  f.Config.Hash(),
		"plumb.seed":           strconv.FormatUint(f.Config.Sampler.Seed, 10),
		"plumb.config":         string(y),
		"plumb.caution":        Caution,
	}, nil
}
