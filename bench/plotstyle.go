package bench

import (
	"fmt"
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// seriesColors tell up to twelve lines apart, and solid, dashed and
// dotted lines in turn tell them apart again after that. Black and grey
// are kept for the references.
var seriesColors = []color.Color{
	color.RGBA{R: 0x1f, G: 0x77, B: 0xb4, A: 0xff}, // blue
	color.RGBA{R: 0xd6, G: 0x27, B: 0x28, A: 0xff}, // red
	color.RGBA{R: 0x2c, G: 0xa0, B: 0x2c, A: 0xff}, // green
	color.RGBA{R: 0xff, G: 0x7f, B: 0x0e, A: 0xff}, // orange
	color.RGBA{R: 0x94, G: 0x67, B: 0xbd, A: 0xff}, // purple
	color.RGBA{R: 0x8c, G: 0x56, B: 0x4b, A: 0xff}, // brown
	color.RGBA{R: 0xe3, G: 0x77, B: 0xc2, A: 0xff}, // pink
	color.RGBA{R: 0x17, G: 0xbe, B: 0xcf, A: 0xff}, // cyan
	color.RGBA{R: 0xbc, G: 0xbd, B: 0x22, A: 0xff}, // olive
	color.RGBA{R: 0x39, G: 0x3b, B: 0x79, A: 0xff}, // navy
	color.RGBA{R: 0xad, G: 0x49, B: 0x4a, A: 0xff}, // brick
	color.RGBA{R: 0x63, G: 0x79, B: 0x39, A: 0xff}, // moss
}

// seriesStyle is series i's colour, dash pattern (nil: solid) and marker.
func seriesStyle(i int) (color.Color, []vg.Length, draw.GlyphDrawer) {
	c := seriesColors[i%len(seriesColors)]
	// Lines that lie on top of one another (schemes that deliver the same)
	// stay visible through the gaps of the ones drawn later.
	var dashes []vg.Length
	switch (i + i/len(seriesColors)) % 3 {
	case 1:
		dashes = []vg.Length{vg.Points(7), vg.Points(3)}
	case 2:
		dashes = []vg.Length{vg.Points(2), vg.Points(2.5)}
	}
	return c, dashes, plotutil.Shape(i)
}

// styleLine gives a line and its points series i's look.
func styleLine(i int, l *plotter.Line, pts *plotter.Scatter) {
	c, dashes, shape := seriesStyle(i)
	l.Color = c
	l.Width = vg.Points(1.6)
	l.Dashes = dashes
	if pts != nil {
		pts.Color = c
		pts.Shape = shape
		pts.Radius = vg.Points(3)
	}
}

// Fonts: every figure uses these sizes so that a legend, a title and tick
// labels read at the size the PNG is written.
const (
	titleFontSize  = 11
	labelFontSize  = 10
	tickFontSize   = 9
	legendFontSize = 9
)

// newPanel is a plot with the figures' fonts.
func newPanel(title, x, y string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font.Size = vg.Points(titleFontSize)
	p.X.Label.Text = x
	p.Y.Label.Text = y
	p.X.Label.TextStyle.Font.Size = vg.Points(labelFontSize)
	p.Y.Label.TextStyle.Font.Size = vg.Points(labelFontSize)
	p.X.Tick.Label.Font.Size = vg.Points(tickFontSize)
	p.Y.Tick.Label.Font.Size = vg.Points(tickFontSize)
	return p
}

// logAxes makes both axes of p logarithmic with decade ticks.
func logAxes(p *plot.Plot, x, y bool) {
	if x {
		p.X.Scale = plot.LogScale{}
		p.X.Tick.Marker = decadeTicks{}
	}
	if y {
		p.Y.Scale = plot.LogScale{}
		p.Y.Tick.Marker = decadeTicks{}
	}
}

// decadeLabel writes 10^k the same way on every axis of every figure:
// plain decimals from 0.01 to 1000, "1e<k>" beyond (no "+", no padding).
func decadeLabel(k int) string {
	if k >= -2 && k <= 3 {
		return strconv.FormatFloat(math.Pow(10, float64(k)), 'f', -1, 64)
	}
	return fmt.Sprintf("1e%d", k)
}

// tickLabel writes a tick value m × 10^k (m = 1, 2 or 5) the way
// decadeLabel writes powers of ten: plain decimals from 0.01 to 1000,
// "<m>e<k>" beyond.
func tickLabel(m float64, k int) string {
	if k >= -2 && k <= 3 {
		return strconv.FormatFloat(m*math.Pow(10, float64(k)), 'f', -1, 64)
	}
	if m == 1 {
		return decadeLabel(k)
	}
	return fmt.Sprintf("%ge%d", m, k)
}

// decadeTicks labels every power of ten in range (and, on axes spanning
// less than three decades, 2 and 5 times each) and puts unlabelled ticks at
// the other multiples; where the range holds no labelled value it labels
// its ends.
type decadeTicks struct{}

// Ticks implements plot.Ticker.
func (decadeTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(lo > 0) || !(hi >= lo) {
		return nil
	}
	dense := math.Log10(hi/lo) < 3
	var ticks []plot.Tick
	labelled := 0
	for k := int(math.Floor(math.Log10(lo))); k <= int(math.Ceil(math.Log10(hi))); k++ {
		v := math.Pow(10, float64(k))
		for m := 1.0; m < 10; m++ {
			w := m * v
			if w < lo*(1-1e-9) || w > hi*(1+1e-9) {
				continue
			}
			t := plot.Tick{Value: w}
			if m == 1 || (dense && (m == 2 || m == 5)) {
				t.Label = tickLabel(m, k)
				labelled++
			}
			ticks = append(ticks, t)
		}
	}
	if labelled == 0 {
		ticks = append(ticks, plot.Tick{Value: lo, Label: formatNumber(lo)}, plot.Tick{Value: hi, Label: formatNumber(hi)})
	}
	return ticks
}

// padLogRange widens a log axis range that is empty (a single point, as a
// user's own gas gives) or narrower than a factor of ten to a decade or
// more around its values, so the point shows with labelled ticks.
func padLogRange(lo, hi *float64) {
	if !(*lo > 0) || !(*hi >= *lo) {
		return
	}
	if *hi < 10**lo {
		mid := math.Sqrt(*lo * *hi)
		*lo, *hi = mid/math.Sqrt(10)/1.5, mid*math.Sqrt(10)*1.5
	}
}

// keyPanel is a panel holding only a legend, drawn in a tile of its own so
// that the legend neither crowds the data nor shrinks to fit.
func keyPanel(title string, entries []keyEntry) *plot.Plot {
	p := plot.New()
	p.HideAxes()
	p.Title.Text = title
	p.Title.TextStyle.Font.Size = vg.Points(titleFontSize)
	p.Legend.Top, p.Legend.Left = true, true
	p.Legend.TextStyle.Font.Size = vg.Points(legendFontSize)
	p.Legend.ThumbnailWidth = vg.Points(28)
	p.Legend.Padding = vg.Points(2)
	for _, e := range entries {
		p.Legend.Add(e.label, e.thumbs...)
	}
	return p
}

// keyEntry is one legend line.
type keyEntry struct {
	label  string
	thumbs []plot.Thumbnailer
}

// keyLabels lists the entries' labels.
func keyLabels(entries []keyEntry) []string {
	out := make([]string, len(entries))
	for i, e := range entries {
		out[i] = e.label
	}
	return out
}

// newFigure makes a figure of n panels of the given size, cols to a row,
// with the key in a column of width keyW at the right.
func newFigure(file string, n, cols int, tileW, tileH vg.Length, key *plot.Plot, legend []string, keyW vg.Length) *Figure {
	c := max(1, min(cols, n))
	rows := max(1, (n+c-1)/c)
	f := &Figure{File: file, Width: vg.Length(c)*tileW + keyW, Height: vg.Length(rows) * tileH, Key: key, KeyWidth: keyW, Legend: legend}
	f.Panels = make([][]*plot.Plot, rows)
	for r := range f.Panels {
		f.Panels[r] = make([]*plot.Plot, c)
	}
	return f
}

// place puts panel i of a figure made by newFigure.
func (f *Figure) place(i int, p *plot.Plot) {
	c := len(f.Panels[0])
	f.Panels[i/c][i%c] = p
}

// verticalMark is a vertical line across a panel's data area at X, for
// marking a value on the x axis (the cooling mass); it takes no part in
// the axis ranges and draws nothing when X is outside them.
type verticalMark struct {
	X     float64
	Style draw.LineStyle
}

// Plot implements plot.Plotter.
func (m verticalMark) Plot(c draw.Canvas, p *plot.Plot) {
	if !(m.X >= p.X.Min && m.X <= p.X.Max) {
		return
	}
	trX, _ := p.Transforms(&c)
	x := trX(m.X)
	c.StrokeLine2(m.Style, x, c.Min.Y, x, c.Max.Y)
}

// Thumbnail implements plot.Thumbnailer.
func (m verticalMark) Thumbnail(c *draw.Canvas) {
	x := (c.Min.X + c.Max.X) / 2
	c.StrokeLine2(m.Style, x, c.Min.Y, x, c.Max.Y)
}

// band is a horizontal band between Lo and Hi across a panel's data area.
type band struct {
	Lo, Hi float64
	Color  color.Color
}

// Plot implements plot.Plotter.
func (b band) Plot(c draw.Canvas, p *plot.Plot) {
	_, trY := p.Transforms(&c)
	lo, hi := math.Max(b.Lo, p.Y.Min), math.Min(b.Hi, p.Y.Max)
	if !(hi > lo) {
		return
	}
	y0, y1 := trY(lo), trY(hi)
	c.FillPolygon(b.Color, []vg.Point{{X: c.Min.X, Y: y0}, {X: c.Max.X, Y: y0}, {X: c.Max.X, Y: y1}, {X: c.Min.X, Y: y1}})
}

// Thumbnail implements plot.Thumbnailer.
func (b band) Thumbnail(c *draw.Canvas) {
	c.FillPolygon(b.Color, []vg.Point{c.Min, {X: c.Max.X, Y: c.Min.Y}, c.Max, {X: c.Min.X, Y: c.Max.Y}})
}

// DataRange implements plot.DataRanger: the band widens the y range to
// show itself.
func (b band) DataRange() (xmin, xmax, ymin, ymax float64) {
	return math.Inf(1), math.Inf(-1), b.Lo, b.Hi
}
