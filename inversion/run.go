package inversion

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"log/slog"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"sync"
	"sync/atomic"
	"time"

	"plumb/inversion/mcmc"
	"plumb/inversion/store"
)

// Version is plumb's version, recorded in every output file.
const Version = "0.1.0"

// SchemaVersion numbers the layout of the run folder and of the Parquet tables.
const SchemaVersion = 1

// Caution travels with every result: it is written into the Parquet metadata and the summary.
const Caution = "A posterior is conditional on the priors and on the model family (number and kind of layers, " +
	"equations of state, observables used); change them and it changes. plumb is a planetary-structure " +
	"research tool, not a hazard-assessment tool."

// Files of a run folder.
const (
	ConfigFile     = "config.yaml"
	CheckpointFile = "checkpoint.json"
	SamplesDir     = "samples"
	StatsDir       = "sample_stats"
	SummaryFile    = "summary.json"
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

// Start begins a new run of cfg (read from cfgFile) in dir, which must not exist or be empty.
func Start(ctx context.Context, cfg *Config, cfgFile, dir string, opt Options) error {
	if _, err := Build(cfg, cfgFile); err != nil {
		return err
	}
	if ents, err := os.ReadDir(dir); err == nil && len(ents) > 0 {
		return fmt.Errorf("%s: %w (choose another with --out, or remove it)", dir, ErrRunDirNotEmpty)
	} else if err != nil && !errors.Is(err, os.ErrNotExist) {
		return fmt.Errorf("run folder %s: %w", dir, err)
	}
	if err := os.MkdirAll(filepath.Join(dir, SamplesDir), 0o755); err != nil {
		return fmt.Errorf("create run folder: %w", err)
	}
	y, err := cfg.YAML()
	if err != nil {
		return err
	}
	head := "# Resolved configuration of this run (after environment and flag overrides).\n" +
		"# plumb resume refuses to continue if it is changed.\n"
	if err := store.WriteFileAtomic(filepath.Join(dir, ConfigFile), append([]byte(head), y...), 0o644); err != nil {
		return fmt.Errorf("write resolved config: %w", err)
	}
	return execute(ctx, dir, opt)
}

// Resume continues the run in dir exactly where its checkpoint left it.
func Resume(ctx context.Context, dir string, opt Options) error {
	return execute(ctx, dir, opt)
}

// LoadRun reads a run folder's config and problem.
func LoadRun(dir string) (*Config, *Problem, error) {
	path := filepath.Join(dir, ConfigFile)
	cfg, err := Load(path, nil)
	if err != nil {
		return nil, nil, err
	}
	p, err := Build(cfg, path)
	if err != nil {
		return nil, nil, err
	}
	return cfg, p, nil
}

// ReadCheckpoint reads a run's checkpoint; it returns (nil, nil) if there is none yet.
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

// chainConfig is the mcmc configuration a problem runs with. Every continuous parameter whose
// prior support lies above zero (radii, thicknesses, densities, velocities) is proposed on a log
// scale: the data constrain products like ρ r³, which are straight lines in log coordinates.
// Initial proposal scales are a tenth of each prior's standard deviation (relative to the prior
// median for log coordinates; common practice, no source); adaptation takes over from there.
func chainConfig(cfg *Config, p *Problem) mcmc.Config {
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
		InitialScale: sc, Log: logc, Independence: cfg.Sampler.Independence, Blocks: p.eventBlocks(cfg.Sampler.EventBlocks),
		Anneal: anneal,
		Init:   p.SamplePrior,
	}
}

// runState is what execute works with.
type runState struct {
	dir    string
	cfg    *Config
	prob   *Problem
	mc     mcmc.Config
	cp     *Checkpoint
	chains []sampler
	cols   *columns
	meta   map[string]string
	log    *slog.Logger
	mon    *monitor
	// grid is the radius grid of the profile table (m; nil when it is off).
	grid []float64
	// diag is the latest convergence line for the progress reporter (nil before the first).
	diag     atomic.Pointer[string]
	lastDiag time.Time
}

func execute(ctx context.Context, dir string, opt Options) error {
	log := opt.Log
	if log == nil {
		log = slog.New(slog.NewTextHandler(io.Discard, nil))
	}
	cfg, prob, err := LoadRun(dir)
	if err != nil {
		return err
	}
	rs := &runState{dir: dir, cfg: cfg, prob: prob, mc: chainConfig(cfg, prob), log: log}
	rs.cols = newColumns(prob)
	if rs.meta, err = runMetadata(dir, cfg); err != nil {
		return err
	}
	if rs.grid, err = prob.profileGrid(filepath.Join(dir, ConfigFile), cfg.Output.Profiles); err != nil {
		return err
	}
	if err := rs.restore(); err != nil {
		return err
	}
	if rs.cp.Complete {
		log.Info("run already complete", "dir", dir)
		return nil
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = cfg.Sampler.Workers
	}
	if workers <= 0 {
		workers = runtime.NumCPU()
	}
	return rs.loop(ctx, workers, opt)
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
		return mcmc.NewTempered(rs.prob.chainTarget(), rs.mc, t.temperConfig(), seed, c)
	}
	return mcmc.NewChain(rs.prob.chainTarget(), rs.mc, seed, c)
}

// restoreSamplers rebuilds the chains from a checkpoint.
func (rs *runState) restoreSamplers(cp *Checkpoint) error {
	n := rs.cfg.Sampler.Chains
	if t := rs.cfg.Sampler.Tempering; t != nil {
		if len(cp.Tempered) != n {
			return fmt.Errorf("checkpoint has %d tempered chains, config %d", len(cp.Tempered), n)
		}
		for _, st := range cp.Tempered {
			tp, err := mcmc.RestoreTempered(rs.prob.chainTarget(), rs.mc, t.temperConfig(), st)
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
		ch, err := mcmc.Restore(rs.prob.chainTarget(), rs.mc, st)
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
	samples := filepath.Join(rs.dir, SamplesDir)
	if err := os.MkdirAll(samples, 0o755); err != nil {
		return fmt.Errorf("samples folder: %w", err)
	}
	if err := store.CleanTemp(samples); err != nil {
		return fmt.Errorf("clean samples folder: %w", err)
	}
	cp, err := ReadCheckpoint(rs.dir)
	if err != nil {
		return err
	}
	hash := rs.cfg.Hash()
	if cp == nil {
		cp = &Checkpoint{SchemaVersion: SchemaVersion, PlumbVersion: Version, GoVersion: runtime.Version(),
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
			return &ConfigError{File: filepath.Join(rs.dir, ConfigFile), Msg: "changed since the run started (config SHA-256 differs from the checkpoint's); a run resumes only with its own config"}
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
	for _, sub := range []string{SamplesDir, StatsDir, ProfilesDir} {
		dir := filepath.Join(rs.dir, sub)
		ents, err := os.ReadDir(dir)
		if err != nil {
			if sub == SamplesDir {
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
	b, err := json.MarshalIndent(rs.cp, "", " ")
	if err != nil {
		return fmt.Errorf("encode checkpoint: %w", err)
	}
	if err := store.WriteFileAtomic(filepath.Join(rs.dir, CheckpointFile), b, 0o644); err != nil {
		return fmt.Errorf("write checkpoint: %w", err)
	}
	return nil
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

// draw is one buffered row.
type draw struct {
	index  int64
	lp     float64
	x, der []float64
}

// progress holds counters shared with the progress reporter; they never influence the draws.
type progress struct {
	sweeps          []atomic.Int64
	accepted, tried []atomic.Int64
}

func (rs *runState) loop(ctx context.Context, workers int, opt Options) error {
	var stop atomic.Bool
	defer context.AfterFunc(ctx, func() { stop.Store(true) })()
	every := rs.cfg.Output.CheckpointEverySteps
	pr := &progress{
		sweeps:   make([]atomic.Int64, len(rs.chains)),
		accepted: make([]atomic.Int64, len(rs.chains)),
		tried:    make([]atomic.Int64, len(rs.chains)),
	}
	for i, ch := range rs.chains {
		pr.sweeps[i].Store(ch.Iter())
	}
	repDone := make(chan struct{})
	var repWG sync.WaitGroup
	repWG.Add(1)
	go func() {
		defer repWG.Done()
		rs.report(pr, opt, repDone)
	}()
	stopReport := sync.OnceFunc(func() { close(repDone); repWG.Wait() })
	defer stopReport()

	rs.log.Info("sampling", "dir", rs.dir, "chains", len(rs.chains), "workers", workers,
		"parameters", rs.prob.Dim(), "observations", len(rs.prob.Observations))
	for {
		// Every chain advances to the same boundary, the next multiple of `every` after the
		// least advanced chain: after an interruption mid-interval the chains realign there, so
		// that the stopping rule always sees the chains at one common sweep.
		minIter := rs.chains[0].Iter()
		for _, ch := range rs.chains {
			minIter = min(minIter, ch.Iter())
		}
		until := (minIter/every + 1) * every
		for _, p := range rs.poolPoints() {
			if minIter < p && until > p {
				until = p // the chains stop together there to pool their warm-up
			}
		}
		bufs := make([][]draw, len(rs.chains))
		jobs := make(chan int)
		var wg sync.WaitGroup
		for range min(workers, len(rs.chains)) {
			wg.Add(1)
			go func() {
				defer wg.Done()
				for c := range jobs {
					bufs[c] = rs.advance(c, until, &stop, pr)
				}
			}()
		}
		for c := range rs.chains {
			jobs <- c
		}
		close(jobs)
		wg.Wait()
		if err := rs.poolWarmup(); err != nil {
			return err
		}
		if err := rs.writePart(bufs); err != nil {
			return err
		}
		rs.checkConvergence(bufs, until)
		if err := rs.writeCheckpoint(); err != nil {
			return err
		}
		if rs.cp.Complete {
			stopReport()
			if rs.cp.Converged {
				rs.log.Info("run complete: every parameter met the stopping rule", "dir", rs.dir,
					"rhat_below", rs.cfg.Sampler.Stop.RHatBelow, "ess_above", rs.cfg.Sampler.Stop.ESSAbove)
			} else {
				rs.log.Info("run complete", "dir", rs.dir)
			}
			return nil
		}
		if stop.Load() {
			stopReport()
			rs.log.Info("interrupted; checkpoint written", "dir", rs.dir)
			return ErrInterrupted
		}
	}
}

// checkConvergence adds the new draws to the monitor and, once every chain is past warm-up,
// applies the stopping rule at this checkpoint (deterministically: it sees exactly the draws
// written so far) and refreshes the progress line's diagnostics (without a rule at most every
// 10 s of wall time, which affects only the display).
func (rs *runState) checkConvergence(bufs [][]draw, until int64) {
	for c, b := range bufs {
		for _, d := range b {
			rs.mon.add(c, d.index, d.x)
		}
	}
	for _, ch := range rs.chains {
		// Only at the common boundary (not after an interruption mid-interval), after warm-up.
		if ch.Iter() <= rs.mc.Warmup || (ch.Iter() != until && !ch.Done()) {
			return
		}
	}
	rule := rs.cfg.Sampler.Stop
	if rule == nil && time.Since(rs.lastDiag) < 10*time.Second {
		return
	}
	rs.lastDiag = time.Now()
	d := rs.mon.diagnostics()
	r, rn, e, en := rs.mon.worst(rs.prob, d)
	line := fmt.Sprintf("max R̂ %.3f (%s)  min ESS %.0f (%s)", r, rn, e, en)
	rs.diag.Store(&line)
	rs.log.Info("convergence", "max_rhat", fmt.Sprintf("%.4f", r), "of", rn, "min_ess_bulk", fmt.Sprintf("%.0f", e), "of_param", en)
	if rule != nil && rs.mon.converged(rule, d) {
		rs.cp.Converged = true
	}
}

// advance runs chain c to the checkpoint boundary until, in chunks so that progress can be
// reported and a stop request honoured promptly.
func (rs *runState) advance(c int, until int64, stop *atomic.Bool, pr *progress) []draw {
	ch := rs.chains[c]
	var out []draw
	emit := func(i int64, x, der []float64, lp float64) {
		out = append(out, draw{index: i, lp: lp, x: slices.Clone(x), der: slices.Clone(der)})
	}
	const chunk = 256
	for ch.Iter() < until && !ch.Done() && !stop.Load() {
		ch.Advance(min(until, ch.Iter()+chunk), stop.Load, emit)
		pr.sweeps[c].Store(ch.Iter())
		k := ch.Counts()
		pr.accepted[c].Store(k.Accepted[0] + k.Accepted[1])
		pr.tried[c].Store(k.Proposed[0] + k.Proposed[1])
	}
	return out
}

// writePart writes the buffered draws of all chains (chain order, then draw order) as the next
// sample part, then lists it in the checkpoint (the checkpoint itself is written after).
func (rs *runState) writePart(bufs [][]draw) error {
	n := 0
	for _, b := range bufs {
		n += len(b)
	}
	if n == 0 {
		return nil
	}
	batch := rs.cols.batch(bufs)
	name := store.PartName(rs.cp.NextPart)
	if err := rs.writeStats(name); err != nil {
		return err
	}
	if err := rs.writeProfiles(name, bufs); err != nil {
		return err
	}
	path := filepath.Join(rs.dir, SamplesDir, name)
	if err := store.WritePart(path, batch, rs.meta); err != nil {
		return fmt.Errorf("write sample part: %w", err)
	}
	rs.cp.Parts = append(rs.cp.Parts, name)
	rs.cp.NextPart++
	return nil
}

func runMetadata(dir string, cfg *Config) (map[string]string, error) {
	y, err := os.ReadFile(filepath.Join(dir, ConfigFile))
	if err != nil {
		return nil, fmt.Errorf("read resolved config: %w", err)
	}
	return map[string]string{
		"plumb.version":        Version,
		"plumb.schema_version": strconv.Itoa(SchemaVersion),
		"plumb.config_sha256":  cfg.Hash(),
		"plumb.seed":           strconv.FormatUint(cfg.Sampler.Seed, 10),
		"plumb.config":         string(y),
		"plumb.caution":        Caution,
	}, nil
}

// report prints progress: a live line on a terminal, or a log line every LogEverySeconds.
func (rs *runState) report(pr *progress, opt Options, done <-chan struct{}) {
	total := rs.mc.Total() * int64(len(rs.chains))
	sum := func(a []atomic.Int64) int64 {
		s := int64(0)
		for i := range a {
			s += a[i].Load()
		}
		return s
	}
	start, startSweeps := time.Now(), sum(pr.sweeps)
	period := time.Duration(rs.cfg.Output.LogEverySeconds * float64(time.Second))
	if opt.Live != nil {
		period = 500 * time.Millisecond
	}
	tick := time.NewTicker(period)
	defer tick.Stop()
	line := func() (float64, float64, time.Duration, float64) {
		s := sum(pr.sweeps)
		el := time.Since(start).Seconds()
		rate := float64(s-startSweeps) / max(el, 1e-9)
		eta := time.Duration(0)
		if rate > 0 {
			eta = time.Duration(float64(total-s) / rate * float64(time.Second)).Round(time.Second)
		}
		acc := float64(sum(pr.accepted)) / max(float64(sum(pr.tried)), 1)
		return 100 * float64(s) / float64(total), rate, eta, acc
	}
	for {
		select {
		case <-done:
			if opt.Live != nil {
				pct, rate, _, acc := line()
				fmt.Fprintf(opt.Live, "\r%5.1f %%  %8.0f draws/s  acceptance %.2f  done%20s\n", pct, rate, acc, "")
			}
			return
		case <-tick.C:
			pct, rate, eta, acc := line()
			diag := ""
			if d := rs.diag.Load(); d != nil {
				diag = *d
			}
			if opt.Live != nil {
				fmt.Fprintf(opt.Live, "\r%5.1f %%  %8.0f draws/s  ETA %-10s acceptance %.2f  %s ", pct, rate, eta, acc, diag)
			} else {
				rs.log.Info("progress", "percent", fmt.Sprintf("%.1f", pct), "draws_per_s", fmt.Sprintf("%.0f", rate),
					"eta", eta.String(), "acceptance", fmt.Sprintf("%.3f", acc), "diagnostics", diag)
			}
		}
	}
}
