package testbed

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/bench/hydro"
)

// advectedWaveError advects a density wave, rho = 1 + 0.2 sin(2 pi (x + y
// + z) / L), at uniform velocity (1, 1, 1) and pressure 1 for one period of
// the box (t = L/3) on n^3 cells and returns the mean absolute density
// error. Uniform velocity and pressure make this an exact solution of the
// Euler equations (the contact wave carried with the flow).
func advectedWaveError(t *testing.T, n int, lim hydro.Limiter) float64 {
	cfg := DefaultGridConfig(n, 1)
	cfg.Limiter = lim
	g, err := NewGrid(cfg)
	require.NoError(t, err)
	gam := cfg.Thermo.Gamma
	wave := func(p [3]float64) float64 { return 1 + 0.2*math.Sin(2*math.Pi*(p[0]+p[1]+p[2])) }
	for c := 0; c < g.Len(); c++ {
		rho := wave(g.Position(c))
		g.SetCell(c, Cell{Mass: rho * g.CellVolume(), Vel: [3]float64{1, 1, 1}, InternalEnergy: 1 / ((gam - 1) * rho)})
	}
	end := 1.0 / 3
	for g.Time() < end {
		require.NoError(t, g.Step(math.Min(g.StableStep(), end-g.Time())))
	}
	sum := 0.0
	for c := 0; c < g.Len(); c++ {
		sum += math.Abs(g.dens[c] - wave(g.Position(c)))
	}
	return sum / float64(g.Len())
}

func TestSecondOrderOnASmoothWave(t *testing.T) {
	if testing.Short() {
		t.Skip("four runs of up to 24^3 cells")
	}
	// Second order divides the error by four when the cells halve; limited
	// slopes clip the wave's extrema, which costs some of that. First order
	// (the control) gains less than a factor two.
	coarse, fine := advectedWaveError(t, 12, DefaultLimiter), advectedWaveError(t, 24, DefaultLimiter)
	t.Logf("%v: L1 density error %.3g at 12^3, %.3g at 24^3, ratio %.2f", DefaultLimiter, coarse, fine, coarse/fine)
	assert.Greater(t, coarse/fine, 2.5)
	coarse, fine = advectedWaveError(t, 12, hydro.FirstOrder), advectedWaveError(t, 24, hydro.FirstOrder)
	t.Logf("first order: ratio %.2f", coarse/fine)
	assert.Less(t, coarse/fine, 2.0)
}
