package bench

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
)

// smallResult runs two set-ups at two densities and three resolutions,
// with a brief speed measurement, for the output tests.
func smallResult(t *testing.T) *Result {
	t.Helper()
	s := QuickSuite()
	var err error
	s.Setups, err = SelectSetups([]string{"interface", "clumpy-cloud"})
	require.NoError(t, err)
	s.DensitiesCm3 = []float64{1, 100}
	s.GasMassesMsun = []float64{1, 100, 1e4}
	s.Speed.Stars, s.Speed.MinDuration, s.Speed.MinRounds = 16, time.Millisecond, 1
	s.Outcome = OutcomeSpec{}
	res, err := Run(s, Options{})
	require.NoError(t, err)
	return res
}

func TestFiguresAreLabeled(t *testing.T) {
	res := smallResult(t)
	figs, err := Figures(res)
	require.NoError(t, err)
	files := map[string]*Figure{}
	for _, f := range figs {
		files[f.File] = f
		for _, row := range f.Panels {
			for _, p := range row {
				if p == nil {
					continue
				}
				assert.NotEmpty(t, p.Title.Text, f.File)
				assert.NotEmpty(t, p.X.Label.Text, f.File)
				assert.NotEmpty(t, p.Y.Label.Text, f.File)
			}
		}
	}
	require.Contains(t, files, "momentum_interface.png")
	require.Contains(t, files, "momentum_clumpy-cloud.png")
	require.Contains(t, files, "isotropy.png")
	require.Contains(t, files, "energy_interface.png")
	require.Contains(t, files, "energy_clumpy-cloud.png")
	require.Contains(t, files, "speed.png")

	m := files["momentum_interface.png"]
	require.Len(t, m.Panels, 1)
	require.Len(t, m.Panels[0], 2, "one panel per density")
	p := m.Panels[0][0]
	assert.Equal(t, "gas element mass [Msun]", p.X.Label.Text)
	assert.Equal(t, "radial momentum per SN [Msun km/s]", p.Y.Label.Text)
	assert.Contains(t, p.Title.Text, "n = 1 cm^-3")
	// A line per scheme, the two analytic references and the cooling-mass
	// mark, in a key of their own; a scheme that gives no radial momentum
	// says "zero" in words instead of being drawn on the log axis.
	require.Len(t, m.Legend, len(Schemes())+3)
	require.NotNil(t, m.Key)
	assert.True(t, strings.HasPrefix(m.Legend[0], "thermal-dump"))
	assert.Contains(t, m.Legend[0], "zero at every mass (not drawn)")
	assert.Contains(t, m.Legend[len(m.Legend)-3], "energy-conserving")
	assert.Contains(t, m.Legend[len(m.Legend)-2], "terminal momentum (kim-ostriker-2015)")
	assert.Contains(t, m.Legend[len(m.Legend)-1], "cooling mass")
	// Tick labels follow one rule on every log axis: no "e+", no long runs
	// of zeros.
	for _, tk := range p.X.Tick.Marker.Ticks(1, 1e5) {
		assert.NotContains(t, tk.Label, "+")
		assert.NotContains(t, tk.Label, "0000")
	}

	assert.Contains(t, files["isotropy.png"].Panels[0][0].Y.Label.Text, "isotropy residual")
	assert.Len(t, files["isotropy.png"].Legend, len(Schemes()))
	e := files["energy_interface.png"]
	assert.Equal(t, []string{"kinetic", "thermal", "radiated", "undeposited"}, e.Legend)
	assert.Equal(t, "share of the energy", e.Panels[0][0].Y.Label.Text)
	assert.Equal(t, "gas element mass [Msun]", e.Panels[0][0].X.Label.Text, "the energy split across resolutions")
	sp := files["speed.png"]
	assert.Equal(t, "stars per second [1/s]", sp.Panels[0][0].Y.Label.Text)
	assert.Contains(t, sp.Panels[0][1].Y.Label.Text, "touch ratio")
	assert.Equal(t, []string{"scheme (couple + apply)", "touch-only floor"}, sp.Legend)
}

func TestWriteResults(t *testing.T) {
	res := smallResult(t)
	dir := filepath.Join(t.TempDir(), "out")
	files, err := WriteResults(dir, res)
	require.NoError(t, err)
	pngs := 0
	for _, p := range files {
		st, err := os.Stat(p)
		require.NoError(t, err)
		assert.Positive(t, st.Size())
		if filepath.Ext(p) != ".png" {
			continue
		}
		pngs++
		b, err := os.ReadFile(p)
		require.NoError(t, err)
		img, err := png.Decode(bytes.NewReader(b))
		require.NoError(t, err, p)
		assert.GreaterOrEqual(t, img.Bounds().Dx(), 500, p)
		assert.GreaterOrEqual(t, img.Bounds().Dy(), 300, p)
		assert.Greater(t, len(b), 10000, "%s is more than a blank image", p)
	}
	assert.Equal(t, 2+1+2+1, pngs, "two momentum figures, isotropy, two energy figures, speed")

	// results.json carries the documented keys.
	b, err := os.ReadFile(filepath.Join(dir, ResultsFile))
	require.NoError(t, err)
	var doc map[string][]map[string]any
	var raw map[string]json.RawMessage
	require.NoError(t, json.Unmarshal(b, &raw))
	doc = map[string][]map[string]any{}
	for _, k := range []string{"convergence", "isotropy", "energy", "speed"} {
		var rows []map[string]any
		require.NoError(t, json.Unmarshal(raw[k], &rows), k)
		require.NotEmpty(t, rows, k)
		doc[k] = rows
	}
	want := map[string][]string{
		"convergence": {"scheme", "setup", "density_cm3", "gas_mass_msun", "radial_momentum_msun_kms", "energy_conserving_msun_kms", "terminal_msun_kms"},
		"isotropy":    {"scheme", "setup", "residual"},
		"energy":      {"scheme", "setup", "kinetic", "thermal", "radiated", "undeposited"},
		"speed":       {"scheme", "stars_per_s", "touch_ratio"},
	}
	for table, keys := range want {
		for _, k := range keys {
			assert.Contains(t, doc[table][0], k, "%s.%s", table, k)
		}
	}
	var back Result
	require.NoError(t, json.Unmarshal(b, &back))
	assert.Equal(t, res.Convergence, back.Convergence)
	for _, r := range back.Speed {
		assert.Positive(t, r.StarsPerS)
		assert.Positive(t, r.TouchRatio)
	}

	// One CSV per table, a header and a line per row.
	for name, n := range map[string]int{ConvergenceFile: len(res.Convergence), IsotropyFile: len(res.Isotropy),
		EnergyFile: len(res.Energy), SpeedFile: len(res.Speed)} {
		f, err := os.Open(filepath.Join(dir, name))
		require.NoError(t, err)
		recs, err := csv.NewReader(f).ReadAll()
		f.Close()
		require.NoError(t, err, name)
		assert.Len(t, recs, n+1, name)
		assert.Equal(t, "scheme", recs[0][0], name)
	}
}

func TestWriteResultsErrors(t *testing.T) {
	_, err := WriteResults(t.TempDir(), nil)
	assert.Error(t, err)
	// A file where the directory should be.
	blocker := filepath.Join(t.TempDir(), "file")
	require.NoError(t, os.WriteFile(blocker, nil, 0o644))
	_, err = WriteResults(filepath.Join(blocker, "out"), &Result{})
	assert.Error(t, err)
}

// A run without a speed measurement writes no speed table or plot and
// removes those of an earlier run; a single gas mass (a user's own gas)
// still plots on log axes; a set-up with one-sided stars says so under
// its isotropy bars.
func TestWriteResultsSingleCaseWithoutSpeed(t *testing.T) {
	c := build(t, "uniform-lattice", CaseSpec{DensityCm3: 1, GasMassMsun: 10, Elements: 512, Seed: 1})
	schemes, err := SelectSchemes([]string{"terminal-momentum", "thermal-dump"})
	require.NoError(t, err)
	dir := t.TempDir()
	withSpeed, err := RunCase(c, 16, SpeedSpec{Stars: 1, MinRounds: 1}, Options{Schemes: schemes})
	require.NoError(t, err)
	require.NotEmpty(t, withSpeed.Speed)
	_, err = WriteResults(dir, withSpeed)
	require.NoError(t, err)
	require.FileExists(t, filepath.Join(dir, SpeedFile))
	require.FileExists(t, filepath.Join(dir, SpeedFigureFile))

	// The same star moved to a corner of the lattice, outside its first
	// element: all its gas on one side.
	corner := *c
	corner.Stars = []feedback.Star{c.Stars[0]}
	corner.Stars[0].Pos = [3]float64{}
	corner.Box = neighbor.Box{}
	res, err := RunCase(&corner, 16, SpeedSpec{}, Options{Schemes: schemes})
	require.NoError(t, err)
	require.Empty(t, res.Speed)
	for _, r := range res.Isotropy {
		assert.Equal(t, 1, r.OneSidedStars)
	}
	files, err := WriteResults(dir, res)
	require.NoError(t, err)
	assert.NoFileExists(t, filepath.Join(dir, SpeedFile))
	assert.NoFileExists(t, filepath.Join(dir, SpeedFigureFile))
	for _, f := range files {
		assert.NotContains(t, f, "speed")
	}
	assert.FileExists(t, filepath.Join(dir, "momentum_uniform-lattice.png"))
	figs, err := Figures(res)
	require.NoError(t, err)
	for _, f := range figs {
		if f.File == "isotropy.png" {
			x := f.Panels[0][0].X
			ticks := x.Tick.Marker.Ticks(x.Min, x.Max)
			require.NotEmpty(t, ticks)
			assert.Contains(t, ticks[0].Label, "1 one-sided")
		}
	}
}

func TestOutcomeInResults(t *testing.T) {
	if testing.Short() {
		t.Skip("a 1D reference and six 3D cases")
	}
	s := QuickSuite()
	var err error
	s.Setups, err = SelectSetups([]string{"uniform-lattice"})
	require.NoError(t, err)
	s.DensitiesCm3, s.GasMassesMsun, s.Speed.Stars = []float64{1}, []float64{100}, 0
	s.Outcome = OutcomeSpec{DensitiesCm3: []float64{100}, CellMassRatios: []float64{0.1, 10}, ShellTimes: []float64{3},
		SliceCellMassRatio: 0.1, SliceShellTime: 3}
	schemes, err := SelectSchemes([]string{"thermal-dump", "terminal-momentum"})
	require.NoError(t, err)
	var calls, last, total int
	res, err := Run(s, Options{Schemes: schemes, Workers: 2, Progress: func(d, n int) { calls, last, total = calls+1, d, n }})
	require.NoError(t, err)
	// Two schemes and the terminal-momentum scheme with the table the 1D
	// reference calibrates, at two resolutions.
	require.Len(t, res.Outcome, 6)
	assert.Equal(t, total, last, "the progress reaches its total")
	assert.Greater(t, calls, 4, "the progress moves while the 3D cases run")
	require.Len(t, res.Slices, 3)
	require.Len(t, res.References, 1)

	dir := t.TempDir()
	files, err := WriteResults(dir, res)
	require.NoError(t, err)
	for _, name := range []string{OutcomeTableFile, OutcomeHistoryTableFile, OutcomeFigureFile, OutcomeHistoryFile,
		"outcome_density_n100.png", "outcome_temperature_n100.png"} {
		assert.Contains(t, files, filepath.Join(dir, name))
	}
	// results.json: outcome rows with the documented keys; the CSV beside.
	b, err := os.ReadFile(filepath.Join(dir, ResultsFile))
	require.NoError(t, err)
	var doc struct {
		Outcome []map[string]any `json:"outcome"`
	}
	require.NoError(t, json.Unmarshal(b, &doc))
	require.Len(t, doc.Outcome, 6)
	for _, k := range []string{"scheme", "density_cm3", "cell_mass_msun", "cell_mass_over_cooling_mass",
		"time_over_shell_formation", "radial_momentum_msun_kms", "reference_momentum_msun_kms",
		"kinetic_share", "thermal_share", "radiated_share", "reference_kinetic_share"} {
		assert.Contains(t, doc.Outcome[0], k)
	}
	f, err := os.Open(filepath.Join(dir, OutcomeTableFile))
	require.NoError(t, err)
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	require.NoError(t, err)
	require.Len(t, rows, 7)
	assert.Equal(t, "scheme", rows[0][0])
	for _, o := range res.Outcome {
		if o.Scheme == "thermal-dump" && o.CellMassOverCoolingMass == 10 {
			assert.Less(t, o.MomentumRatio(), 0.3, "a thermal dump overcools in cells of 10 cooling masses")
		}
	}
	// Written again without the outcome, the folder keeps no outcome files.
	s2 := *res
	s2.Outcome, s2.OutcomeHistory, s2.References, s2.Slices = nil, nil, nil, nil
	_, err = WriteResults(dir, &s2)
	require.NoError(t, err)
	stale, _ := filepath.Glob(filepath.Join(dir, "outcome*"))
	assert.Empty(t, stale)
}

func TestSinglePointFigureIsReadable(t *testing.T) {
	// A user's own gas gives one gas mass at one density: the momentum
	// figure spans a decade around it with labelled ticks, not an empty
	// range.
	res := smallResult(t)
	var rows []Convergence
	for _, r := range res.Convergence {
		if r.DensityCm3 == 1 && r.GasMassMsun == 100 && r.Setup == "interface" {
			rows = append(rows, r)
		}
	}
	res.Convergence = rows
	f, err := momentumFigure(res, "interface")
	require.NoError(t, err)
	p := f.Panels[0][0]
	require.NotNil(t, p)
	// The axis ranges are set when the panel is drawn.
	require.NoError(t, f.SavePNG(filepath.Join(t.TempDir(), "one.png")))
	assert.GreaterOrEqual(t, p.X.Max/p.X.Min, 10.0)
	labelled := 0
	for _, tk := range p.X.Tick.Marker.Ticks(p.X.Min, p.X.Max) {
		if tk.Label != "" {
			labelled++
		}
	}
	assert.GreaterOrEqual(t, labelled, 1)
}
