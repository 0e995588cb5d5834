package bench

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields/units"
)

func build(t *testing.T, name string, spec CaseSpec) *Case {
	t.Helper()
	s, err := SelectSetups([]string{name})
	require.NoError(t, err)
	c, err := s[0].Build(spec)
	require.NoError(t, err)
	require.NoError(t, c.Gas.View().Validate())
	return c
}

func TestSetupsAreDeterministicAndValid(t *testing.T) {
	spec := CaseSpec{DensityCm3: 3, GasMassMsun: 50, Elements: 1000, Seed: 7}
	for _, s := range StandardSetups() {
		t.Run(s.Name, func(t *testing.T) {
			a := build(t, s.Name, spec)
			b := build(t, s.Name, spec)
			assert.Equal(t, a, b, "same spec, same case")
			assert.Equal(t, s.Name, a.Setup)
			assert.NotEmpty(t, a.Stars)
			n := a.Gas.Len()
			assert.InDelta(t, spec.Elements, n, 0.5*float64(spec.Elements))
			ids := map[int64]bool{}
			for i := 0; i < n; i++ {
				assert.False(t, ids[a.Gas.ID[i]])
				ids[a.Gas.ID[i]] = true
				assert.Equal(t, spec.GasMassMsun, a.Gas.Mass[i])
				assert.Positive(t, a.Gas.Density[i])
				assert.Positive(t, a.Gas.Energy[i])
			}
		})
	}
}

// The hydrogen density of the lattices is the one asked for: total mass
// over box volume, converted with 1.4 proton masses per hydrogen atom
// (common practice) and the IAU/CODATA constants of package units.
func TestLatticeDensity(t *testing.T) {
	for _, name := range []string{"uniform-lattice", "glass"} {
		c := build(t, name, CaseSpec{DensityCm3: 10, GasMassMsun: 100, Elements: 4096, Seed: 1})
		total := 0.0
		for _, m := range c.Gas.Mass {
			total += m
		}
		L := c.Box.Size[0]
		rho := total / (L * L * L) * units.SolarMass / (units.Parsec * units.Parsec * units.Parsec)
		n := rho / (feedback.MassPerHydrogen * units.ProtonMass)
		assert.InEpsilon(t, 10, n, 1e-12, name)
		for _, d := range c.Gas.Density {
			assert.InEpsilon(t, total/(L*L*L), d, 1e-12)
		}
		for a := 0; a < 3; a++ {
			assert.InDelta(t, L/2, c.Stars[0].Pos[a], 1e-12*L)
			for _, x := range c.Gas.Pos[a] {
				assert.True(t, x >= 0 && x < L)
			}
		}
	}
	// The jitter moves elements, by at most a quarter spacing per axis.
	lat := build(t, "uniform-lattice", CaseSpec{DensityCm3: 1, GasMassMsun: 1, Elements: 512, Seed: 1})
	gl := build(t, "glass", CaseSpec{DensityCm3: 1, GasMassMsun: 1, Elements: 512, Seed: 1})
	d := lat.Box.Size[0] / 8
	moved := 0
	for i := range lat.Gas.Mass {
		for a := 0; a < 3; a++ {
			dx := math.Abs(gl.Gas.Pos[a][i] - lat.Gas.Pos[a][i])
			dx = math.Min(dx, lat.Box.Size[a]-dx)
			assert.LessOrEqual(t, dx, 0.25*d*(1+1e-12))
			if dx > 0 {
				moved++
			}
		}
	}
	assert.Greater(t, moved, 3*len(lat.Gas.Mass)/2)
}

func TestInterfaceGeometry(t *testing.T) {
	c := build(t, "interface", CaseSpec{DensityCm3: 1, GasMassMsun: 10, Elements: 4096, Seed: 1})
	amb := codeDensity(1)
	star := c.Stars[0].Pos
	assert.Positive(t, star[2], "star on the ambient side of the face")
	dense, diffuse := 0, 0
	for i := range c.Gas.Mass {
		z := c.Gas.Pos[2][i]
		if z < 0 {
			dense++
			assert.InEpsilon(t, InterfaceContrast*amb, c.Gas.Density[i], 1e-12)
		} else {
			diffuse++
			assert.InEpsilon(t, amb, c.Gas.Density[i], 1e-12)
			assert.Greater(t, z, star[2], "star below the first ambient layer")
		}
	}
	assert.Equal(t, dense, diffuse)
	assert.Equal(t, [3]float64{}, c.Box.Size, "open box")
}

func TestClumpyCloudStructure(t *testing.T) {
	spec := CaseSpec{DensityCm3: 10, GasMassMsun: 100, Elements: 4096, Seed: 1}
	c := build(t, "clumpy-cloud", spec)
	n := float64(c.Gas.Len())
	R := math.Cbrt(3 * n * spec.GasMassMsun / (4 * math.Pi * codeDensity(spec.DensityCm3)))
	lo, hi := math.Inf(1), 0.0
	for i := range c.Gas.Mass {
		r := math.Sqrt(c.Gas.Pos[0][i]*c.Gas.Pos[0][i] + c.Gas.Pos[1][i]*c.Gas.Pos[1][i] + c.Gas.Pos[2][i]*c.Gas.Pos[2][i])
		assert.LessOrEqual(t, r, R*(1+1e-12))
		lo, hi = math.Min(lo, c.Gas.Density[i]), math.Max(hi, c.Gas.Density[i])
	}
	assert.Greater(t, hi/lo, 100.0, "clumps are much denser than the inter-clump gas")
	require.Len(t, c.Stars, clusterStars)
	for _, s := range c.Stars {
		r := math.Sqrt(s.Pos[0]*s.Pos[0] + s.Pos[1]*s.Pos[1] + s.Pos[2]*s.Pos[2])
		assert.LessOrEqual(t, r, clusterRadius*R)
	}
}

func TestSetupsRejectBadSpecs(t *testing.T) {
	tests := []struct {
		name string
		spec CaseSpec
	}{
		{"zero density", CaseSpec{DensityCm3: 0, GasMassMsun: 1, Elements: 512}},
		{"infinite density", CaseSpec{DensityCm3: math.Inf(1), GasMassMsun: 1, Elements: 512}},
		{"negative mass", CaseSpec{DensityCm3: 1, GasMassMsun: -1, Elements: 512}},
		{"NaN mass", CaseSpec{DensityCm3: 1, GasMassMsun: math.NaN(), Elements: 512}},
		{"too few elements", CaseSpec{DensityCm3: 1, GasMassMsun: 1, Elements: 8}},
	}
	for _, s := range StandardSetups() {
		for _, tc := range tests {
			t.Run(s.Name+"/"+tc.name, func(t *testing.T) {
				c, err := s.Build(tc.spec)
				assert.Error(t, err)
				assert.Nil(t, c)
			})
		}
	}
	_, err := SelectSetups([]string{"moon"})
	assert.ErrorContains(t, err, "unknown set-up")
	_, err = SelectSetups([]string{"glass", " glass"})
	assert.ErrorContains(t, err, `set-up "glass" named twice`)
	two, err := SelectSetups([]string{"interface", " uniform-lattice "})
	require.NoError(t, err)
	require.Len(t, two, 2)
	assert.Equal(t, "interface", two[0].Name)
	assert.Equal(t, "uniform-lattice", two[1].Name)
}

// The touch-only floor leaves the gas bit for bit as it was and touches k
// elements per star.
func TestTouchFloorLeavesGasUnchanged(t *testing.T) {
	c := build(t, "clumpy-cloud", CaseSpec{DensityCm3: 1, GasMassMsun: 10, Elements: 1000, Seed: 3})
	before := c.Gas.Clone()
	tree := newTestTree(t, c)
	var f TouchFloor
	n, err := f.Touch(c.Gas.View(), tree, c.Stars, 32)
	require.NoError(t, err)
	assert.Equal(t, 32*len(c.Stars), n)
	assert.Equal(t, before, c.Gas)
	view := c.Gas.View()
	allocs := func(stars int) float64 {
		return testing.AllocsPerRun(10, func() { _, _ = f.Touch(view, tree, c.Stars[:stars], 32) })
	}
	// Gas validation allocates a little once per call; nothing is
	// allocated per star once the scratch has grown.
	assert.Equal(t, allocs(1), allocs(len(c.Stars)))
	_, err = f.Touch(c.Gas.View(), tree, c.Stars, 0)
	assert.Error(t, err)
	_, err = f.Touch(c.Gas.View(), tree, c.Stars, 5000)
	assert.Error(t, err, "more neighbors than gas")
}
