package testbed

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/bench/cooling"
	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// stirredGrid is a small cooling grid at n_H ~ 1 cm^-3 with random
// velocities (~30 km/s), densities and temperatures (1e3–1e6 K), the same
// for a given seed.
func stirredGrid(t testing.TB, n, workers int, seed uint64) *Grid {
	cfg := DefaultGridConfig(n, 40)
	cfg.Workers = workers
	curve, err := cooling.Builtin(1)
	require.NoError(t, err)
	cfg.Cooling = curve
	g, err := NewGrid(cfg)
	require.NoError(t, err)
	t.Cleanup(g.Close)
	u := cfg.Units
	rng := rand.New(rand.NewPCG(seed, 7))
	rho := cfg.Thermo.MassDensity(1) / u.DensityGCm3()
	for c := 0; c < g.Len(); c++ {
		temp := math.Pow(10, 3+3*rng.Float64())
		g.SetCell(c, Cell{
			Mass:           rho * (0.5 + rng.Float64()) * g.CellVolume(),
			Vel:            [3]float64{30 * rng.NormFloat64(), 30 * rng.NormFloat64(), 30 * rng.NormFloat64()},
			InternalEnergy: cfg.Thermo.SpecificEnergy(temp) / u.SpecificEnergy(),
			Metals:         0.0134 * (0.5 + rng.Float64()),
		})
	}
	return g
}

// supernova is one 1e51 erg supernova with 10 Msun of ejecta (1 Msun of
// metals) from a star at rest at p, in the testbed's units.
func supernova(p [3]float64, step uint64, dt float64) feedback.Source {
	u := units.ParsecSolarMassKms()
	m := 10 * units.SolarMass / u.MassG
	src := feedback.Source{Star: feedback.Star{ID: 1, Pos: p, Metallicity: 0.0134}, Channel: yields.CoreCollapse,
		Mass: m, Energy: 1e51 / u.EnergyErg(), Events: 1, Step: step, Duration: dt}
	src.Species[yields.Metals] = 0.1 * m
	return src
}

// evolveWithInjection injects a supernova with scheme s at the box centre,
// then steps the grid (cooling on) for steps steps.
func evolveWithInjection(t testing.TB, g *Grid, s feedback.Scheme, steps int) *Injector {
	in, err := NewInjector(g, feedback.Config{Scheme: s, Neighbors: 32, Workers: g.cfg.Workers})
	require.NoError(t, err)
	l := g.cfg.Size
	_, _, err = in.Inject(g, []feedback.Source{supernova([3]float64{l / 2, l / 2, l / 2}, 0, 0)})
	require.NoError(t, err)
	for i := 0; i < steps; i++ {
		require.NoError(t, g.Step(g.StableStep()))
	}
	return in
}

func TestGridConservesToRoundOff(t *testing.T) {
	for _, s := range []feedback.Scheme{feedback.ThermalDump{}, feedback.Kinetic{}} {
		t.Run(s.Name(), func(t *testing.T) {
			g := stirredGrid(t, 12, 2, 3)
			before := g.Totals()
			evolveWithInjection(t, g, s, 30)
			after := g.Totals()
			l := g.Ledger()
			require.Positive(t, l.Radiated, "cooling ran")
			assert.InEpsilon(t, before.Mass+l.InjectedMass, after.Mass, 1e-13, "mass")
			assert.InEpsilon(t, before.Metals+l.InjectedMetals, after.Metals, 1e-13, "metals")
			// Momentum is compared on the scale of the momenta in the box.
			scale := 0.0
			for c := 0; c < g.Len(); c++ {
				scale += g.mass[c] * math.Sqrt(g.vel[0][c]*g.vel[0][c]+g.vel[1][c]*g.vel[1][c]+g.vel[2][c]*g.vel[2][c])
			}
			for a := 0; a < 3; a++ {
				assert.InDelta(t, before.Momentum[a]+l.InjectedMomentum[a], after.Momentum[a], 1e-13*scale, "momentum %d", a)
			}
			want := before.TotalEnergy + l.Injected - l.Radiated + l.Floor
			assert.InEpsilon(t, want, after.TotalEnergy, 1e-12, "energy: initial + injected - radiated + floor")
			assert.Less(t, l.Floor, 1e-9*l.Injected, "the floor barely acts")
		})
	}
}

func TestGridBitwiseForAnyWorkerCount(t *testing.T) {
	run := func(workers int) *Grid {
		g := stirredGrid(t, 10, workers, 5)
		evolveWithInjection(t, g, feedback.Kinetic{}, 12)
		return g
	}
	ref := run(1)
	for _, w := range []int{2, 4} {
		g := run(w)
		same := func(a, b []float64) bool {
			for i := range a {
				if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
					return false
				}
			}
			return true
		}
		assert.True(t, same(ref.mass, g.mass), "mass, %d workers", w)
		assert.True(t, same(ref.eint, g.eint), "internal energy, %d workers", w)
		assert.True(t, same(ref.metal, g.metal), "metals, %d workers", w)
		for a := 0; a < 3; a++ {
			assert.True(t, same(ref.vel[a], g.vel[a]), "velocity %d, %d workers", a, w)
		}
		assert.Equal(t, math.Float64bits(ref.Ledger().Radiated), math.Float64bits(g.Ledger().Radiated), "radiated, %d workers", w)
		assert.Equal(t, math.Float64bits(ref.Time()), math.Float64bits(g.Time()), "time, %d workers", w)
	}
}

func TestUniformGasAtEquilibriumStaysBitwise(t *testing.T) {
	cfg := DefaultGridConfig(8, 20)
	curve, err := cooling.Builtin(1)
	require.NoError(t, err)
	cfg.Cooling = curve
	g, err := NewGrid(cfg)
	require.NoError(t, err)
	u := cfg.Units
	rho := cfg.Thermo.MassDensity(1)
	teq := curve.EquilibriumTemperature(cfg.Thermo.HydrogenDensity(rho))
	g.Fill(rho/u.DensityGCm3(), cfg.Thermo.SpecificEnergy(teq)/u.SpecificEnergy(), 0.0134)
	before := g.CellState(17)
	for i := 0; i < 5; i++ {
		require.NoError(t, g.Step(g.StableStep()))
	}
	for c := 0; c < g.Len(); c++ {
		require.Equal(t, before, g.CellState(c), "cell %d", c)
	}
	assert.Zero(t, g.Ledger().Radiated)
}

func TestGridStepAllocatesNothing(t *testing.T) {
	g := stirredGrid(t, 8, 2, 9)
	dt := 0.5 * g.StableStep()
	require.NoError(t, g.Step(dt)) // warm the workers up
	allocs := testing.AllocsPerRun(5, func() {
		if err := g.Step(dt); err != nil {
			t.Fatal(err)
		}
		g.StableStep()
		g.Totals()
	})
	assert.Zero(t, allocs)
}

func TestGridConfigErrors(t *testing.T) {
	for name, change := range map[string]func(*GridConfig){
		"too few cells":   func(c *GridConfig) { c.Cells = 3 },
		"zero box":        func(c *GridConfig) { c.Size = 0 },
		"Courant of one":  func(c *GridConfig) { c.Courant = 1 },
		"no workers":      func(c *GridConfig) { c.Workers = 0 },
		"NaN temperature": func(c *GridConfig) { c.MinTemperature = math.NaN() },
		"bad units":       func(c *GridConfig) { c.Units.MassG = -1 },
	} {
		cfg := DefaultGridConfig(8, 10)
		change(&cfg)
		_, err := NewGrid(cfg)
		assert.ErrorIs(t, err, ErrConfig, name)
	}
	g, err := NewGrid(DefaultGridConfig(4, 1))
	require.NoError(t, err)
	assert.ErrorIs(t, g.Check(), ErrState, "a grid without gas")
	assert.ErrorIs(t, g.Step(-1), ErrConfig)
}

func TestHeldCellsDoNotCool(t *testing.T) {
	// A supernova coupled with delayed cooling (Stinson et al. 2006) flags
	// the 32 cells it heats and the grid holds their cooling: over a step
	// they end exactly as in a grid without cooling, while the same cells
	// heated by a plain thermal dump cool.
	step := func(s feedback.Scheme, cool bool) (*Grid, []int) {
		cfg := DefaultGridConfig(12, 60)
		curve, err := cooling.Builtin(1)
		require.NoError(t, err)
		if cool {
			cfg.Cooling = curve
		}
		g, err := NewGrid(cfg)
		require.NoError(t, err)
		u := cfg.Units
		rho := cfg.Thermo.MassDensity(10)
		g.Fill(rho/u.DensityGCm3(), cfg.Thermo.SpecificEnergy(curve.EquilibriumTemperature(10))/u.SpecificEnergy(), 0.0134)
		in, err := NewInjector(g, feedback.Config{Scheme: s, Neighbors: 32, Workers: 1})
		require.NoError(t, err)
		_, _, err = in.Inject(g, []feedback.Source{supernova([3]float64{30, 30, 30}, 0, 0)})
		require.NoError(t, err)
		var hot []int
		for _, r := range in.Records() {
			hot = append(hot, r.GasIndex)
		}
		require.NoError(t, g.Step(1e-3)) // about a thousand years
		return g, hot
	}
	held, hot := step(feedback.DelayedCooling{}, true)
	free, _ := step(feedback.DelayedCooling{}, false)
	assert.Equal(t, 32, held.HeldCells())
	for _, c := range hot {
		assert.Equal(t, free.eint[c], held.eint[c], "held cell %d", c)
	}
	dumped, _ := step(feedback.ThermalDump{}, true)
	assert.Zero(t, dumped.HeldCells())
	cooled := 0
	for _, c := range hot {
		if dumped.eint[c] < free.eint[c] {
			cooled++
		}
	}
	assert.Equal(t, 32, cooled, "without the hold the heated cells cool")
}
