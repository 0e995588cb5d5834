package feedback_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// koTable is a remnant table holding the Kim & Ostriker 2015 fit's own
// values (feedback.KimOstriker2015) on a grid of densities and two
// metallicities, with the fit's late growth: its final momentum reached
// where the momentum law reaches it.
func koTable(t *testing.T) *feedback.RemnantTable {
	t.Helper()
	var rows []feedback.RemnantTableRow
	for _, z := range []float64{0.1, 2} {
		for _, n := range []float64{0.01, 0.1, 1, 10, 100} {
			r := feedback.KimOstriker2015.Remnant(units.FOE, n, z*yields.SolarMetals)
			rows = append(rows, feedback.RemnantTableRow{
				Density: n, Metallicity: z, Energy: units.FOE, ShellTime: 1,
				ShellRadius: r.CoolingRadius / units.Parsec, ShellMass: r.SwitchMass / units.SolarMass,
				ShellMomentum: r.SwitchMomentum / units.MsunKms,
				LateTime:      10, LateMomentum: r.TerminalMomentum / units.MsunKms,
				LateMass: r.SwitchMass * math.Pow(r.TerminalMomentum/r.SwitchMomentum, 1/r.GrowthExponent) / units.SolarMass,
			})
		}
	}
	var sb strings.Builder
	require.NoError(t, feedback.WriteRemnantTable(&sb, nil, rows))
	tab, err := feedback.ReadRemnantTable(strings.NewReader(sb.String()))
	require.NoError(t, err)
	return tab
}

// The terminal-momentum scheme takes a remnant table like a published fit:
// a table holding the Kim & Ostriker 2015 fit's values couples the same
// momentum and heat as the fit itself, below and past the switch.
func TestTerminalMomentumTableLikeFit(t *testing.T) {
	u := units.ParsecSolarMassKms()
	tab := koTable(t)
	msf := feedback.KimOstriker2015.Remnant(units.FOE, 1, yields.SolarMetals).SwitchMass / units.SolarMass
	for _, mc := range []float64{0.3 * msf, 3 * msf, 30 * msf} {
		g, _ := latticeOfMass(9, mc/32, 1, u)
		src := supernova(1, u)
		run := func(s feedback.Scheme) (p, heat float64, capped int) {
			out, _ := coupleOnce(t, g.Clone(), feedback.Config{Units: u, Scheme: s, Weighting: feedback.KernelVolume, Neighbors: 32}, []feedback.Source{src})
			for _, r := range out.Records {
				heat += r.Heat
			}
			return out.Ledger.RadialMomentum, heat, out.Ledger.Capped
		}
		pf, hf, cf := run(feedback.TerminalMomentum{Fit: feedback.KimOstriker2015})
		pt, ht, ct := run(feedback.TerminalMomentum{Table: tab})
		assert.InEpsilon(t, pf, pt, 1e-9, "momentum at %.3g Msun coupled", mc)
		assert.InEpsilon(t, hf, ht, 1e-9, "heat at %.3g Msun coupled", mc)
		assert.Equal(t, cf, ct)
		// Selected by name with the table in the options, too.
		o := feedback.DefaultSchemeOptions()
		o.Table = tab
		s, err := feedback.SchemeByName("terminal-momentum", o)
		require.NoError(t, err)
		pn, _, _ := run(s)
		assert.Equal(t, pt, pn)
	}
}

// Gas outside the table's grid returns the release undeposited with
// ErrOutsideRemnantTable; a clamping table couples it at the grid's edge.
func TestTerminalMomentumTableOutsideGrid(t *testing.T) {
	u := units.ParsecSolarMassKms()
	tab := koTable(t)
	g, _ := latticeOfMass(9, 100, 1e3, u) // n = 1000 cm^-3: above the grid
	src := supernova(1, u)
	c, err := feedback.NewCoupler(feedback.Config{Units: u, Scheme: feedback.TerminalMomentum{Table: tab}, Neighbors: 32})
	require.NoError(t, err)
	f, err := neighbor.NewTree(g.Packed(), g.ID, feedback.Config{}.Box)
	require.NoError(t, err)
	out := &feedback.Output{}
	require.NoError(t, c.Couple(g.View(), f, []feedback.Source{src}, out))
	require.Len(t, out.Problems, 1)
	assert.True(t, errors.Is(out.Err(), feedback.ErrOutsideRemnantTable), "%v", out.Err())
	assert.Empty(t, out.Records)
	require.NoError(t, out.Ledger.Balanced(1e-12))

	clamped, _ := coupleOnce(t, g.Clone(), feedback.Config{Units: u, Scheme: feedback.TerminalMomentum{Table: tab.WithOutsideGrid(feedback.ClampToGrid)}, Neighbors: 32}, []feedback.Source{src})
	fit, _ := coupleOnce(t, g.Clone(), feedback.Config{Units: u, Scheme: feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}, Neighbors: 32}, []feedback.Source{src})
	// Far past the switch both couple their terminal momentum: the clamped
	// table the fit's at the grid's edge, n = 100, the fit its own at n =
	// 1000, (1000/100)^0.13 lower.
	assert.Equal(t, 1, clamped.Ledger.Capped)
	assert.InEpsilon(t, math.Pow(10, 0.13), clamped.Ledger.RadialMomentum/fit.Ledger.RadialMomentum, 1e-9)
}
