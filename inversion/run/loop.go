package run

import (
	"context"
	"fmt"
	"path/filepath"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
	"slices"
	"sync"
	"sync/atomic"
	"time"
)

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
	batch := sampleBatch(rs.cols, rs.prob, bufs)
	name := store.PartName(rs.cp.NextPart)
	if err := rs.writeStats(name); err != nil {
		return err
	}
	if err := rs.writeProfiles(name, bufs); err != nil {
		return err
	}
	path := filepath.Join(rs.dir, runfolder.SamplesDir, name)
	if err := store.WritePart(path, batch, rs.meta); err != nil {
		return fmt.Errorf("write sample part: %w", err)
	}
	rs.cp.Parts = append(rs.cp.Parts, name)
	rs.cp.NextPart++
	return nil
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
