package feedback

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// testRemnantRows is a 3 x 2 grid whose momenta and radii follow power laws
// in density and metallicity, so log-bilinear interpolation is exact.
func testRemnantRows() []RemnantTableRow {
	var rows []RemnantTableRow
	for _, z := range []float64{0.1, 1} {
		for _, n := range []float64{0.1, 1, 10} {
			rows = append(rows, RemnantTableRow{
				Density: n, Metallicity: z, Energy: 1e51,
				ShellTime: 44 * math.Pow(n, -0.55), ShellRadius: 22 * math.Pow(n, -0.42) * math.Pow(z, -0.1),
				ShellMass: 1500 * math.Pow(n, -0.26), ShellMomentum: 2e5 * math.Pow(n, -0.13) * math.Pow(z, -0.2),
				LateTime: 440 * math.Pow(n, -0.55), LateMass: 9000 * math.Pow(n, -0.26), LateMomentum: 2.6e5 * math.Pow(n, -0.13) * math.Pow(z, -0.2),
			})
		}
	}
	return rows
}

func TestRemnantTableRoundTrip(t *testing.T) {
	var sb strings.Builder
	rows := testRemnantRows()
	require.NoError(t, WriteRemnantTable(&sb, []string{"test grid", "two lines"}, rows))
	tab, err := ReadRemnantTable(strings.NewReader(sb.String()))
	require.NoError(t, err)
	assert.Equal(t, rows, tab.Rows())
	assert.Equal(t, 1e51, tab.Energy())
	// Grid points come back exactly (to round-off of exp(log)).
	for _, r := range rows {
		rem, err := tab.Remnant(r.Energy, r.Density, r.Metallicity*yields.SolarMetals)
		require.NoError(t, err)
		assert.InEpsilon(t, r.ShellMomentum*units.MsunKms, rem.SwitchMomentum, 1e-13)
		assert.InEpsilon(t, r.ShellMass*units.SolarMass, rem.SwitchMass, 1e-13)
		assert.InEpsilon(t, r.ShellRadius*units.Parsec, rem.CoolingRadius, 1e-13)
		assert.InEpsilon(t, r.LateMomentum*units.MsunKms, rem.TerminalMomentum, 1e-13)
		// Past the switch the momentum grows with the swept mass to reach
		// the late momentum at the late mass.
		p, _, radiative := rem.MomentumAt(r.Energy, 3*units.SolarMass, r.LateMass*units.SolarMass)
		assert.True(t, radiative)
		assert.InEpsilon(t, r.LateMomentum*units.MsunKms, p, 1e-12)
	}
	// Between grid points the power laws are reproduced.
	n, z := 3.7, 0.42
	rem, err := tab.Remnant(1e51, n, z*yields.SolarMetals)
	require.NoError(t, err)
	assert.InEpsilon(t, 2e5*math.Pow(n, -0.13)*math.Pow(z, -0.2)*units.MsunKms, rem.SwitchMomentum, 1e-12)
	assert.InEpsilon(t, 22*math.Pow(n, -0.42)*math.Pow(z, -0.1)*units.Parsec, rem.CoolingRadius, 1e-12)
	// Other energies scale with the Kim & Ostriker 2015 exponents.
	rem2, err := tab.Remnant(2e51, n, z*yields.SolarMetals)
	require.NoError(t, err)
	assert.InEpsilon(t, math.Pow(2, 0.93), rem2.SwitchMomentum/rem.SwitchMomentum, 1e-12)
	assert.InEpsilon(t, math.Pow(2, 0.87), rem2.SwitchMass/rem.SwitchMass, 1e-12)
	assert.InEpsilon(t, math.Pow(2, 0.29), rem2.CoolingRadius/rem.CoolingRadius, 1e-12)
}

func TestRemnantTableOutsideGrid(t *testing.T) {
	var sb strings.Builder
	require.NoError(t, WriteRemnantTable(&sb, nil, testRemnantRows()))
	tab, err := ReadRemnantTable(strings.NewReader(sb.String()))
	require.NoError(t, err)
	for _, in := range [][2]float64{{0.05, 1}, {20, 1}, {1, 0.01}, {1, 2}, {1, 0}} {
		_, err := tab.Remnant(1e51, in[0], in[1]*yields.SolarMetals)
		assert.ErrorIs(t, err, ErrOutsideRemnantTable, "n=%v Z=%v", in[0], in[1])
	}
	for _, in := range [][2]float64{{math.NaN(), 1}, {0, 1}, {-1, 1}, {1, -0.1}, {1, math.Inf(1)}} {
		_, err := tab.Remnant(1e51, in[0], in[1]*yields.SolarMetals)
		assert.ErrorIs(t, err, ErrBadValue, "n=%v Z=%v", in[0], in[1])
	}
	_, err = tab.Remnant(math.NaN(), 1, 1)
	assert.ErrorIs(t, err, ErrBadValue)
	clamp := tab.WithOutsideGrid(ClampToGrid)
	lo, err := clamp.Remnant(1e51, 0.01, 0)
	require.NoError(t, err)
	edge, err := clamp.Remnant(1e51, 0.1, 0.1*yields.SolarMetals)
	require.NoError(t, err)
	assert.Equal(t, edge, lo)
	hi, err := clamp.Remnant(1e51, 1e3, 5*yields.SolarMetals)
	require.NoError(t, err)
	edge, err = clamp.Remnant(1e51, 10, yields.SolarMetals)
	require.NoError(t, err)
	assert.Equal(t, edge, hi)
	// The original still refuses.
	_, err = tab.Remnant(1e51, 1e3, yields.SolarMetals)
	assert.ErrorIs(t, err, ErrOutsideRemnantTable)
}

func TestRemnantTableErrors(t *testing.T) {
	h := RemnantTableHeader + "\n"
	row := func(n, z, e float64) string {
		var sb strings.Builder
		_ = WriteRemnantTable(&sb, nil, []RemnantTableRow{{Density: n, Metallicity: z, Energy: e, ShellTime: 1, ShellRadius: 1, ShellMass: 1, ShellMomentum: 1, LateTime: 1, LateMass: 1, LateMomentum: 1}})
		return strings.SplitN(sb.String(), "\n", 2)[1]
	}
	cases := []struct{ name, text, want string }{
		{"empty", "", "empty"},
		{"wrong header", "density[cm^-3],metallicity[solar]\n", "line 1: 2 columns"},
		{"wrong unit", strings.Replace(h, "shell_radius[pc]", "shell_radius[kpc]", 1), `line 1: column 5 is "shell_radius[kpc]"`},
		{"no rows", "# c\n" + h, "no data rows"},
		{"not a number", h + "1,1,1e51,x,1,1,1,1,1,1\n", `line 2: column "shell_time[kyr]": "x"`},
		{"zero momentum", h + "1,1,1e51,1,1,1,0,1,1,1\n", `line 2: column "shell_momentum[Msun km/s]": 0`},
		{"negative late", h + "1,1,1e51,1,1,1,1,1,1,-1\n", "line 2:"},
		{"field count", h + "1,1,1e51,1,1,1,1,1,1\n", "line 2:"},
		{"energies differ", h + row(1, 1, 1e51) + row(2, 1, 2e51), "line 3: energy 2e+51"},
		{"density falls", h + row(2, 1, 1e51) + row(1, 1, 1e51), "line 3: density 1 does not rise"},
		{"metallicity falls", h + row(1, 1, 1e51) + row(1, 0.5, 1e51), "line 3: metallicity 0.5 after 1"},
		{"ragged", h + row(1, 0.5, 1e51) + row(2, 0.5, 1e51) + row(1, 1, 1e51), "line 4: 3 rows do not split"},
		{"other densities", h + row(1, 0.5, 1e51) + row(2, 0.5, 1e51) + row(1, 1, 1e51) + row(3, 1, 1e51), "line 5: density 3: metallicity 1 has a different density grid"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadRemnantTable(strings.NewReader(tc.text))
			require.Error(t, err)
			assert.True(t, errors.Is(err, ErrRemnantTable), "%v", err)
			assert.Contains(t, err.Error(), tc.want)
		})
	}
	_, err := ReadRemnantTableFile("no/such/table.csv")
	assert.Error(t, err)
}
