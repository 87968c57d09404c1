package run

import (
	"fmt"
	"os"
	"path/filepath"

	"plumb/forward"
	"plumb/inversion/runfolder"
	"plumb/inversion/store"
)

// profileRows appends the profile of one draw (structure st) on grid to the batch: one row per
// grid radius not above the surface, at a layer boundary the layer below.
func profileRows(b *store.Batch, chain, draw int64, st *forward.Structure, grid []float64) {
	n := len(grid)
	for n > 0 && grid[n-1] > st.Radius() {
		n--
	}
	pr := st.ProfileAt(grid[:n])
	i64 := func(i int, v int64) { b.Data[i] = append(b.Data[i].([]int64), v) }
	f64 := func(i int, v float64) { b.Data[i] = append(b.Data[i].([]float64), v) }
	for k := range n {
		i64(0, chain)
		i64(1, draw)
		f64(2, pr.Radius[k]/1e3)
		b.Data[3] = append(b.Data[3].([]string), st.Model.Layers[st.LayerAt(grid[k], false)].Name)
		f64(4, pr.Density[k])
		f64(5, pr.Vp[k]/1e3)
		f64(6, pr.Vs[k]/1e3)
		f64(7, pr.Gravity[k])
		f64(8, pr.Pressure[k]/1e9)
	}
}

// writeProfiles writes the profile part that accompanies sample part name: the profiles of the
// buffered draws whose index is a multiple of output.profiles.every_draws, structures solved
// again from the draws' parameters (the same deterministic solve as during sampling). Like the
// sample_stats part it is written before the sample part and removed on resume unless the
// checkpoint lists that part.
func (rs *runState) writeProfiles(name string, bufs [][]draw) error {
	every := rs.cfg.Output.Profiles.EveryDraws
	if every == 0 || len(rs.grid) == 0 {
		return nil
	}
	b, err := store.NewBatch(runfolder.ProfileColumns(), 0)
	if err != nil {
		return err
	}
	for c, buf := range bufs {
		for _, d := range buf {
			if d.index%every != 0 {
				continue
			}
			st, err := rs.prob.Solve(d.x)
			if err != nil {
				// Cannot happen for an accepted draw (its density was finite); say so loudly.
				return fmt.Errorf("profile of chain %d draw %d: %w", c, d.index, err)
			}
			profileRows(b, int64(c), d.index, st, rs.grid)
		}
	}
	if b.Len() == 0 {
		return nil
	}
	dir := filepath.Join(rs.dir, runfolder.ProfilesDir)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("profiles folder: %w", err)
	}
	if err := store.WritePart(filepath.Join(dir, name), b, rs.meta); err != nil {
		return fmt.Errorf("write profiles part: %w", err)
	}
	return nil
}
