package testbed

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/bench/cooling"
)

func TestClumpyMediumKeepsItsMeanDensity(t *testing.T) {
	cfg := DefaultGridConfig(16, 100)
	curve, err := cooling.Builtin(1)
	require.NoError(t, err)
	g, err := NewGrid(cfg)
	require.NoError(t, err)
	u := cfg.Units
	th := cfg.Thermo
	rho := th.MassDensity(1) / u.DensityGCm3()
	eq := func(r float64) float64 {
		return th.SpecificEnergy(curve.EquilibriumTemperature(th.HydrogenDensity(r*u.DensityGCm3()))) / u.SpecificEnergy()
	}
	m := ClumpyMedium()
	g.fillMedium(m, rho, 0.3*22, 40, [3]float64{50, 50, 50}, eq, 0.0134)
	tot := g.Totals()
	assert.InEpsilon(t, rho*100*100*100, tot.Mass, 1e-12, "the mean density is the case's")
	lo, hi := math.Inf(1), 0.0
	for c := 0; c < g.Len(); c++ {
		lo, hi = math.Min(lo, g.dens[c]), math.Max(hi, g.dens[c])
		assert.InEpsilon(t, eq(g.dens[c]), g.eint[c], 1e-9, "each cell at its own equilibrium")
	}
	assert.InEpsilon(t, 0.5*rho, lo, 0.05, "half the mass spread evenly")
	assert.Greater(t, hi/rho, 3.0, "clumps")
	// The same medium again, bit for bit.
	g2, err := NewGrid(cfg)
	require.NoError(t, err)
	g2.fillMedium(m, rho, 0.3*22, 40, [3]float64{50, 50, 50}, eq, 0.0134)
	assert.Equal(t, g.mass, g2.mass)
	assert.Error(t, Medium{Name: "bad", Clumps: 3}.validate())
}
