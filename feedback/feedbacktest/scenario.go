// Package feedbacktest checks any feedback scheme, a user's own included,
// inside go test: it runs the scheme on randomized and adversarial
// neighborhoods (uniform, clustered, one-sided, a single neighbor, gas at
// the star's position, a huge density contrast, a moving star in moving gas,
// overlapping stars) and asserts that mass, every species, momentum and
// energy are conserved to round-off, that masses and energies stay
// positive, that the radial momentum is balanced where the geometry allows
// it, and that results are bitwise the same for any worker count and star
// order.
//
//	func TestMyScheme(t *testing.T) {
//		feedbacktest.Check(t, MyScheme{}, feedbacktest.DefaultOptions())
//	}
package feedbacktest

import (
	"math"
	"math/rand/v2"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Species tracked by the scenario gas.
func trackedSpecies() []yields.Species {
	return []yields.Species{yields.Metals, yields.Hydrogen, yields.Helium, yields.Oxygen, yields.Iron}
}

// Scenario is a named neighborhood set-up: gas, the stars releasing into
// it, and whether its geometry admits an isotropic deposit.
type Scenario struct {
	Name    string
	Gas     *audit.GasArrays
	Sources []feedback.Source
	Box     neighbor.Box
	// Neighbors to couple to (at most the gas count).
	Neighbors int
	// Balanced is true when gas surrounds every star, so a corrected scheme
	// must hand out radial momentum with a vanishing net.
	Balanced bool
}

// SupernovaRelease is a single 1e51 erg supernova ejecting 10 Msun, in the
// scenario units: the release every scenario star makes.
func SupernovaRelease(star feedback.Star) feedback.Source {
	u := units.ParsecSolarMassKms()
	s := feedback.Source{Star: star, Channel: yields.CoreCollapse, Mass: 10, Events: 1,
		Energy: units.FOE / u.EnergyErg()}
	s.Species[yields.Hydrogen] = 5.5
	s.Species[yields.Helium] = 3.5
	s.Species[yields.Metals] = 1.0
	s.Species[yields.Oxygen] = 0.6
	s.Species[yields.Iron] = 0.08
	return s
}

// newGas makes n elements with the given positions generator, density n_H
// (cm^-3) and temperature-like specific energy.
func newGas(n int, pos func(i int) [3]float64, mass float64, nH float64, rng *rand.Rand, vel float64, idBase int64) *audit.GasArrays {
	u := units.ParsecSolarMassKms()
	rho := nH * feedback.MassPerHydrogen * units.ProtonMass / u.DensityGCm3()
	g := &audit.GasArrays{Species: trackedSpecies()}
	for a := 0; a < 3; a++ {
		g.Pos[a] = make([]float64, n)
		g.Vel[a] = make([]float64, n)
	}
	g.Fractions = make([][]float64, len(g.Species))
	for c := range g.Fractions {
		g.Fractions[c] = make([]float64, n)
	}
	for i := 0; i < n; i++ {
		p := pos(i)
		for a := 0; a < 3; a++ {
			g.Pos[a][i] = p[a]
			if vel > 0 {
				g.Vel[a][i] = vel * rng.NormFloat64()
			}
		}
		g.Mass = append(g.Mass, mass*(0.8+0.4*rng.Float64()))
		g.Density = append(g.Density, rho*(0.8+0.4*rng.Float64()))
		// About 1e4 K: (3/2) k T / (mu m_p) with mu = 0.6, in km^2/s^2.
		g.Energy = append(g.Energy, 1.5*units.Boltzmann*1e4/(0.6*units.ProtonMass)/u.SpecificEnergy())
		g.ID = append(g.ID, idBase+int64(rng.IntN(1<<20))*1024+int64(i))
		z := 0.01 * rng.Float64()
		fr := []float64{z, 0.74 - z/2, 0.26 - z/2, 0.4 * z, 0.1 * z}
		for c := range g.Fractions {
			g.Fractions[c][i] = fr[c]
		}
	}
	return g
}

func ball(rng *rand.Rand, r float64) [3]float64 {
	for {
		p := [3]float64{2*rng.Float64() - 1, 2*rng.Float64() - 1, 2*rng.Float64() - 1}
		if p[0]*p[0]+p[1]*p[1]+p[2]*p[2] <= 1 {
			return [3]float64{r * p[0], r * p[1], r * p[2]}
		}
	}
}

// Scenarios returns the standard set-ups for a seed.
func Scenarios(seed uint64) []Scenario {
	rng := rand.New(rand.NewPCG(seed, 0x5eed))
	star := func(id int64, p [3]float64, v [3]float64) feedback.Star {
		return feedback.Star{ID: id, Pos: p, Vel: v, Mass: 1e3, Metallicity: 0.0134, Age: 5}
	}
	var out []Scenario

	g := newGas(400, func(int) [3]float64 { return ball(rng, 50) }, 100, 1, rng, 0, 1)
	out = append(out, Scenario{Name: "uniform", Gas: g, Neighbors: 48, Balanced: true,
		Sources: []feedback.Source{SupernovaRelease(star(7, [3]float64{}, [3]float64{}))}})

	// Six clumps of different size and density around the star.
	centers := [][3]float64{{12, 0, 0}, {-9, 3, 0}, {0, 14, -2}, {1, -10, 0}, {0, 2, 11}, {-3, 0, -13}}
	radii := []float64{3, 5, 2, 6, 4, 3}
	g = newGas(360, func(i int) [3]float64 {
		c := centers[i%len(centers)]
		p := ball(rng, radii[i%len(centers)])
		return [3]float64{c[0] + p[0], c[1] + p[1], c[2] + p[2]}
	}, 50, 30, rng, 0, 2)
	for i := range g.Density {
		g.Density[i] *= float64(1 + i%len(centers))
	}
	out = append(out, Scenario{Name: "clustered", Gas: g, Neighbors: 200, Balanced: true,
		Sources: []feedback.Source{SupernovaRelease(star(11, [3]float64{}, [3]float64{}))}})

	g = newGas(200, func(int) [3]float64 {
		p := ball(rng, 30)
		p[0] = math.Abs(p[0]) + 0.5
		return p
	}, 100, 1, rng, 0, 3)
	out = append(out, Scenario{Name: "one-sided", Gas: g, Neighbors: 32,
		Sources: []feedback.Source{SupernovaRelease(star(13, [3]float64{}, [3]float64{}))}})

	g = newGas(1, func(int) [3]float64 { return [3]float64{3, 1, -2} }, 1e3, 10, rng, 0, 4)
	out = append(out, Scenario{Name: "single-neighbor", Gas: g, Neighbors: 1,
		Sources: []feedback.Source{SupernovaRelease(star(17, [3]float64{}, [3]float64{}))}})

	g = newGas(64, func(i int) [3]float64 {
		if i == 0 {
			return [3]float64{1, 2, 3}
		}
		return ball(rng, 20)
	}, 80, 3, rng, 0, 5)
	out = append(out, Scenario{Name: "at-star", Gas: g, Neighbors: 24,
		Sources: []feedback.Source{SupernovaRelease(star(19, [3]float64{1, 2, 3}, [3]float64{}))}})

	g = newGas(300, func(int) [3]float64 { return ball(rng, 40) }, 100, 0.1, rng, 0, 6)
	for i := range g.Mass {
		if g.Pos[0][i] > 0 {
			g.Density[i] *= 1e4
			g.Mass[i] *= 10
		}
	}
	out = append(out, Scenario{Name: "density-contrast", Gas: g, Neighbors: 48, Balanced: true,
		Sources: []feedback.Source{SupernovaRelease(star(23, [3]float64{}, [3]float64{}))}})

	g = newGas(300, func(int) [3]float64 { return ball(rng, 40) }, 100, 3, rng, 80, 7)
	out = append(out, Scenario{Name: "moving", Gas: g, Neighbors: 48, Balanced: true,
		Sources: []feedback.Source{SupernovaRelease(star(29, [3]float64{1, -2, 0.5}, [3]float64{250, -120, 60}))}})

	g = newGas(500, func(int) [3]float64 { return ball(rng, 40) }, 60, 2, rng, 20, 8)
	var srcs []feedback.Source
	for s := 0; s < 12; s++ {
		p := ball(rng, 15)
		v := [3]float64{30 * rng.NormFloat64(), 30 * rng.NormFloat64(), 30 * rng.NormFloat64()}
		srcs = append(srcs, SupernovaRelease(star(int64(100+7*s), p, v)))
	}
	out = append(out, Scenario{Name: "overlapping-stars", Gas: g, Neighbors: 40, Balanced: true, Sources: srcs})

	g = newGas(216, func(i int) [3]float64 {
		return [3]float64{float64(i%6) * 10, float64(i/6%6) * 10, float64(i/36) * 10}
	}, 100, 1, rng, 0, 9)
	out = append(out, Scenario{Name: "periodic-corner", Gas: g, Neighbors: 32, Balanced: true,
		Box:     neighbor.Box{Size: [3]float64{60, 60, 60}},
		Sources: []feedback.Source{SupernovaRelease(star(31, [3]float64{0.5, 59.5, 0.2}, [3]float64{}))}})
	return out
}
