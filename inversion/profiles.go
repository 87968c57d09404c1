package inversion

import (
	"fmt"
	"math"
	"os"
	"path/filepath"

	"plumb/forward"
	"plumb/inversion/store"
)

// ProfilesDir is the run sub-folder of the profile table.
const ProfilesDir = "profiles"

// Columns of the profile table (long format: one row per profiled draw and grid radius).
const (
	ColRadiusKm    = "radius_km"
	ColLayer       = "layer"
	ColDensity     = "density_kg_m3"
	ColVp          = "vp_km_s"
	ColVs          = "vs_km_s"
	ColGravity     = "gravity_m_s2"
	ColPressureGPa = "pressure_gpa"
)

// maxProfileNodes bounds the grid so that a mistyped step cannot make a table of billions of
// rows (common practice, no source: 10⁴ nodes resolve 1 km in a 10 000 km planet).
const maxProfileNodes = 10000

func profileColumns() []store.Column {
	return []store.Column{
		{Name: ColChain, Kind: store.Int64},
		{Name: ColDraw, Kind: store.Int64},
		{Name: ColRadiusKm, Kind: store.Float64, Unit: "km"},
		{Name: ColLayer, Kind: store.String},
		{Name: ColDensity, Kind: store.Float64, Unit: "kg/m3"},
		{Name: ColVp, Kind: store.Float64, Unit: "km/s"},
		{Name: ColVs, Kind: store.Float64, Unit: "km/s"},
		{Name: ColGravity, Kind: store.Float64, Unit: "m/s2"},
		{Name: ColPressureGPa, Kind: store.Float64, Unit: "GPa"},
	}
}

// profileGrid returns the radius grid (m) of the run's profile table: forward.RadiusGrid up to the
// largest radius the planet can have, with the configured step or the automatic one (that
// radius / 200, rounded down to 1, 2 or 5 × 10^k km, so grids are round numbers). nil when the
// table is off. file names the config in errors.
func (p *Problem) profileGrid(file string, pc ProfilesConfig) ([]float64, error) {
	if pc.EveryDraws == 0 {
		return nil, nil
	}
	rmax := p.radius.fixed
	if !p.radius.isFixed() {
		_, rmax = p.Space.Params[p.radius.param].Prior.Support()
		if math.IsInf(rmax, 1) {
			rmax = p.Space.Params[p.radius.param].Prior.Quantile(1 - 1e-9)
		}
	}
	step := pc.RadiusStepKm * 1e3
	if step == 0 {
		step = roundStep(rmax / 200)
	}
	if rmax/step > maxProfileNodes {
		return nil, &ConfigError{File: file, Key: "output.profiles.radius_step_km",
			Msg: fmt.Sprintf("%g km gives %.0f grid radii up to %g km; at most %d", step/1e3, rmax/step, rmax/1e3, maxProfileNodes)}
	}
	return forward.RadiusGrid(rmax, step), nil
}

// roundStep rounds a positive length down to 1, 2 or 5 × 10^k km (m in and out).
func roundStep(v float64) float64 {
	km := v / 1e3
	e := math.Pow(10, math.Floor(math.Log10(km)))
	for _, m := range []float64{5, 2, 1} {
		if m*e <= km {
			return m * e * 1e3
		}
	}
	return e * 1e3
}

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
	b, err := store.NewBatch(profileColumns(), 0)
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
	dir := filepath.Join(rs.dir, ProfilesDir)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("profiles folder: %w", err)
	}
	if err := store.WritePart(filepath.Join(dir, name), b, rs.meta); err != nil {
		return fmt.Errorf("write profiles part: %w", err)
	}
	return nil
}
