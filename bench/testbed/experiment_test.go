package testbed

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
)

// outcomeAt runs the experiment for the given variants (and the
// calibrated-table variant when calibrated), densities and cell masses (in
// cooling masses), measured at 3 shell-formation times.
func outcomeAt(t *testing.T, variants []Variant, densities, ratios []float64, calibrated bool) *Result {
	t.Helper()
	cfg := DefaultConfig()
	cfg.Variants = variants
	if !calibrated {
		cfg.CalibratedVariant = ""
	} else {
		variants = append(variants, Variant{Name: cfg.CalibratedVariant})
	}
	cfg.DensitiesCm3 = densities
	cfg.CellMassRatios = ratios
	cfg.ShellTimes = []float64{3}
	cfg.HistorySamples = 0
	cfg.SliceCellMassRatio = 0
	cfg.Workers = 2
	res, err := Run(cfg)
	require.NoError(t, err)
	require.Len(t, res.Outcome, len(variants)*len(densities)*len(ratios))
	return res
}

func TestThermalDumpOvercoolsAtCoarseResolution(t *testing.T) {
	// Heat dumped into cells ten or more times the cooling mass is radiated
	// before it can do work: the overcooling of thermal feedback at coarse
	// resolution (common practice in the trade). It must deliver less than
	// 30% of the 1D reference's momentum at 3 shell-formation times.
	densities := []float64{1, 100}
	if testing.Short() {
		densities = densities[1:]
	}
	res := outcomeAt(t, []Variant{{Name: "thermal-dump", Scheme: feedback.ThermalDump{}}}, densities, []float64{10, 30}, false)
	for _, o := range res.Outcome {
		t.Logf("n = %g, %g cooling masses: %.3f of the reference", o.DensityCm3, o.CellMassOverCoolingMass, o.MomentumRatio())
		assert.Less(t, o.MomentumRatio(), 0.3, "n = %g, %g cooling masses", o.DensityCm3, o.CellMassOverCoolingMass)
		assert.Greater(t, o.RadiatedShare, 0.5, "most of the energy is radiated")
	}
}

func TestTerminalMomentumDeliversAtEveryResolution(t *testing.T) {
	// The terminal-momentum scheme exists to deliver the right momentum
	// whether or not the cooling radius is resolved: within 30% of the 1D
	// reference from well-resolved cells to cells thirty times the cooling
	// mass (Kim & Ostriker 2015, ApJ 802, 99: the terminal momentum of a
	// remnant is what subgrid schemes should give the gas), with the
	// Kim & Ostriker 2015 fit and with a remnant table calibrated from the
	// 1D reference itself.
	ratios, densities := []float64{1e-3, 0.01, 0.1, 1, 10, 30}, []float64{1, 100}
	if testing.Short() {
		ratios, densities = []float64{0.1, 30}, densities[1:]
	}
	v := Variant{Name: "terminal-momentum", Scheme: feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}}
	res := outcomeAt(t, []Variant{v}, densities, ratios, true)
	for _, o := range res.Outcome {
		t.Logf("%s: n = %g, %g cooling masses: %.3f of the reference", o.Scheme, o.DensityCm3, o.CellMassOverCoolingMass, o.MomentumRatio())
		assert.InDelta(t, 1, o.MomentumRatio(), 0.3, "%s: n = %g, %g cooling masses", o.Scheme, o.DensityCm3, o.CellMassOverCoolingMass)
	}
}

func TestEnergyConservingSchemesConvergeWhenResolved(t *testing.T) {
	if testing.Short() {
		t.Skip("four 3D runs of about 30^3 cells")
	}
	// With cells of 1e-3 cooling masses (cell size 0.16 r_sf, below the
	// r_sf / 3 Kim & Ostriker 2015 ask for convergence) every scheme that
	// hands the gas the whole energy delivers the 1D reference's momentum
	// within 25%.
	variants := []Variant{
		{Name: "thermal-dump", Scheme: feedback.ThermalDump{}},
		{Name: "kinetic", Scheme: feedback.DefaultKinetic()},
		{Name: "stochastic-heating", Scheme: feedback.DefaultStochasticHeating(1)},
		{Name: "terminal-momentum", Scheme: feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}},
	}
	res := outcomeAt(t, variants, []float64{1}, []float64{1e-3}, false)
	for _, o := range res.Outcome {
		t.Logf("%s: %.3f of the reference (cell %.2f r_sf)", o.Scheme, o.MomentumRatio(), o.CellSizeOverShellRadius)
		assert.Less(t, o.CellSizeOverShellRadius, 1.0/3)
		assert.InDelta(t, 1, o.MomentumRatio(), 0.25, o.Scheme)
		// Stochastic heating carries what cannot pay for a whole
		// temperature jump; at this resolution that is a trace.
		assert.Less(t, o.UndepositedShare, 1e-3, o.Scheme)
	}
}

// The cold shell keeps its heat without the temperature floor: over ten
// shell-formation times at n_H = 100 and 1e-3 cooling masses (30 cells
// across), the floor adds less than 1% of the supernova energy. Without
// the velocity-slope cap it added 3.8% (3.2% with the mean mass held at
// 0.6), radiated again as spurious cooling.
func TestFloorStaysNegligible(t *testing.T) {
	if testing.Short() {
		t.Skip("a 30^3 run to ten shell-formation times")
	}
	cfg := DefaultConfig()
	cfg.Variants = []Variant{{Name: "thermal-dump", Scheme: feedback.ThermalDump{}}}
	cfg.CalibratedVariant = ""
	cfg.DensitiesCm3, cfg.CellMassRatios, cfg.ShellTimes = []float64{100}, []float64{1e-3}, []float64{10}
	cfg.HistorySamples, cfg.SliceCellMassRatio, cfg.Workers = 0, 0, 2
	res, err := Run(cfg)
	require.NoError(t, err)
	require.Len(t, res.Outcome, 1)
	o := res.Outcome[0]
	t.Logf("floor %.2g of the supernova energy, radiated %.3f, momentum %.3f of the reference", o.FloorShare, o.RadiatedShare, o.MomentumRatio())
	assert.Less(t, o.FloorShare, 0.01)
}
