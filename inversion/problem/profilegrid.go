package problem

import (
	"fmt"
	"math"

	"plumb/forward"
)

// maxProfileNodes bounds the grid so that a mistyped step cannot make a table of billions of
// rows (common practice, no source: 10⁴ nodes resolve 1 km in a 10 000 km planet).
const maxProfileNodes = 10000

// ProfileGrid returns the radius grid (m) of the run's profile table: forward.RadiusGrid up to the
// largest radius the planet can have, with the configured step or the automatic one (that
// radius / 200, rounded down to 1, 2 or 5 × 10^k km, so grids are round numbers). nil when the
// table is off. file names the config in errors.
func (p *Problem) ProfileGrid(file string, pc ProfilesConfig) ([]float64, error) {
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
