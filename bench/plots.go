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
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// Figure is one PNG file: a grid of plot panels, row by row.
type Figure struct {
	// File is the PNG's file name.
	File string
	// Panels are the plots, Panels[row][col]; a nil panel leaves its tile
	// empty.
	Panels [][]*plot.Plot
	// Legend lists the legend entries, in order, of the panel that carries
	// the legend.
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
	img := vgimg.New(f.Width, f.Height)
	dc := draw.New(img)
	tiles := draw.Tiles{Rows: rows, Cols: cols, PadX: vg.Millimeter * 4, PadY: vg.Millimeter * 4,
		PadTop: vg.Millimeter * 2, PadBottom: vg.Millimeter * 2, PadLeft: vg.Millimeter * 2, PadRight: vg.Millimeter * 2}
	for r := range f.Panels {
		for c, p := range f.Panels[r] {
			if p != nil {
				p.Draw(tiles.At(dc, c, r))
			}
		}
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
// residual by set-up, the energy shares, and the speed (when measured).
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
	if f, err = energyFigure(res); err != nil {
		return nil, err
	}
	figs = append(figs, f)
	if len(res.Speed) > 0 {
		if f, err = speedFigure(res); err != nil {
			return nil, err
		}
		figs = append(figs, f)
	}
	return figs, nil
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
// mass, one log-log panel per density, a line per scheme and the analytic
// references dashed.
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
	cols := min(3, len(densities))
	rows := (len(densities) + cols - 1) / cols
	fig := &Figure{File: "momentum_" + fileSafe(setup) + ".png",
		Width: vg.Length(cols) * 4.2 * vg.Inch, Height: vg.Length(rows) * 3.6 * vg.Inch}
	fig.Panels = make([][]*plot.Plot, rows)
	for r := range fig.Panels {
		fig.Panels[r] = make([]*plot.Plot, cols)
	}
	for di, n := range densities {
		p := plot.New()
		p.Title.Text = fmt.Sprintf("%s, n = %s cm^-3", setup, formatNumber(n))
		p.X.Label.Text = "gas element mass [Msun]"
		p.Y.Label.Text = "radial momentum per SN [Msun km/s]"
		p.X.Scale, p.Y.Scale = plot.LogScale{}, plot.LogScale{}
		p.X.Tick.Marker, p.Y.Tick.Marker = plot.LogTicks{Prec: -1}, plot.LogTicks{Prec: -1}
		var ec, term plotter.XYs
		floor := math.Inf(1)
		for _, r := range res.Convergence {
			if r.Setup == setup && r.DensityCm3 == n && r.Scheme == res.Schemes[0].Name {
				ec = append(ec, plotter.XY{X: r.GasMassMsun, Y: r.EnergyConservingMsunKm})
				term = append(term, plotter.XY{X: r.GasMassMsun, Y: r.TerminalMsunKms})
				floor = math.Min(floor, 0.1*math.Min(r.EnergyConservingMsunKm, r.TerminalMsunKms))
			}
		}
		if !(floor > 0) || math.IsInf(floor, 0) {
			floor = 1
		}
		var legend []string
		add := func(name string, th ...plot.Thumbnailer) {
			if di == 0 {
				p.Legend.Add(name, th...)
				legend = append(legend, name)
			}
		}
		for si, name := range schemeOrder(res) {
			var xy plotter.XYs
			clamped := false
			for _, r := range res.Convergence {
				if r.Setup == setup && r.DensityCm3 == n && r.Scheme == name {
					y := r.RadialMomentumMsunKms
					if !(y > floor) {
						y, clamped = floor, true
					}
					xy = append(xy, plotter.XY{X: r.GasMassMsun, Y: y})
				}
			}
			if len(xy) == 0 {
				continue
			}
			line, points, err := plotter.NewLinePoints(xy)
			if err != nil {
				return nil, fmt.Errorf("momentum plot %s: %w", setup, err)
			}
			line.Color = plotutil.Color(si)
			line.Width = vg.Points(1.5)
			points.Color = plotutil.Color(si)
			points.Shape = plotutil.Shape(si)
			p.Add(line, points)
			label := name
			if clamped {
				label += " (zero: at axis floor)"
			}
			add(label, line, points)
		}
		for i, ref := range []struct {
			xy    plotter.XYs
			name  string
			color color.Color
		}{
			{ec, "energy-conserving sqrt(2E(M_ej+0.28 M_sw))", color.Black},
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
			add(ref.name, l)
		}
		// A single gas mass (a user's own gas) or equal momenta give an
		// empty log range, which the plot would widen linearly past zero:
		// widen it by a factor instead.
		widenLogRange(&p.X.Min, &p.X.Max)
		widenLogRange(&p.Y.Min, &p.Y.Max)
		p.Legend.Top, p.Legend.Left = true, true
		p.Legend.TextStyle.Font.Size = vg.Points(7)
		if di == 0 {
			fig.Legend = legend
		}
		fig.Panels[di/cols][di%cols] = p
	}
	return fig, nil
}

// widenLogRange spreads an empty positive axis range to a factor of 3 on
// each side.
func widenLogRange(lo, hi *float64) {
	if *lo == *hi && *lo > 0 {
		*lo, *hi = *lo/3, *hi*3
	}
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
			label = fmt.Sprintf("1e%d", int(v)-residualFloorDecades)
			if v == residualFloorDecades {
				label = "1"
			}
		}
		t = append(t, plot.Tick{Value: v, Label: label})
	}
	return t
}

func nominalBars(p *plot.Plot, names []string) {
	p.NominalX(names...)
	p.X.Tick.Label.Rotation = math.Pi / 6
	p.X.Tick.Label.XAlign = draw.XRight
	p.X.Tick.Label.YAlign = draw.YTop
}

// isotropyFigure draws the isotropy residual by set-up, a bar per scheme.
func isotropyFigure(res *Result) (*Figure, error) {
	setups := setupOrder(res)
	schemes := schemeOrder(res)
	p := plot.New()
	p.Title.Text = "isotropy residual by set-up (worst star)"
	p.X.Label.Text = "set-up"
	p.Y.Label.Text = "isotropy residual |sum p_j| / sum |p_j| (log scale)"
	// Head room above a residual of one keeps the legend clear of the bars.
	p.Y.Min, p.Y.Max = 0, residualFloorDecades+6
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
	fig := &Figure{File: "isotropy.png", Width: 9 * vg.Inch, Height: 5 * vg.Inch}
	w := vg.Points(math.Min(18, 360/float64(len(setups)*max(len(schemes), 1))))
	for si, name := range schemes {
		vals := make(plotter.Values, len(setups))
		for i, s := range setups {
			for _, r := range res.Isotropy {
				if r.Scheme == name && r.Setup == s {
					vals[i] = logBar(r.Residual)
				}
			}
		}
		b, err := plotter.NewBarChart(vals, w)
		if err != nil {
			return nil, fmt.Errorf("isotropy plot: %w", err)
		}
		b.Color = plotutil.Color(si)
		b.LineStyle.Width = 0
		b.Offset = w * vg.Length(float64(si)-float64(len(schemes)-1)/2)
		p.Add(b)
		p.Legend.Add(name, b)
		fig.Legend = append(fig.Legend, name)
	}
	p.Legend.Top = true
	p.Legend.TextStyle.Font.Size = vg.Points(7)
	fig.Panels = [][]*plot.Plot{{p}}
	return fig, nil
}

// referenceCase picks the case the energy figure shows: the density
// closest to 1 cm^-3 and the gas mass closest to 100 Msun, in log.
func referenceCase(res *Result) (float64, float64) {
	bestN, bestM := math.NaN(), math.NaN()
	for _, r := range res.Energy {
		if math.IsNaN(bestN) || math.Abs(math.Log10(r.DensityCm3)) < math.Abs(math.Log10(bestN)) {
			bestN = r.DensityCm3
		}
		if math.IsNaN(bestM) || math.Abs(math.Log10(r.GasMassMsun)-2) < math.Abs(math.Log10(bestM)-2) {
			bestM = r.GasMassMsun
		}
	}
	return bestN, bestM
}

// energyFigure draws stacked energy shares per scheme, one panel per
// set-up, at the reference case.
func energyFigure(res *Result) (*Figure, error) {
	setups := setupOrder(res)
	schemes := schemeOrder(res)
	n, m := referenceCase(res)
	cols := min(2, max(len(setups), 1))
	rows := max((len(setups)+cols-1)/cols, 1)
	fig := &Figure{File: "energy.png", Width: vg.Length(cols) * 5 * vg.Inch, Height: vg.Length(rows) * 4 * vg.Inch}
	fig.Panels = make([][]*plot.Plot, rows)
	for r := range fig.Panels {
		fig.Panels[r] = make([]*plot.Plot, cols)
	}
	parts := []struct {
		name string
		get  func(EnergyBudget) float64
	}{
		{"kinetic", func(e EnergyBudget) float64 { return e.Kinetic }},
		{"thermal", func(e EnergyBudget) float64 { return e.Thermal }},
		{"radiated", func(e EnergyBudget) float64 { return e.Radiated }},
		{"undeposited", func(e EnergyBudget) float64 { return e.Undeposited }},
	}
	w := vg.Points(math.Min(24, 240/float64(max(len(schemes), 1))))
	for i, s := range setups {
		p := plot.New()
		p.Title.Text = fmt.Sprintf("%s: n = %s cm^-3, gas element %s Msun", s, formatNumber(n), formatNumber(m))
		p.X.Label.Text = "scheme"
		p.Y.Label.Text = "share of the energy released"
		p.Y.Min, p.Y.Max = 0, 1.25
		nominalBars(p, schemes)
		var below *plotter.BarChart
		for pi, part := range parts {
			vals := make(plotter.Values, len(schemes))
			for si, name := range schemes {
				for _, r := range res.Energy {
					if r.Scheme == name && r.Setup == s && r.DensityCm3 == n && r.GasMassMsun == m {
						vals[si] = math.Max(part.get(r), 0)
					}
				}
			}
			b, err := plotter.NewBarChart(vals, w)
			if err != nil {
				return nil, fmt.Errorf("energy plot: %w", err)
			}
			b.Color = plotutil.Color(pi)
			b.LineStyle.Width = 0
			if below != nil {
				b.StackOn(below)
			}
			below = b
			p.Add(b)
			p.Legend.Add(part.name, b)
			if i == 0 {
				fig.Legend = append(fig.Legend, part.name)
			}
		}
		p.Legend.Top = true
		p.Legend.TextStyle.Font.Size = vg.Points(7)
		fig.Panels[i/cols][i%cols] = p
	}
	return fig, nil
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
	p1 := plot.New()
	p1.Title.Text = fmt.Sprintf("speed on %s, %d stars x %d neighbors", res.Speed[0].Setup, res.Speed[0].Stars, res.Speed[0].Neighbors)
	p1.X.Label.Text = "scheme"
	p1.Y.Label.Text = "stars per second [1/s]"
	nominalBars(p1, names)
	fig := &Figure{File: SpeedFigureFile, Width: 10 * vg.Inch, Height: 4.5 * vg.Inch}
	for i, v := range []struct {
		vals plotter.Values
		name string
	}{{rate, "scheme (couple + apply)"}, {floor, "touch-only floor"}} {
		b, err := plotter.NewBarChart(v.vals, w)
		if err != nil {
			return nil, fmt.Errorf("speed plot: %w", err)
		}
		b.Color = plotutil.Color(i)
		b.LineStyle.Width = 0
		b.Offset = w * vg.Length(float64(i)-0.5)
		p1.Add(b)
		p1.Legend.Add(v.name, b)
		fig.Legend = append(fig.Legend, v.name)
	}
	p1.Legend.Top = true
	p1.Legend.TextStyle.Font.Size = vg.Points(7)
	p2 := plot.New()
	p2.Title.Text = "time per star over the touch-only floor"
	p2.X.Label.Text = "scheme"
	p2.Y.Label.Text = "touch ratio (scheme time / floor time)"
	nominalBars(p2, names)
	b, err := plotter.NewBarChart(ratio, w)
	if err != nil {
		return nil, fmt.Errorf("speed plot: %w", err)
	}
	b.Color = plotutil.Color(2)
	b.LineStyle.Width = 0
	p2.Add(b)
	fig.Panels = [][]*plot.Plot{{p1, p2}}
	return fig, nil
}
