package remnant

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"sort"
	"sync"

	"github.com/ejecta-dev/ejecta/bench/cooling"
	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Grid is a calibration grid of ambient densities and metallicities.
type Grid struct {
	// Densities in cm^-3 and Metallicities in solar units, each rising and
	// positive.
	Densities, Metallicities []float64
	// Table, when set, supplies the cooling curve at each metallicity (a
	// user's cooling table); otherwise the built-in curve is used.
	Table *cooling.Table
	// Workers is the number of runs at once; zero means GOMAXPROCS.
	Workers int
	// Progress, when set, is called after each finished run with the
	// number done and the total, from one goroutine at a time.
	Progress func(done, total int)
}

// Case is one finished calibration run.
type Case struct {
	// Density (n_H, cm^-3) and Metallicity (solar units) are the grid
	// point.
	Density, Metallicity float64
	// Result is the run there.
	Result *Result
}

// Calibrate runs base (its Density, Metallicity and Cooling replaced) at
// every grid point, in parallel, and returns the cases ordered by
// metallicity then density. Each run is deterministic and independent of
// the others, so the cases do not depend on the number of workers. A run
// that fails, or never reaches shell formation, is an error naming its
// grid point.
func Calibrate(ctx context.Context, base Config, g Grid) ([]Case, error) {
	for _, axis := range [...]struct {
		name string
		v    []float64
	}{{"densities", g.Densities}, {"metallicities", g.Metallicities}} {
		name, v := axis.name, axis.v
		if len(v) == 0 || !sort.Float64sAreSorted(v) {
			return nil, fmt.Errorf("remnant: calibration %s %v: want a rising, non-empty list: %w", name, v, ErrConfig)
		}
		for i, x := range v {
			if !(x > 0) || math.IsInf(x, 0) || (i > 0 && x == v[i-1]) {
				return nil, fmt.Errorf("remnant: calibration %s %v: want distinct finite values > 0: %w", name, v, ErrConfig)
			}
		}
	}
	if base.NoCooling {
		return nil, fmt.Errorf("remnant: calibration without cooling has no shell formation: %w", ErrConfig)
	}
	curves := make([]*cooling.Curve, len(g.Metallicities))
	for i, z := range g.Metallicities {
		var err error
		if g.Table != nil {
			curves[i], err = g.Table.Curve(z)
		} else {
			curves[i], err = cooling.Builtin(z)
		}
		if err != nil {
			return nil, fmt.Errorf("remnant: calibration at metallicity %v: %w", z, err)
		}
	}
	cases := make([]Case, 0, len(g.Densities)*len(g.Metallicities))
	for _, z := range g.Metallicities {
		for _, n := range g.Densities {
			cases = append(cases, Case{Density: n, Metallicity: z})
		}
	}
	workers := g.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, len(cases))
	ctx, cancel := context.WithCancel(ctx)
	defer cancel()
	jobs := make(chan int)
	errs := make([]error, len(cases))
	var mu sync.Mutex
	done := 0
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range jobs {
				c := &cases[i]
				cfg := base
				cfg.Density, cfg.Metallicity = c.Density, c.Metallicity
				cfg.Cooling = curves[i/len(g.Densities)]
				res, err := runContext(ctx, cfg)
				switch {
				case err != nil:
					errs[i] = err
				case !res.ShellFormation.Found:
					errs[i] = fmt.Errorf("no shell formation before the end of the run (%.3g kyr)", res.Late.Time/(1e3*units.JulianYear))
				}
				if errs[i] != nil {
					errs[i] = fmt.Errorf("remnant: calibration at n_H = %v cm^-3, Z = %v solar: %w", c.Density, c.Metallicity, errs[i])
					cancel()
				}
				c.Result = res
				mu.Lock()
				done++
				if g.Progress != nil {
					g.Progress(done, len(cases))
				}
				mu.Unlock()
			}
		}()
	}
feed:
	for i := range cases {
		select {
		case jobs <- i:
		case <-ctx.Done():
			break feed
		}
	}
	close(jobs)
	wg.Wait()
	for _, err := range errs {
		if err != nil && !errors.Is(err, context.Canceled) {
			return nil, err
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("remnant: calibration: %w", err)
	}
	return cases, nil
}

// runContext is Run with a check for cancellation every hundred steps.
func runContext(ctx context.Context, cfg Config) (*Result, error) {
	s, err := New(cfg)
	if err != nil {
		return nil, err
	}
	s.cancel = func() error { return ctx.Err() }
	return s.Run()
}

// TableRows turns calibration cases into remnant table rows (package
// feedback's format): times in kyr, radii in pc, masses in Msun, momenta in
// Msun km/s.
func TableRows(cases []Case) []feedback.RemnantTableRow {
	rows := make([]feedback.RemnantTableRow, len(cases))
	for i, c := range cases {
		r := c.Result
		sf := r.ShellFormation
		rows[i] = feedback.RemnantTableRow{
			Density: c.Density, Metallicity: c.Metallicity, Energy: r.Config.Energy,
			ShellTime:     sf.Time / (1e3 * units.JulianYear),
			ShellRadius:   sf.ShockRadius / units.Parsec,
			ShellMass:     sf.Mass / units.SolarMass,
			ShellMomentum: sf.Momentum / units.MsunKms,
			LateTime:      r.Late.Time / (1e3 * units.JulianYear),
			LateMass:      r.Late.Mass / units.SolarMass,
			LateMomentum:  r.Late.Momentum / units.MsunKms,
		}
	}
	return rows
}
