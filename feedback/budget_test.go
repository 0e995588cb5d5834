package feedback_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// electronsPerHydrogen is n_e / n_H for fully ionized hydrogen and singly
// ionized helium, from the solar mass fractions X = 0.7381, Y = 0.2485
// (Asplund, Grevesse, Sauval & Scott 2009, ARA&A 47, 481; from memory)
// and the standard atomic weights 1.008 and 4.0026 (IUPAC): each helium
// atom gives one electron, n_He / n_H = (Y / 4.0026) / (X / 1.008).
func electronsPerHydrogen() float64 { return 1 + (0.2485/4.0026)/(0.7381/1.008) }

func TestHydrogenAndElectronCounts(t *testing.T) {
	// The gas mass per hydrogen atom is 1/X proton masses with the solar
	// hydrogen mass fraction X = 0.7381 (Asplund et al. 2009, from memory),
	// the one the yields use, not a separate 1.4.
	assert.InEpsilon(t, 1/0.7381, feedback.MassPerHydrogen, 1e-12)
	assert.InEpsilon(t, 1/yields.SolarHydrogen, feedback.MassPerHydrogen, 1e-15)
	// An H II region has about 1.1 electrons per hydrogen atom once helium
	// is singly ionized (derivation in electronsPerHydrogen).
	assert.InEpsilon(t, electronsPerHydrogen(), feedback.ElectronsPerHydrogen, 1e-3)
	assert.InDelta(t, 1.085, feedback.ElectronsPerHydrogen, 0.005)
}

func TestInfraredBoostIsBounded(t *testing.T) {
	// A 100 g/cm^2 column at solar metallicity has tau_IR = 500 with the
	// default 5 cm^2/g; radiation-hydrodynamic studies find the delivered
	// momentum is at most a few L/c however large tau_IR is (Krumholz &
	// Thompson 2012, ApJ 760, 155; Skinner & Ostriker 2015, ApJ 809, 187;
	// from memory), so the default bound holds it at 3 L/c.
	u := units.ParsecSolarMassKms()
	e := 1e6 * units.SolarLuminosity * units.Megayear / u.EnergyErg()
	lc := e / (units.SpeedOfLight / u.VelocityCmPS)
	cases := []struct {
		name  string
		rp    feedback.RadiationPressure
		sigma float64
		want  float64 // in units of L dt / c
	}{
		{"default bound", feedback.DefaultRadiationPressure(), 100, 3},
		{"configured bound", boosted(1.5), 100, 1.5},
		{"unbounded on request", boosted(math.Inf(1)), 100, 501},
		{"below the bound", feedback.DefaultRadiationPressure(), 0.2, 2},
	}
	for _, c := range cases {
		assert.InEpsilon(t, c.want, c.rp.Momentum(e, c.sigma, 1, u)/lc, 1e-9, c.name)
	}
	// Through the coupler: a dense cloud whose column is far above
	// tau_IR = 1 gets 3 L/c, not (1 + tau_IR) L/c.
	g := uniformGas(12, 400, 1e4, 1e4, u)
	src := feedback.Source{Star: feedback.Star{ID: 2}, Channel: yields.RadiationPressure, Energy: e}
	out, _ := coupleOnce(t, g, feedback.Config{Units: u, Scheme: feedback.DefaultRadiationPressure(), Neighbors: 64}, []feedback.Source{src})
	assert.InEpsilon(t, 3*lc, out.Ledger.RadialMomentum, 1e-6)
	// A bound below 1 (zero included) is refused when the coupler is made.
	for _, b := range []float64{0.5, 0} {
		_, err := feedback.NewCoupler(feedback.Config{Units: u, Scheme: boosted(b)})
		assert.ErrorContains(t, err, "at least 1")
		assert.ErrorIs(t, err, feedback.ErrInvalidArgument)
	}
}

// boosted is the default radiation pressure with another bound on the
// infrared boost.
func boosted(b float64) feedback.RadiationPressure {
	rp := feedback.DefaultRadiationPressure()
	rp.MaxInfraredBoost = b
	return rp
}

func TestPhotoheatingIsPaidFromTheLight(t *testing.T) {
	// The heat photoionization and photoelectric heating deposit is part of
	// the light the stars emit: radiation pressure and the two heating
	// channels together take in the population's radiant energy, not more
	// (energy conservation). A 1e4 Msun population from 0.5 to 1.5 Myr.
	u := units.ParsecSolarMassKms()
	pop := defaultPopulation(t)
	g := uniformGas(3, 400, 100, 1, u)
	f := newTree(t, g)
	myr := units.Megayear / u.TimeS()
	rel, err := pop.Release(0.5, 1.5, 0.0134)
	require.NoError(t, err)
	light := rel.RadiantEnergy * 1e4 / u.EnergyErg() // erg per Msun formed
	star := feedback.StarParticle{Star: feedback.Star{ID: 1, Mass: 1e4, Metallicity: 0.0134, Age: 0.5 * myr}, FormedMass: 1e4}
	for _, c := range []struct {
		name      string
		cfg       feedback.StepConfig
		rad, heat bool
	}{
		{"both", feedback.StepConfig{}, true, true},
		{"no photoionization", feedback.StepConfig{SkipPhotoionization: true}, true, false},
		{"no radiation pressure", feedback.StepConfig{SkipRadiation: true}, false, true},
	} {
		cfg := feedback.DefaultStepConfig(feedback.Config{Units: u}, pop)
		cfg.SkipPhotoionization, cfg.SkipRadiation = c.cfg.SkipPhotoionization, c.cfg.SkipRadiation
		cfg.Seed = 1
		st, err := feedback.NewStepper(cfg)
		require.NoError(t, err)
		var out feedback.StepOutput
		require.NoError(t, st.Step(g.View(), f, []feedback.StarParticle{star}, 0, myr, &out))
		rad := out.Channels[yields.RadiationPressure].In.Energy
		ion := out.Channels[yields.Photoionization].In.Energy
		pe := out.Channels[yields.PhotoelectricHeating]
		require.NoError(t, out.Ledger.Balanced(1e-12), c.name)
		if c.rad {
			// The photoelectric channel keeps only its heat in its books.
			assert.Greater(t, pe.In.Energy, 0.0, c.name)
			assert.InEpsilon(t, pe.In.Energy, pe.Deposited.Energy, 1e-12, c.name)
			assert.Zero(t, pe.Radiated, c.name)
			rad += pe.In.Energy
		}
		photons := rel.IonizingPhotons * 1e4
		heat := photons * 3 * 1.602176634e-12 / u.EnergyErg() // 3 eV per photon, the default
		if c.heat {
			assert.InEpsilon(t, heat, ion, 1e-9, c.name)
		}
		if c.rad && c.heat {
			assert.InEpsilon(t, light, rad+ion, 1e-12, c.name)
		}
		if c.rad && !c.heat {
			assert.InEpsilon(t, light, rad, 1e-12, c.name)
		}
		if !c.rad {
			assert.Zero(t, rad, c.name)
		}
	}
}

// stromgrenMass is the gas mass (Msun) a source of q ionizing photons per
// second keeps ionized in uniform gas of hydrogen density n (cm^-3):
// q / (alpha_B n_e n) of volume (Strömgren 1939, ApJ 89, 526; alpha_B =
// 2.6e-13 cm^3/s at 1e4 K, Osterbrock & Ferland 2006, from memory), with
// n_e from electronsPerHydrogen and 1/X proton masses per hydrogen atom.
func stromgrenMass(q, n float64) float64 {
	v := q / (2.6e-13 * electronsPerHydrogen() * n * n)
	return v * n * units.ProtonMass / 0.7381 / units.SolarMass
}

// The ionizing photons reach beyond the coupler's k nearest neighbors when
// asked to: the search grows until the Strömgren mass is ionized, and
// whatever the gas reached cannot absorb (by default the 32 neighbors,
// 320 Msun) is booked as escaped photons, whose heat is radiated.
func TestPhotonsReachBeyondTheNeighbors(t *testing.T) {
	u := units.ParsecSolarMassKms()
	const q = 1e49 // photons per second: 4.4e4 Msun at n = 1
	g, _ := latticeOfMass(23, 10, 1, u)
	dt := units.Megayear / u.TimeS()
	photons := q * units.Megayear
	src := feedback.Source{Star: feedback.Star{ID: 1, Pos: [3]float64{0.1, 0.05, 0.02}}, Channel: yields.Photoionization,
		Photons: photons, Duration: dt, Energy: photons * 3 * 1.602176634e-12 / u.EnergyErg()}
	ms := stromgrenMass(q, 1)
	for _, c := range []struct {
		name  string
		reach int
		want  float64 // ionized mass, Msun
	}{
		{"grown to the Strömgren mass", 1 << 14, ms},
		{"bounded search", 100, 1000},
		{"coupler's neighbors only (default)", 0, 320},
	} {
		before := append([]float64(nil), g.Energy...)
		gc := g.Clone()
		out, _ := coupleOnce(t, gc, feedback.Config{Units: u, Scheme: feedback.Photoionization{Reach: c.reach}, Neighbors: 32}, []feedback.Source{src})
		// Ionized gas is lifted from its start to the 1e4 K floor, u =
		// (3/2) k T / (mu m_p) (photoionizedMeanMass); the last element in
		// part. Count the
		// ionized mass in full lifts.
		floor := 1.5 * units.Boltzmann * 1e4 / (photoionizedMeanMass() * units.ProtonMass) / u.SpecificEnergy()
		ionized := 0.0
		for _, r := range out.Records {
			i := r.GasIndex
			ionized += (gc.Energy[i] - before[i]) / (floor - before[i]) * gc.Mass[i] * u.MassG / units.SolarMass
		}
		assert.InEpsilon(t, c.want, ionized, 0.01, c.name)
		escaped := photons * (1 - c.want/ms)
		assert.InDelta(t, escaped, out.Ledger.EscapedPhotons, 1e-6*photons, c.name)
		assert.Equal(t, photons, out.Ledger.Photons)
	}
}

// The stepper's photoionization channel reaches beyond the shared
// neighbor search too: a young 1e4 Msun population in gas at n = 100
// ionizes its Strömgren mass, far more than its 32 neighbors hold.
func TestStepperPhotoionizesTheStromgrenMass(t *testing.T) {
	u := units.ParsecSolarMassKms()
	pop := defaultPopulation(t)
	g, _ := latticeOfMass(25, 10, 100, u)
	f := newTree(t, g)
	cfg := feedback.DefaultStepConfig(feedback.Config{Units: u, Neighbors: 32}, pop)
	cfg.Seed, cfg.SkipRadiation, cfg.SkipWinds, cfg.SkipPhotoelectric = 1, true, true, true
	cfg.Photoionization = feedback.Photoionization{Reach: 1 << 14}
	st, err := feedback.NewStepper(cfg)
	require.NoError(t, err)
	myr := units.Megayear / u.TimeS()
	star := feedback.StarParticle{Star: feedback.Star{ID: 1, Mass: 1e4, Metallicity: 0.0134, Age: 0.5 * myr, Pos: [3]float64{0.1, 0.05, 0.02}}, FormedMass: 1e4}
	var out feedback.StepOutput
	dt := 0.1 * myr
	require.NoError(t, st.Step(g.View(), f, []feedback.StarParticle{star}, 0, dt, &out))
	rel, err := pop.Release(0.5, 0.6, 0.0134)
	require.NoError(t, err)
	q := rel.IonizingPhotons * 1e4 / (0.1 * units.Megayear)
	ionized := 0
	for _, r := range out.Records {
		if r.Channel == yields.Photoionization && r.Flags&feedback.FlagIonized != 0 {
			ionized++
		}
	}
	require.Greater(t, ionized, 32)
	assert.InDelta(t, stromgrenMass(q, 100), 10*float64(ionized), 10, "Q = %.3g /s", q)
	assert.Zero(t, out.Channels[yields.Photoionization].EscapedPhotons)
}

// Grown photoionization searches give bitwise the same gas for any worker
// count.
func TestPhotonReachIsDeterministic(t *testing.T) {
	u := units.ParsecSolarMassKms()
	base, dx := latticeOfMass(17, 10, 1, u)
	dt := units.Megayear / u.TimeS()
	var srcs []feedback.Source
	for s := 0; s < 20; s++ {
		photons := 2e47 * (1 + float64(s%3)) * units.Megayear
		srcs = append(srcs, feedback.Source{Star: feedback.Star{ID: int64(s + 1), Pos: [3]float64{float64(s%7-3) * dx, float64(s%5-2) * dx, 0.3 * dx}},
			Channel: yields.Photoionization, Photons: photons, Duration: dt, Energy: photons * 3 * 1.602176634e-12 / u.EnergyErg()})
	}
	var ref *audit.GasArrays
	for _, workers := range []int{1, 2, 3} {
		g := base.Clone()
		out, _ := coupleOnce(t, g, feedback.Config{Units: u, Scheme: feedback.Photoionization{Reach: 4096}, Neighbors: 32, Workers: workers}, srcs)
		require.Greater(t, len(out.Records), 32*len(srcs))
		if ref == nil {
			ref = g
			continue
		}
		for i := range g.Energy {
			require.Equal(t, math.Float64bits(ref.Energy[i]), math.Float64bits(g.Energy[i]), "workers %d", workers)
		}
	}
}

// Fully ionized gas of the solar mass fractions (X = 0.7381, Y = 0.2485,
// Z = 0.0134; Asplund et al. 2009, from memory) has, per gram, 2 X / 1.008
// + 3 Y / 4.0026 + Z / 2 particles per atomic mass unit (two per hydrogen
// atom, three per helium atom, with the IUPAC standard atomic weights;
// about one per two nucleons for heavy elements, common practice), so its
// mean particle mass is 0.99277 (m_u / m_p, CODATA 2018) over that, 0.599
// proton masses: the temperature scale of stochastic heating's jump must
// use it, not a value for another composition.
func TestIonizedMeanMass(t *testing.T) {
	particles := 2*0.7381/1.008 + 3*0.2485/4.0026 + 0.0134/2
	assert.InEpsilon(t, 0.99277/particles, feedback.IonizedMeanMolecularWeight, 1e-3)
}

// photoionizedMeanMass is the mean particle mass, in proton masses, of
// the gas whose electrons photoionization's recombinations count:
// hydrogen fully and helium singly ionized (electronsPerHydrogen), so per
// hydrogen atom 1 + n_He / n_H nuclei and as many electrons, in 1/X proton
// masses of gas (X = 0.7381, Asplund et al. 2009, from memory): 0.624.
func photoionizedMeanMass() float64 {
	return (1 / 0.7381) / (2 * electronsPerHydrogen())
}

// Photoionized gas is lifted to 1e4 K at the mean particle mass of the
// composition its recombinations assume (hydrogen fully and helium singly
// ionized, 1.085 electrons per hydrogen atom): before, the floor took the
// fully ionized 0.599 (helium doubly ionized) while the recombinations
// counted singly ionized helium's electrons, and the floor came out 4%
// hotter than the gas the Strömgren budget describes.
func TestPhotoionizedFloorMatchesItsElectrons(t *testing.T) {
	assert.InDelta(t, 0.624, photoionizedMeanMass(), 0.001)
	assert.InEpsilon(t, photoionizedMeanMass(), feedback.PhotoionizedMeanMolecularWeight, 1e-3)
	// The same composition in the library's own terms: particles per
	// hydrogen atom are the nuclei (1 + n_He / n_H) plus the electrons.
	assert.InEpsilon(t, feedback.MassPerHydrogen/(2*feedback.ElectronsPerHydrogen), feedback.PhotoionizedMeanMolecularWeight, 1e-12)

	// A source with photons to spare ionizes every neighbor of cold gas
	// and lifts it exactly to the floor.
	u := units.ParsecSolarMassKms()
	g := uniformGas(9, 100, 10, 1, u)
	dt := units.Megayear / u.TimeS()
	photons := 1e50 * units.Megayear
	src := feedback.Source{Star: feedback.Star{ID: 1, Pos: [3]float64{0.1, 0.05, 0.02}}, Channel: yields.Photoionization,
		Photons: photons, Duration: dt, Energy: 1e60 / u.EnergyErg()}
	out, _ := coupleOnce(t, g, feedback.Config{Units: u, Scheme: feedback.Photoionization{}, Neighbors: 8}, []feedback.Source{src})
	require.Len(t, out.Records, 8)
	floor := 1.5 * units.Boltzmann * 1e4 / (photoionizedMeanMass() * units.ProtonMass) / u.SpecificEnergy()
	for _, r := range out.Records {
		require.NotZero(t, r.Flags&feedback.FlagIonized)
		assert.InEpsilon(t, floor, g.Energy[r.GasIndex], 1e-3, "element %d", r.GasID)
	}
}
