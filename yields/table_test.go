package yields

import (
	"bytes"
	"flag"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/interp"
)

var update = flag.Bool("update", false, "rewrite testdata/yields/example_table.csv from the built-in population")

const exampleTablePath = "../testdata/yields/example_table.csv"

func mustSpecies(list string) SpeciesSet {
	s, err := ParseSpeciesSet(list)
	if err != nil {
		panic(err)
	}
	return s
}

// exampleLayout is the grid of the shipped example table: 4 ages per decade
// from 0.1 Myr to 13.8 Gyr, three metallicities, oxygen and iron.
func exampleLayout() TableLayout {
	var ages []float64
	for a := 0.1; a < HubbleTime; a *= math.Pow(10, 0.25) {
		ages = append(ages, a)
	}
	ages = append(ages, HubbleTime)
	return TableLayout{
		Ages:          ages,
		Metallicities: []float64{0.001, 0.0134, 0.03},
		Species:       mustSpecies("O,Fe"),
		Digits:        7,
	}
}

// The committed example table is what the built-in Kroupa population writes
// (run with -update to regenerate it after a model change).
func TestExampleTableUpToDate(t *testing.T) {
	p := newTestPopulation(t, Kroupa)
	var buf bytes.Buffer
	require.NoError(t, WriteTable(&buf, p, exampleLayout()))
	if *update {
		require.NoError(t, os.WriteFile(exampleTablePath, buf.Bytes(), 0o644))
	}
	got, err := os.ReadFile(exampleTablePath)
	require.NoError(t, err)
	assert.Equal(t, buf.String(), string(got), "example table out of date: go test ./yields -run ExampleTableUpToDate -update")
	tab, err := ReadTableFile(exampleTablePath)
	require.NoError(t, err)
	assert.Len(t, tab.Metallicities(), 3)
}

// Written exactly and read back, a table reproduces the population at its
// grid points, and its releases add up over consecutive intervals.
func TestTableRoundTrip(t *testing.T) {
	p := newTestPopulation(t, Salpeter)
	layout := exampleLayout()
	layout.Digits = 0
	layout.Species = SpeciesSet{}
	var buf bytes.Buffer
	require.NoError(t, WriteTable(&buf, p, layout))
	tab, err := ReadTable(&buf)
	require.NoError(t, err)
	for _, z := range layout.Metallicities {
		for i := 0; i+1 < len(layout.Ages); i += 3 {
			a0, a1 := layout.Ages[i], layout.Ages[i+1]
			want, err := p.Release(a0, a1, z)
			require.NoError(t, err)
			got, err := tab.Release(a0, a1, z)
			require.NoError(t, err)
			// A release is a difference of two cumulative values: it can
			// carry the round-off of the cumulative value, a few ulp of it.
			cum, err := p.Release(0, a1, z)
			require.NoError(t, err)
			wf, gf, cf := flatten(want), flatten(got), flatten(cum)
			for j := range wf {
				assert.InDelta(t, wf[j], gf[j], 1e-12*math.Abs(wf[j])+1e-15*math.Abs(cf[j])+1e-300, "Z=%g [%g,%g] term %d", z, a0, a1, j)
			}
			l, err := tab.Luminosity(a0, z)
			require.NoError(t, err)
			lw, _ := p.Luminosity(a0, z)
			assert.InEpsilon(t, lw, l, 1e-14)
			f, err := tab.FarUltravioletLuminosity(a0, z)
			require.NoError(t, err)
			fw, _ := p.FarUltravioletLuminosity(a0, z)
			assert.InEpsilon(t, fw, f, 1e-14)
			if e := got.Channels[MassiveWinds]; e.Mass > 0 {
				assert.InEpsilon(t, p.cfg.MassiveWinds.Speed, e.WindSpeed, 1e-9)
			}
		}
	}
	// Additivity between grid points and off the grid.
	edges := []float64{0, 0.05, 0.3, 2.2, 3.7, 9.9, 41, 333, 13000, 20000}
	whole, err := tab.Release(edges[0], edges[len(edges)-1], 0.005)
	require.NoError(t, err)
	sum := make([]float64, len(flatten(whole)))
	for i := 0; i+1 < len(edges); i++ {
		r, err := tab.Release(edges[i], edges[i+1], 0.005)
		require.NoError(t, err)
		for j, v := range flatten(r) {
			assert.GreaterOrEqual(t, v, 0.0)
			sum[j] += v
		}
	}
	for j, w := range flatten(whole) {
		assert.InDelta(t, w, sum[j], 1e-12*math.Abs(w)+1e-300, "term %d", j)
	}
}

// Between grid points the table interpolates linearly in log age; gonum's
// interp.PiecewiseLinear on (ln age, value) is the independent reference.
func TestTableInterpolationMatchesGonum(t *testing.T) {
	tab, err := ReadTableFile(exampleTablePath)
	require.NoError(t, err)
	ages := tab.Ages()
	xs := make([]float64, len(ages))
	ys := make([]float64, len(ages))
	const z = 0.0134 // a grid metallicity: no Z interpolation
	for i, a := range ages {
		xs[i] = math.Log(a)
		r, err := tab.Release(0, a, z)
		require.NoError(t, err)
		ys[i] = r.Channels[CoreCollapse].Events
	}
	var pl interp.PiecewiseLinear
	require.NoError(t, pl.Fit(xs, ys))
	for _, a := range []float64{0.13, 3.3, 7.7, 25, 180, 4000} {
		r, err := tab.Release(0, a, z)
		require.NoError(t, err)
		assert.InDelta(t, pl.Predict(math.Log(a)), r.Channels[CoreCollapse].Events, 1e-15, "age %g", a)
	}
}

func TestTableZeroCopyAndNoAllocation(t *testing.T) {
	tab, err := ReadTableFile(exampleTablePath)
	require.NoError(t, err)
	a := tab.Ages()
	a[0] = -1
	assert.Positive(t, tab.Ages()[0])
	allocs := testing.AllocsPerRun(100, func() { _, _ = tab.Release(3, 4, 0.01) })
	assert.Zero(t, allocs)
}

const goodTable = `# a two-age, one-metallicity table
age[Myr],metallicity[mass_fraction],luminosity[Lsun/Msun],ionizing_rate[photons/s/Msun],radiant_energy[erg/Msun],ionizing_photons[photons/Msun],ccsn_events[1/Msun],ccsn_mass[Msun/Msun],ccsn_energy[erg/Msun],ccsn_z[Msun/Msun],ccsn_h[Msun/Msun],ccsn_he[Msun/Msun],snia_events[1/Msun],snia_mass[Msun/Msun],snia_energy[erg/Msun],snia_z[Msun/Msun],snia_h[Msun/Msun],snia_he[Msun/Msun],massive_wind_mass[Msun/Msun],massive_wind_energy[erg/Msun],massive_wind_z[Msun/Msun],massive_wind_h[Msun/Msun],massive_wind_he[Msun/Msun],agb_wind_mass[Msun/Msun],agb_wind_energy[erg/Msun],agb_wind_z[Msun/Msun],agb_wind_h[Msun/Msun],agb_wind_he[Msun/Msun]
1,0.02,1000,3e46,1e50,1e59,0,0,0,0,0,0,0,0,0,0,0,0,0.001,4e46,0.00002,0.0007,0.00028,0,0,0,0,0
10,0.02,500,1e46,2e50,5e59,0.005,0.05,5e48,0.01,0.028,0.012,0,0,0,0,0,0,0.002,8e46,0.00004,0.0014,0.00056,0,0,0,0,0
`

// Each defect is rejected, and the error names the line it is on.
func TestReadTableRejectsMalformed(t *testing.T) {
	lines := strings.Split(goodTable, "\n")
	replace := func(line int, from, to string) string {
		l := append([]string(nil), lines...)
		l[line-1] = strings.Replace(l[line-1], from, to, 1)
		return strings.Join(l, "\n")
	}
	tests := []struct {
		name, input, wantLine, wantText string
	}{
		{"short row", replace(3, "1000,", ""), "line 3", "wrong number of fields"},
		{"missing required column", strings.Replace(strings.Replace(goodTable, ",agb_wind_he[Msun/Msun]", "", 1), ",0\n", "\n", 2), "line 2", "missing column agb_wind_he"},
		{"wrong unit", replace(2, "age[Myr]", "age[Gyr]"), "line 2", `unit "Gyr"`},
		{"no unit", replace(2, "age[Myr]", "age"), "line 2", "name[unit]"},
		{"unknown column", replace(2, "ccsn_z[", "ccsn_zz["), "line 2", "unknown quantity"},
		{"NaN", replace(4, "500", "NaN"), "line 4", "finite"},
		{"negative", replace(3, "1000", "-1000"), "line 3", "finite value >= 0"},
		{"not a number", replace(3, "1000", "lots"), "line 3", "not a number"},
		{"non-monotonic ages", replace(4, "10,", "0.5,"), "line 4", "does not rise"},
		{"negative rate", replace(4, "2e50", "0.5e50"), "line 4", "negative rate"},
		{"species do not add up", replace(4, "0.028", "0.03"), "line 4", "H + He + metals"},
		{"zero age", replace(3, "1,0.02", "0,0.02"), "line 3", "want > 0"},
		{"metallicity 1", replace(3, "1,0.02", "1,1"), "line 3", "metallicity"},
		{"empty", "", "", "empty"},
		{"header only", lines[0] + "\n" + lines[1] + "\n", "line 2", "no data rows"},
		{"one age", strings.Join(lines[:3], "\n"), "line 3", "at least two ages"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadTable(strings.NewReader(tc.input))
			require.Error(t, err)
			assert.ErrorIs(t, err, ErrTable)
			assert.Contains(t, err.Error(), tc.wantLine)
			assert.Contains(t, err.Error(), tc.wantText)
		})
	}
	_, err := ReadTable(strings.NewReader(goodTable))
	require.NoError(t, err)
	_, err = ReadTableFile(filepath.Join(t.TempDir(), "absent.csv"))
	assert.Error(t, err)
}

// The far-ultraviolet columns are optional: a table without them loads and
// gives no far-ultraviolet light (and is written back without them); a
// table with them interpolates them like the other light columns; one of
// the pair alone, or a falling cumulative energy, is an error.
func TestTableFarUltravioletColumns(t *testing.T) {
	tab, err := ReadTable(strings.NewReader(goodTable))
	require.NoError(t, err)
	assert.False(t, tab.HasFarUltraviolet())
	f, err := tab.FarUltravioletLuminosity(3, 0.02)
	require.NoError(t, err)
	assert.Zero(t, f)
	r, err := tab.Release(0, 10, 0.02)
	require.NoError(t, err)
	assert.Zero(t, r.FarUltravioletEnergy)
	assert.Positive(t, r.RadiantEnergy)
	var buf bytes.Buffer
	require.NoError(t, WriteTable(&buf, tab, TableLayout{Ages: []float64{1, 10}, Metallicities: []float64{0.02}}))
	assert.NotContains(t, buf.String(), "fuv_")

	lines := strings.Split(goodTable, "\n")
	withFUV := func(lum1, lum2, e1, e2 string) string {
		l := append([]string(nil), lines...)
		l[1] += ",fuv_luminosity[Lsun/Msun],fuv_energy[erg/Msun]"
		l[2] += "," + lum1 + "," + e1
		l[3] += "," + lum2 + "," + e2
		return strings.Join(l, "\n")
	}
	tab, err = ReadTable(strings.NewReader(withFUV("400", "200", "4e49", "8e49")))
	require.NoError(t, err)
	assert.True(t, tab.HasFarUltraviolet())
	// Linear in log age between the grid points 1 and 10 Myr.
	f, err = tab.FarUltravioletLuminosity(math.Sqrt(10), 0.02)
	require.NoError(t, err)
	assert.InEpsilon(t, 300, f, 1e-12)
	r, err = tab.Release(1, 10, 0.02)
	require.NoError(t, err)
	assert.InEpsilon(t, 4e49, r.FarUltravioletEnergy, 1e-12)

	_, err = ReadTable(strings.NewReader(withFUV("400", "200", "8e49", "4e49")))
	require.Error(t, err)
	assert.Contains(t, err.Error(), "line 4")
	assert.Contains(t, err.Error(), "negative rate")
	onlyOne := append([]string(nil), lines...)
	onlyOne[1] += ",fuv_luminosity[Lsun/Msun]"
	onlyOne[2] += ",400"
	onlyOne[3] += ",200"
	_, err = ReadTable(strings.NewReader(strings.Join(onlyOne, "\n")))
	require.Error(t, err)
	assert.Contains(t, err.Error(), "line 2")
	assert.Contains(t, err.Error(), "both or neither")
}

func TestTableGridChecks(t *testing.T) {
	p := newTestPopulation(t, Kroupa)
	var buf bytes.Buffer
	require.NoError(t, WriteTable(&buf, p, TableLayout{Ages: []float64{1, 10, 100}, Metallicities: []float64{0.01, 0.02}, Digits: 8}))
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
	// Blocks out of order.
	swapped := append([]string{lines[0]}, append(append([]string{}, lines[4:7]...), lines[1:4]...)...)
	_, err := ReadTable(strings.NewReader(strings.Join(swapped, "\n")))
	require.Error(t, err)
	assert.Contains(t, err.Error(), "line 5")
	// Ragged grid: one row missing in the second block.
	ragged := append([]string{}, lines[:6]...)
	_, err = ReadTable(strings.NewReader(strings.Join(ragged, "\n")))
	require.Error(t, err)
	assert.Contains(t, err.Error(), "equal size")
	// A different age grid in the second block.
	diff := append([]string{}, lines...)
	diff[5] = strings.Replace(diff[5], "10,", "11,", 1)
	_, err = ReadTable(strings.NewReader(strings.Join(diff, "\n")))
	require.Error(t, err)
	assert.Contains(t, err.Error(), "line 6")
	require.Error(t, WriteTable(&buf, p, TableLayout{Ages: []float64{1}}))
}

// FuzzReadTable: no input makes ReadTable panic, and any table it accepts
// gives finite, non-negative, additive releases.
func FuzzReadTable(f *testing.F) {
	f.Add([]byte(goodTable))
	lines := strings.Split(goodTable, "\n")
	lines[1] += ",fuv_luminosity[Lsun/Msun],fuv_energy[erg/Msun]"
	lines[2] += ",400,4e49"
	lines[3] += ",200,8e49"
	f.Add([]byte(strings.Join(lines, "\n")))
	f.Add([]byte("age[Myr],metallicity[mass_fraction]\n1,0.02\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		tab, err := ReadTable(bytes.NewReader(data))
		if err != nil {
			return
		}
		for _, z := range []float64{0, 0.001, 0.02, 0.5} {
			r1, err := tab.Release(0, 5, z)
			require.NoError(t, err)
			r2, err := tab.Release(5, 50, z)
			require.NoError(t, err)
			r, err := tab.Release(0, 50, z)
			require.NoError(t, err)
			a, b, c := flatten(r1), flatten(r2), flatten(r)
			for j := range c {
				require.False(t, math.IsNaN(c[j]) || math.IsInf(c[j], 0), "term %d", j)
				require.GreaterOrEqual(t, a[j], 0.0)
				require.GreaterOrEqual(t, b[j], 0.0)
				require.InDelta(t, c[j], a[j]+b[j], 1e-9*math.Abs(c[j])+1e-300, "term %d", j)
			}
		}
	})
}
