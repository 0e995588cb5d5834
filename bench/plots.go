package bench

import (
	"fmt"
	"image/color"
	"math"
	"os"
	"sort"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Figure is one PNG file: a grid of plot panels, row by row, and a key
// (the legend) in a tile of its own.
type Figure struct {
	// File is the PNG's file name.
	File string
	// Panels are the plots, Panels[row][col]; a nil panel leaves its tile
	// empty.
	Panels [][]*plot.Plot
	// Key, when set, is a legend-only panel drawn in a column of width
	// KeyWidth at the right of the panels, the figure's full height.
	Key      *plot.Plot
	KeyWidth vg.Length
	// Legend lists the key's entries, in order.
	Legend []string
	// Width and Height are the image size.
	Width, Height vg.Length
}

// SavePNG draws the figure into a PNG file.
func (f *Figure) SavePNG(path string) error {
	rows := len(f.Panels)
	if rows == 0 {
		return fmt.Errorf("figure %s: no panels", f.File)
	}
	cols := len(f.Panels[0])
	img := vgimg.NewWith(vgimg.UseWH(f.Width, f.Height), vgimg.UseDPI(110))
	full := draw.New(img)
	dc := full
	if f.Key != nil {
		dc = draw.Crop(full, 0, -f.KeyWidth, 0, 0)
	}
	tiles := draw.Tiles{Rows: rows, Cols: cols, PadX: vg.Millimeter * 5, PadY: vg.Millimeter * 5,
		PadTop: vg.Millimeter * 3, PadBottom: vg.Millimeter * 3, PadLeft: vg.Millimeter * 3, PadRight: vg.Millimeter * 3}
	for r := range f.Panels {
		for c, p := range f.Panels[r] {
			if p != nil {
				p.Draw(tiles.At(dc, c, r))
			}
		}
	}
	if f.Key != nil {
		f.Key.Draw(draw.Crop(full, f.Width-f.KeyWidth, 0, vg.Millimeter*3, -vg.Millimeter*3))
	}
	out, err := os.Create(path)
	if err != nil {
		return fmt.Errorf("figure %s: %w", f.File, err)
	}
	if _, err := (vgimg.PngCanvas{Canvas: img}).WriteTo(out); err != nil {
		out.Close()
		return fmt.Errorf("figure %s: %w", f.File, err)
	}
	if err := out.Close(); err != nil {
		return fmt.Errorf("figure %s: %w", f.File, err)
	}
	return nil
}

// Figures builds the plots of a result: radial momentum against gas
// element mass for each set-up (one panel per density), the isotropy
// residual by set-up, the energy shares against gas element mass for each
// set-up, the speed (when measured), and the evolved outcome (when run).
func Figures(res *Result) ([]*Figure, error) {
	var figs []*Figure
	for _, s := range setupOrder(res) {
		f, err := momentumFigure(res, s)
		if err != nil {
			return nil, err
		}
		figs = append(figs, f)
	}
	f, err := isotropyFigure(res)
	if err != nil {
		return nil, err
	}
	figs = append(figs, f)
	for _, s := range setupOrder(res) {
		if f, err = energyFigure(res, s); err != nil {
			return nil, err
		}
		figs = append(figs, f)
	}
	if len(res.Speed) > 0 {
		if f, err = speedFigure(res); err != nil {
			return nil, err
		}
		figs = append(figs, f)
	}
	more, err := outcomeFigures(res)
	if err != nil {
		return nil, err
	}
	return append(figs, more...), nil
}

// setupOrder lists the set-ups in the order they first appear.
func setupOrder(res *Result) []string {
	var out []string
	seen := map[string]bool{}
	for _, r := range res.Convergence {
		if !seen[r.Setup] {
			seen[r.Setup] = true
			out = append(out, r.Setup)
		}
	}
	return out
}

func schemeOrder(res *Result) []string {
	out := make([]string, len(res.Schemes))
	for i, s := range res.Schemes {
		out[i] = s.Name
	}
	return out
}

// fileSafe makes a name usable in a file name.
func fileSafe(s string) string {
	return strings.Map(func(r rune) rune {
		if r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || r == '-' || r == '_' || r == '.' {
			return r
		}
		return '_'
	}, s)
}

func formatNumber(v float64) string { return strconv.FormatFloat(v, 'g', 3, 64) }

// momentumFigure draws radial momentum per supernova against gas element
// mass, one log-log panel per density, a line per scheme, the analytic
// references dashed, and a dotted mark where the coupled gas (neighbors ×
// element mass) reaches the cooling mass of the Kim & Ostriker 2015 fit. A
// scheme's zero momentum cannot be drawn on the log axis: its points are
// left out and its key entry says "zero" in words.
func momentumFigure(res *Result, setup string) (*Figure, error) {
	var densities []float64
	seen := map[float64]bool{}
	for _, r := range res.Convergence {
		if r.Setup == setup && !seen[r.DensityCm3] {
			seen[r.DensityCm3] = true
			densities = append(densities, r.DensityCm3)
		}
	}
	sort.Float64s(densities)
	schemes := schemeOrder(res)
	// Where each scheme was zero, over all panels.
	zeros := make([]int, len(schemes))
	points := make([]int, len(schemes))
	for si, name := range schemes {
		for _, r := range res.Convergence {
			if r.Setup == setup && r.Scheme == name {
				points[si]++
				if !(r.RadialMomentumMsunKms > 0) {
					zeros[si]++
				}
			}
		}
	}
	var key []keyEntry
	panels := make([]*plot.Plot, len(densities))
	for di, n := range densities {
		p := newPanel(fmt.Sprintf("%s, n = %s cm^-3", setup, formatNumber(n)),
			"gas element mass [Msun]", "radial momentum per SN [Msun km/s]")
		logAxes(p, true, true)
		var ec, term plotter.XYs
		for _, r := range res.Convergence {
			if r.Setup == setup && r.DensityCm3 == n && r.Scheme == schemes[0] {
				ec = append(ec, plotter.XY{X: r.GasMassMsun, Y: r.EnergyConservingMsunKm})
				term = append(term, plotter.XY{X: r.GasMassMsun, Y: r.TerminalMsunKms})
			}
		}
		for si, name := range schemes {
			var xy plotter.XYs
			for _, r := range res.Convergence {
				if r.Setup == setup && r.DensityCm3 == n && r.Scheme == name && r.RadialMomentumMsunKms > 0 {
					xy = append(xy, plotter.XY{X: r.GasMassMsun, Y: r.RadialMomentumMsunKms})
				}
			}
			line, pts := &plotter.Line{}, &plotter.Scatter{}
			if len(xy) > 0 {
				var err error
				if line, pts, err = plotter.NewLinePoints(xy); err != nil {
					return nil, fmt.Errorf("momentum plot %s: %w", setup, err)
				}
			}
			styleLine(si, line, pts)
			if len(xy) > 0 {
				p.Add(line, pts)
			}
			if di == 0 {
				label := name
				switch {
				case zeros[si] == points[si]:
					label += ": zero at every mass (not drawn)"
				case zeros[si] > 0:
					label += fmt.Sprintf(": zero at %d of %d points (not drawn)", zeros[si], points[si])
				}
				key = append(key, keyEntry{label, []plot.Thumbnailer{line, pts}})
			}
		}
		for i, ref := range []struct {
			xy    plotter.XYs
			name  string
			color color.Color
		}{
			{ec, "energy-conserving sqrt(2E(M_ej + 0.28 M_sw)) of the coupled gas", color.Black},
			{term, "terminal momentum (" + res.TerminalFit + ")", color.Gray{Y: 110}},
		} {
			if len(ref.xy) == 0 {
				continue
			}
			l, err := plotter.NewLine(ref.xy)
			if err != nil {
				return nil, fmt.Errorf("momentum plot %s: %w", setup, err)
			}
			l.Color = ref.color
			l.Width = vg.Points(1.2)
			l.Dashes = []vg.Length{vg.Points(6), vg.Points(3 + 2*float64(i))}
			p.Add(l)
			if di == 0 {
				key = append(key, keyEntry{ref.name, []plot.Thumbnailer{l}})
			}
		}
		mark := verticalMark{X: coolingElementMass(n, res.Neighbors),
			Style: draw.LineStyle{Color: color.Gray{Y: 60}, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(1.5), vg.Points(2.5)}}}
		p.Add(mark)
		if di == 0 {
			key = append(key, keyEntry{fmt.Sprintf("coupled mass (%d x element) = cooling mass (Kim & Ostriker 2015)", res.Neighbors),
				[]plot.Thumbnailer{mark}})
		}
		// A single gas mass (a user's own gas) or equal momenta give an
		// empty log range: widen it to a decade or more.
		padLogRange(&p.X.Min, &p.X.Max)
		padLogRange(&p.Y.Min, &p.Y.Max)
		panels[di] = p
	}
	keyP := keyPanel("key", key)
	fig := newFigure("momentum_"+fileSafe(setup)+".png", len(densities), 3, 4.6*vg.Inch, 4.2*vg.Inch, keyP, keyLabels(key), 4.6*vg.Inch)
	for i, p := range panels {
		fig.place(i, p)
	}
	return fig, nil
}

// coolingElementMass is the gas element mass (Msun) at which the coupled
// gas of k elements holds the cooling mass of the Kim & Ostriker 2015 fit
// at hydrogen density n (cm^-3): the mass inside the shell-formation
// radius.
func coolingElementMass(n float64, k int) float64 {
	rem := feedback.KimOstriker2015.Remnant(SupernovaEnergyErg, n, yields.SolarMetals)
	rho := n * feedback.MassPerHydrogen * units.ProtonMass
	return rem.CoolingMass(rho) / units.SolarMass / float64(max(k, 1))
}

// logBar maps a residual onto a bar height: decades above 1e-16.
const residualFloorDecades = 16

func logBar(r float64) float64 {
	if !(r > 0) {
		return 0
	}
	return math.Max(math.Log10(r)+residualFloorDecades, 0)
}

// residualTicks labels the log-bar axis in powers of ten.
type residualTicks struct{}

func (residualTicks) Ticks(lo, hi float64) []plot.Tick {
	var t []plot.Tick
	for v := 0.0; v <= residualFloorDecades; v++ {
		label := ""
		if int(v)%4 == 0 {
			label = decadeLabel(int(v) - residualFloorDecades)
		}
		t = append(t, plot.Tick{Value: v, Label: label})
	}
	return t
}

func nominalBars(p *plot.Plot, names []string) {
	p.NominalX(names...)
	p.X.Tick.Label.Font.Size = vg.Points(tickFontSize)
	p.X.Tick.Label.Rotation = math.Pi / 6
	p.X.Tick.Label.XAlign = draw.XRight
	p.X.Tick.Label.YAlign = draw.YTop
}

// isotropyFigure draws the isotropy residual by set-up, a bar per scheme
// on a log scale; a residual of exactly zero (a scheme that hands out no
// radial momentum) has no bar and is written "zero" in its place.
func isotropyFigure(res *Result) (*Figure, error) {
	setups := setupOrder(res)
	schemes := schemeOrder(res)
	p := newPanel("isotropy residual by set-up (worst star)", "set-up", "isotropy residual |sum p_j| / sum |p_j|")
	p.Y.Min, p.Y.Max = 0, residualFloorDecades+1
	p.Y.Tick.Marker = residualTicks{}
	// A set-up with stars whose gas is all on one side says so under its
	// bars: no correction can balance those stars.
	labels := make([]string, len(setups))
	for i, s := range setups {
		labels[i] = s
		for _, r := range res.Isotropy {
			if r.Setup == s && r.OneSidedStars > 0 {
				labels[i] = fmt.Sprintf("%s (%d one-sided, uncorrectable)", s, r.OneSidedStars)
				break
			}
		}
	}
	nominalBars(p, labels)
	w := vg.Points(math.Min(18, 420/float64(len(setups)*max(len(schemes), 1))))
	var key []keyEntry
	for si, name := range schemes {
		vals := make(plotter.Values, len(setups))
		var zero plotter.XYs
		for i, s := range setups {
			for _, r := range res.Isotropy {
				if r.Scheme == name && r.Setup == s {
					vals[i] = logBar(r.Residual)
					if r.Residual == 0 {
						zero = append(zero, plotter.XY{X: float64(i), Y: 0.3})
					}
				}
			}
		}
		b, err := plotter.NewBarChart(vals, w)
		if err != nil {
			return nil, fmt.Errorf("isotropy plot: %w", err)
		}
		c, _, _ := seriesStyle(si)
		b.Color = c
		b.LineStyle.Width = 0
		b.Offset = w * vg.Length(float64(si)-float64(len(schemes)-1)/2)
		p.Add(b)
		if len(zero) > 0 {
			words := make([]string, len(zero))
			for i := range words {
				words[i] = "zero"
			}
			l, err := plotter.NewLabels(plotter.XYLabels{XYs: zero, Labels: words})
			if err != nil {
				return nil, fmt.Errorf("isotropy plot: %w", err)
			}
			for i := range l.TextStyle {
				l.TextStyle[i].Rotation = math.Pi / 2
				l.TextStyle[i].Font.Size = vg.Points(7)
				l.TextStyle[i].Color = c
				l.TextStyle[i].XAlign = draw.XCenter
			}
			l.Offset = vg.Point{X: b.Offset}
			p.Add(l)
		}
		key = append(key, keyEntry{name, []plot.Thumbnailer{b}})
	}
	fig := newFigure("isotropy.png", 1, 1, 8*vg.Inch, 5*vg.Inch, keyPanel("key", key), keyLabels(key), 3*vg.Inch)
	fig.place(0, p)
	return fig, nil
}

// energyParts are the shares an energy budget splits into.
var energyParts = []struct {
	name string
	get  func(EnergyBudget) float64
}{
	{"kinetic", func(e EnergyBudget) float64 { return e.Kinetic }},
	{"thermal", func(e EnergyBudget) float64 { return e.Thermal }},
	{"radiated", func(e EnergyBudget) float64 { return e.Radiated }},
	{"undeposited", func(e EnergyBudget) float64 { return e.Undeposited }},
}

// energyDensity is the density of a set-up's energy rows closest to
// 1 cm^-3 in log.
func energyDensity(res *Result, setup string) float64 {
	best := math.NaN()
	for _, r := range res.Energy {
		if r.Setup == setup && (math.IsNaN(best) || math.Abs(math.Log10(r.DensityCm3)) < math.Abs(math.Log10(best))) {
			best = r.DensityCm3
		}
	}
	return best
}

// energyFigure draws, for one set-up at the density closest to 1 cm^-3,
// where each scheme puts the energy at every gas element mass: one panel
// per scheme, a stacked bar per mass.
func energyFigure(res *Result, setup string) (*Figure, error) {
	schemes := schemeOrder(res)
	n := energyDensity(res, setup)
	var masses []float64
	for _, r := range res.Energy {
		if r.Setup == setup && r.DensityCm3 == n && r.Scheme == schemes[0] {
			masses = append(masses, r.GasMassMsun)
		}
	}
	names := make([]string, len(masses))
	for i, m := range masses {
		names[i] = formatMass(m)
	}
	w := vg.Points(math.Min(22, 200/float64(max(len(masses), 1))))
	var key []keyEntry
	panels := make([]*plot.Plot, len(schemes))
	for si, name := range schemes {
		p := newPanel(name, "gas element mass [Msun]", "share of the energy")
		p.Y.Min, p.Y.Max = 0, 1.05
		nominalBars(p, names)
		var below *plotter.BarChart
		for pi, part := range energyParts {
			vals := make(plotter.Values, len(masses))
			for mi, m := range masses {
				for _, r := range res.Energy {
					if r.Scheme == name && r.Setup == setup && r.DensityCm3 == n && r.GasMassMsun == m {
						vals[mi] = math.Max(part.get(r), 0)
					}
				}
			}
			b, err := plotter.NewBarChart(vals, w)
			if err != nil {
				return nil, fmt.Errorf("energy plot: %w", err)
			}
			b.Color, _, _ = seriesStyle(pi)
			b.LineStyle.Width = 0
			if below != nil {
				b.StackOn(below)
			}
			below = b
			p.Add(b)
			if si == 0 {
				key = append(key, keyEntry{part.name, []plot.Thumbnailer{b}})
			}
		}
		panels[si] = p
	}
	fig := newFigure("energy_"+fileSafe(setup)+".png", len(schemes), 4, 3.6*vg.Inch, 3.4*vg.Inch,
		keyPanel(fmt.Sprintf("share of the energy\non %s\nat n = %s cm^-3", setup, formatNumber(n)), key), keyLabels(key), 1.8*vg.Inch)
	for i, p := range panels {
		fig.place(i, p)
	}
	return fig, nil
}

// formatMass writes a gas element mass for a category label.
func formatMass(m float64) string {
	if k := math.Log10(m); m > 0 && k == math.Round(k) {
		return decadeLabel(int(k))
	}
	return formatNumber(m)
}

// speedFigure draws stars per second for each scheme beside the touch-only
// floor, and the ratio of the two.
func speedFigure(res *Result) (*Figure, error) {
	names := make([]string, len(res.Speed))
	rate := make(plotter.Values, len(res.Speed))
	floor := make(plotter.Values, len(res.Speed))
	ratio := make(plotter.Values, len(res.Speed))
	for i, r := range res.Speed {
		names[i] = r.Scheme
		rate[i], floor[i], ratio[i] = r.StarsPerS, r.FloorStarsPerS, r.TouchRatio
	}
	w := vg.Points(math.Min(18, 240/float64(len(names))))
	p1 := newPanel(fmt.Sprintf("speed on %s, %d stars x %d neighbors", res.Speed[0].Setup, res.Speed[0].Stars, res.Speed[0].Neighbors),
		"scheme", "stars per second [1/s]")
	nominalBars(p1, names)
	var key []keyEntry
	for i, v := range []struct {
		vals plotter.Values
		name string
	}{{rate, "scheme (couple + apply)"}, {floor, "touch-only floor"}} {
		b, err := plotter.NewBarChart(v.vals, w)
		if err != nil {
			return nil, fmt.Errorf("speed plot: %w", err)
		}
		b.Color, _, _ = seriesStyle(i)
		b.LineStyle.Width = 0
		b.Offset = w * vg.Length(float64(i)-0.5)
		p1.Add(b)
		key = append(key, keyEntry{v.name, []plot.Thumbnailer{b}})
	}
	p2 := newPanel("time per star over the touch-only floor", "scheme", "touch ratio (scheme time / floor time)")
	nominalBars(p2, names)
	b, err := plotter.NewBarChart(ratio, w)
	if err != nil {
		return nil, fmt.Errorf("speed plot: %w", err)
	}
	b.Color, _, _ = seriesStyle(2)
	b.LineStyle.Width = 0
	p2.Add(b)
	fig := newFigure(SpeedFigureFile, 2, 2, 5*vg.Inch, 4.5*vg.Inch, keyPanel("key", key), keyLabels(key), 2.4*vg.Inch)
	fig.place(0, p1)
	fig.place(1, p2)
	return fig, nil
}
