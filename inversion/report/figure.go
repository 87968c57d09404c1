package report

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"math"
	"regexp"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"

	"plumb/inversion/store"
)

// Formats lists the file formats Save accepts.
var Formats = []string{"png", "svg", "pdf"}

// DPI is the resolution at which a figure's pixel size becomes a physical size: a PNG of
// W×H pixels and an SVG or PDF of W×H px at 96 dpi (the CSS pixel) have the same layout.
const DPI = 96

// Default pixel size of a figure.
const (
	DefaultWidthPx  = 1200
	DefaultHeightPx = 900
)

// Font sizes in points (at 96 dpi one point is 4/3 px). Chosen so that a 3×3 grid of panels in
// a 1200×900 px figure keeps tick labels about 12 px high.
const (
	figTitleSize  = 16
	panelTitle    = 11.5
	axisLabelSize = 10.5
	tickSize      = 9
	legendSize    = 10
)

// Grey levels of the figures (0 black, 255 white). Series are told apart by these levels and by
// dash patterns, never by hue, so the figures read the same when printed in greyscale.
var (
	black     = color.Gray{Y: 0}
	darkGrey  = color.Gray{Y: 70}
	midGrey   = color.Gray{Y: 140}
	lightGrey = color.Gray{Y: 195}
	paleGrey  = color.Gray{Y: 228}
	white     = color.Gray{Y: 255}
)

// Dash patterns, in points.
var (
	solid    []vg.Length
	dashed   = []vg.Length{vg.Points(6), vg.Points(3)}
	dotted   = []vg.Length{vg.Points(1.5), vg.Points(2.5)}
	dashDot  = []vg.Length{vg.Points(7), vg.Points(2.5), vg.Points(1.5), vg.Points(2.5)}
	longDash = []vg.Length{vg.Points(11), vg.Points(4)}
)

// seriesStyle returns the line style of the i-th of several series (chains): a dash pattern and
// a grey level that both change with i, so two series differ in both.
func seriesStyle(i int) draw.LineStyle {
	dashes := [][]vg.Length{solid, dashed, dotted, dashDot, longDash}
	// Dark greys only: these lines are drawn over light-grey data.
	greys := []color.Gray{black, {Y: 105}, {Y: 50}, {Y: 135}, {Y: 80}}
	return draw.LineStyle{Color: greys[i%len(greys)], Width: vg.Points(1), Dashes: dashes[(i/len(greys)+i)%len(dashes)]}
}

// LegendEntry is one item of a figure's legend, drawn in the header under the title.
type LegendEntry struct {
	// Label is the text.
	Label string
	// Thumb draws the symbol.
	Thumb plot.Thumbnailer
}

// Figure is a titled grid of panels with an optional shared legend and a note line.
type Figure struct {
	// Name is the file stem the figure is saved under (e.g. "marginals").
	Name string
	// Title is drawn on top of the figure.
	Title string
	// Legend is drawn in one row under the title.
	Legend []LegendEntry
	// Panels are the plots, rows × columns; nil cells stay empty.
	Panels [][]*plot.Plot
	// Note is a line of small text at the bottom (e.g. how many draws are shown).
	Note string
}

// sans returns the sans-serif face of the fonts bundled with the plotting library at size points
// (a sans face stays legible at small sizes on screen).
func sans(size float64) font.Font {
	return font.Font{Typeface: "Liberation", Variant: "Sans", Size: vg.Points(size)}
}

// textStyle returns a plain sans-serif text style at size points.
func textStyle(size float64, c color.Color) text.Style {
	return text.Style{Color: c, Font: sans(size), Handler: plot.DefaultTextHandler}
}

// newPanel returns an empty plot styled for a figure panel.
func newPanel(title, xLabel, yLabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font = sans(panelTitle)
	p.Title.Padding = vg.Points(4)
	p.X.Label.Text, p.Y.Label.Text = xLabel, yLabel
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = sans(axisLabelSize)
		a.Tick.Label.Font = sans(tickSize)
		a.Padding = vg.Points(2)
	}
	p.X.Tick.Marker = niceTicks{}
	p.Y.Tick.Marker = niceTicks{}
	return p
}

// niceTicks places about six labelled ticks at multiples of 1, 2, 2.5 or 5 × 10^k, with unlabelled
// minor ticks between them; labels are in %g form, so 1.333e+24 does not print as 25 digits.
// (The plotting library's default labels only two or three ticks on a panel of a grid.)
type niceTicks struct{}

// Ticks implements plot.Ticker.
func (niceTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || math.IsInf(hi-lo, 0) {
		return plot.DefaultTicks{}.Ticks(lo, hi)
	}
	raw := (hi - lo) / 6
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	step, minor := 10*mag, 5
	for _, m := range []struct {
		f     float64
		minor int
	}{{1, 5}, {2, 4}, {2.5, 5}, {5, 5}} {
		if m.f*mag >= raw {
			step, minor = m.f*mag, m.minor
			break
		}
	}
	var ts []plot.Tick
	k0, k1 := math.Ceil(lo/step-1e-9), math.Floor(hi/step+1e-9)
	for k := k0 - 1; k <= k1; k++ {
		v := k * step
		if v == 0 {
			v = 0 // not −0, which would print as "-0"
		}
		if v >= lo-1e-9*step && v <= hi+1e-9*step {
			ts = append(ts, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'g', 6, 64)})
		}
		for j := 1; j < minor; j++ {
			if m := v + float64(j)*step/float64(minor); m >= lo && m <= hi {
				ts = append(ts, plot.Tick{Value: m})
			}
		}
	}
	return ts
}

// addGrid adds light grid lines to a panel, behind the data that is added later.
func addGrid(p *plot.Plot) {
	g := plotter.NewGrid()
	g.Vertical = draw.LineStyle{Color: paleGrey, Width: vg.Points(0.5)}
	g.Horizontal = draw.LineStyle{Color: paleGrey, Width: vg.Points(0.5)}
	p.Add(g)
}

// grid arranges panels row-major into a grid with cols columns.
func grid(panels []*plot.Plot, cols int) [][]*plot.Plot {
	cols = max(1, min(cols, len(panels)))
	rows := (len(panels) + cols - 1) / cols
	out := make([][]*plot.Plot, rows)
	for r := range out {
		out[r] = make([]*plot.Plot, cols)
		for c := range cols {
			if i := r*cols + c; i < len(panels) {
				out[r][c] = panels[i]
			}
		}
	}
	return out
}

// gridCols is the number of columns of a near-square grid of n panels in a landscape figure.
func gridCols(n int) int {
	switch {
	case n <= 1:
		return 1
	case n <= 2:
		return 2
	case n <= 6:
		return 3
	case n <= 12:
		return 4
	}
	return 5
}

// Draw draws the figure onto c.
func (f *Figure) Draw(c draw.Canvas) {
	c.SetColor(white)
	c.Fill(c.Rectangle.Path())
	pad := vg.Points(8)
	top := c.Max.Y - pad
	ts := textStyle(figTitleSize, black)
	ts.XAlign, ts.YAlign = draw.XCenter, draw.YTop
	// No bold face: the PDF backend cannot embed the bundled bold sans face.
	if f.Title != "" {
		c.FillText(ts, vg.Point{X: (c.Min.X + c.Max.X) / 2, Y: top}, f.Title)
		top -= ts.Height(f.Title) + vg.Points(4)
	}
	if len(f.Legend) > 0 {
		top = f.drawLegend(c, top) - vg.Points(2)
	}
	bottom := c.Min.Y + pad/2
	if f.Note != "" {
		ns := textStyle(tickSize, darkGrey)
		ns.XAlign, ns.YAlign = draw.XLeft, draw.YBottom
		c.FillText(ns, vg.Point{X: c.Min.X + pad, Y: bottom}, f.Note)
		bottom += ns.Height(f.Note) + vg.Points(2)
	}
	if len(f.Panels) == 0 {
		return
	}
	area := draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
		Min: vg.Point{X: c.Min.X + pad, Y: bottom}, Max: vg.Point{X: c.Max.X - pad, Y: top}}}
	cols := len(f.Panels[0])
	tiles := draw.Tiles{Rows: len(f.Panels), Cols: cols, PadX: vg.Points(14), PadY: vg.Points(10)}
	canvases := plot.Align(f.Panels, tiles, area)
	for r, row := range f.Panels {
		for k, p := range row {
			if p != nil {
				p.Draw(canvases[r][k])
			}
		}
	}
}

// drawLegend draws the legend entries in one centred row below y and returns the row's bottom.
func (f *Figure) drawLegend(c draw.Canvas, y vg.Length) vg.Length {
	ls := textStyle(legendSize, black)
	ls.XAlign, ls.YAlign = draw.XLeft, draw.YCenter
	thumbW, gap, h := vg.Points(26), vg.Points(16), ls.Height("M")
	total := vg.Length(0)
	for _, e := range f.Legend {
		total += thumbW + vg.Points(4) + ls.Width(e.Label) + gap
	}
	total -= gap
	x := (c.Min.X+c.Max.X)/2 - total/2
	mid := y - h/2 - vg.Points(2)
	for _, e := range f.Legend {
		tc := draw.Canvas{Canvas: c.Canvas, Rectangle: vg.Rectangle{
			Min: vg.Point{X: x, Y: mid - h/2}, Max: vg.Point{X: x + thumbW, Y: mid + h/2}}}
		e.Thumb.Thumbnail(&tc)
		x += thumbW + vg.Points(4)
		c.FillText(ls, vg.Point{X: x, Y: mid}, e.Label)
		x += ls.Width(e.Label) + gap
	}
	return mid - h/2 - vg.Points(2)
}

// Render draws the figure in format (png, svg or pdf) at wPx × hPx pixels (96 dpi for the
// vector formats) and returns the file's bytes.
func (f *Figure) Render(format string, wPx, hPx int) (out []byte, err error) {
	// The plotting library panics on some degenerate input (e.g. a canvas too small for its
	// labels); report that as an error of this figure instead of crashing the command.
	defer func() {
		if p := recover(); p != nil {
			out, err = nil, fmt.Errorf("render %s: %v", f.Name, p)
		}
	}()
	if wPx <= 0 || hPx <= 0 {
		return nil, fmt.Errorf("figure size %d×%d px: both must be positive", wPx, hPx)
	}
	w := vg.Length(wPx) * vg.Inch / DPI
	h := vg.Length(hPx) * vg.Inch / DPI
	var cw vg.CanvasWriterTo
	switch format {
	case "png":
		// An image of exactly wPx × hPx: giving vgimg a size in length units would round.
		img := image.NewRGBA(image.Rect(0, 0, wPx, hPx))
		cw = vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseImage(img), vgimg.UseDPI(DPI))}
	case "svg":
		// Fonts embedded, so the figure looks the same on a machine without them.
		cw = vgsvg.NewWith(vgsvg.UseWH(w, h), vgsvg.EmbedFonts(true))
	case "pdf":
		cw = vgpdf.New(w, h)
	default:
		return nil, fmt.Errorf("unknown figure format %q (want one of %s)", format, strings.Join(Formats, ", "))
	}
	f.Draw(draw.New(cw))
	var buf bytes.Buffer
	if _, err := cw.WriteTo(&buf); err != nil {
		return nil, fmt.Errorf("render %s as %s: %w", f.Name, format, err)
	}
	b := buf.Bytes()
	if format == "pdf" {
		b = fixPDFDates(b)
	}
	return b, nil
}

// pdfDate matches the creation and modification dates the PDF writer stamps with the wall
// clock.
var pdfDate = regexp.MustCompile(`/(CreationDate|ModDate) \(D:[0-9]{14}\)`)

// fixPDFDates replaces the wall-clock dates of a PDF by a fixed one of the same length (so the
// cross-reference offsets stay valid): the same run then gives a byte-identical PDF.
func fixPDFDates(b []byte) []byte {
	return pdfDate.ReplaceAllFunc(b, func(m []byte) []byte {
		key := m[:bytes.IndexByte(m, ' ')]
		return append(append([]byte{}, key...), " (D:20000101000000)"...)
	})
}

// Save renders the figure and writes it atomically to path (replacing a file of that name).
func (f *Figure) Save(path, format string, wPx, hPx int) error {
	b, err := f.Render(format, wPx, hPx)
	if err != nil {
		return err
	}
	if err := store.WriteFileAtomic(path, b, 0o644); err != nil {
		return fmt.Errorf("write figure: %w", err)
	}
	return nil
}

// lineThumb draws a legend symbol for a line style.
type lineThumb draw.LineStyle

// Thumbnail implements plot.Thumbnailer.
func (l lineThumb) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	c.StrokeLine2(draw.LineStyle(l), c.Min.X, y, c.Max.X, y)
}

// boxThumb draws a legend symbol for a filled area with an optional outline.
type boxThumb struct {
	fill    color.Color
	outline draw.LineStyle
}

// Thumbnail implements plot.Thumbnailer.
func (b boxThumb) Thumbnail(c *draw.Canvas) {
	pts := []vg.Point{c.Min, {X: c.Min.X, Y: c.Max.Y}, c.Max, {X: c.Max.X, Y: c.Min.Y}}
	c.FillPolygon(b.fill, pts)
	if b.outline.Width > 0 {
		c.StrokeLines(b.outline, append(pts, c.Min))
	}
}

// unitSuffix returns " (unit)" or "" for a dimensionless quantity.
func unitSuffix(unit string) string {
	if unit == "" {
		return ""
	}
	return " (" + unit + ")"
}

// perUnit returns the unit of a probability density over a quantity in unit.
func perUnit(unit string) string {
	if unit == "" {
		return ""
	}
	if strings.ContainsAny(unit, "/·*") {
		return " (per " + unit + ")"
	}
	return " (1/" + unit + ")"
}
