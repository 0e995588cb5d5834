package testbed

import (
	"fmt"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
)

// Injector couples stars' releases into a grid by the path a host takes:
// a feedback.Coupler finds each star's neighbors among the cells (a
// neighbor.Tree on the cell centres), its scheme writes records, and
// feedback.Apply adds them to the grid's own arrays through Grid.Gas. The
// grid then updates its densities and cooling holds (Grid.AfterApply).
// Nothing in the coupling knows it is feeding a grid.
type Injector struct {
	coupler *feedback.Coupler
	finder  *neighbor.Tree
	applier feedback.Applier
	out     feedback.Output
	touched []feedback.Touched
	total   Injected
}

// Injected is what an injector has handed to its grid, summed over calls:
// the couplers' ledgers, and the energy radiated at injection net of what
// Apply reclaimed (the energy a scheme declares lost by an unresolved
// remnant).
type Injected struct {
	Ledger   feedback.Ledger
	Radiated float64
	Calls    int
}

// NewInjector prepares an injector for grid g with coupling configuration
// cfg; the units and the periodic box are the grid's (cfg's are replaced).
func NewInjector(g *Grid, cfg feedback.Config) (*Injector, error) {
	cfg.Units = g.cfg.Units
	cfg.Box = g.Box()
	cp, err := feedback.NewCoupler(cfg)
	if err != nil {
		return nil, fmt.Errorf("testbed: injector: %w", err)
	}
	tree, err := neighbor.NewTree(g.PackedPositions(), g.IDs(), g.Box())
	if err != nil {
		return nil, fmt.Errorf("testbed: injector: %w", err)
	}
	return &Injector{coupler: cp, finder: tree}, nil
}

// Inject couples sources into g and applies the records. It returns the
// call's ledger (what was handed out, radiated at injection, and returned
// undeposited) and Apply's report. A source the coupler could not couple
// at all is an error.
func (in *Injector) Inject(g *Grid, sources []feedback.Source) (feedback.Ledger, feedback.ApplyReport, error) {
	var rep feedback.ApplyReport
	gas := g.Gas()
	if err := in.coupler.Couple(gas, in.finder, sources, &in.out); err != nil {
		return feedback.Ledger{}, rep, fmt.Errorf("testbed: inject: %w", err)
	}
	if len(in.out.Problems) > 0 {
		p := in.out.Problems[0]
		return in.out.Ledger, rep, fmt.Errorf("testbed: inject: star %d: %w", p.StarID, p.Err)
	}
	var err error
	in.touched, rep, err = in.applier.Apply(gas, in.out.Records, in.touched)
	if err != nil {
		return in.out.Ledger, rep, fmt.Errorf("testbed: inject: %w", err)
	}
	g.AfterApply(rep, in.touched)
	in.total.Ledger.Add(&in.out.Ledger)
	in.total.Radiated += in.out.Ledger.Radiated - rep.Reclaimed
	in.total.Calls++
	return in.out.Ledger, rep, nil
}

// Total is what the injector has handed out so far.
func (in *Injector) Total() Injected { return in.total }

// Records are the records of the last call.
func (in *Injector) Records() []feedback.Record { return in.out.Records }
