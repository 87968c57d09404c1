package report

import (
	"fmt"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ErrNothingToDraw is returned by a figure function when the run has nothing of that kind (no
// categorical parameter, no profiles table); callers skip the figure.
var ErrNothingToDraw = fmt.Errorf("nothing to draw")

// Levels draws one panel per categorical parameter: the posterior probability of each level
// (dark bar) beside its prior probability (light bar), with the values printed above the bars.
// It returns ErrNothingToDraw when the run has no categorical parameter.
func Levels(r *Run) (*Figure, error) {
	cats := r.Categoricals()
	if len(cats) == 0 {
		return nil, fmt.Errorf("no categorical parameters: %w", ErrNothingToDraw)
	}
	outline := draw.LineStyle{Color: black, Width: vg.Points(0.8)}
	barW := vg.Points(40)
	var panels []*plot.Plot
	for _, c := range cats {
		p := newPanel(c.Name, c.Name+" (level)", "probability")
		addGrid(p)
		post, err := plotter.NewBarChart(plotter.Values(c.Posterior), barW)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", c.Name, err)
		}
		post.Color, post.LineStyle, post.Offset = darkGrey, outline, -barW/2-vg.Points(1)
		prior, err := plotter.NewBarChart(plotter.Values(c.Prior), barW)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", c.Name, err)
		}
		prior.Color, prior.LineStyle, prior.Offset = paleGrey, outline, barW/2+vg.Points(1)
		p.Add(post, prior)
		// Value labels above the bars; the bar offsets are in canvas units, so the labels are
		// shifted by the same amount.
		for _, s := range []struct {
			v   []float64
			off vg.Length
		}{{c.Posterior, post.Offset}, {c.Prior, prior.Offset}} {
			xy := plotter.XYLabels{}
			for i, v := range s.v {
				xy.XYs = append(xy.XYs, plotter.XY{X: float64(i), Y: v})
				xy.Labels = append(xy.Labels, fmt.Sprintf("%.3f", v))
			}
			lb, err := plotter.NewLabels(xy)
			if err != nil {
				return nil, fmt.Errorf("%s: %w", c.Name, err)
			}
			for i := range lb.TextStyle {
				lb.TextStyle[i].Font = sans(tickSize)
				lb.TextStyle[i].XAlign = draw.XCenter
				lb.TextStyle[i].YAlign = draw.YBottom
			}
			lb.Offset = vg.Point{X: s.off, Y: vg.Points(2)}
			p.Add(lb)
		}
		p.NominalX(c.Labels...)
		p.X.Tick.Label.Font = sans(axisLabelSize)
		p.Y.Min, p.Y.Max = 0, 1.1                           // room for the labels above a bar at 1
		p.X.Min, p.X.Max = -0.7, float64(len(c.Labels))-0.3 // half a slot of room at either end
		panels = append(panels, p)
	}
	return &Figure{
		Name:  "levels",
		Title: fmt.Sprintf("%s: categorical parameters, posterior vs prior", r.Problem.Name),
		Legend: []LegendEntry{
			{Label: "posterior probability", Thumb: boxThumb{fill: darkGrey, outline: outline}},
			{Label: "prior probability", Thumb: boxThumb{fill: paleGrey, outline: outline}},
		},
		Panels: grid(panels, gridCols(len(panels))),
		Note:   fmt.Sprintf("%d draws from %d chains.", r.Samples.Len(), r.chains),
	}, nil
}
