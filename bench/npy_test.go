package bench

import (
	"math"
	"os"
	"path/filepath"
	"testing"

	"codeberg.org/sbinet/npyio"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields/units"
)

func writeNpy(t *testing.T, dir, name string, v any) {
	t.Helper()
	f, err := os.Create(filepath.Join(dir, name))
	require.NoError(t, err)
	require.NoError(t, npyio.Write(f, v))
	require.NoError(t, f.Close())
}

// writeGasDir writes the gas of a case as .npy files in the documented
// layout, converting to the given code units.
func writeGasDir(t *testing.T, dir string, c *Case, u units.CodeUnits, withStars bool) {
	t.Helper()
	n := c.Gas.Len()
	l := c.Units.LengthCm / u.LengthCm
	m := c.Units.MassG / u.MassG
	v := c.Units.VelocityCmPS / u.VelocityCmPS
	pos := mat.NewDense(n, 3, nil)
	vel := mat.NewDense(n, 3, nil)
	for i := 0; i < n; i++ {
		for a := 0; a < 3; a++ {
			pos.Set(i, a, c.Gas.Pos[a][i]*l)
			vel.Set(i, a, c.Gas.Vel[a][i]*v)
		}
	}
	scale := func(s []float64, f float64) []float64 {
		out := make([]float64, len(s))
		for i, x := range s {
			out[i] = x * f
		}
		return out
	}
	writeNpy(t, dir, GasPositionsFile, pos)
	writeNpy(t, dir, GasVelocitiesFile, vel)
	writeNpy(t, dir, GasMassesFile, scale(c.Gas.Mass, m))
	writeNpy(t, dir, GasDensitiesFile, scale(c.Gas.Density, m/(l*l*l)))
	e32 := make([]float32, n)
	for i, x := range c.Gas.Energy {
		e32[i] = float32(x * v * v)
	}
	writeNpy(t, dir, GasInternalEnergyFile, e32)
	writeNpy(t, dir, GasIDsFile, c.Gas.ID)
	writeNpy(t, dir, GasMetallicityFile, c.Gas.Fractions[0])
	if withStars {
		st := mat.NewDense(len(c.Stars), 3, nil)
		for s, star := range c.Stars {
			for a := 0; a < 3; a++ {
				st.Set(s, a, star.Pos[a]*l)
			}
		}
		writeNpy(t, dir, StarPositionsFile, st)
	}
}

// Gas written in other code units (kpc, 1e10 Msun, km/s) and read back
// couples exactly as the built-in case does: the same radial momentum per
// supernova in Msun km/s, to round-off of the unit conversions.
func TestReadGasDirRoundTrip(t *testing.T) {
	c := build(t, "clumpy-cloud", CaseSpec{DensityCm3: 10, GasMassMsun: 100, Elements: 800, Seed: 2})
	dir := t.TempDir()
	u := units.Astro()
	writeGasDir(t, dir, c, u, true)
	got, err := ReadGasDir(dir, u, neighbor.Box{})
	require.NoError(t, err)
	require.Equal(t, c.Gas.Len(), got.Gas.Len())
	require.Len(t, got.Stars, len(c.Stars))
	assert.Equal(t, "user-gas", got.Setup)
	assert.InEpsilon(t, 100, got.GasMassMsun, 1e-9)
	assert.Equal(t, c.Gas.ID, got.Gas.ID)

	schemes, err := SelectSchemes([]string{"terminal-momentum", "thermal-dump"})
	require.NoError(t, err)
	mine, err := RunCase(c, 32, SpeedSpec{}, Options{Schemes: schemes})
	require.NoError(t, err)
	theirs, err := RunCase(got, 32, SpeedSpec{}, Options{Schemes: schemes})
	require.NoError(t, err)
	require.Len(t, theirs.Convergence, 2)
	for i := range mine.Convergence {
		assert.InEpsilon(t, mine.Convergence[i].RadialMomentumMsunKms+1, theirs.Convergence[i].RadialMomentumMsunKms+1, 1e-6)
		assert.InEpsilon(t, mine.Convergence[i].CoupledMassMsun, theirs.Convergence[i].CoupledMassMsun, 1e-9)
	}
	assert.Empty(t, theirs.Speed)
}

// Without stars.npy, IDs or metallicity, one star sits at the densest
// element and IDs run from 1.
func TestReadGasDirDefaults(t *testing.T) {
	c := build(t, "uniform-lattice", CaseSpec{DensityCm3: 1, GasMassMsun: 10, Elements: 512, Seed: 1})
	c.Gas.Density[77] *= 3
	dir := t.TempDir()
	writeGasDir(t, dir, c, units.ParsecSolarMassKms(), false)
	require.NoError(t, os.Remove(filepath.Join(dir, GasIDsFile)))
	require.NoError(t, os.Remove(filepath.Join(dir, GasMetallicityFile)))
	got, err := ReadGasDir(dir, units.ParsecSolarMassKms(), c.Box)
	require.NoError(t, err)
	require.Len(t, got.Stars, 1)
	for a := 0; a < 3; a++ {
		assert.Equal(t, c.Gas.Pos[a][77], got.Stars[0].Pos[a])
	}
	assert.Equal(t, int64(1), got.Gas.ID[0])
	assert.Empty(t, got.Gas.Species)
	assert.InEpsilon(t, 3, got.DensityCm3, 1e-12)
}

func TestReadGasDirRejectsBadInput(t *testing.T) {
	c := build(t, "uniform-lattice", CaseSpec{DensityCm3: 1, GasMassMsun: 10, Elements: 512, Seed: 1})
	tests := []struct {
		name  string
		spoil func(dir string)
		want  string
	}{
		{"missing mass", func(dir string) { require.NoError(t, os.Remove(filepath.Join(dir, GasMassesFile))) }, "mass.npy"},
		{"short density", func(dir string) { writeNpy(t, dir, GasDensitiesFile, []float64{1, 2}) }, "rows"},
		{"flat positions", func(dir string) { writeNpy(t, dir, GasPositionsFile, make([]float64, 3*512)) }, "shape"},
		{"negative mass", func(dir string) {
			m := append([]float64(nil), c.Gas.Mass...)
			m[5] = -1
			writeNpy(t, dir, GasMassesFile, m)
		}, "element 5"},
		{"NaN energy", func(dir string) {
			e := append([]float64(nil), c.Gas.Energy...)
			e[9] = math.NaN()
			writeNpy(t, dir, GasInternalEnergyFile, e)
		}, "NaN"},
		{"duplicate IDs", func(dir string) {
			ids := append([]int64(nil), c.Gas.ID...)
			ids[3] = ids[2]
			writeNpy(t, dir, GasIDsFile, ids)
		}, "share ID"},
		{"unsupported type", func(dir string) { writeNpy(t, dir, GasMassesFile, make([]uint8, 512)) }, "not supported"},
		{"not npy", func(dir string) {
			require.NoError(t, os.WriteFile(filepath.Join(dir, GasDensitiesFile), []byte("density,1\n"), 0o644))
		}, "density.npy"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			writeGasDir(t, dir, c, units.ParsecSolarMassKms(), false)
			tc.spoil(dir)
			got, err := ReadGasDir(dir, units.ParsecSolarMassKms(), neighbor.Box{})
			require.Error(t, err)
			assert.Contains(t, err.Error(), tc.want)
			assert.Nil(t, got)
		})
	}
	_, err := ReadGasDir(t.TempDir(), units.CodeUnits{}, neighbor.Box{})
	assert.Error(t, err, "zero units")
}

// Positions outside a stated periodic box are refused, not wrapped; a star
// outside the gas's extent on an open axis is refused (its gas would all
// lie on one side); one on the edge of the extent is accepted.
func TestReadGasDirChecksPositions(t *testing.T) {
	c := build(t, "uniform-lattice", CaseSpec{DensityCm3: 1, GasMassMsun: 10, Elements: 512, Seed: 1})
	require.True(t, c.Box.Periodic())
	L := c.Box.Size[0]
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range c.Gas.Pos[1] {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	tests := []struct {
		name  string
		box   neighbor.Box
		gas   func(g *[3][]float64)
		star  [3]float64
		want  error
		where string
	}{
		{"inside the box", c.Box, nil, [3]float64{0, 0.5 * L, 0.999 * L}, nil, ""},
		{"gas at L", c.Box, func(g *[3][]float64) { g[2][7] = L }, [3]float64{1, 1, 1}, ErrOutsideBox, "element 7 has z"},
		{"gas below 0", c.Box, func(g *[3][]float64) { g[0][3] = -1e-9 * L }, [3]float64{1, 1, 1}, ErrOutsideBox, "element 3 has x"},
		{"star outside the box", c.Box, nil, [3]float64{1, 1.5 * L, 1}, ErrOutsideBox, "star 0 has y"},
		{"open box, star on the gas's edge", neighbor.Box{}, nil, [3]float64{0.5 * L, lo, 0.5 * L}, nil, ""},
		{"open box, star beyond the gas", neighbor.Box{}, nil, [3]float64{0.5 * L, hi + 1e-6*L, 0.5 * L}, ErrStarOutsideGas, "star 0 has y"},
		{"open box, gas anywhere", neighbor.Box{}, func(g *[3][]float64) { g[0][0] = -10 * L }, [3]float64{0.5 * L, 0.5 * L, 0.5 * L}, nil, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			cc := *c
			g := c.Gas.Clone()
			cc.Gas = g
			if tc.gas != nil {
				tc.gas(&g.Pos)
			}
			cc.Stars = []feedback.Star{{ID: 1, Pos: tc.star}}
			dir := t.TempDir()
			writeGasDir(t, dir, &cc, units.ParsecSolarMassKms(), true)
			got, err := ReadGasDir(dir, units.ParsecSolarMassKms(), tc.box)
			if tc.want == nil {
				require.NoError(t, err)
				assert.Equal(t, tc.star, got.Stars[0].Pos)
				return
			}
			require.ErrorIs(t, err, tc.want)
			assert.Contains(t, err.Error(), tc.where)
			assert.Nil(t, got)
		})
	}
}
