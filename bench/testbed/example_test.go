package testbed_test

import (
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/bench/cooling"
	"github.com/ejecta-dev/ejecta/bench/testbed"
	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// A supernova injected with a thermal dump into a 16^3 box of gas at
// n_H = 1 cm^-3, through the coupler and Apply, then evolved with cooling;
// the energy ledger closes to round-off.
func ExampleGrid() {
	cfg := testbed.DefaultGridConfig(16, 100) // 100 pc, parsec / Msun / km/s units
	curve, _ := cooling.Builtin(1)
	cfg.Cooling = curve
	g, _ := testbed.NewGrid(cfg)
	u := cfg.Units
	rho := cfg.Thermo.MassDensity(1) // g/cm^3
	teq := curve.EquilibriumTemperature(1)
	g.Fill(rho/u.DensityGCm3(), cfg.Thermo.SpecificEnergy(teq)/u.SpecificEnergy(), 0.0134)
	e0 := g.Totals().TotalEnergy

	in, _ := testbed.NewInjector(g, feedback.Config{Scheme: feedback.ThermalDump{}, Neighbors: 32, Workers: 1})
	sn := feedback.Source{Star: feedback.Star{ID: 1, Pos: [3]float64{50, 50, 50}}, Channel: yields.CoreCollapse,
		Mass: 10, Energy: units.FOE / u.EnergyErg(), Events: 1}
	if _, _, err := in.Inject(g, []feedback.Source{sn}); err != nil {
		fmt.Println(err)
		return
	}
	for g.Time() < 0.1 { // 0.1 code time units: about 98 kyr
		if err := g.Step(math.Min(g.StableStep(), 0.1-g.Time())); err != nil {
			fmt.Println(err)
			return
		}
	}
	l := g.Ledger()
	e1 := g.Totals().TotalEnergy
	fmt.Printf("radiated %.0f%% of the supernova energy\n", 100*l.Radiated/l.Injected)
	fmt.Println("ledger closes:", math.Abs(e0+l.Injected-l.Radiated+l.Floor-e1) < 1e-12*e1)
	// Output:
	// radiated 75% of the supernova energy
	// ledger closes: true
}

// The terminal-momentum scheme and a thermal dump in cells of ten cooling
// masses at n_H = 100 cm^-3, evolved to three shell-formation times and set
// beside the 1D reference remnant; the experiment adds the
// terminal-momentum scheme with a remnant table calibrated from that
// reference.
func ExampleRun() {
	cfg := testbed.DefaultConfig()
	cfg.Variants = []testbed.Variant{
		{Name: "thermal-dump", Scheme: feedback.ThermalDump{}},
		{Name: "terminal-momentum", Scheme: feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}},
	}
	cfg.DensitiesCm3, cfg.CellMassRatios, cfg.ShellTimes = []float64{100}, []float64{10}, []float64{3}
	cfg.HistorySamples, cfg.SliceCellMassRatio = 0, 0
	res, err := testbed.Run(cfg)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, o := range res.Outcome {
		fmt.Printf("%s: %.1f of the 1D reference's momentum\n", o.Scheme, o.MomentumRatio())
	}
	// Output:
	// thermal-dump: 0.0 of the 1D reference's momentum
	// terminal-momentum: 1.0 of the 1D reference's momentum
	// terminal-momentum-calibrated: 1.0 of the 1D reference's momentum
}
