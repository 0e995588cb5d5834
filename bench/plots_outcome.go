package bench

import (
	"fmt"
	"image/color"
	"math"
	"sort"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/palette"
	"gonum.org/v1/plot/palette/moreland"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/ejecta-dev/ejecta/bench/testbed"
)

// Files of the evolved-outcome figures.
const (
	// OutcomeFigureFile is the headline: delivered over reference momentum
	// against cell mass in cooling masses.
	OutcomeFigureFile = "outcome_momentum.png"
	// OutcomeHistoryFile is the momentum against time beside the 1D
	// reference.
	OutcomeHistoryFile = "outcome_history.png"
)

// outcomeFigures draws the evolved outcome, when the run has one.
func outcomeFigures(res *Result) ([]*Figure, error) {
	if len(res.Outcome) == 0 {
		return nil, nil
	}
	figs := []*Figure{outcomeMomentumFigure(res), outcomeHistoryFigure(res)}
	for _, gr := range outcomeGroups(res) {
		for _, q := range []sliceQuantity{sliceDensity, sliceTemperature} {
			if f := sliceFigure(res, gr, q); f != nil {
				figs = append(figs, f)
			}
		}
	}
	return figs, nil
}

// outcomeGroup is one medium at one density: a column of the headline
// figure.
type outcomeGroup struct {
	medium string
	n      float64
}

// label names a group in a title: the density, and the medium unless it
// is uniform.
func (g outcomeGroup) label() string {
	l := "n = " + formatNumber(g.n) + " cm^-3"
	if g.medium != "" && g.medium != "uniform" {
		l += " (" + g.medium + ")"
	}
	return l
}

// file names a group in a file name.
func (g outcomeGroup) file() string {
	f := "n" + fileSafe(formatNumber(g.n))
	if g.medium != "" && g.medium != "uniform" {
		f += "_" + fileSafe(g.medium)
	}
	return f
}

// outcomeGroups lists the media and densities of the outcome rows: media
// in order of appearance, densities rising within each.
func outcomeGroups(res *Result) []outcomeGroup {
	var media []string
	seenM := map[string]bool{}
	var out []outcomeGroup
	seen := map[outcomeGroup]bool{}
	for _, o := range res.Outcome {
		if !seenM[o.Medium] {
			seenM[o.Medium] = true
			media = append(media, o.Medium)
		}
	}
	for _, m := range media {
		var ns []float64
		for _, o := range res.Outcome {
			g := outcomeGroup{o.Medium, o.DensityCm3}
			if o.Medium == m && !seen[g] {
				seen[g] = true
				ns = append(ns, o.DensityCm3)
			}
		}
		sort.Float64s(ns)
		for _, n := range ns {
			out = append(out, outcomeGroup{m, n})
		}
	}
	return out
}

func outcomeTimes(res *Result) []float64 {
	var out []float64
	seen := map[float64]bool{}
	for _, o := range res.Outcome {
		if !seen[o.TimeOverShellFormation] {
			seen[o.TimeOverShellFormation] = true
			out = append(out, o.TimeOverShellFormation)
		}
	}
	sort.Float64s(out)
	return out
}

// outcomeSchemes lists the schemes of the outcome rows in result order.
func outcomeSchemes(res *Result) []string {
	var out []string
	seen := map[string]bool{}
	for _, o := range res.Outcome {
		if !seen[o.Scheme] {
			seen[o.Scheme] = true
			out = append(out, o.Scheme)
		}
	}
	return out
}

// convergedCellMass is the cell mass, in cooling masses, of cells of side
// r_sf / 3 (the resolution Kim & Ostriker 2015 ask for): (1/3)^3 of the
// volume of a sphere of radius r_sf, which holds the cooling mass.
const convergedCellMass = 1.0 / 27 / (4 * math.Pi / 3)

// outcomeMomentumFigure is the headline: for each density (columns) and
// measurement time (rows), the radial momentum each scheme delivers over
// the 1D reference's at the same time, against cell mass in cooling
// masses, with the band within 30% of the reference shaded and the
// cooling mass and the Kim & Ostriker 2015 convergence resolution marked.
// Zero momentum (no energy deposited) cannot show on the log axis: such a
// scheme's key entry says so in words.
func outcomeMomentumFigure(res *Result) *Figure {
	groups, times, schemes := outcomeGroups(res), outcomeTimes(res), outcomeSchemes(res)
	zeros := map[string]int{}
	for _, o := range res.Outcome {
		if nothingDelivered(o) {
			zeros[o.Scheme]++
		}
	}
	var key []keyEntry
	var panels []*plot.Plot
	for ti, t := range times {
		for di, gr := range groups {
			p := newPanel(fmt.Sprintf("%s, t = %s t_sf", gr.label(), formatNumber(t)),
				"cell mass / cooling mass", "radial momentum / 1D reference")
			logAxes(p, true, true)
			first := ti == 0 && di == 0
			within := band{Lo: 0.7, Hi: 1.3, Color: color.Gray{Y: 225}}
			p.Add(within)
			one := verticalMark{X: 1, Style: draw.LineStyle{Color: color.Black, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(4), vg.Points(3)}}}
			conv := verticalMark{X: convergedCellMass, Style: draw.LineStyle{Color: color.Gray{Y: 90}, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(1.5), vg.Points(2.5)}}}
			p.Add(one, conv)
			ref := horizontalLine(1)
			p.Add(ref)
			if first {
				key = append(key, keyEntry{"within 30% of the 1D reference", []plot.Thumbnailer{within}},
					keyEntry{"1D reference (ratio 1)", []plot.Thumbnailer{ref}},
					keyEntry{"cell mass = cooling mass", []plot.Thumbnailer{one}},
					keyEntry{"cell size = r_sf / 3 (Kim & Ostriker 2015 convergence)", []plot.Thumbnailer{conv}})
			}
			for si, name := range schemes {
				var xy plotter.XYs
				total := 0
				for _, o := range res.Outcome {
					if o.Scheme == name && o.Medium == gr.medium && o.DensityCm3 == gr.n && o.TimeOverShellFormation == t {
						total++
						if !nothingDelivered(o) {
							xy = append(xy, plotter.XY{X: o.CellMassOverCoolingMass, Y: o.MomentumRatio()})
						}
					}
				}
				line, pts := &plotter.Line{}, &plotter.Scatter{}
				if len(xy) > 0 {
					line, pts, _ = plotter.NewLinePoints(xy)
				}
				styleLine(si, line, pts)
				if len(xy) > 0 {
					p.Add(line, pts)
				}
				if first {
					label := name
					if z := zeros[name]; z > 0 {
						label += fmt.Sprintf(": nothing at %d of %d points", z, len(groups)*len(times)*total)
					}
					key = append(key, keyEntry{label, []plot.Thumbnailer{line, pts}})
				}
			}
			padLogRange(&p.X.Min, &p.X.Max)
			p.Y.Min, p.Y.Max = math.Min(p.Y.Min, 0.5), math.Max(p.Y.Max, 2)
			p.Y.Min = math.Max(p.Y.Min, 0.03)
			panels = append(panels, p)
		}
	}
	fig := newFigure(OutcomeFigureFile, len(panels), min(len(groups), 4), 5*vg.Inch, 4.4*vg.Inch,
		keyPanel("evolved momentum over the 1D reference", key), keyLabels(key), 4*vg.Inch)
	for i, p := range panels {
		fig.place(i, p)
	}
	return fig
}

// nothingDelivered says a case delivered no momentum to speak of: none,
// or the scheme handed most of the energy back undeposited (stochastic
// heating that cannot pay for a heated cell). Such points are not drawn on
// the log axis; the key says how many there are.
func nothingDelivered(o testbed.Outcome) bool {
	return !(o.MomentumRatio() > 1e-3) || o.UndepositedShare > 0.5
}

// horizontalLine is a solid black line at y across a panel.
type horizontalLine float64

// Plot implements plot.Plotter.
func (h horizontalLine) Plot(c draw.Canvas, p *plot.Plot) {
	y := float64(h)
	if !(y >= p.Y.Min && y <= p.Y.Max) {
		return
	}
	_, trY := p.Transforms(&c)
	c.StrokeLine2(draw.LineStyle{Color: color.Black, Width: vg.Points(1.2)}, c.Min.X, trY(y), c.Max.X, trY(y))
}

// Thumbnail implements plot.Thumbnailer.
func (h horizontalLine) Thumbnail(c *draw.Canvas) {
	y := (c.Min.Y + c.Max.Y) / 2
	c.StrokeLine2(draw.LineStyle{Color: color.Black, Width: vg.Points(1.2)}, c.Min.X, y, c.Max.X, y)
}

// outcomeHistoryFigure draws each scheme's radial momentum against time
// beside the 1D reference, one panel per density (rows) and resolution
// (columns).
func outcomeHistoryFigure(res *Result) *Figure {
	groups, schemes := outcomeGroups(res), outcomeSchemes(res)
	var ratios []float64
	seen := map[float64]bool{}
	for _, h := range res.OutcomeHistory {
		if !seen[h.CellMassOverCoolingMass] {
			seen[h.CellMassOverCoolingMass] = true
			ratios = append(ratios, h.CellMassOverCoolingMass)
		}
	}
	sort.Float64s(ratios)
	ratios = spreadPick(ratios, 4)
	var key []keyEntry
	var panels []*plot.Plot
	for di, gr := range groups {
		n := gr.n
		var ref plotter.XYs
		var tsf float64
		for _, r := range res.References {
			if r.DensityCm3 == n {
				tsf = r.ShellFormationKyr
				for _, h := range r.History {
					if h.RadialMomentumMsunKms > 0 && h.TimeKyr > 0 {
						ref = append(ref, plotter.XY{X: h.TimeKyr, Y: h.RadialMomentumMsunKms})
					}
				}
			}
		}
		for ri, ratio := range ratios {
			p := newPanel(fmt.Sprintf("%s, cell = %s cooling masses", gr.label(), formatNumber(ratio)),
				"time [kyr]", "radial momentum [Msun km/s]")
			logAxes(p, true, true)
			first := di == 0 && ri == 0
			if len(ref) > 1 {
				l, _ := plotter.NewLine(ref)
				l.Color, l.Width = color.Black, vg.Points(2.4)
				p.Add(l)
				if first {
					key = append(key, keyEntry{"1D reference", []plot.Thumbnailer{l}})
				}
			}
			sf := verticalMark{X: tsf, Style: draw.LineStyle{Color: color.Gray{Y: 90}, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(4), vg.Points(3)}}}
			p.Add(sf)
			if first {
				key = append(key, keyEntry{"1D shell formation", []plot.Thumbnailer{sf}})
			}
			for si, name := range schemes {
				var xy plotter.XYs
				for _, h := range res.OutcomeHistory {
					if h.Scheme == name && h.Medium == gr.medium && h.DensityCm3 == n && h.CellMassOverCoolingMass == ratio && h.RadialMomentumMsunKms > 0 {
						xy = append(xy, plotter.XY{X: h.TimeKyr, Y: h.RadialMomentumMsunKms})
					}
				}
				line := &plotter.Line{}
				if len(xy) > 1 {
					line, _ = plotter.NewLine(xy)
				}
				styleLine(si, line, nil)
				if len(xy) > 1 {
					p.Add(line)
				}
				if first {
					key = append(key, keyEntry{name, []plot.Thumbnailer{line}})
				}
			}
			p.Y.Min = math.Max(p.Y.Min, p.Y.Max*1e-3)
			panels = append(panels, p)
		}
	}
	fig := newFigure(OutcomeHistoryFile, len(panels), max(len(ratios), 1), 4.4*vg.Inch, 3.9*vg.Inch,
		keyPanel("radial momentum against time", key), keyLabels(key), 3.4*vg.Inch)
	for i, p := range panels {
		fig.place(i, p)
	}
	return fig
}

// sliceQuantity is what a slice figure shows.
type sliceQuantity int

const (
	sliceDensity sliceQuantity = iota
	sliceTemperature
)

// sliceFigure draws one quantity of the slices through the star at one
// density, a panel per scheme on a shared logarithmic colour scale, with
// the scale in the key tile.
func sliceFigure(res *Result, gr outcomeGroup, q sliceQuantity) *Figure {
	n := gr.n
	var slices []testbed.Slice
	for _, s := range res.Slices {
		if s.DensityCm3 == n && s.Medium == gr.medium {
			slices = append(slices, s)
		}
	}
	if len(slices) == 0 {
		return nil
	}
	values := func(s *testbed.Slice) []float64 {
		if q == sliceTemperature {
			return s.TemperatureK
		}
		return s.HydrogenDensityCm3
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := range slices {
		for _, v := range values(&slices[i]) {
			if v > 0 {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
	}
	if !(hi > lo) {
		hi = lo * 10
	}
	lo, hi = math.Log10(lo), math.Log10(hi)
	name, unit, file := "hydrogen density", "log10 n_H [cm^-3]", "outcome_density"
	if q == sliceTemperature {
		name, unit, file = "temperature", "log10 T [K]", "outcome_temperature"
	}
	var cm palette.ColorMap = moreland.SmoothBlueRed()
	if q == sliceDensity {
		cm = moreland.ExtendedBlackBody()
	}
	cm.SetMin(lo)
	cm.SetMax(hi)
	pal := cm.Palette(64)
	var panels []*plot.Plot
	for i := range slices {
		s := &slices[i]
		p := newPanel(s.Scheme, "x [pc]", "y [pc]")
		h := plotter.NewHeatMap(sliceGrid{s: s, v: values(s)}, pal)
		h.Min, h.Max = lo, hi
		p.Add(h)
		p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = 0, s.BoxPc, 0, s.BoxPc
		panels = append(panels, p)
	}
	s0 := slices[0]
	cb := newPanel(fmt.Sprintf("%s\n%s\ncell %s cooling masses\nt = %s t_sf", name, gr.label(),
		formatNumber(s0.CellMassOverCoolingMass), formatNumber(s0.TimeOverShellFormation)), "", unit)
	bar := &plotter.ColorBar{ColorMap: cm, Vertical: true}
	cb.Add(bar)
	cb.HideX()
	fig := newFigure(fmt.Sprintf("%s_%s.png", file, gr.file()), len(panels), 4, 3.3*vg.Inch, 3.3*vg.Inch, cb, nil, 2*vg.Inch)
	for i, p := range panels {
		fig.place(i, p)
	}
	return fig
}

// sliceGrid is a slice as a plotter.GridXYZ of log10 values in parsec.
type sliceGrid struct {
	s *testbed.Slice
	v []float64
}

func (g sliceGrid) Dims() (c, r int) { return g.s.Cells, g.s.Cells }
func (g sliceGrid) Z(c, r int) float64 {
	v := g.v[c+g.s.Cells*r]
	if !(v > 0) {
		return math.NaN()
	}
	return math.Log10(v)
}
func (g sliceGrid) X(c int) float64 { return (float64(c) + 0.5) * g.s.BoxPc / float64(g.s.Cells) }
func (g sliceGrid) Y(r int) float64 { return (float64(r) + 0.5) * g.s.BoxPc / float64(g.s.Cells) }

// spreadPick keeps at most k of the rising values, the first, the last and
// the ones between closest to even steps in index.
func spreadPick(v []float64, k int) []float64 {
	if len(v) <= k {
		return v
	}
	out := make([]float64, k)
	for i := range out {
		out[i] = v[int(math.Round(float64(i)*float64(len(v)-1)/float64(k-1)))]
	}
	return out
}
