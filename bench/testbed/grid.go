package testbed

import (
	"errors"
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/bench/cooling"
	"github.com/ejecta-dev/ejecta/bench/hydro"
	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// ErrConfig marks a grid configuration that cannot be run.
var ErrConfig = errors.New("invalid grid configuration")

// ErrState marks a grid state the solver cannot advance (a non-finite or
// non-positive density or internal energy).
var ErrState = errors.New("unphysical grid state")

// GridConfig sets up a Grid: a periodic cube of Cells^3 cells of side Size
// (code length), in the code units Units.
type GridConfig struct {
	// Cells is the number of cells along each axis, at least 4.
	Cells int
	// Size is the side of the periodic box in code length units.
	Size float64
	// Units are the code units of every field (the testbed uses parsec,
	// solar mass and km/s).
	Units units.CodeUnits
	// Thermo relates temperature, density and internal energy; its Gamma is
	// the adiabatic index of the hydrodynamics too.
	Thermo cooling.Gas
	// Cooling is the cooling function; nil switches cooling off.
	Cooling *cooling.Curve
	// Courant is the Courant number of the time step, in (0, 1).
	Courant float64
	// CoolingCourant, when positive, also limits the step to this fraction
	// of the shortest cooling time (thermal energy over net cooling rate)
	// of the cells hotter than CoolingStepTemperature whose cooling is not
	// held, but never below a tenth of the Courant step, so that the
	// hydrodynamics does not push for long with heat the cooling removes.
	// The one-dimensional reference (package remnant) limits its step the
	// same way. Zero leaves the step to the Courant condition.
	CoolingCourant float64
	// Limiter limits the slopes of the reconstruction.
	Limiter hydro.Limiter
	// VelocitySlopeCap caps each cell's velocity slopes so that the kinetic
	// energy of its reconstructed velocity profile stays below this share of
	// its internal energy (hydro.CapVelocitySlope), as the one-dimensional
	// reference does: in cold gas moving supersonically the uncapped slopes
	// let the energy fluxes drain cells' heat below the floor. >= 0; +Inf
	// switches the cap off.
	VelocitySlopeCap float64
	// MinTemperature (K) is the floor of the internal energy: where the
	// hydrodynamics would leave a cell colder, it is raised to this
	// temperature and the energy added is booked in Ledger.Floor.
	MinTemperature float64
	// Workers is the number of goroutines the sweeps and the cooling run on,
	// at least 1. Results are bitwise the same for any number.
	Workers int
}

// DefaultCourant is the Courant number DefaultGridConfig uses: each
// one-dimensional sweep of the split scheme is stable up to 1, and 0.4
// leaves room for the state changing between the sweeps of one step
// (common practice).
const DefaultCourant = 0.4

// CoolingStepTemperature is the temperature (K) above which a cell's
// cooling time limits the step (GridConfig.CoolingCourant): 2e4 K, the hot
// gas of the one-dimensional reference, whose step is limited the same way.
const CoolingStepTemperature = 2e4

// DefaultLimiter is the slope limiter DefaultGridConfig uses: monotonized
// central, the sharpest of package hydro's and the one the one-dimensional
// reference uses.
const DefaultLimiter = hydro.MonotonizedCentral

// DefaultVelocitySlopeCap is the velocity-slope cap DefaultGridConfig uses,
// 0.3, the one-dimensional reference's (package remnant).
const DefaultVelocitySlopeCap = 0.3

// DefaultMinTemperature is the temperature floor DefaultGridConfig uses, 1 K:
// far below the coldest equilibrium of the built-in cooling, so it only
// catches round-off in cold fast flows.
const DefaultMinTemperature = 1.0

// DefaultGridConfig is a grid of cells^3 cells of side size, in parsec,
// solar mass and km/s, with the default thermodynamics of package cooling,
// no cooling, DefaultCourant and one worker.
func DefaultGridConfig(cells int, size float64) GridConfig {
	return GridConfig{Cells: cells, Size: size, Units: units.ParsecSolarMassKms(), Thermo: cooling.DefaultGas(),
		Courant: DefaultCourant, Limiter: DefaultLimiter, VelocitySlopeCap: DefaultVelocitySlopeCap, MinTemperature: DefaultMinTemperature, Workers: 1}
}

// Grid is a uniform Cartesian grid in a periodic box that solves the Euler
// equations of an ideal gas with optically thin cooling. Its state is held
// as the columns a feedback host binds: cell mass, velocity, specific
// internal energy, density and metal mass fraction, with cell-centre
// positions and IDs; Gas returns the feedback view on these very arrays, so
// feedback records are applied to the solver's own memory.
//
// Cell (i, j, k) (x, y, z indices) is element i + N (j + N k) of every
// array, centred at ((i+½) dx, (j+½) dx, (k+½) dx) with ID one more than its
// index.
type Grid struct {
	cfg    GridConfig
	n      int     // cells per side
	dx     float64 // cell side
	volume float64 // cell volume
	gas    hydro.IdealGas

	mass, dens, eint, metal []float64
	vel                     [3][]float64
	pos                     [3][]float64
	id                      []int64
	// holdUntil is the code time until which a cell's cooling is held.
	holdUntil []float64

	time   float64
	steps  uint64
	ledger Ledger

	view feedback.Gas

	// cooler applies cfg.Cooling to cfg.Thermo; nil without cooling.
	cooler *cooling.Cooler
	// Cooling conversions to cgs.
	rhoCGS, eCGS, tCGS float64
	// eFloor is the specific internal energy floor (code).
	eFloor float64

	// State of the pass under way.
	sweepDtDx float64 // time step over cell size of the current sweep
	coolDt    float64 // time step of the current cooling pass (code)
	probe     probe   // what the current measurement pass measures

	pool    pool
	scratch []sweepScratch
	planes  []planeSums
	task    task
}

// Ledger is what a grid's energy balance books besides the gas itself:
// energy injected through feedback records, energy radiated by cooling
// (net of heating), energy the solver added where it floored the internal
// energy, and mass and momentum injected. For a grid started with energy
// E0 its total energy is E0 + Injected − Radiated + Floor to round-off.
type Ledger struct {
	// Injected is the total energy the applied feedback records added
	// (code energy), as Apply reports it.
	Injected float64
	// Radiated is the energy removed by cooling, net of heating (code
	// energy).
	Radiated float64
	// Floor is the energy added where the solver raised a negative
	// internal energy to its floor (code energy).
	Floor float64
	// InjectedMass, InjectedMetals and InjectedMomentum are what the
	// applied records added.
	InjectedMass, InjectedMetals float64
	InjectedMomentum             [3]float64
}

// NewGrid allocates a grid at rest with zero density; set its state with
// Fill or SetCell before stepping.
func NewGrid(cfg GridConfig) (*Grid, error) {
	if cfg.Cells < 4 || cfg.Cells > 1024 {
		return nil, fmt.Errorf("testbed: %d cells per side, want 4..1024: %w", cfg.Cells, ErrConfig)
	}
	if !(cfg.Size > 0) || math.IsInf(cfg.Size, 0) {
		return nil, fmt.Errorf("testbed: box size %v, want finite > 0: %w", cfg.Size, ErrConfig)
	}
	if err := cfg.Units.Validate(); err != nil {
		return nil, fmt.Errorf("testbed: %w: %w", err, ErrConfig)
	}
	if err := cfg.Thermo.Validate(); err != nil {
		return nil, fmt.Errorf("testbed: %w", err)
	}
	if !(cfg.Courant > 0 && cfg.Courant < 1) {
		return nil, fmt.Errorf("testbed: Courant number %v, want in (0, 1): %w", cfg.Courant, ErrConfig)
	}
	if !(cfg.CoolingCourant >= 0) || math.IsInf(cfg.CoolingCourant, 0) {
		return nil, fmt.Errorf("testbed: cooling Courant number %v, want finite >= 0: %w", cfg.CoolingCourant, ErrConfig)
	}
	if !(cfg.MinTemperature > 0) || math.IsInf(cfg.MinTemperature, 0) {
		return nil, fmt.Errorf("testbed: minimum temperature %v K, want finite > 0: %w", cfg.MinTemperature, ErrConfig)
	}
	if !(cfg.VelocitySlopeCap >= 0) {
		return nil, fmt.Errorf("testbed: velocity slope cap %v, want >= 0: %w", cfg.VelocitySlopeCap, ErrConfig)
	}
	if cfg.Limiter > hydro.FirstOrder {
		return nil, fmt.Errorf("testbed: unknown limiter %v: %w", cfg.Limiter, ErrConfig)
	}
	if cfg.Workers < 1 || cfg.Workers > 1024 {
		return nil, fmt.Errorf("testbed: %d workers, want 1..1024: %w", cfg.Workers, ErrConfig)
	}
	n := cfg.Cells
	cells := n * n * n
	g := &Grid{cfg: cfg, n: n, dx: cfg.Size / float64(n), gas: hydro.IdealGas{Gamma: cfg.Thermo.Gamma}}
	if cfg.Cooling != nil {
		k, err := cooling.NewCooler(cfg.Cooling, cfg.Thermo)
		if err != nil {
			return nil, fmt.Errorf("testbed: %w", err)
		}
		g.cooler = k
	}
	g.volume = g.dx * g.dx * g.dx
	alloc := func() []float64 { return make([]float64, cells) }
	g.mass, g.dens, g.eint, g.metal, g.holdUntil = alloc(), alloc(), alloc(), alloc(), alloc()
	for a := 0; a < 3; a++ {
		g.vel[a] = alloc()
		g.pos[a] = alloc()
	}
	g.id = make([]int64, cells)
	for k := 0; k < n; k++ {
		for j := 0; j < n; j++ {
			for i := 0; i < n; i++ {
				c := i + n*(j+n*k)
				g.pos[0][c] = (float64(i) + 0.5) * g.dx
				g.pos[1][c] = (float64(j) + 0.5) * g.dx
				g.pos[2][c] = (float64(k) + 0.5) * g.dx
				g.id[c] = int64(c) + 1
			}
		}
	}
	g.view = feedback.Gas{
		N:                cells,
		Pos:              [3]feedback.Column{feedback.Float64s(g.pos[0]), feedback.Float64s(g.pos[1]), feedback.Float64s(g.pos[2])},
		Vel:              [3]feedback.Column{feedback.Float64s(g.vel[0]), feedback.Float64s(g.vel[1]), feedback.Float64s(g.vel[2])},
		Mass:             feedback.Float64s(g.mass),
		Density:          feedback.Float64s(g.dens),
		InternalEnergy:   feedback.Float64s(g.eint),
		ID:               feedback.Int64s(g.id),
		Species:          []yields.Species{yields.Metals},
		SpeciesFractions: []feedback.Column{feedback.Float64s(g.metal)},
	}
	u := cfg.Units
	g.rhoCGS, g.eCGS, g.tCGS = u.DensityGCm3(), u.SpecificEnergy(), u.TimeS()
	g.eFloor = cfg.Thermo.SpecificEnergy(cfg.MinTemperature) / g.eCGS
	g.scratch = make([]sweepScratch, cfg.Workers)
	for w := range g.scratch {
		g.scratch[w] = newSweepScratch(n)
	}
	g.planes = make([]planeSums, n)
	g.pool.init(cfg.Workers)
	return g, nil
}

// Config returns the grid's configuration.
func (g *Grid) Config() GridConfig { return g.cfg }

// Cells is the number of cells along each axis.
func (g *Grid) Cells() int { return g.n }

// Len is the total number of cells.
func (g *Grid) Len() int { return len(g.mass) }

// CellSize is the side of a cell (code length).
func (g *Grid) CellSize() float64 { return g.dx }

// CellVolume is the volume of a cell (code length cubed).
func (g *Grid) CellVolume() float64 { return g.volume }

// Box is the grid's periodic box, for neighbor finders and couplers.
func (g *Grid) Box() neighbor.Box {
	l := g.cfg.Size
	return neighbor.Box{Size: [3]float64{l, l, l}}
}

// Time is the code time the grid has reached.
func (g *Grid) Time() float64 { return g.time }

// Steps is the number of steps taken.
func (g *Grid) Steps() uint64 { return g.steps }

// Ledger returns the energy, mass and momentum the grid has booked.
func (g *Grid) Ledger() Ledger { return g.ledger }

// Gas is the feedback view on the grid's own arrays: positions, velocities,
// masses, densities, specific internal energies, IDs and the metal mass
// fraction. Records applied to it change the grid in place; call
// AfterApply with the touched cells afterwards so the solver's density and
// cooling holds follow.
func (g *Grid) Gas() *feedback.Gas { return &g.view }

// PackedPositions returns the cell centres as x0, y0, z0, x1, ..., the
// layout neighbor finders are built on.
func (g *Grid) PackedPositions() []float64 { return g.view.PackedPositions(nil) }

// IDs returns the cell IDs in cell order.
func (g *Grid) IDs() []int64 { return append([]int64(nil), g.id...) }

// Index is the array index of cell (i, j, k), each taken periodically.
func (g *Grid) Index(i, j, k int) int {
	n := g.n
	i, j, k = ((i%n)+n)%n, ((j%n)+n)%n, ((k%n)+n)%n
	return i + n*(j+n*k)
}

// Cell is one cell's state in code units: mass, velocity, specific
// internal energy and metal mass fraction.
type Cell struct {
	Mass           float64
	Vel            [3]float64
	InternalEnergy float64
	Metals         float64
}

// SetCell sets cell c's state; the density follows from the mass.
func (g *Grid) SetCell(c int, s Cell) {
	g.mass[c] = s.Mass
	g.dens[c] = s.Mass / g.volume
	for a := 0; a < 3; a++ {
		g.vel[a][c] = s.Vel[a]
	}
	g.eint[c] = s.InternalEnergy
	g.metal[c] = s.Metals
}

// CellState returns cell c's state.
func (g *Grid) CellState(c int) Cell {
	return Cell{Mass: g.mass[c], Vel: [3]float64{g.vel[0][c], g.vel[1][c], g.vel[2][c]},
		InternalEnergy: g.eint[c], Metals: g.metal[c]}
}

// Position is cell c's centre.
func (g *Grid) Position(c int) [3]float64 {
	return [3]float64{g.pos[0][c], g.pos[1][c], g.pos[2][c]}
}

// Fill sets every cell to gas at rest of mass density rho (code), specific
// internal energy e (code) and metal mass fraction z.
func (g *Grid) Fill(rho, e, z float64) {
	m := rho * g.volume
	for c := range g.mass {
		g.SetCell(c, Cell{Mass: m, InternalEnergy: e, Metals: z})
	}
}

// Check reports ErrState, naming the first offending cell, unless every
// cell has finite positive mass, finite non-negative internal energy and a
// finite velocity.
func (g *Grid) Check() error {
	for c := range g.mass {
		m, e := g.mass[c], g.eint[c]
		v := g.vel[0][c] + g.vel[1][c] + g.vel[2][c]
		if !(m > 0) || math.IsInf(m, 0) || !(e >= 0) || math.IsInf(e, 0) || math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("testbed: cell %d: mass %v, internal energy %v, velocity (%v, %v, %v): %w",
				c, m, e, g.vel[0][c], g.vel[1][c], g.vel[2][c], ErrState)
		}
	}
	return nil
}

// Totals are the conserved sums over the grid in code units: mass, metal
// mass, momentum, and kinetic and thermal energy.
type Totals struct {
	Mass, Metals float64
	Momentum     [3]float64
	Kinetic      float64
	Thermal      float64
	TotalEnergy  float64
}

// Totals sums the grid's conserved quantities, plane by plane in a fixed
// order, so the sums are the same bits for any worker count.
func (g *Grid) Totals() Totals {
	g.run(taskTotals, g.n)
	var t Totals
	for p := range g.planes {
		s := &g.planes[p]
		t.Mass += s.mass
		t.Metals += s.metals
		for a := 0; a < 3; a++ {
			t.Momentum[a] += s.mom[a]
		}
		t.Kinetic += s.kinetic
		t.Thermal += s.thermal
	}
	t.TotalEnergy = t.Kinetic + t.Thermal
	return t
}

// totalsPlane sums plane k (z index) into its partial sums.
func (g *Grid) totalsPlane(k int) {
	s := &g.planes[k]
	*s = planeSums{}
	n := g.n
	for c := k * n * n; c < (k+1)*n*n; c++ {
		m := g.mass[c]
		vx, vy, vz := g.vel[0][c], g.vel[1][c], g.vel[2][c]
		s.mass += m
		s.metals += m * g.metal[c]
		s.mom[0] += m * vx
		s.mom[1] += m * vy
		s.mom[2] += m * vz
		s.kinetic += 0.5 * m * (vx*vx + vy*vy + vz*vz)
		s.thermal += m * g.eint[c]
	}
}

// planeSums are one plane's partial sums of a reduction.
type planeSums struct {
	mass, metals, kinetic, thermal float64
	mom                            [3]float64
	radiated, floor                float64
	maxSpeed, minCooling           float64
	radial, hot, excess            float64
	bad                            int
	_                              [3]float64 // keeps neighboring planes' sums off one cache line
}
