package inversion

import (
	"fmt"
	"os"
	"path/filepath"

	"plumb/inversion/mcmc"
	"plumb/inversion/store"
)

// Columns of the sample_stats table of a tempered run: one row per chain and replica at each
// checkpoint, cumulative to that checkpoint.
const (
	ColIteration         = "iteration"
	ColReplica           = "replica"
	ColBeta              = "beta"
	ColExchangeProposed  = "exchange_proposed"
	ColExchangeAccepted  = "exchange_accepted"
	ColExchangeProposedW = "exchange_proposed_warmup"
	ColExchangeAcceptedW = "exchange_accepted_warmup"
	ColLogLikMean        = "log_likelihood_mean"
	ColLogLikSweeps      = "log_likelihood_sweeps"
)

// statsColumns lays out the sample_stats table. Exchange counts are those of the pair (replica,
// replica + 1) — 0 for the hottest replica — after warm-up and during it; the log-likelihood mean
// is over the post-warm-up sweeps (0 with log_likelihood_sweeps = 0 before), the integrand of the
// thermodynamic-integration evidence.
func statsColumns() []store.Column {
	return []store.Column{
		{Name: ColChain, Kind: store.Int64},
		{Name: ColIteration, Kind: store.Int64, Unit: "sweeps"},
		{Name: ColReplica, Kind: store.Int64},
		{Name: ColBeta, Kind: store.Float64},
		{Name: ColExchangeProposed, Kind: store.Int64},
		{Name: ColExchangeAccepted, Kind: store.Int64},
		{Name: ColExchangeProposedW, Kind: store.Int64},
		{Name: ColExchangeAcceptedW, Kind: store.Int64},
		{Name: ColLogLikMean, Kind: store.Float64},
		{Name: ColLogLikSweeps, Kind: store.Int64},
	}
}

// writeStats writes the sample_stats part that accompanies sample part name (tempered runs
// only). It is written before the sample part, and both are listed by the checkpoint written
// after them; a resume removes stats parts the checkpoint does not list.
func (rs *runState) writeStats(name string) error {
	if rs.cfg.Sampler.Tempering == nil {
		return nil
	}
	b, err := store.NewBatch(statsColumns(), len(rs.chains)*rs.cfg.Sampler.Tempering.Replicas)
	if err != nil {
		return err
	}
	add := func(i int, v any) {
		switch x := v.(type) {
		case int64:
			b.Data[i] = append(b.Data[i].([]int64), x)
		case float64:
			b.Data[i] = append(b.Data[i].([]float64), x)
		}
	}
	for c, ch := range rs.chains {
		tp, ok := ch.(*mcmc.Tempered)
		if !ok {
			return fmt.Errorf("sample_stats: chain %d is not tempered", c)
		}
		betas := tp.Betas()
		prop, acc := tp.SwapCounts()
		ll := tp.LogLikStats()
		for k, beta := range betas {
			var p, a [2]int64
			if k < len(prop) {
				p, a = prop[k], acc[k]
			}
			mean := 0.0
			if ll[k].N > 0 {
				mean = ll[k].Mean
			}
			for i, v := range []any{int64(c), tp.Iter(), int64(k), beta, p[1], a[1], p[0], a[0], mean, ll[k].N} {
				add(i, v)
			}
		}
	}
	dir := filepath.Join(rs.dir, StatsDir)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("sample_stats folder: %w", err)
	}
	if err := store.WritePart(filepath.Join(dir, name), b, rs.meta); err != nil {
		return fmt.Errorf("write sample_stats part: %w", err)
	}
	return nil
}
