package bench

import (
	"fmt"
	"math"
	"math/rand/v2"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// InterfaceContrast is the density ratio between the dense slab and the
// ambient gas of the two-phase interface set-up.
const InterfaceContrast = 100

// Case is one gas set-up at one density and mass resolution, ready to
// couple: the gas, its periodic box (zero for an open box), the stars that
// explode in it, and the code units of all of these.
type Case struct {
	// Setup names the set-up the case was built from.
	Setup string
	// DensityCm3 is the set-up's reference hydrogen number density in
	// cm^-3 (the ambient phase for the interface, the cloud mean for the
	// clumpy cloud).
	DensityCm3 float64
	// GasMassMsun is the gas element mass in solar masses (the mean, where
	// masses differ).
	GasMassMsun float64
	// Gas holds the gas in code units.
	Gas *audit.GasArrays
	// Box is the periodic box; zero for an open box.
	Box neighbor.Box
	// Stars each release one supernova.
	Stars []feedback.Star
	// Units are the code units of Gas, Box and Stars.
	Units units.CodeUnits
}

// CaseSpec asks a set-up for one case.
type CaseSpec struct {
	// DensityCm3 is the reference hydrogen number density in cm^-3.
	DensityCm3 float64
	// GasMassMsun is the gas element mass in solar masses.
	GasMassMsun float64
	// Elements is the approximate number of gas elements.
	Elements int
	// Seed makes the random parts of the set-up reproducible.
	Seed uint64
}

func (s CaseSpec) validate() error {
	if !(s.DensityCm3 > 0) || math.IsInf(s.DensityCm3, 0) {
		return fmt.Errorf("density %g cm^-3 must be positive and finite", s.DensityCm3)
	}
	if !(s.GasMassMsun > 0) || math.IsInf(s.GasMassMsun, 0) {
		return fmt.Errorf("gas element mass %g Msun must be positive and finite", s.GasMassMsun)
	}
	if s.Elements < 64 || s.Elements > 1<<24 {
		return fmt.Errorf("element count %d outside 64..16777216", s.Elements)
	}
	return nil
}

// Setup is a named generator of gas around exploding stars.
type Setup struct {
	// Name identifies the set-up in results and on the command line.
	Name string
	// Description says what the gas looks like.
	Description string
	// Build makes the gas for one density and resolution. The same spec
	// gives bitwise the same case.
	Build func(spec CaseSpec) (*Case, error)
}

// StandardSetups returns the built-in set-ups, the demo scenario last:
//
//   - uniform-lattice: a periodic cubic lattice of equal-mass elements at
//     uniform density; the star sits at the box center, in the middle of a
//     lattice cell.
//   - glass: the same lattice with every element displaced by a uniform
//     random offset of up to a quarter spacing on each axis. It stands in
//     for a relaxed glass (it is not one: no relaxation is done); densities
//     keep the nominal value.
//   - interface: a two-phase interface in an open box. Equal-mass elements
//     fill a dense slab (density InterfaceContrast times the reference)
//     below the plane z = 0 and ambient gas above it, each phase on its own
//     cubic lattice; the star sits just on the ambient side of the face, a
//     quarter of an ambient spacing above it. Most of its neighbors are in
//     the slab, a few in the ambient gas: the hard case for isotropy.
//   - clumpy-cloud: the demo scenario, a setting of our own with invented
//     numbers. A spherical cloud whose mean density is the reference holds
//     half its mass in twelve Gaussian clumps (one at the center) and half
//     spread uniformly, with a 2 km/s random velocity dispersion and gas at
//     about 100 K; a young cluster of eight stars within a tenth of the
//     cloud radius of the center, moving at about 1 km/s, each releases one
//     supernova in the same step. Densities are k-nearest estimates.
func StandardSetups() []Setup {
	return []Setup{
		{Name: "uniform-lattice", Description: "periodic cubic lattice, star at the center of a cell", Build: buildLattice},
		{Name: "glass", Description: "periodic lattice jittered by up to a quarter spacing (glass-like)", Build: buildGlass},
		{Name: "interface", Description: "star at the face of a dense slab, density contrast 100", Build: buildInterface},
		{Name: "clumpy-cloud", Description: "demo: clumpy cloud around a young cluster of 8 stars (invented numbers)", Build: buildClumpyCloud},
	}
}

// SelectSetups returns the standard set-ups with the given names, in the
// given order; nil or empty names select all of them. An unknown name, or
// one given twice, is an error.
func SelectSetups(names []string) ([]Setup, error) {
	return selectByName(StandardSetups(), func(s Setup) string { return s.Name }, names, "set-up")
}

// solarMetallicity is the gas metal mass fraction of the built-in set-ups.
const solarMetallicity = yields.SolarMetals

// gasTemperatureEnergy is the specific internal energy (km^2/s^2) of gas at
// temperature t with mean molecular weight mu: (3/2) k T / (mu m_p).
func gasTemperatureEnergy(t, mu float64) float64 {
	return 1.5 * units.Boltzmann * t / (mu * units.ProtonMass) / units.ParsecSolarMassKms().SpecificEnergy()
}

// codeDensity converts a hydrogen number density (cm^-3) to a code mass
// density, with feedback.MassPerHydrogen proton masses per hydrogen atom.
func codeDensity(nH float64) float64 {
	return nH * feedback.MassPerHydrogen * units.ProtonMass / units.ParsecSolarMassKms().DensityGCm3()
}

// newArrays allocates n elements of gas tracking the total metals.
func newArrays(n int) *audit.GasArrays {
	g := &audit.GasArrays{Species: []yields.Species{yields.Metals}}
	for a := 0; a < 3; a++ {
		g.Pos[a] = make([]float64, n)
		g.Vel[a] = make([]float64, n)
	}
	g.Mass = make([]float64, n)
	g.Density = make([]float64, n)
	g.Energy = make([]float64, n)
	g.ID = make([]int64, n)
	g.Fractions = [][]float64{make([]float64, n)}
	return g
}

// setElement fills element i.
func setElement(g *audit.GasArrays, i int, p [3]float64, m, rho, u float64) {
	for a := 0; a < 3; a++ {
		g.Pos[a][i] = p[a]
	}
	g.Mass[i], g.Density[i], g.Energy[i] = m, rho, u
	g.ID[i] = int64(i + 1)
	g.Fractions[0][i] = solarMetallicity
}

func latticeSide(elements int) int {
	s := int(math.Round(math.Cbrt(float64(elements))))
	if s%2 == 1 {
		s++ // even, so the box center is a cell center
	}
	return max(s, 4)
}

func star(id int64, p [3]float64) feedback.Star {
	return feedback.Star{ID: id, Pos: p, Mass: 100, Metallicity: solarMetallicity, Age: 10}
}

func buildLattice(spec CaseSpec) (*Case, error) { return lattice(spec, "uniform-lattice", 0) }

func buildGlass(spec CaseSpec) (*Case, error) { return lattice(spec, "glass", 0.25) }

// lattice builds a periodic lattice with each element displaced by up to
// jitter spacings on each axis.
func lattice(spec CaseSpec, name string, jitter float64) (*Case, error) {
	if err := spec.validate(); err != nil {
		return nil, fmt.Errorf("set-up %s: %w", name, err)
	}
	s := latticeSide(spec.Elements)
	rho := codeDensity(spec.DensityCm3)
	d := math.Cbrt(spec.GasMassMsun / rho)
	L := float64(s) * d
	rng := rand.New(rand.NewPCG(spec.Seed, 0x61a55))
	g := newArrays(s * s * s)
	u := gasTemperatureEnergy(1e4, 0.6)
	i := 0
	for z := 0; z < s; z++ {
		for y := 0; y < s; y++ {
			for x := 0; x < s; x++ {
				p := [3]float64{(float64(x) + 0.5) * d, (float64(y) + 0.5) * d, (float64(z) + 0.5) * d}
				if jitter > 0 {
					for a := 0; a < 3; a++ {
						p[a] += jitter * d * (2*rng.Float64() - 1)
						p[a] = math.Mod(p[a]+L, L)
					}
				}
				setElement(g, i, p, spec.GasMassMsun, rho, u)
				i++
			}
		}
	}
	c := L / 2
	return &Case{Setup: name, DensityCm3: spec.DensityCm3, GasMassMsun: spec.GasMassMsun, Gas: g,
		Box: neighbor.Box{Size: [3]float64{L, L, L}}, Stars: []feedback.Star{star(1, [3]float64{c, c, c})},
		Units: units.ParsecSolarMassKms()}, nil
}

// buildInterface makes two half-lattices of equal-mass elements: a dense
// slab below z = 0 and ambient gas above, both centered on the z axis.
func buildInterface(spec CaseSpec) (*Case, error) {
	if err := spec.validate(); err != nil {
		return nil, fmt.Errorf("set-up interface: %w", err)
	}
	a := latticeSide(spec.Elements)
	depth := a / 2
	rhoAmb := codeDensity(spec.DensityCm3)
	rhoSlab := InterfaceContrast * rhoAmb
	dAmb := math.Cbrt(spec.GasMassMsun / rhoAmb)
	dSlab := math.Cbrt(spec.GasMassMsun / rhoSlab)
	g := newArrays(2 * a * a * depth)
	uAmb := gasTemperatureEnergy(1e4, 0.6)
	uSlab := uAmb / InterfaceContrast // pressure balance
	i := 0
	for z := 0; z < depth; z++ {
		for y := 0; y < a; y++ {
			for x := 0; x < a; x++ {
				lat := func(d float64, sign float64) [3]float64 {
					return [3]float64{(float64(x) - float64(a-1)/2) * d, (float64(y) - float64(a-1)/2) * d, sign * (float64(z) + 0.5) * d}
				}
				setElement(g, i, lat(dSlab, -1), spec.GasMassMsun, rhoSlab, uSlab)
				i++
				setElement(g, i, lat(dAmb, 1), spec.GasMassMsun, rhoAmb, uAmb)
				i++
			}
		}
	}
	return &Case{Setup: "interface", DensityCm3: spec.DensityCm3, GasMassMsun: spec.GasMassMsun, Gas: g,
		Stars: []feedback.Star{star(1, [3]float64{0, 0, 0.25 * dAmb})}, Units: units.ParsecSolarMassKms()}, nil
}

// Demo scenario numbers: invented, not taken from any observation.
const (
	cloudClumps         = 12
	cloudClumpMass      = 0.5  // fraction of the cloud mass in clumps
	cloudClumpRadius    = 0.08 // clump Gaussian width, in cloud radii
	cloudDispersionKms  = 2.0
	cloudTemperatureK   = 100
	clusterStars        = 8
	clusterRadius       = 0.1 // in cloud radii
	clusterDispersion   = 1.0 // km/s
	densityEstimateNear = 32
)

// buildClumpyCloud makes the demo scenario (see StandardSetups).
func buildClumpyCloud(spec CaseSpec) (*Case, error) {
	if err := spec.validate(); err != nil {
		return nil, fmt.Errorf("set-up clumpy-cloud: %w", err)
	}
	n := spec.Elements
	rhoMean := codeDensity(spec.DensityCm3)
	R := math.Cbrt(3 * float64(n) * spec.GasMassMsun / (4 * math.Pi * rhoMean))
	rng := rand.New(rand.NewPCG(spec.Seed, 0xc10d))
	centers := make([][3]float64, cloudClumps)
	for c := 1; c < cloudClumps; c++ {
		centers[c] = ball(rng, 0.7*R)
	}
	g := newArrays(n)
	u := gasTemperatureEnergy(cloudTemperatureK, 1.27)
	nClump := int(cloudClumpMass * float64(n))
	for i := 0; i < n; i++ {
		var p [3]float64
		if i < nClump {
			c := centers[i%cloudClumps]
			for {
				for a := 0; a < 3; a++ {
					p[a] = c[a] + cloudClumpRadius*R*rng.NormFloat64()
				}
				if p[0]*p[0]+p[1]*p[1]+p[2]*p[2] <= R*R {
					break
				}
			}
		} else {
			p = ball(rng, R)
		}
		setElement(g, i, p, spec.GasMassMsun, 0, u)
		for a := 0; a < 3; a++ {
			g.Vel[a][i] = cloudDispersionKms * rng.NormFloat64()
		}
	}
	if err := estimateDensities(g, densityEstimateNear); err != nil {
		return nil, fmt.Errorf("set-up clumpy-cloud: %w", err)
	}
	stars := make([]feedback.Star, clusterStars)
	for s := range stars {
		stars[s] = star(int64(s+1), ball(rng, clusterRadius*R))
		for a := 0; a < 3; a++ {
			stars[s].Vel[a] = clusterDispersion * rng.NormFloat64()
		}
	}
	return &Case{Setup: "clumpy-cloud", DensityCm3: spec.DensityCm3, GasMassMsun: spec.GasMassMsun, Gas: g,
		Stars: stars, Units: units.ParsecSolarMassKms()}, nil
}

// estimateDensities sets each element's density to the mass of its k
// nearest neighbors (itself included) over the volume of the sphere
// reaching the k-th: a k-nearest estimate (common practice).
func estimateDensities(g *audit.GasArrays, k int) error {
	tree, err := neighbor.NewTree(g.Packed(), g.ID, neighbor.Box{})
	if err != nil {
		return fmt.Errorf("density estimate: %w", err)
	}
	var buf []neighbor.Neighbor
	for i := range g.Mass {
		q := neighbor.Query{Pos: [3]float64{g.Pos[0][i], g.Pos[1][i], g.Pos[2][i]}}
		buf, err = tree.Nearest(q, k, buf)
		if err != nil {
			return fmt.Errorf("density estimate at element %d: %w", i, err)
		}
		m := 0.0
		for _, nb := range buf {
			m += g.Mass[nb.Index]
		}
		r2 := buf[len(buf)-1].Dist2
		g.Density[i] = m / (4 * math.Pi / 3 * r2 * math.Sqrt(r2))
	}
	return nil
}

// ball draws a point uniformly inside a sphere of radius r.
func ball(rng *rand.Rand, r float64) [3]float64 {
	for {
		p := [3]float64{2*rng.Float64() - 1, 2*rng.Float64() - 1, 2*rng.Float64() - 1}
		if p[0]*p[0]+p[1]*p[1]+p[2]*p[2] <= 1 {
			return [3]float64{r * p[0], r * p[1], r * p[2]}
		}
	}
}
