package report

import (
	"fmt"
	"math"
	"plumb/inversion/mcmc"
	"plumb/inversion/runfolder"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// ObservationFit is the posterior predictive of one observation, normalised as
// z = (predicted − observed)/σ.
type ObservationFit struct {
	// Key is the observation's key (e.g. "k2"), Unit its output unit.
	Key, Unit string
	// Observed and Sigma are the datum and its 1σ uncertainty, in Unit.
	Observed, Sigma float64
	// Q holds the 5, 25, 50, 75 and 95 % quantiles of z over all draws (NaN without draws).
	Q [5]float64
}

// fitQuantiles are the probabilities of ObservationFit.Q.
var fitQuantiles = [5]float64{0.05, 0.25, 0.5, 0.75, 0.95}

// ObservationFits computes the normalised posterior predictive of every observation, in the
// problem's observation order.
func (r *Run) ObservationFits() []ObservationFit {
	var out []ObservationFit
	for _, o := range r.Problem.Observations {
		si := o.Observable.ToSI()
		f := ObservationFit{Key: o.Observable.Key, Unit: o.Observable.Unit, Observed: o.Value / si, Sigma: o.Sigma / si}
		v, _ := r.Samples.Float64(runfolder.PredictionPrefix + o.Observable.Key)
		z := make([]float64, len(v))
		for k, x := range v {
			z[k] = (x - f.Observed) / f.Sigma
		}
		z = finiteSorted(z)
		for k, p := range fitQuantiles {
			f.Q[k] = mcmc.Quantile7Sorted(z, p)
		}
		out = append(out, f)
	}
	return out
}

// fitRows draws one horizontal interval per observation: a line over the 90 % interval, a box
// over the 50 % interval and a bar at the median. Row i is drawn at y = n−1−i (first on top).
type fitRows struct {
	fits []ObservationFit
}

// Plot implements plot.Plotter.
func (f fitRows) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	n := len(f.fits)
	whisker := draw.LineStyle{Color: black, Width: vg.Points(1.3)}
	edge := draw.LineStyle{Color: black, Width: vg.Points(0.9)}
	median := draw.LineStyle{Color: black, Width: vg.Points(2.6)}
	bh := vg.Points(7) // half height of the 50 % box
	for i, fit := range f.fits {
		if math.IsNaN(fit.Q[2]) {
			continue
		}
		y := trY(float64(n - 1 - i))
		x05, x25, x50, x75, x95 := trX(fit.Q[0]), trX(fit.Q[1]), trX(fit.Q[2]), trX(fit.Q[3]), trX(fit.Q[4])
		c.StrokeLines(whisker, c.ClipLinesX([]vg.Point{{X: x05, Y: y}, {X: x95, Y: y}})...)
		for _, x := range []vg.Length{x05, x95} {
			if c.ContainsX(x) {
				c.StrokeLine2(whisker, x, y-bh/2, x, y+bh/2)
			}
		}
		box := []vg.Point{{X: x25, Y: y - bh}, {X: x25, Y: y + bh}, {X: x75, Y: y + bh}, {X: x75, Y: y - bh}}
		c.FillPolygon(lightGrey, c.ClipPolygonX(box))
		c.StrokeLines(edge, c.ClipLinesX(append(box, box[0]))...)
		if c.ContainsX(x50) {
			c.StrokeLine2(median, x50, y-bh-vg.Points(3), x50, y+bh+vg.Points(3))
		}
	}
}

// DataRange implements plot.DataRanger: the 90 % intervals and the ±1σ band, at least ±3σ.
func (f fitRows) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, xmax = -3, 3
	for _, fit := range f.fits {
		if !math.IsNaN(fit.Q[0]) {
			xmin, xmax = math.Min(xmin, fit.Q[0]), math.Max(xmax, fit.Q[4])
		}
	}
	return xmin, xmax, -0.6, float64(len(f.fits)) - 0.4
}

// Observations draws the posterior predictive of every observation on one panel, normalised to
// (predicted − observed)/σ so that observations in different units share the axis: for each
// observation its 50 % and 90 % predictive intervals and median, against the observed value
// (0) ± 1σ (the shaded band). The row labels give the observed value ± σ in its unit.
func Observations(r *Run) (*Figure, error) {
	fits := r.ObservationFits()
	if len(fits) == 0 {
		return nil, fmt.Errorf("no observations: %w", ErrNothingToDraw)
	}
	what := "posterior"
	if r.Problem.PriorOnly() {
		what = "prior"
	}
	p := newPanel("", "(predicted − observed) / σ", "")
	rows := fitRows{fits: fits}
	_, _, ylo, yhi := rows.DataRange()
	band, err := plotter.NewPolygon(plotter.XYs{{X: -1, Y: ylo}, {X: -1, Y: yhi}, {X: 1, Y: yhi}, {X: 1, Y: ylo}})
	if err != nil {
		return nil, err
	}
	band.Color, band.LineStyle.Width = paleGrey, 0
	zero, err := plotter.NewLine(plotter.XYs{{X: 0, Y: ylo}, {X: 0, Y: yhi}})
	if err != nil {
		return nil, err
	}
	zero.LineStyle = draw.LineStyle{Color: midGrey, Width: vg.Points(1), Dashes: dashed}
	addGrid(p)
	p.Add(band, zero, rows)
	labels := make([]string, len(fits))
	for i, f := range fits {
		labels[i] = fmt.Sprintf("%s = %.6g ± %.3g%s", f.Key, f.Observed, f.Sigma, spaceUnit(f.Unit))
	}
	slices.Reverse(labels)
	p.NominalY(labels...)
	p.Y.Tick.Label.Font = sans(axisLabelSize)
	p.Y.Min, p.Y.Max = ylo, yhi
	return &Figure{
		Name:  "observations",
		Title: fmt.Sprintf("%s: %s predictive vs observations", r.Problem.Name, what),
		Legend: []LegendEntry{
			{Label: "observed ± 1σ", Thumb: boxThumb{fill: paleGrey}},
			{Label: "median", Thumb: lineThumb(draw.LineStyle{Color: black, Width: vg.Points(2.6)})},
			{Label: "50 % interval", Thumb: boxThumb{fill: lightGrey, outline: draw.LineStyle{Color: black, Width: vg.Points(0.9)}}},
			{Label: "90 % interval", Thumb: lineThumb(draw.LineStyle{Color: black, Width: vg.Points(1.3)})},
		},
		Panels: [][]*plot.Plot{{p}},
		Note:   fmt.Sprintf("%s predictive over %d draws; σ is each observation's 1σ uncertainty.", what, r.Samples.Len()),
	}, nil
}

// spaceUnit returns " unit" or "".
func spaceUnit(u string) string {
	if u == "" {
		return ""
	}
	return " " + u
}
