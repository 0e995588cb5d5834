package main

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// ejecta_config_defaults and ejecta_population_defaults write the
// library's Go defaults into every field, and the values ejecta.h states
// for them; a context made from the default config couples with what Go
// makes of its own defaults, and a population enabled from the default
// population config releases what the default built-in population does.
func TestDefaultsAreTheLibrarys(t *testing.T) {
	var c configABI
	require.Equal(t, codeOK, entryConfigDefaults(&c))
	opts := feedback.DefaultSchemeOptions()
	for _, tc := range []struct {
		field             string
		got, lib, header  float64
		headerRelativeTol float64
	}{
		{"length_cm", c.LengthCm, 1, 1, 0},
		{"mass_g", c.MassG, 1, 1, 0},
		{"velocity_cm_per_s", c.VelocityCmPerS, 1, 1, 0},
		{"kinetic_fraction", c.KineticFraction, feedback.DefaultKinetic().KineticFraction, 0.28, 0},
		{"coupling_radius", c.CouplingRadius, feedback.Config{}.Radius, 0, 0},
		{"seed", float64(c.Seed), float64(opts.Seed), 0, 0},
		{"neighbor_count", float64(c.NeighborCount), feedback.DefaultNeighbors, 32, 0},
		{"worker_threads", float64(c.WorkerThreads), 1, 1, 0},
		{"isotropy_correction", float64(c.IsotropyCorrection), 1, 1, 0},
		{"photon_reach", float64(c.PhotonReach), float64(feedback.Photoionization{}.Reach), 0, 0},
		{"max_infrared_boost", c.MaxInfraredBoost, feedback.DefaultRadiationPressure().MaxInfraredBoost, 3, 0},
		{"wind_event_energy_erg", c.WindEventEnergyErg, feedback.DefaultWinds(feedback.KimOstriker2015).EventEnergy, 1e51, 0},
	} {
		assert.Equal(t, tc.lib, tc.got, "%s: the library's default", tc.field)
		assert.Equal(t, tc.header, tc.got, "%s: the value ejecta.h states", tc.field)
	}
	assert.Equal(t, [3]float64{}, c.BoxSize)
	assert.Nil(t, c.RemnantTable)
	for _, tc := range []struct {
		field string
		got   [nameCapacity]byte
		want  string
	}{
		{"scheme", c.Scheme, feedback.TerminalMomentum{}.Name()},
		{"remnant_fit", c.RemnantFit, feedback.KimOstriker2015.String()},
		{"weighting", c.Weighting, feedback.KernelVolume.String()},
	} {
		name, err := cName(tc.field, &tc.got)
		require.NoError(t, err)
		assert.Equal(t, tc.want, name, tc.field)
	}

	// What the default config makes: the scheme options are Go's
	// defaults, and the coupler is the one Go makes from a config naming
	// only the units and the scheme.
	cfg, got, err := parseConfig(&c)
	require.NoError(t, err)
	assert.Equal(t, opts, got)
	mine, err := feedback.NewCoupler(cfg)
	require.NoError(t, err)
	gos, err := feedback.NewCoupler(feedback.Config{Units: units.CodeUnits{LengthCm: 1, MassG: 1, VelocityCmPS: 1},
		Scheme: feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}})
	require.NoError(t, err)
	assert.Equal(t, gos.Config(), mine.Config())
	for _, name := range feedback.SchemeNames() {
		c := defaultConfig()
		c.Scheme = [nameCapacity]byte{}
		copy(c.Scheme[:], name)
		cfg, _, err := parseConfig(&c)
		require.NoError(t, err, name)
		want, err := feedback.SchemeByName(name, feedback.DefaultSchemeOptions())
		require.NoError(t, err, name)
		assert.Equal(t, want, cfg.Scheme, name)
	}

	var p populationConfigABI
	require.Equal(t, codeOK, entryPopulationDefaults(&p))
	y := yields.DefaultConfig()
	step := feedback.DefaultStepConfig(feedback.Config{}, nil)
	imf, err := cName("imf", &p.IMF)
	require.NoError(t, err)
	assert.Equal(t, y.IMF.String(), imf)
	assert.Equal(t, "kroupa", imf, "ejecta.h")
	for _, tc := range []struct {
		field            string
		got, lib, header float64
	}{
		{"lightest_star_mass", p.LightestStarMass, y.LightestStarMass, 0.1},
		{"heaviest_star_mass", p.HeaviestStarMass, y.HeaviestStarMass, 100},
		{"max_supernovae_per_step", p.MaxSupernovaePerStep, step.MaxSupernovaePerStep, 10},
		{"winds", float64(p.Winds), 1, 1},
		{"radiation_pressure", float64(p.RadiationPressure), 1, 1},
		{"photoionization", float64(p.Photoionization), 1, 1},
		{"delayed_cooling", float64(p.DelayedCooling), 0, 0},
		{"photoelectric_heating", float64(p.PhotoelectricHeating), 1, 1},
	} {
		assert.Equal(t, tc.lib, tc.got, "%s: the library's default", tc.field)
		assert.Equal(t, tc.header, tc.got, "%s: the value ejecta.h states", tc.field)
	}
	assert.False(t, step.SkipWinds || step.SkipRadiation || step.SkipPhotoionization || step.SkipPhotoelectric || step.DelayedCooling)
	assert.Nil(t, p.YieldsTable)

	h := withPopulation(t, pcConfig(), nil)
	s, err := contexts().lookup(h)
	require.NoError(t, err)
	builtin, err := yields.NewPopulation(yields.DefaultConfig())
	require.NoError(t, err)
	for _, age := range []float64{0, 3, 10, 40, 1000} {
		want, err := builtin.Release(age, age+1, 0.0134)
		require.NoError(t, err)
		got, err := s.pop.model.Release(age, age+1, 0.0134)
		require.NoError(t, err)
		assert.Equal(t, want, got, "release at %g Myr", age)
	}
}

// stepLedger creates a context from c, binds g, steps the stars through
// ejecta_step and returns the ledger and the records.
func stepLedger(t *testing.T, c configABI, g *testGas, stars []starABI) (ledgerABI, []recordABI) {
	t.Helper()
	h := create(t, c)
	require.Equal(t, codeOK, entryBindGas(h, &g.desc))
	require.Equal(t, codeOK, entryStep(h, &stars[0], int64(len(stars)), 0, modeOwnFinder, nil, nil), lastError(h))
	var l ledgerABI
	require.Equal(t, codeOK, entryGetLedger(h, &l))
	require.Equal(t, codeOK, entryLedgerBalanced(&l, 1e-12, nil, 0))
	var n, w int64
	require.Equal(t, codeOK, entryRecordCount(h, &n))
	recs := make([]recordABI, n)
	if n > 0 {
		require.Equal(t, codeOK, entryCopyRecords(h, &recs[0], n, &w))
	}
	return l, recs
}

// withScheme is pcConfig with the named scheme in a periodic box.
func withScheme(name string, box float64) configABI {
	c := pcConfig()
	c.Scheme = [nameCapacity]byte{}
	copy(c.Scheme[:], name)
	c.BoxSize = [3]float64{box, box, box}
	return c
}

// A kinetic fraction of 0 through the config is 0: stars and gas at rest
// get no kinetic energy and no momentum, all the energy is heat (0 once
// meant the Sedov-Taylor 28%).
func TestZeroKineticFractionGivesNoKicks(t *testing.T) {
	stars := supernovae(3, 8, 11)
	for i := range stars {
		stars[i].Velocity = [3]float64{}
	}
	for _, f := range []float64{0, feedback.SedovKineticFraction, 1} {
		c := withScheme("kinetic", 8)
		c.KineticFraction = f
		g := newTestGas(6, 8, 3)
		for i := range g.elems {
			g.elems[i].Vel = [3]float64{} // gas at rest: no kinetic energy lost to mass loading
		}
		l, recs := stepLedger(t, c, g, stars)
		if f == 0 {
			assert.Zero(t, l.KickEnergy, "kick energy")
			assert.Zero(t, l.RadialMomentum, "radial momentum")
			assert.InEpsilon(t, l.Released.Energy, l.Heat, 1e-12, "all heat")
			for _, r := range recs { // ejecta at rest bring no momentum
				assert.Equal(t, [3]float64{}, r.Momentum, "record momentum")
			}
			continue
		}
		assert.Positive(t, l.RadialMomentum, "fraction %g", f)
		// About the fraction asked for (the kicked gas is loaded with the
		// ejecta, which takes some of it).
		assert.InEpsilon(t, f*l.Released.Energy, l.KickEnergy, 0.05, "fraction %g", f)
	}
}

// A population config's max_supernovae_per_step is used as given:
// INFINITY never suggests a smaller step, a small bound does.
func TestMaxSupernovaePerStepAsGiven(t *testing.T) {
	for _, tc := range []struct {
		limit   float64
		suggest bool
	}{{math.Inf(1), false}, {0.5, true}} {
		h := withPopulation(t, pcConfig(), func(p *populationConfigABI) { p.MaxSupernovaePerStep = tc.limit })
		g := denseGas(5, 10, 4)
		require.Equal(t, codeOK, entryBindGas(h, &g.desc))
		star := cluster(1, 1e6, 10, 10)
		code := entryStepPopulation(h, &star, 1, 1/myrPerCodeTime, 0, modeOwnFinder, nil, nil)
		require.Contains(t, []int32{codeOK, codeUndeposited}, code, lastError(h))
		var dt float64
		require.Equal(t, codeOK, entrySuggestedStep(h, &dt))
		if tc.suggest {
			assert.Positive(t, dt, "limit %g", tc.limit)
		} else {
			assert.Zero(t, dt, "limit %g", tc.limit)
		}
	}
}

// opaqueGas is newTestGas 1e5 times denser (n_H ~ 1e5 cm^-3): 32
// neighbors of a star then hold a gas column of ~2 g/cm^2, so the
// ultraviolet is absorbed and the infrared optical depth is ~10 with the
// default opacities.
func opaqueGas(side int, box float64, seed uint64) *testGas {
	g := newTestGas(side, box, seed)
	for i := range g.elems {
		g.elems[i].Rho *= 1e5
		g.elems[i].Mass *= 1e5
	}
	return g
}

// max_infrared_boost bounds the infrared trapping factor of radiation
// pressure, as the scheme of ejecta_step and as the population's channel:
// where 1 + tau_IR exceeds 3, the momentum with bound 3 is exactly 3 times
// that with bound 1 (p = L dt / c (1 - exp(-tau_UV)) min(1 + tau_IR, B));
// without a bound it is larger still.
func TestInfraredBoostBound(t *testing.T) {
	light := 1e6 * units.SolarLuminosity * 0.1 * units.Megayear / (units.SolarMass * units.Kilometer * units.Kilometer)
	star := starABI{ID: 3, Position: [3]float64{4.1, 3.9, 4.05}, Mass: 1e4, Metallicity: 0.0134, Energy: light,
		Duration: 0.1 / myrPerCodeTime}
	radial := func(boost float64) float64 {
		c := withScheme("radiation-pressure", 8)
		c.MaxInfraredBoost = boost
		l, _ := stepLedger(t, c, opaqueGas(6, 8, 5), []starABI{star})
		assert.Zero(t, l.Limited)
		return l.RadialMomentum
	}
	one, three, unbounded := radial(1), radial(3), radial(math.Inf(1))
	assert.InEpsilon(t, 3, three/one, 1e-12)
	assert.Greater(t, unbounded, 1.5*three)

	channel := func(boost float64) float64 {
		c := pcConfig()
		c.BoxSize = [3]float64{8, 8, 8}
		c.MaxInfraredBoost = boost
		h := withPopulation(t, c, nil)
		g := opaqueGas(6, 8, 6)
		require.Equal(t, codeOK, entryBindGas(h, &g.desc))
		st := cluster(1, 1e4, 8, 1)
		require.Equal(t, codeOK, entryStepPopulation(h, &st, 1, 0.1/myrPerCodeTime, 0, modeOwnFinder, nil, nil), lastError(h))
		var l ledgerABI
		require.Equal(t, codeOK, entryGetChannelLedger(h, int32(yields.RadiationPressure), &l))
		return l.RadialMomentum
	}
	assert.InEpsilon(t, 3, channel(3)/channel(1), 1e-12)
}

// photon_reach lets photoionization search past the star's neighbors
// until its photons are absorbed: with reach 0 no more than the
// neighbor_count nearest elements are ionized, with a large reach about
// as many as the photon rate keeps ionized (the Stromgren mass), both
// through ejecta_step's scheme and the population's channel.
func TestPhotonReach(t *testing.T) {
	const k = 16
	u := units.ParsecSolarMassKms()
	dt := 0.01   // code time
	rate := 1e46 // ionizing photons per second
	photons := rate * dt * u.TimeS()
	star := starABI{ID: 9, Position: [3]float64{8.1, 7.9, 8.05}, Mass: 1e3, Metallicity: 0.0134,
		Photons: photons, Energy: photons * feedback.DefaultPhotoheatingPerPhoton / u.EnergyErg(), Duration: dt}
	ionized := func(recs []recordABI) int {
		n := 0
		for _, r := range recs {
			if r.Flags&uint32(feedback.FlagIonized) != 0 {
				n++
			}
		}
		return n
	}
	count := func(reach int32) int {
		c := withScheme("photoionization", 16)
		c.NeighborCount, c.PhotonReach = k, reach
		_, recs := stepLedger(t, c, newTestGas(8, 16, 7), []starABI{star})
		return ionized(recs)
	}
	// Case B recombination at 1e4 K, alpha_B = 2.6e-13 cm^3/s
	// (Osterbrock & Ferland 2006, table 2.1), with n_e = 1.1 n_H: each
	// element (n_H ~ 1 cm^-3, 8 pc^3) recombines ~7e43 times a second, so
	// 1e46 photons/s keep ~150 elements ionized.
	perElement := 2.6e-13 * 1.1 * 1.0 * 1.0 * 8 * math.Pow(units.Parsec, 3)
	stromgren := rate / perElement
	assert.LessOrEqual(t, count(0), k)
	assert.LessOrEqual(t, count(k), k, "a reach not above the neighbors keeps to them")
	far := count(400)
	assert.Greater(t, far, 4*k)
	assert.InEpsilon(t, stromgren, float64(far), 0.3)

	channel := func(reach int32) int {
		c := pcConfig()
		c.BoxSize = [3]float64{12, 12, 12}
		c.NeighborCount, c.PhotonReach = k, reach
		h := withPopulation(t, c, nil)
		g := denseGas(6, 12, 8)
		require.Equal(t, codeOK, entryBindGas(h, &g.desc))
		st := cluster(1, 1e4, 12, 1)
		require.Equal(t, codeOK, entryStepPopulation(h, &st, 1, 0.1/myrPerCodeTime, 0, modeOwnFinder, nil, nil), lastError(h))
		var n, w int64
		require.Equal(t, codeOK, entryRecordCount(h, &n))
		recs := make([]recordABI, n)
		require.Equal(t, codeOK, entryCopyRecords(h, &recs[0], n, &w))
		return ionized(recs)
	}
	assert.LessOrEqual(t, channel(0), k)
	assert.Greater(t, channel(1000), 4*k)
}

// wind_event_energy_erg is the energy of the remnants a wind's energy is
// counted in, for the stellar-winds scheme and the population's wind
// channels: in gas that has cooled the remnants (radiative phase), the
// same wind energy in remnants of a hundredth of the energy delivers
// more momentum (a remnant's terminal momentum grows more slowly than its
// energy; Kim & Ostriker 2015, ApJ 802, 99: p ~ E^0.94).
func TestWindEventEnergy(t *testing.T) {
	wind := starABI{ID: 4, Position: [3]float64{4.1, 3.9, 4.05}, Mass: 1e4, Metallicity: 0.0134, Age: 3 / myrPerCodeTime,
		Channel: int32(yields.MassiveWinds), EjectedMass: 0.5,
		Energy: 1e50 / (units.SolarMass * units.Kilometer * units.Kilometer)}
	wind.SpeciesMass[yields.Metals] = 0.01
	radial := func(ev float64) float64 {
		c := withScheme("stellar-winds", 8)
		c.WindEventEnergyErg = ev
		l, _ := stepLedger(t, c, opaqueGas(6, 8, 9), []starABI{wind})
		return l.RadialMomentum
	}
	few, many := radial(1e51), radial(1e49)
	assert.Greater(t, many, 1.2*few)
	assert.Less(t, many, 1.5*few)

	channel := func(ev float64) float64 {
		c := pcConfig()
		c.BoxSize = [3]float64{8, 8, 8}
		c.WindEventEnergyErg = ev
		h := withPopulation(t, c, nil)
		g := opaqueGas(6, 8, 10)
		require.Equal(t, codeOK, entryBindGas(h, &g.desc))
		st := cluster(1, 1e4, 8, 3)
		require.Equal(t, codeOK, entryStepPopulation(h, &st, 1, 0.5/myrPerCodeTime, 0, modeOwnFinder, nil, nil), lastError(h))
		var l ledgerABI
		require.Equal(t, codeOK, entryGetChannelLedger(h, int32(yields.MassiveWinds), &l))
		require.Positive(t, l.Released.Energy)
		return l.RadialMomentum
	}
	assert.Greater(t, channel(1e49), 1.2*channel(1e51))
}
