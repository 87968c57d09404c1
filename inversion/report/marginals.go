package report

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// priorPoints is the number of points at which a prior density is drawn across a panel.
const priorPoints = 400

// resolve returns the columns named (all sampled continuous parameters when names is empty);
// an unknown name is an error naming it.
func (r *Run) resolve(names []string) ([]Param, error) {
	if len(names) == 0 {
		return r.Sampled(), nil
	}
	out := make([]Param, 0, len(names))
	for _, n := range names {
		p, ok := r.Lookup(n)
		if !ok {
			return nil, fmt.Errorf("unknown continuous parameter %q", n)
		}
		out = append(out, p)
	}
	return out, nil
}

// PriorDensity returns the prior probability density of p at the output-unit value y, in
// 1/output unit: the prior is defined in SI, x = y/ToUnit, so the density picks up the Jacobian
// |dx/dy| = 1/ToUnit. It is NaN for a column without a prior.
func (p Param) PriorDensity(y float64) float64 {
	if p.Prior == nil {
		return math.NaN()
	}
	return math.Exp(p.Prior.LogProb(y/p.ToUnit)) / p.ToUnit
}

// Marginals draws one panel per named continuous column (default: every sampled continuous
// parameter): the posterior histogram (all chains) as a probability density in output units,
// with the prior density overlaid as a dashed line. Derived columns have no prior line.
func Marginals(r *Run, names []string) (*Figure, error) {
	params, err := r.resolve(names)
	if err != nil {
		return nil, err
	}
	if len(params) == 0 {
		return nil, fmt.Errorf("no continuous parameters to draw")
	}
	priorStyle := draw.LineStyle{Color: black, Width: vg.Points(1.6), Dashes: dashed}
	histFill, histLine := lightGrey, draw.LineStyle{Color: darkGrey, Width: vg.Points(0.6)}
	var panels []*plot.Plot
	for _, par := range params {
		s := finiteSorted(r.values(par.Name))
		if len(s) == 0 {
			return nil, fmt.Errorf("%s: no finite draws", par.Name)
		}
		p := newPanel(par.Name, par.Name+unitSuffix(par.Unit), "probability density"+perUnit(par.Unit))
		addGrid(p)
		lo, hi := span(s)
		n := binCount(s, lo, hi, 12, 60)
		dens := histogram(s, lo, hi, n)
		w := (hi - lo) / float64(n)
		h := &plotter.Histogram{Width: w, FillColor: histFill, LineStyle: histLine}
		for k, d := range dens {
			h.Bins = append(h.Bins, plotter.HistogramBin{Min: lo + float64(k)*w, Max: lo + float64(k+1)*w, Weight: d})
		}
		p.Add(h)
		top := slices.Max(dens)
		if par.Prior != nil {
			pts := make(plotter.XYs, priorPoints)
			for k := range pts {
				x := lo + (hi-lo)*float64(k)/float64(priorPoints-1)
				pts[k] = plotter.XY{X: x, Y: par.PriorDensity(x)}
				top = math.Max(top, pts[k].Y)
			}
			l, err := plotter.NewLine(pts)
			if err != nil {
				return nil, fmt.Errorf("%s: prior line: %w", par.Name, err)
			}
			l.LineStyle = priorStyle
			p.Add(l)
		}
		// 6 % headroom, so that the tallest bar visibly ends inside the panel.
		p.Y.Min, p.Y.Max = 0, 1.06*top
		panels = append(panels, p)
	}
	return &Figure{
		Name:  "marginals",
		Title: fmt.Sprintf("%s: marginal posteriors", r.Problem.Name),
		Legend: []LegendEntry{
			{Label: "posterior (histogram of all chains)", Thumb: boxThumb{fill: histFill, outline: histLine}},
			{Label: "prior density", Thumb: lineThumb(priorStyle)},
		},
		Panels: grid(panels, gridCols(len(panels))),
		Note:   fmt.Sprintf("%d draws from %d chains; x range = range of the draws.", r.Samples.Len(), r.chains),
	}, nil
}
