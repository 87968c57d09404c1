package report

import (
	"fmt"
	"image/color"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"plumb/forward"
	"plumb/inversion/mcmc"
	"plumb/inversion/runfolder"
)

// ProfileBands are pointwise posterior quantiles of one property on the profiles' radius grid.
type ProfileBands struct {
	// RadiusKm is the grid, ascending.
	RadiusKm []float64
	// Q[k][i] is the fitQuantiles[k] quantile (5, 25, 50, 75, 95 %) at RadiusKm[i].
	Q [5][]float64
}

// profileProperty is one column of the profiles table drawn by Profiles.
type profileProperty struct {
	col, label, unit string
	// fromSI converts a forward.Profile value (SI) to the column's unit.
	fromSI float64
	truth  func(p *forward.Profile) []float64
}

// profileProperties are the panels of the profiles figure.
var profileProperties = []profileProperty{
	{runfolder.ColDensity, "density", "kg/m3", 1, func(p *forward.Profile) []float64 { return p.Density }},
	{runfolder.ColVp, "vp", "km/s", 1e-3, func(p *forward.Profile) []float64 { return p.Vp }},
	{runfolder.ColVs, "vs", "km/s", 1e-3, func(p *forward.Profile) []float64 { return p.Vs }},
}

// Bands computes the pointwise quantiles of the profiles column col at each grid radius.
func (r *Run) Bands(col string) (*ProfileBands, error) {
	if r.Profiles == nil {
		return nil, fmt.Errorf("no profiles table: %w", ErrNothingToDraw)
	}
	rad, ok := r.Profiles.Float64(runfolder.ColRadiusKm)
	if !ok {
		return nil, fmt.Errorf("profiles table lacks %s", runfolder.ColRadiusKm)
	}
	v, ok := r.Profiles.Float64(col)
	if !ok {
		return nil, fmt.Errorf("profiles table lacks %s", col)
	}
	idx := make([]int, len(rad))
	for i := range idx {
		idx[i] = i
	}
	// Group the rows by radius: the grid is fixed, so equal radii are exactly equal floats.
	slices.SortStableFunc(idx, func(a, b int) int {
		switch {
		case rad[a] < rad[b]:
			return -1
		case rad[a] > rad[b]:
			return 1
		}
		return 0
	})
	b := &ProfileBands{}
	for lo := 0; lo < len(idx); {
		hi := lo
		vals := []float64{}
		for hi < len(idx) && rad[idx[hi]] == rad[idx[lo]] {
			vals = append(vals, v[idx[hi]])
			hi++
		}
		s := finiteSorted(vals)
		if len(s) > 0 {
			b.RadiusKm = append(b.RadiusKm, rad[idx[lo]])
			for k, p := range fitQuantiles {
				b.Q[k] = append(b.Q[k], mcmc.Quantile7Sorted(s, p))
			}
		}
		lo = hi
	}
	return b, nil
}

// profiledDraws counts the distinct (chain, draw) pairs of the profiles table.
func (r *Run) profiledDraws() int {
	c, _ := r.Profiles.Int64(colChain)
	d, _ := r.Profiles.Int64(colDraw)
	seen := map[[2]int64]bool{}
	for i := range c {
		seen[[2]int64{c[i], d[i]}] = true
	}
	return len(seen)
}

// Profiles draws density, vp and vs against radius: the pointwise posterior median with the
// 50 % and 90 % credible bands from the profiles table, and the truth profile (SI, as returned
// by forward.Structure.Profile) as a dashed line when truth is not nil. It returns
// ErrNothingToDraw when the run has no profiles table.
func Profiles(r *Run, truth *forward.Profile) (*Figure, error) {
	if r.Profiles == nil {
		return nil, fmt.Errorf("run %s has no %s table: %w", r.Dir, runfolder.ProfilesDir, ErrNothingToDraw)
	}
	medStyle := draw.LineStyle{Color: black, Width: vg.Points(1.8)}
	truthStyle := draw.LineStyle{Color: black, Width: vg.Points(1.6), Dashes: dashDot}
	var panels []*plot.Plot
	for _, pp := range profileProperties {
		b, err := r.Bands(pp.col)
		if err != nil {
			return nil, err
		}
		if len(b.RadiusKm) == 0 {
			return nil, fmt.Errorf("profiles column %s has no finite values", pp.col)
		}
		p := newPanel(pp.label, pp.label+unitSuffix(pp.unit), "radius (km)")
		addGrid(p)
		for _, band := range []struct {
			lo, hi int
			fill   color.Color
		}{{0, 4, paleGrey}, {1, 3, lightGrey}} {
			var pts plotter.XYs
			for i, rk := range b.RadiusKm {
				pts = append(pts, plotter.XY{X: b.Q[band.lo][i], Y: rk})
			}
			for i := len(b.RadiusKm) - 1; i >= 0; i-- {
				pts = append(pts, plotter.XY{X: b.Q[band.hi][i], Y: b.RadiusKm[i]})
			}
			poly, err := plotter.NewPolygon(pts)
			if err != nil {
				return nil, fmt.Errorf("%s band: %w", pp.col, err)
			}
			poly.Color, poly.LineStyle.Width = band.fill, 0
			p.Add(poly)
		}
		med := make(plotter.XYs, len(b.RadiusKm))
		for i, rk := range b.RadiusKm {
			med[i] = plotter.XY{X: b.Q[2][i], Y: rk}
		}
		ml, err := plotter.NewLine(med)
		if err != nil {
			return nil, fmt.Errorf("%s median: %w", pp.col, err)
		}
		ml.LineStyle = medStyle
		p.Add(ml)
		if truth != nil && len(truth.Radius) > 0 {
			tv := pp.truth(truth)
			pts := make(plotter.XYs, len(truth.Radius))
			for i := range pts {
				pts[i] = plotter.XY{X: tv[i] * pp.fromSI, Y: truth.Radius[i] / 1e3}
			}
			tl, err := plotter.NewLine(pts)
			if err != nil {
				return nil, fmt.Errorf("truth %s: %w", pp.col, err)
			}
			tl.LineStyle = truthStyle
			p.Add(tl)
		}
		p.Y.Min = 0
		panels = append(panels, p)
	}
	legend := []LegendEntry{
		{Label: "median", Thumb: lineThumb(medStyle)},
		{Label: "50 % credible band", Thumb: boxThumb{fill: lightGrey}},
		{Label: "90 % credible band", Thumb: boxThumb{fill: paleGrey}},
	}
	if truth != nil {
		legend = append(legend, LegendEntry{Label: "truth", Thumb: lineThumb(truthStyle)})
	}
	return &Figure{
		Name:   "profiles",
		Title:  fmt.Sprintf("%s: radial profiles", r.Problem.Name),
		Legend: legend,
		Panels: [][]*plot.Plot{panels},
		Note:   fmt.Sprintf("Pointwise quantiles over %d profiled draws at each grid radius (vs = 0 in liquid layers).", r.profiledDraws()),
	}, nil
}
