package remnant

import (
	"context"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/bench/cooling"
	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// calibrationBase is a coarse, short configuration: enough to pass shell
// formation, cheap enough for a unit test.
func calibrationBase() Config {
	cfg := DefaultConfig()
	cfg.ZonesPerShellRadius = 40
	cfg.DomainShellRadii = 1.6
	cfg.EndShellTimes = 2.2
	return cfg
}

// A table calibrated with the built-in cooling gives back the solver's own
// shell-formation momentum at the grid points (within 2%), and between
// them lands near a direct run.
func TestCalibratedTableReproducesSolver(t *testing.T) {
	base := calibrationBase()
	var calls int
	cases, err := Calibrate(context.Background(), base, Grid{
		Densities: []float64{1, 100}, Metallicities: []float64{1},
		Progress: func(done, total int) { calls++; assert.Equal(t, 2, total) },
	})
	require.NoError(t, err)
	assert.Equal(t, 2, calls)
	var sb strings.Builder
	require.NoError(t, feedback.WriteRemnantTable(&sb, []string{"test calibration"}, TableRows(cases)))
	tab, err := feedback.ReadRemnantTable(strings.NewReader(sb.String()))
	require.NoError(t, err)
	for _, c := range cases {
		rem, err := tab.Remnant(units.FOE, c.Density, c.Metallicity*yields.SolarMetals)
		require.NoError(t, err)
		assert.InEpsilon(t, c.Result.ShellFormation.Momentum, rem.SwitchMomentum, 0.02, "n = %v", c.Density)
		assert.InEpsilon(t, c.Result.ShellFormation.Mass, rem.SwitchMass, 0.02, "n = %v", c.Density)
		assert.InEpsilon(t, c.Result.ShellFormation.ShockRadius, rem.CoolingRadius, 0.02, "n = %v", c.Density)
		assert.InEpsilon(t, c.Result.Late.Momentum, rem.TerminalMomentum, 0.02, "n = %v", c.Density)
	}
	if testing.Short() {
		return
	}
	mid := base
	mid.Density = 10
	res, err := Run(mid)
	require.NoError(t, err)
	rem, err := tab.Remnant(units.FOE, 10, yields.SolarMetals)
	require.NoError(t, err)
	assert.InEpsilon(t, res.ShellFormation.Momentum, rem.SwitchMomentum, 0.05, "log-midpoint against a direct run")
}

// Cases do not depend on the number of workers, and a user's cooling table
// holding the built-in curve gives the built-in results.
func TestCalibrationDeterministic(t *testing.T) {
	if testing.Short() {
		t.Skip("four calibration runs")
	}
	base := calibrationBase()
	g := Grid{Densities: []float64{1, 10}, Metallicities: []float64{1}, Workers: 1}
	one, err := Calibrate(context.Background(), base, g)
	require.NoError(t, err)
	curve, err := cooling.Builtin(1)
	require.NoError(t, err)
	curve0, err := cooling.Builtin(0.5)
	require.NoError(t, err)
	var sb strings.Builder
	require.NoError(t, cooling.WriteTable(&sb, []float64{0.5, 1}, []*cooling.Curve{curve0, curve}))
	tab, err := cooling.ReadTable(strings.NewReader(sb.String()))
	require.NoError(t, err)
	g.Workers = 2
	two, err := Calibrate(context.Background(), base, g)
	require.NoError(t, err)
	assert.Equal(t, TableRows(one), TableRows(two), "bitwise the same for 1 and 2 workers")
	g.Table = tab
	fromTable, err := Calibrate(context.Background(), base, g)
	require.NoError(t, err)
	for i, r := range TableRows(fromTable) {
		// The table stores log10 T, so node temperatures differ in the last bits.
		assert.InEpsilon(t, TableRows(one)[i].ShellMomentum, r.ShellMomentum, 1e-9)
		assert.InEpsilon(t, TableRows(one)[i].LateMomentum, r.LateMomentum, 1e-9)
	}
}

func TestCalibrationErrors(t *testing.T) {
	base := calibrationBase()
	for _, g := range []Grid{
		{Densities: nil, Metallicities: []float64{1}},
		{Densities: []float64{10, 1}, Metallicities: []float64{1}},
		{Densities: []float64{1, 1}, Metallicities: []float64{1}},
		{Densities: []float64{1}, Metallicities: []float64{0}},
	} {
		_, err := Calibrate(context.Background(), base, g)
		assert.ErrorIs(t, err, ErrConfig, "%+v", g)
	}
	// With both axes wrong, the error always names the densities first
	// (the check order is fixed, not a map's).
	for range 20 {
		_, err := Calibrate(context.Background(), base, Grid{Densities: []float64{2, 1}, Metallicities: []float64{0}})
		require.ErrorIs(t, err, ErrConfig)
		assert.Contains(t, err.Error(), "densities")
	}
	nc := base
	nc.NoCooling = true
	_, err := Calibrate(context.Background(), nc, Grid{Densities: []float64{1}, Metallicities: []float64{1}})
	assert.ErrorIs(t, err, ErrConfig)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err = Calibrate(ctx, base, Grid{Densities: []float64{1}, Metallicities: []float64{1}})
	assert.ErrorIs(t, err, context.Canceled)
}
