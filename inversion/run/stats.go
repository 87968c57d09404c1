package run

import (
	"fmt"
	"os"
	"path/filepath"

	"plumb/inversion/mcmc"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
)

// writeStats writes the sample_stats part that accompanies sample part name (tempered runs
// only). It is written before the sample part, and both are listed by the checkpoint written
// after them; a resume removes stats parts the checkpoint does not list.
func (rs *runState) writeStats(name string) error {
	if rs.cfg.Sampler.Tempering == nil {
		return nil
	}
	b, err := store.NewBatch(runfolder.StatsColumns(), len(rs.chains)*rs.cfg.Sampler.Tempering.Replicas)
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
	dir := filepath.Join(rs.dir, runfolder.StatsDir)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("sample_stats folder: %w", err)
	}
	if err := store.WritePart(filepath.Join(dir, name), b, rs.meta); err != nil {
		return fmt.Errorf("write sample_stats part: %w", err)
	}
	return nil
}
