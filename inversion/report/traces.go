package report

import (
	"fmt"
	"image/color"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// tracePoints is the most points drawn per chain and panel: longer chains are shown every k-th
// draw (a 1200 px wide figure cannot show more; it keeps SVG and PDF files small).
const tracePoints = 1500

// Traces draws one panel per named continuous column (default: every sampled continuous
// parameter): the value against the draw index, one line per chain in its own dash pattern and
// grey level.
func Traces(r *Run, names []string) (*Figure, error) {
	params, err := r.resolve(names)
	if err != nil {
		return nil, err
	}
	if len(params) == 0 {
		return nil, fmt.Errorf("no continuous parameters to draw")
	}
	draws, _ := r.Samples.Int64(colDraw)
	chains := splitInt(draws, r.chainIndex(), r.chains)
	longest := 0
	for _, c := range chains {
		longest = max(longest, len(c))
	}
	stride := max(1, (longest+tracePoints-1)/tracePoints)
	var panels []*plot.Plot
	for _, par := range params {
		p := newPanel(par.Name, "draw index", par.Name+unitSuffix(par.Unit))
		addGrid(p)
		series := r.byChain(par.Name)
		// Overlaid raw traces of several chains are a dense tangle in which no line style can
		// be followed; they are drawn thin in light greys, as the band the chains cover, and
		// each chain's batch means are drawn on top in that chain's own dash pattern and grey
		// level, so drifts and disagreements between chains stay readable.
		for c, v := range series {
			pts := make(plotter.XYs, 0, len(v)/stride+1)
			for k := 0; k < len(v); k += stride {
				pts = append(pts, plotter.XY{X: float64(chains[c][k]), Y: v[k]})
			}
			if len(pts) == 0 {
				continue
			}
			l, err := plotter.NewLine(pts)
			if err != nil {
				return nil, fmt.Errorf("%s, chain %d: %w", par.Name, c, err)
			}
			l.LineStyle = rawTraceStyle(c)
			p.Add(l)
		}
		for c, v := range series {
			pts := batchMeans(chains[c], v, traceBatches)
			if len(pts) < 2 {
				continue
			}
			halo, err := plotter.NewLine(pts)
			if err != nil {
				return nil, fmt.Errorf("%s, chain %d: %w", par.Name, c, err)
			}
			halo.LineStyle = draw.LineStyle{Color: white, Width: vg.Points(4)}
			l, err := plotter.NewLine(pts)
			if err != nil {
				return nil, fmt.Errorf("%s, chain %d: %w", par.Name, c, err)
			}
			l.LineStyle = meanStyle(c)
			p.Add(halo, l)
		}
		panels = append(panels, p)
	}
	var legend []LegendEntry
	for c := range r.chains {
		legend = append(legend, LegendEntry{Label: fmt.Sprintf("chain %d", c), Thumb: lineThumb(meanStyle(c))})
	}
	note := fmt.Sprintf("%d chains; thin lines: the draws; thick lines: means of %d consecutive batches per chain. Draw index counts kept draws after warm-up.",
		r.chains, traceBatches)
	if stride > 1 {
		note += fmt.Sprintf(" Every %d-th draw shown.", stride)
	}
	return &Figure{
		Name:   "traces",
		Title:  fmt.Sprintf("%s: traces of the chains", r.Problem.Name),
		Legend: legend,
		Panels: grid(panels, gridCols(len(panels))),
		Note:   note,
	}, nil
}

// traceBatches is the number of batches whose means are drawn per chain (each 5 % of the chain:
// long enough to average out the draw-to-draw scatter, short enough to show a drift).
const traceBatches = 20

// batchMeans splits the draws v (draw indices idx) into n consecutive batches of equal length
// and returns each batch's mean at its middle draw index.
func batchMeans(idx []int64, v []float64, n int) plotter.XYs {
	size := len(v) / n
	if size < 1 {
		return nil
	}
	out := make(plotter.XYs, 0, n)
	for b := range n {
		lo, hi := b*size, (b+1)*size
		if b == n-1 {
			hi = len(v)
		}
		s := 0.0
		for _, x := range v[lo:hi] {
			s += x
		}
		out = append(out, plotter.XY{X: float64(idx[lo]+idx[hi-1]) / 2, Y: s / float64(hi-lo)})
	}
	return out
}

// rawTraceStyle is the thin line of chain c's draws: light greys only, so the batch means on
// top stand out.
func rawTraceStyle(c int) draw.LineStyle {
	greys := []uint8{150, 185, 165, 205}
	return draw.LineStyle{Color: color.Gray{Y: greys[c%len(greys)]}, Width: vg.Points(0.4)}
}

// meanStyle is the thick line of chain c's batch means: seriesStyle, thicker.
func meanStyle(c int) draw.LineStyle {
	s := seriesStyle(c)
	s.Width = vg.Points(2)
	return s
}

// chainIndex returns the chain column.
func (r *Run) chainIndex() []int64 {
	c, _ := r.Samples.Int64(colChain)
	return c
}

// splitInt splits v by chain (values of chain in [0, n)), keeping table order.
func splitInt(v, chain []int64, n int) [][]int64 {
	out := make([][]int64, n)
	for i, c := range chain {
		out[c] = append(out[c], v[i])
	}
	return out
}
