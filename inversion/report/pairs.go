package report

import (
	"fmt"
	"image/color"
	"math"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// pairBins is the number of bins per axis of a pair plot's 2-D histogram: ~40 keeps about 10
// draws per occupied cell for a few thousand draws (common practice, no source).
const pairBins = 40

// Pair names two continuous columns drawn against each other.
type Pair struct {
	// X and Y are column names.
	X, Y string
}

// counts2D is a 2-D histogram: z[i][j] counts the draws in x-bin i and y-bin j; it implements
// plotter.GridXYZ with the bin centres as coordinates.
type counts2D struct {
	x0, dx, y0, dy float64
	z              [][]float64
}

func (g *counts2D) Dims() (c, r int)   { return len(g.z), len(g.z[0]) }
func (g *counts2D) Z(c, r int) float64 { return g.z[c][r] }
func (g *counts2D) X(c int) float64    { return g.x0 + (float64(c)+0.5)*g.dx }
func (g *counts2D) Y(r int) float64    { return g.y0 + (float64(r)+0.5)*g.dy }

// newCounts2D bins the pairs (x[k], y[k]) into n×n cells over the ranges of x and y.
func newCounts2D(x, y []float64, n int) *counts2D {
	xl, xh := span(finiteSorted(x))
	yl, yh := span(finiteSorted(y))
	g := &counts2D{x0: xl, dx: (xh - xl) / float64(n), y0: yl, dy: (yh - yl) / float64(n), z: make([][]float64, n)}
	for i := range g.z {
		g.z[i] = make([]float64, n)
	}
	for k := range x {
		i, j := int((x[k]-xl)/g.dx), int((y[k]-yl)/g.dy)
		i, j = min(i, n-1), min(j, n-1) // the maximum falls into the last bin
		if i >= 0 && j >= 0 {
			g.z[i][j]++
		}
	}
	return g
}

// smoothed returns a copy of g convolved with the 3×3 binomial kernel (1 2 1)ᵀ(1 2 1)/16, which
// takes the cell-to-cell noise out of the credible-region contours (the heat map keeps the raw
// counts).
func (g *counts2D) smoothed() *counts2D {
	c, r := g.Dims()
	w := [3]float64{1, 2, 1}
	out := &counts2D{x0: g.x0, dx: g.dx, y0: g.y0, dy: g.dy, z: make([][]float64, c)}
	for i := range c {
		out.z[i] = make([]float64, r)
		for j := range r {
			s, ws := 0.0, 0.0
			for a := -1; a <= 1; a++ {
				for b := -1; b <= 1; b++ {
					if i+a < 0 || i+a >= c || j+b < 0 || j+b >= r {
						continue
					}
					s += w[a+1] * w[b+1] * g.z[i+a][j+b]
					ws += w[a+1] * w[b+1]
				}
			}
			out.z[i][j] = s / ws
		}
	}
	return out
}

// credibleLevels returns, for each mass m, the cell value t such that the cells with value ≥ t
// hold a share m of the total: the boundary of the highest-density region of that mass.
func (g *counts2D) credibleLevels(masses ...float64) []float64 {
	var v []float64
	total := 0.0
	for _, col := range g.z {
		v = append(v, col...)
		total += sum(col)
	}
	slices.Sort(v)
	slices.Reverse(v)
	out := make([]float64, len(masses))
	for k, m := range masses {
		acc := 0.0
		for _, x := range v {
			acc += x
			out[k] = x
			if acc >= m*total {
				break
			}
		}
	}
	return out
}

func sum(v []float64) float64 {
	s := 0.0
	for _, x := range v {
		s += x
	}
	return s
}

// sqrtGrid shows a grid on a square-root scale: with a linear scale, a sharp mode (or a stuck
// chain) would leave the rest of the posterior nearly white.
type sqrtGrid struct{ *counts2D }

// Z implements plotter.GridXYZ.
func (g sqrtGrid) Z(c, r int) float64 { return math.Sqrt(g.counts2D.Z(c, r)) }

// greyRamp is a palette from white (no draws) to near black (most draws).
type greyRamp int

// Colors implements palette.Palette.
func (n greyRamp) Colors() []color.Color {
	out := make([]color.Color, n)
	for i := range out {
		// Down to grey level 40 rather than black, so the black contour lines stay visible.
		out[i] = color.Gray{Y: uint8(255 - math.Round(215*float64(i)/float64(n-1)))}
	}
	return out
}

// Pairs draws, for each pair, the joint posterior of the two columns as a grey heat map of a
// 2-D histogram of all draws, with the 50 % and 90 % highest-density regions outlined.
// Unknown names are errors.
func Pairs(r *Run, pairs []Pair) (*Figure, error) {
	if len(pairs) == 0 {
		return nil, fmt.Errorf("no parameter pairs to draw")
	}
	c50 := draw.LineStyle{Color: black, Width: vg.Points(1.5)}
	c90 := draw.LineStyle{Color: black, Width: vg.Points(1.5), Dashes: dashed}
	halo := draw.LineStyle{Color: white, Width: vg.Points(3.5)}
	var panels []*plot.Plot
	for _, pr := range pairs {
		px, ok := r.Lookup(pr.X)
		if !ok {
			return nil, fmt.Errorf("unknown continuous parameter %q", pr.X)
		}
		py, ok := r.Lookup(pr.Y)
		if !ok {
			return nil, fmt.Errorf("unknown continuous parameter %q", pr.Y)
		}
		g := newCounts2D(r.values(px.Name), r.values(py.Name), pairBins)
		p := newPanel(px.Name+" vs "+py.Name, px.Name+unitSuffix(px.Unit), py.Name+unitSuffix(py.Unit))
		hm := plotter.NewHeatMap(sqrtGrid{g}, greyRamp(256))
		hm.Min = 0
		p.Add(hm)
		sm := g.smoothed()
		lv := sm.credibleLevels(0.5, 0.9)
		// Contours need a level strictly inside the grid's range; a posterior concentrated in
		// one cell has none worth drawing.
		if lv[1] > 0 && lv[0] > lv[1] {
			for _, c := range []struct {
				level float64
				style draw.LineStyle
			}{{lv[1], c90}, {lv[0], c50}} {
				for _, pts := range contourLines(sm, c.level) {
					for _, st := range []draw.LineStyle{halo, c.style} {
						l, err := plotter.NewLine(pts)
						if err != nil {
							return nil, fmt.Errorf("%s vs %s: contour: %w", pr.X, pr.Y, err)
						}
						l.LineStyle = st
						p.Add(l)
					}
				}
			}
		}
		panels = append(panels, p)
	}
	return &Figure{
		Name:  "pairs",
		Title: fmt.Sprintf("%s: joint posteriors", r.Problem.Name),
		Legend: []LegendEntry{
			{Label: "draws per cell (square-root scale; white: none)", Thumb: rampThumb{}},
			{Label: "50 % credible region", Thumb: lineThumb(c50)},
			{Label: "90 % credible region", Thumb: lineThumb(c90)},
		},
		Panels: grid(panels, gridCols(len(panels))),
		Note: fmt.Sprintf("%d draws, %d×%d bins; credible regions: highest-density cells of the histogram smoothed with a 3×3 binomial kernel.",
			r.Samples.Len(), pairBins, pairBins),
	}, nil
}

// rampThumb draws the heat map's grey ramp as a legend symbol.
type rampThumb struct{}

// Thumbnail implements plot.Thumbnailer.
func (rampThumb) Thumbnail(c *draw.Canvas) {
	const n = 8
	cols := greyRamp(n).Colors()
	w := (c.Max.X - c.Min.X) / n
	for i, col := range cols {
		x := c.Min.X + vg.Length(i)*w
		c.FillPolygon(col, []vg.Point{{X: x, Y: c.Min.Y}, {X: x, Y: c.Max.Y}, {X: x + w, Y: c.Max.Y}, {X: x + w, Y: c.Min.Y}})
	}
	pts := []vg.Point{c.Min, {X: c.Min.X, Y: c.Max.Y}, c.Max, {X: c.Max.X, Y: c.Min.Y}, c.Min}
	c.StrokeLines(draw.LineStyle{Color: darkGrey, Width: vg.Points(0.5)}, pts)
}
