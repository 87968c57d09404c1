package run

import (
	"context"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"sync/atomic"
	"time"

	"plumb/inversion/mcmc"
	"plumb/inversion/problem"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
)

// Options control how a run executes; none of them changes the draws.
type Options struct {
	// Workers is the number of goroutines running chains; 0 takes the config's value (whose 0
	// means one per core).
	Workers int
	// Log receives progress and events (nil: discard).
	Log *slog.Logger
	// Live, when non-nil, gets a live progress line (for a terminal) instead of periodic log lines.
	Live io.Writer
}

// ErrInterrupted is returned when a run stopped on a signal after writing its checkpoint.
var ErrInterrupted = errors.New("run interrupted; checkpoint written")

// ErrRunDirNotEmpty is returned when a new run would overwrite an existing one.
var ErrRunDirNotEmpty = errors.New("run folder exists and is not empty")

// Start begins a new run of cfg (read from cfgFile, which names it in errors) in dir, which must
// not exist or be empty. The problem is built once, from the resolved config exactly as it is
// written to the run folder (so a resume, which reads that file, builds the same problem), before
// anything is created. It returns the folder at the end of the run (also when interrupted).
func Start(ctx context.Context, cfg *problem.Config, cfgFile, dir string, opt Options) (*runfolder.Folder, error) {
	y, err := cfg.YAML()
	if err != nil {
		return nil, err
	}
	head := "# Resolved configuration of this run (after environment and flag overrides).\n" +
		"# plumb resume refuses to continue if it is changed.\n"
	text := append([]byte(head), y...)
	resolved, err := problem.Parse(text, cfgFile)
	if err != nil {
		return nil, err
	}
	prob, err := problem.Build(resolved, cfgFile)
	if err != nil {
		return nil, err
	}
	if ents, err := os.ReadDir(dir); err == nil && len(ents) > 0 {
		return nil, fmt.Errorf("%s: %w (choose another with --out, or remove it)", dir, ErrRunDirNotEmpty)
	} else if err != nil && !errors.Is(err, os.ErrNotExist) {
		return nil, fmt.Errorf("run folder %s: %w", dir, err)
	}
	if err := os.MkdirAll(filepath.Join(dir, runfolder.SamplesDir), 0o755); err != nil {
		return nil, fmt.Errorf("create run folder: %w", err)
	}
	if err := store.WriteFileAtomic(filepath.Join(dir, runfolder.ConfigFile), text, 0o644); err != nil {
		return nil, fmt.Errorf("write resolved config: %w", err)
	}
	return execute(ctx, runfolder.New(dir, resolved, prob, nil), opt)
}

// Resume continues the run in the opened folder f exactly where its checkpoint left it (or from
// the start when it has none). It returns the folder at the end of the run.
func Resume(ctx context.Context, f *runfolder.Folder, opt Options) (*runfolder.Folder, error) {
	return execute(ctx, f, opt)
}

// chainConfig is the mcmc configuration a problem runs with. Every continuous parameter whose
// prior support lies above zero (radii, thicknesses, densities, velocities) is proposed on a log
// scale: the data constrain products like ρ r³, which are straight lines in log coordinates.
// Initial proposal scales are a tenth of each prior's standard deviation (relative to the prior
// median for log coordinates; common practice, no source); adaptation takes over from there.
func chainConfig(cfg *problem.Config, p *problem.Problem) mcmc.Config {
	sc := make([]float64, p.Dim())
	logc := make([]bool, p.Dim())
	for i, par := range p.Space.Params {
		sc[i] = 0.1 * par.Prior.StdDev()
		if lo, _ := par.Prior.Support(); par.Levels() == 0 && lo > 0 {
			logc[i] = true
			sc[i] /= par.Prior.Quantile(0.5)
		}
	}
	anneal := cfg.Sampler.Anneal
	if p.PriorOnly() {
		anneal = 0 // nothing to anneal
	}
	return mcmc.Config{
		Warmup: cfg.Sampler.WarmupSteps, Steps: cfg.Sampler.Steps, Thin: cfg.Sampler.Thin,
		InitialScale: sc, Log: logc, Independence: cfg.Sampler.Independence, Blocks: p.EventBlocks(cfg.Sampler.EventBlocks),
		Anneal: anneal,
		Init:   p.SamplePrior,
	}
}

// runState is what execute works with.
type runState struct {
	dir    string
	cfg    *problem.Config
	prob   *problem.Problem
	mc     mcmc.Config
	cp     *runfolder.Checkpoint
	chains []sampler
	cols   []store.Column
	meta   map[string]string
	log    *slog.Logger
	mon    *monitor
	// grid is the radius grid of the profile table (m; nil when it is off).
	grid []float64
	// diag is the latest convergence line for the progress reporter (nil before the first).
	diag     atomic.Pointer[string]
	lastDiag time.Time
}

func execute(ctx context.Context, f *runfolder.Folder, opt Options) (*runfolder.Folder, error) {
	log := opt.Log
	if log == nil {
		log = slog.New(slog.NewTextHandler(io.Discard, nil))
	}
	dir, cfg, prob := f.Dir, f.Config, f.Problem
	rs := &runState{dir: dir, cfg: cfg, prob: prob, mc: chainConfig(cfg, prob), log: log}
	rs.cols = runfolder.SampleColumns(prob)
	var err error
	if rs.meta, err = f.Metadata(); err != nil {
		return nil, err
	}
	if rs.grid, err = prob.ProfileGrid(filepath.Join(dir, runfolder.ConfigFile), cfg.Output.Profiles); err != nil {
		return nil, err
	}
	if err := rs.restore(); err != nil {
		return nil, err
	}
	done := runfolder.New(dir, cfg, prob, rs.cp)
	if rs.cp.Complete {
		log.Info("run already complete", "dir", dir)
		return done, nil
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = cfg.Sampler.Workers
	}
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	return done, rs.loop(ctx, workers, opt)
}

// sampler is what the run loop drives: an mcmc.Chain, or an mcmc.Tempered ladder of them.
type sampler interface {
	Advance(until int64, stop func() bool, emit mcmc.Emit) int64
	Iter() int64
	Done() bool
	Counts() mcmc.Counters
}

// newSampler starts chain c afresh.
func (rs *runState) newSampler(c int) (sampler, error) {
	seed := rs.cfg.Sampler.Seed
	if t := rs.cfg.Sampler.Tempering; t != nil {
		return mcmc.NewTempered(rs.prob.ChainTarget(), rs.mc, t.TemperConfig(), seed, c)
	}
	return mcmc.NewChain(rs.prob.ChainTarget(), rs.mc, seed, c)
}

// restoreSamplers rebuilds the chains from a checkpoint.
func (rs *runState) restoreSamplers(cp *runfolder.Checkpoint) error {
	n := rs.cfg.Sampler.Chains
	if t := rs.cfg.Sampler.Tempering; t != nil {
		if len(cp.Tempered) != n {
			return fmt.Errorf("checkpoint has %d tempered chains, config %d", len(cp.Tempered), n)
		}
		for _, st := range cp.Tempered {
			tp, err := mcmc.RestoreTempered(rs.prob.ChainTarget(), rs.mc, t.TemperConfig(), st)
			if err != nil {
				return fmt.Errorf("restore checkpoint: %w", err)
			}
			rs.chains = append(rs.chains, tp)
		}
		return nil
	}
	if len(cp.Chains) != n {
		return fmt.Errorf("checkpoint has %d chains, config %d", len(cp.Chains), n)
	}
	for _, st := range cp.Chains {
		ch, err := mcmc.Restore(rs.prob.ChainTarget(), rs.mc, st)
		if err != nil {
			return fmt.Errorf("restore checkpoint: %w", err)
		}
		rs.chains = append(rs.chains, ch)
	}
	return nil
}

// restore loads the checkpoint (or starts the chains afresh) and removes sample parts written
// after the last checkpoint, which a crash between part and checkpoint can leave behind.
func (rs *runState) restore() error {
	samples := filepath.Join(rs.dir, runfolder.SamplesDir)
	if err := os.MkdirAll(samples, 0o755); err != nil {
		return fmt.Errorf("samples folder: %w", err)
	}
	if err := store.CleanTemp(samples); err != nil {
		return fmt.Errorf("clean samples folder: %w", err)
	}
	cp, err := runfolder.ReadCheckpoint(rs.dir)
	if err != nil {
		return err
	}
	hash := rs.cfg.Hash()
	if cp == nil {
		cp = &runfolder.Checkpoint{SchemaVersion: runfolder.SchemaVersion, PlumbVersion: runfolder.Version, GoVersion: runtime.Version(),
			ConfigSHA256: hash, Seed: rs.cfg.Sampler.Seed}
		for c := range rs.cfg.Sampler.Chains {
			ch, err := rs.newSampler(c)
			if err != nil {
				return fmt.Errorf("start chains: %w", err)
			}
			rs.chains = append(rs.chains, ch)
		}
	} else {
		if cp.ConfigSHA256 != hash {
			return &problem.ConfigError{File: filepath.Join(rs.dir, runfolder.ConfigFile), Msg: "changed since the run started (config SHA-256 differs from the checkpoint's); a run resumes only with its own config"}
		}
		if cp.GoVersion != runtime.Version() {
			rs.log.Warn("Go version differs from the one the run started with; random streams may differ, so the resumed draws may not equal an uninterrupted run's",
				"checkpoint", cp.GoVersion, "now", runtime.Version())
		}
		if err := rs.restoreSamplers(cp); err != nil {
			return err
		}
	}
	rs.cp = cp
	rs.mon = newMonitor(rs.prob, len(rs.chains))
	// Parts written after the last checkpoint (a crash between part and checkpoint) are removed,
	// with the sample_stats and profiles parts that carry the names of the sample parts they
	// accompany (temporary files are not listed parts either). samples/ must exist; the others
	// only exist in runs that write them.
	for _, sub := range runfolder.PartDirs {
		dir := filepath.Join(rs.dir, sub)
		ents, err := os.ReadDir(dir)
		if err != nil {
			if sub == runfolder.SamplesDir {
				return fmt.Errorf("samples folder: %w", err)
			}
			continue
		}
		for _, e := range ents {
			if !slices.Contains(cp.Parts, e.Name()) {
				rs.log.Info("removing a part written after the last checkpoint", "file", filepath.Join(sub, e.Name()))
				if err := os.Remove(filepath.Join(dir, e.Name())); err != nil {
					return fmt.Errorf("remove stale %s part: %w", sub, err)
				}
			}
		}
	}
	if err := rs.mon.addParts(rs.dir, rs.prob); err != nil {
		return err
	}
	return rs.writeCheckpoint()
}

func (rs *runState) writeCheckpoint() error {
	rs.cp.Chains = rs.cp.Chains[:0]
	rs.cp.Tempered = rs.cp.Tempered[:0]
	done := true
	for _, ch := range rs.chains {
		switch c := ch.(type) {
		case *mcmc.Chain:
			rs.cp.Chains = append(rs.cp.Chains, c.State())
		case *mcmc.Tempered:
			ts := c.State()
			cold := ts.Replicas[0]
			cold.Chain, cold.Iter, cold.Draws = ts.Chain, ts.Iter, ts.Draws
			rs.cp.Tempered = append(rs.cp.Tempered, ts)
			rs.cp.Chains = append(rs.cp.Chains, cold)
		}
		done = done && ch.Done()
	}
	rs.cp.Complete = done || rs.cp.Converged
	return runfolder.WriteCheckpoint(rs.dir, rs.cp)
}

// poolPoints are the sweeps at which the chains stop together to pool their warm-up
// (sampler.pool_warmup): half-way through warm-up and at its end (mcmc.PoolWarmup).
func (rs *runState) poolPoints() []int64 {
	w := rs.mc.Warmup
	if !rs.cfg.Sampler.PoolWarmup || w == 0 || len(rs.chains) < 2 {
		return nil
	}
	if w/2 == 0 {
		return []int64{w}
	}
	return []int64{w / 2, w}
}

// poolWarmup pools the chains' warm-up (mcmc.PoolWarmup) when they have all just reached a pool
// point that has not been pooled yet. It runs before the checkpoint of that boundary is written,
// and the checkpoint records the point (PooledAt), so a resumed run pools each point exactly once.
func (rs *runState) poolWarmup() error {
	pts := rs.poolPoints()
	if len(pts) == 0 {
		return nil
	}
	it := rs.chains[0].Iter()
	if !slices.Contains(pts, it) || slices.Contains(rs.cp.PooledAt, it) {
		return nil
	}
	for _, ch := range rs.chains {
		if ch.Iter() != it {
			return nil
		}
	}
	var err error
	switch rs.chains[0].(type) {
	case *mcmc.Chain:
		cs := make([]*mcmc.Chain, len(rs.chains))
		for i, ch := range rs.chains {
			cs[i] = ch.(*mcmc.Chain)
		}
		err = mcmc.PoolWarmup(cs)
	case *mcmc.Tempered:
		ts := make([]*mcmc.Tempered, len(rs.chains))
		for i, ch := range rs.chains {
			ts[i] = ch.(*mcmc.Tempered)
		}
		err = mcmc.PoolTemperedWarmup(ts)
	}
	if err != nil {
		return err
	}
	rs.cp.PooledAt = append(rs.cp.PooledAt, it)
	return nil
}
