package bench

import (
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Files of a gas directory read by ReadGasDir. All arrays are NumPy .npy
// files, little- or big-endian, float32 or float64 (IDs: int32, int64 or
// integral floats), C or Fortran order, in the code units the caller
// states:
//
//	pos.npy              (n, 3)  positions                      [length]
//	vel.npy              (n, 3)  velocities                     [velocity]
//	mass.npy             (n,)    element masses                 [mass]
//	density.npy          (n,)    mass densities                 [mass / length^3]
//	internal_energy.npy  (n,)    specific internal energies     [velocity^2]
//	id.npy               (n,)    unique IDs (optional; 1..n if absent)
//	metallicity.npy      (n,)    metal mass fractions (optional; none tracked if absent)
//	stars.npy            (s, 3)  star positions (optional)      [length]
//
// On a periodic axis of the box every gas and star position must lie in
// [0, L) (ErrOutsideBox); on an open axis every star must lie within the
// extent of the gas (ErrStarOutsideGas), since a star outside it has all
// its gas on one side and no coupling can be isotropic there.
//
// Without stars.npy one star is placed at the densest element. Each star
// releases one supernova (SupernovaEnergyErg, EjectaMassMsun) at rest in
// the code frame, with the metallicity of the gas nearest to it (solar when
// no metallicity is given).
const (
	GasPositionsFile      = "pos.npy"
	GasVelocitiesFile     = "vel.npy"
	GasMassesFile         = "mass.npy"
	GasDensitiesFile      = "density.npy"
	GasInternalEnergyFile = "internal_energy.npy"
	GasIDsFile            = "id.npy"
	GasMetallicityFile    = "metallicity.npy"
	StarPositionsFile     = "stars.npy"
)

// Errors of ReadGasDir, for errors.Is.
var (
	// ErrOutsideBox marks a gas or star position outside the periodic box.
	ErrOutsideBox = errors.New("position outside the periodic box")
	// ErrStarOutsideGas marks a star outside the extent of the gas.
	ErrStarOutsideGas = errors.New("star outside the gas")
)

// ReadGasDir reads a user's gas from the .npy arrays in dir (see
// GasPositionsFile for the layout), in code units u, with periodic box box
// (zero for open), into a case named "user-gas".
func ReadGasDir(dir string, u units.CodeUnits, box neighbor.Box) (*Case, error) {
	if err := u.Validate(); err != nil {
		return nil, fmt.Errorf("read gas %s: %w", dir, err)
	}
	if err := box.Validate(); err != nil {
		return nil, fmt.Errorf("read gas %s: %w", dir, err)
	}
	pos, n, err := readGasArray(dir, GasPositionsFile, 3, -1, true)
	if err != nil {
		return nil, err
	}
	if n == 0 {
		return nil, fmt.Errorf("read gas %s: %s holds no elements", dir, GasPositionsFile)
	}
	vel, _, err := readGasArray(dir, GasVelocitiesFile, 3, n, true)
	if err != nil {
		return nil, err
	}
	cols := map[string][]float64{}
	for _, name := range []string{GasMassesFile, GasDensitiesFile, GasInternalEnergyFile} {
		v, _, err := readGasArray(dir, name, 1, n, true)
		if err != nil {
			return nil, err
		}
		cols[name] = v
	}
	ids, _, err := readGasArray(dir, GasIDsFile, 1, n, false)
	if err != nil {
		return nil, err
	}
	metals, _, err := readGasArray(dir, GasMetallicityFile, 1, n, false)
	if err != nil {
		return nil, err
	}
	starPos, ns, err := readGasArray(dir, StarPositionsFile, 3, -1, false)
	if err != nil {
		return nil, err
	}

	g := &audit.GasArrays{}
	for a := 0; a < 3; a++ {
		g.Pos[a] = make([]float64, n)
		g.Vel[a] = make([]float64, n)
		for i := 0; i < n; i++ {
			g.Pos[a][i] = pos[3*i+a]
			g.Vel[a][i] = vel[3*i+a]
		}
	}
	g.Mass, g.Density, g.Energy = cols[GasMassesFile], cols[GasDensitiesFile], cols[GasInternalEnergyFile]
	g.ID = make([]int64, n)
	seen := make(map[int64]int, n)
	for i := range g.ID {
		id := int64(i + 1)
		if ids != nil {
			v := ids[i]
			if v != math.Trunc(v) || math.Abs(v) > 1<<53 {
				return nil, fmt.Errorf("read gas %s: %s element %d: ID %g is not an integer", dir, GasIDsFile, i, v)
			}
			id = int64(v)
		}
		if j, dup := seen[id]; dup {
			return nil, fmt.Errorf("read gas %s: %s: elements %d and %d share ID %d", dir, GasIDsFile, j, i, id)
		}
		seen[id] = i
		g.ID[i] = id
	}
	if metals != nil {
		g.Species = []yields.Species{yields.Metals}
		g.Fractions = [][]float64{metals}
	}
	for i := 0; i < n; i++ {
		if !(g.Mass[i] > 0) || !(g.Density[i] > 0) || !(g.Energy[i] >= 0) {
			return nil, fmt.Errorf("read gas %s: element %d has mass %g, density %g, internal energy %g: need positive mass and density and non-negative energy",
				dir, i, g.Mass[i], g.Density[i], g.Energy[i])
		}
		if metals != nil && !(metals[i] >= 0 && metals[i] <= 1) {
			return nil, fmt.Errorf("read gas %s: element %d: metallicity %g outside [0, 1]", dir, i, metals[i])
		}
	}

	c := &Case{Setup: "user-gas", Gas: g, Box: box, Units: u}
	densest := 0
	for i := range g.Density {
		if g.Density[i] > g.Density[densest] {
			densest = i
		}
	}
	if starPos == nil {
		starPos, ns = []float64{g.Pos[0][densest], g.Pos[1][densest], g.Pos[2][densest]}, 1
	}
	if ns == 0 {
		return nil, fmt.Errorf("read gas %s: %s holds no stars", dir, StarPositionsFile)
	}
	if err := checkInside(pos, starPos, box); err != nil {
		return nil, fmt.Errorf("read gas %s: %w", dir, err)
	}
	tree, err := neighbor.NewTree(g.Packed(), g.ID, box)
	if err != nil {
		return nil, fmt.Errorf("read gas %s: %w", dir, err)
	}
	var buf []neighbor.Neighbor
	mean := 0.0
	for s := 0; s < ns; s++ {
		p := [3]float64{starPos[3*s], starPos[3*s+1], starPos[3*s+2]}
		buf, err = tree.Nearest(neighbor.Query{Pos: p}, 1, buf)
		if err != nil {
			return nil, fmt.Errorf("read gas %s: star %d: %w", dir, s, err)
		}
		z := yields.SolarMetals
		if metals != nil {
			z = metals[buf[0].Index]
		}
		mean += g.Density[buf[0].Index]
		c.Stars = append(c.Stars, feedback.Star{ID: int64(s + 1), Pos: p, Mass: 100 * units.SolarMass / u.MassG, Metallicity: z})
	}
	mean /= float64(ns)
	c.DensityCm3 = mean * u.DensityGCm3() / (feedback.MassPerHydrogen * units.ProtonMass)
	total := 0.0
	for _, m := range g.Mass {
		total += m
	}
	c.GasMassMsun = total / float64(n) * u.MassG / units.SolarMass
	return c, nil
}

// checkInside checks the gas and star positions (row-major, 3 per row)
// against the box: on a periodic axis all of them lie in [0, L); on an open
// axis the stars lie within the gas's extent.
func checkInside(gas, stars []float64, box neighbor.Box) error {
	axes := [3]string{"x", "y", "z"}
	var lo, hi [3]float64
	for a := 0; a < 3; a++ {
		lo[a], hi[a] = math.Inf(1), math.Inf(-1)
	}
	for i := 0; i < len(gas)/3; i++ {
		for a := 0; a < 3; a++ {
			x := gas[3*i+a]
			if L := box.Size[a]; L > 0 && !(x >= 0 && x < L) {
				return fmt.Errorf("%s: element %d has %s = %g, outside [0, %g) (-box-size): %w",
					GasPositionsFile, i, axes[a], x, L, ErrOutsideBox)
			}
			lo[a], hi[a] = math.Min(lo[a], x), math.Max(hi[a], x)
		}
	}
	for s := 0; s < len(stars)/3; s++ {
		for a := 0; a < 3; a++ {
			x := stars[3*s+a]
			if L := box.Size[a]; L > 0 {
				if !(x >= 0 && x < L) {
					return fmt.Errorf("%s: star %d has %s = %g, outside [0, %g) (-box-size): %w",
						StarPositionsFile, s, axes[a], x, L, ErrOutsideBox)
				}
				continue
			}
			if x < lo[a] || x > hi[a] {
				return fmt.Errorf("%s: star %d has %s = %g, outside the gas's extent [%g, %g] on that axis: all its gas would lie on one side: %w",
					StarPositionsFile, s, axes[a], x, lo[a], hi[a], ErrStarOutsideGas)
			}
		}
	}
	return nil
}

// readGasArray reads dir/name (see audit.ReadArray) for ReadGasDir: want >= 0
// requires that many rows, and a missing optional file gives nil.
func readGasArray(dir, name string, ncol, want int, required bool) ([]float64, int, error) {
	path := filepath.Join(dir, name)
	if _, err := os.Stat(path); errors.Is(err, fs.ErrNotExist) && !required {
		return nil, 0, nil
	}
	data, rows, err := audit.ReadArray(path, ncol)
	if err != nil {
		return nil, 0, fmt.Errorf("read gas: %w", err)
	}
	if want >= 0 && rows != want {
		return nil, 0, fmt.Errorf("read gas %s: %d rows, want %d (as in %s)", path, rows, want, GasPositionsFile)
	}
	return data, rows, nil
}
