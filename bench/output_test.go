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
	res, err := Run(s, Options{})
	require.NoError(t, err)
	return res
}

func TestFiguresAreLabelled(t *testing.T) {
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
	require.Contains(t, files, "energy.png")
	require.Contains(t, files, "speed.png")

	m := files["momentum_interface.png"]
	require.Len(t, m.Panels, 1)
	require.Len(t, m.Panels[0], 2, "one panel per density")
	p := m.Panels[0][0]
	assert.Equal(t, "gas element mass [Msun]", p.X.Label.Text)
	assert.Equal(t, "radial momentum per SN [Msun km/s]", p.Y.Label.Text)
	assert.Contains(t, p.Title.Text, "n = 1 cm^-3")
	// A line per scheme plus the two analytic references.
	require.Len(t, m.Legend, len(Schemes())+2)
	assert.True(t, strings.HasPrefix(m.Legend[0], "thermal-dump"))
	assert.Contains(t, m.Legend[0], "axis floor", "a thermal dump's zero momentum is drawn at the floor, and says so")
	assert.Contains(t, m.Legend[len(m.Legend)-2], "energy-conserving")
	assert.Contains(t, m.Legend[len(m.Legend)-1], "terminal momentum (kim-ostriker-2015)")

	assert.Contains(t, files["isotropy.png"].Panels[0][0].Y.Label.Text, "isotropy residual")
	assert.Len(t, files["isotropy.png"].Legend, len(Schemes()))
	assert.Equal(t, []string{"kinetic", "thermal", "radiated", "undeposited"}, files["energy.png"].Legend)
	assert.Equal(t, "share of the energy released", files["energy.png"].Panels[0][0].Y.Label.Text)
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
	assert.Equal(t, 2+3, pngs, "two momentum figures, isotropy, energy, speed")

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
