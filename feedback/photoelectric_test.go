package feedback_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/feedback/feedbacktest"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// fuvSource is a star at pos emitting lum erg/s of far-ultraviolet light
// for one Myr, in code units u.
func fuvSource(id int64, pos [3]float64, lum float64, u units.CodeUnits) feedback.Source {
	return feedback.Source{Star: feedback.Star{ID: id, Pos: pos, Metallicity: 0.0134},
		Energy: lum * units.Megayear / u.EnergyErg(), Duration: units.Megayear / u.TimeS()}
}

func TestFUVFieldInverseSquareInClearGas(t *testing.T) {
	// Without dust the field falls as the inverse square of the distance:
	// G0 = L / (4 pi r^2) / 1.6e-3 erg s^-1 cm^-2 (Habing 1968, from
	// memory). Arithmetic: 1e39 erg/s at 10 pc (IAU 2015 B2 parsec) gives
	// 1e39 / (4 pi (3.0857e19 cm)^2) = 8.358e-2 erg s^-1 cm^-2, G0 = 52.2.
	assert.InEpsilon(t, 52.24, feedback.FUVFieldAt(1e39, 10*units.Parsec, 0), 1e-3)
	assert.InEpsilon(t, 52.24/4, feedback.FUVFieldAt(1e39, 20*units.Parsec, 0), 1e-3)

	u := units.ParsecSolarMassKms()
	g := latticeGas(9, 2, 1, u) // 2 pc spacing: element radius 1.24 pc
	star := [3]float64{0.3, -0.2, 0.1}
	const lum = 1e39
	clear := feedback.DefaultPhotoelectricHeating()
	clear.FUVOpacity = 0
	out, _ := coupleOnce(t, g, feedback.Config{Units: u, Scheme: clear, Neighbors: 200}, []feedback.Source{fuvSource(1, star, lum, u)})
	require.Len(t, out.Records, 200)
	checked := 0
	for _, r := range out.Records {
		i := r.GasIndex
		d := math.Sqrt(math.Pow(g.Pos[0][i]-star[0], 2) + math.Pow(g.Pos[1][i]-star[1], 2) + math.Pow(g.Pos[2][i]-star[2], 2))
		if d < 1.5 {
			continue // inside the element's own radius: taken at that radius
		}
		want := lum / (4 * math.Pi * math.Pow(d*units.Parsec, 2)) / 1.6e-3
		assert.InEpsilon(t, want, r.FUVField, 1e-12, "element at %g pc", d)
		checked++
	}
	assert.Greater(t, checked, 150)
	// Clear gas absorbs nothing, so nothing heats and all light leaves.
	assert.Zero(t, out.Ledger.Heat)
	assert.InEpsilon(t, out.Ledger.In.Energy, out.Ledger.Radiated, 1e-12)
}

func TestFUVFieldIsAttenuatedByTheDustInFront(t *testing.T) {
	// With dust, each element sees exp(-tau) of the clear field, tau the
	// column of the gas nearer the star (plus half its own) times the
	// opacity scaled with metallicity.
	u := units.ParsecSolarMassKms()
	g := latticeGas(7, 2, 30, u)
	star := [3]float64{0.3, -0.2, 0.1}
	s := feedback.DefaultPhotoelectricHeating()
	out, _ := coupleOnce(t, g, feedback.Config{Units: u, Scheme: s, Neighbors: 100}, []feedback.Source{fuvSource(1, star, 1e39, u)})
	prev := math.Inf(1)
	for _, r := range out.Records { // nearest first
		i := r.GasIndex
		d := math.Sqrt(math.Pow(g.Pos[0][i]-star[0], 2) + math.Pow(g.Pos[1][i]-star[1], 2) + math.Pow(g.Pos[2][i]-star[2], 2))
		clearField := feedback.FUVFieldAt(1e39, math.Max(d, 2*math.Cbrt(3/(4*math.Pi)))*units.Parsec, 0)
		ratio := r.FUVField / clearField
		assert.Less(t, ratio, 1.0)
		assert.LessOrEqual(t, ratio, prev*(1+1e-12), "attenuation grows outwards")
		prev = ratio
	}
	assert.Less(t, prev, 0.5, "30 cm^-3 of solar-metallicity gas is optically thick to FUV over ~7 pc")
}

func TestPhotoelectricEfficiencyFit(t *testing.T) {
	// Bakes & Tielens 1994 (ApJ 427, 822), their fit eq. 43 (from memory):
	// eps = 4.87e-2 / (1 + 4e-3 x^0.73) + 3.65e-2 (T/1e4)^0.7 / (1 + 2e-4 x).
	cases := []struct {
		name    string
		x, T    float64
		want    float64
		rel     float64
		comment string
	}{
		// Uncharged grains (x -> 0) in cold gas: the fit's ceiling, 4.87%.
		{"uncharged-cold", 0, 0, 4.87e-2, 1e-12, "first coefficient"},
		// At 1e4 K the recombination term adds its full 3.65%.
		{"uncharged-warm", 0, 1e4, 4.87e-2 + 3.65e-2, 1e-12, "sum of coefficients"},
		// The charging term halves where 4e-3 x^0.73 = 1, x = 250^(1/0.73)
		// = 1925 (the form eps = 0.049 / (1 + (x/1925)^0.73) + ... often
		// quoted).
		{"half-charged", math.Pow(250, 1/0.73), 0, 4.87e-2 / 2, 1e-12, "x = 1925"},
		{"half-charged-rounded", 1925, 0, 4.87e-2 / 2, 1e-3, "x = 1925"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			assert.InEpsilon(t, c.want, feedback.PhotoelectricEfficiency(c.x, c.T), c.rel, c.comment)
		})
	}
	// Cold neutral medium (G0 = 1.7, T = 80 K, n_e = 0.03 cm^-3, so x ~ 500):
	// heating efficiencies of 3-5% (Bakes & Tielens 1994, and the
	// diffuse-cloud values built on them; from memory).
	cnm := feedback.PhotoelectricEfficiency(1.7*math.Sqrt(80)/0.03, 80)
	assert.Greater(t, cnm, 0.03)
	assert.Less(t, cnm, 0.05)
	// Strongly charged grains near bright stars (x ~ 1e6) heat at well
	// under a percent (their efficiency curve falls by about two decades
	// between x = 1e2 and 1e6; from memory).
	strong := feedback.PhotoelectricEfficiency(1e6, 100)
	assert.Greater(t, strong, 1e-4)
	assert.Less(t, strong, 3e-3)
	// Falls monotonically as grains charge.
	prev := math.Inf(1)
	for lx := -1.0; lx <= 7; lx += 0.25 {
		e := feedback.PhotoelectricEfficiency(math.Pow(10, lx), 300)
		assert.Less(t, e, prev)
		prev = e
	}
}

func TestPhotoelectricHeatingRateOpticallyThin(t *testing.T) {
	// In optically thin gas each element gets 1e-24 eps G0 erg/s per
	// hydrogen nucleus over the step (Bakes & Tielens 1994), eps at its own
	// x = G0 sqrt(T) / n_e, scaled with Z / Z_sun.
	u := units.ParsecSolarMassKms()
	g := latticeGas(7, 2, 1, u)
	star := [3]float64{0.3, -0.2, 0.1}
	s := feedback.PhotoelectricHeating{FUVOpacity: 1, ElectronFraction: 1e-2} // tau << 1, cap far away
	const lum = 1e39
	before := append([]float64(nil), g.Energy...)
	out, _ := coupleOnce(t, g, feedback.Config{Units: u, Scheme: s, Neighbors: 100}, []feedback.Source{fuvSource(1, star, lum, u)})
	for _, r := range out.Records {
		i := r.GasIndex
		// Neutral atomic gas: mu = (1/X) / (1 + n_He/n_H), both from the
		// library's solar mass fractions.
		mu := feedback.MassPerHydrogen / feedback.ElectronsPerHydrogen
		T := 2.0 / 3 * before[i] * u.SpecificEnergy() * mu * units.ProtonMass / units.Boltzmann
		nH := g.Density[i] * u.DensityGCm3() / (feedback.MassPerHydrogen * units.ProtonMass)
		eps := feedback.PhotoelectricEfficiency(r.FUVField*math.Sqrt(T)/(1e-2*nH), T) * g.Fractions[0][i] / yields.SolarMetals
		hydrogen := g.Mass[i] * u.MassG / (feedback.MassPerHydrogen * units.ProtonMass)
		want := 1e-24 * eps * r.FUVField * hydrogen * units.Megayear / u.EnergyErg()
		assert.InEpsilon(t, want, r.Heat, 1e-9)
	}
	assert.Greater(t, out.Ledger.Heat, 0.0)
}

func TestPhotoelectricHeatNeverExceedsAbsorbedLight(t *testing.T) {
	u := units.ParsecSolarMassKms()
	star := [3]float64{0.3, -0.2, 0.1}
	const lum = 1e39
	for _, kappa := range []float64{1e-6, 1e-2, 1, 1000, 1e6} {
		g := latticeGas(7, 2, 10, u)
		s := feedback.PhotoelectricHeating{FUVOpacity: kappa, ElectronFraction: 1}
		out, _ := coupleOnce(t, g, feedback.Config{Units: u, Scheme: s, Neighbors: 150}, []feedback.Source{fuvSource(1, star, lum, u)})
		// The light the shells absorb: E (1 - exp(-tau)), with tau summed
		// over the neighbors as the scheme documents.
		tau := 0.0
		size := math.Cbrt(3 * g.Mass[0] / (4 * math.Pi * g.Density[0]))
		for _, r := range out.Records {
			i := r.GasIndex
			d := math.Sqrt(math.Pow(g.Pos[0][i]-star[0], 2) + math.Pow(g.Pos[1][i]-star[1], 2) + math.Pow(g.Pos[2][i]-star[2], 2))
			d = math.Max(d, size) * units.Parsec
			tau += kappa * g.Fractions[0][i] / yields.SolarMetals * g.Mass[i] * units.SolarMass / (4 * math.Pi * d * d)
		}
		e := out.Ledger.In.Energy
		absorbed := -math.Expm1(-tau) * e
		assert.LessOrEqual(t, out.Ledger.Heat, absorbed*(1+1e-12), "kappa %g", kappa)
		if kappa == 1e-6 {
			// So little dust that every element is capped at what it absorbs.
			assert.InEpsilon(t, absorbed, out.Ledger.Heat, 1e-9)
		}
		assert.InEpsilon(t, e-out.Ledger.Heat, out.Ledger.Radiated, 1e-12, "the rest is radiated")
	}
}

func TestPhotoelectricHeatingPassesTheHarness(t *testing.T) {
	u := units.ParsecSolarMassKms()
	light := func(s feedback.Star) feedback.Source {
		// A young cluster's far-ultraviolet light, 3e5 Lsun for 0.1 Myr.
		return feedback.Source{Star: s, Energy: 3e5 * units.SolarLuminosity * 0.1 * units.Megayear / u.EnergyErg(),
			Duration: 0.1 * units.Megayear / u.TimeS()}
	}
	opts := feedbacktest.DefaultOptions()
	opts.Release, opts.Seeds = light, []uint64{1, 2}
	feedbacktest.Check(t, feedback.DefaultPhotoelectricHeating(), opts)
	// With the supernova's ejecta too (mass shared as in a thermal dump).
	withEjecta := func(s feedback.Star) feedback.Source {
		src := feedbacktest.SupernovaRelease(s)
		src.Duration = 0.1 * units.Megayear / u.TimeS()
		return src
	}
	opts.Release, opts.Seeds = withEjecta, []uint64{3}
	feedbacktest.Check(t, feedback.DefaultPhotoelectricHeating(), opts)
}

func TestPhotoelectricHeatingRefusesBadInput(t *testing.T) {
	u := units.ParsecSolarMassKms()
	g := latticeGas(3, 2, 1, u)
	cases := []struct {
		name   string
		scheme feedback.PhotoelectricHeating
		src    feedback.Source
		kind   error
	}{
		{"no-duration", feedback.DefaultPhotoelectricHeating(), feedback.Source{Star: feedback.Star{ID: 1}, Energy: 1}, feedback.ErrBadValue},
		{"negative-electrons", feedback.PhotoelectricHeating{FUVOpacity: 1000, ElectronFraction: -1e-4}, fuvSource(1, [3]float64{}, 1e39, u), feedback.ErrInvalidArgument},
		{"nan-ionization-rate", feedback.PhotoelectricHeating{FUVOpacity: 1000, IonizationRate: math.NaN()}, fuvSource(1, [3]float64{}, 1e39, u), feedback.ErrInvalidArgument},
		{"infinite-ionization-rate", feedback.PhotoelectricHeating{FUVOpacity: 1000, IonizationRate: math.Inf(1)}, fuvSource(1, [3]float64{}, 1e39, u), feedback.ErrInvalidArgument},
		{"negative-opacity", feedback.PhotoelectricHeating{FUVOpacity: -1, ElectronFraction: 1e-4}, fuvSource(1, [3]float64{}, 1e39, u), feedback.ErrInvalidArgument},
		{"nan-opacity", feedback.PhotoelectricHeating{FUVOpacity: math.NaN(), ElectronFraction: 1e-4}, fuvSource(1, [3]float64{}, 1e39, u), feedback.ErrInvalidArgument},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			cp, err := feedback.NewCoupler(feedback.Config{Units: u, Scheme: c.scheme, Neighbors: 8})
			if c.kind == feedback.ErrInvalidArgument {
				// A bad setting is refused when the coupler is made.
				require.ErrorIs(t, err, c.kind)
				return
			}
			require.NoError(t, err)
			f := treeOf(t, g)
			var out feedback.Output
			require.NoError(t, cp.Couple(g.View(), f, []feedback.Source{c.src}, &out))
			require.Len(t, out.Problems, 1)
			assert.ErrorIs(t, out.Problems[0].Err, c.kind)
			assert.Empty(t, out.Records)
			assert.Equal(t, out.Ledger.In.Energy, out.Ledger.Undeposited.Energy, "returned whole")
		})
	}
}

// treeOf builds the default finder on the gas.
func treeOf(t *testing.T, g *audit.GasArrays) neighbor.Finder {
	t.Helper()
	f, err := neighbor.NewTree(g.Packed(), g.ID, neighbor.Box{})
	require.NoError(t, err)
	return f
}

func TestStepperLightsTheGasWithThePopulationsFarUltraviolet(t *testing.T) {
	// The stepper's photoelectric channel sees the population's
	// far-ultraviolet light: in clear gas each element's G0 is the mean
	// far-ultraviolet luminosity over the step over 4 pi r^2, in Habing
	// units (inverse-square arithmetic), and with dust the heat it
	// deposits is paid out of the light radiation pressure couples.
	u := units.ParsecSolarMassKms()
	pop, err := yields.NewPopulation(yields.DefaultConfig())
	require.NoError(t, err)
	myr := units.Megayear / u.TimeS()
	star := feedback.StarParticle{Star: feedback.Star{ID: 9, Pos: [3]float64{0.3, -0.2, 0.1}, Mass: 1e4, Metallicity: 0.0134, Age: myr},
		FormedMass: 1e4}
	rel, err := pop.Release(1, 1.1, 0.0134)
	require.NoError(t, err)
	lum := rel.FarUltravioletEnergy * 1e4 / (0.1 * units.Megayear) // erg/s
	mid, err := pop.FarUltravioletLuminosity(1.05, 0.0134)
	require.NoError(t, err)
	assert.InEpsilon(t, mid*1e4*units.SolarLuminosity, lum, 0.01, "a young population's light barely changes in 0.1 Myr")

	clear := feedback.DefaultPhotoelectricHeating()
	clear.FUVOpacity = 0
	for _, c := range []struct {
		name   string
		scheme feedback.Scheme
	}{{"clear", clear}, {"dusty", nil}} {
		t.Run(c.name, func(t *testing.T) {
			g := latticeGas(9, 2, 10, u)
			cfg := feedback.DefaultStepConfig(feedback.Config{Units: u, Neighbors: 100}, pop)
			cfg.Seed, cfg.Photoelectric = 1, c.scheme
			st, err := feedback.NewStepper(cfg)
			require.NoError(t, err)
			var out feedback.StepOutput
			view := g.View()
			require.NoError(t, st.Step(view, treeOf(t, g), []feedback.StarParticle{star}, 0, 0.1*myr, &out))
			require.NoError(t, out.Ledger.Balanced(1e-12))
			lit := 0
			for _, r := range out.Records {
				if r.Channel != yields.PhotoelectricHeating {
					assert.Zero(t, r.FUVField)
					continue
				}
				lit++
				i := r.GasIndex
				d := math.Sqrt(math.Pow(g.Pos[0][i]-0.3, 2) + math.Pow(g.Pos[1][i]+0.2, 2) + math.Pow(g.Pos[2][i]-0.1, 2))
				clearField := lum / (4 * math.Pi * math.Pow(math.Max(d, 2*math.Cbrt(3/(4*math.Pi)))*units.Parsec, 2)) / 1.6e-3
				if c.scheme != nil {
					assert.InEpsilon(t, clearField, r.FUVField, 1e-6)
				} else {
					assert.Less(t, r.FUVField, clearField)
				}
			}
			assert.Equal(t, 100, lit)
			pe := out.Channels[yields.PhotoelectricHeating]
			light := rel.RadiantEnergy * 1e4 / u.EnergyErg()
			total := pe.In.Energy + out.Channels[yields.RadiationPressure].In.Energy + out.Channels[yields.Photoionization].In.Energy
			assert.InEpsilon(t, light, total, 1e-12, "the light is coupled once")
			if c.scheme == nil {
				assert.Greater(t, pe.Heat, 0.0)
			} else {
				assert.Zero(t, pe.Heat)
			}
			touched, _, err := new(feedback.Applier).Apply(view, out.Records, nil)
			require.NoError(t, err)
			for _, tc := range touched {
				assert.Greater(t, tc.FUVField, 0.0, "every touched element was lit")
			}
		})
	}
}

func TestCaseBRecombinationAt(t *testing.T) {
	// Case B coefficients of hydrogen, Osterbrock & Ferland 2006 table 2.1
	// (from memory): 4.54e-13 at 5000 K, 2.59e-13 at 1e4 K, 1.43e-13 at
	// 2e4 K (cm^3 s^-1).
	for _, c := range []struct{ T, want float64 }{{5000, 4.54e-13}, {1e4, 2.59e-13}, {2e4, 1.43e-13}} {
		assert.InEpsilon(t, c.want, feedback.CaseBRecombinationAt(c.T), 0.01, "T = %g K", c.T)
	}
	assert.InEpsilon(t, feedback.CaseBRecombination, feedback.CaseBRecombinationAt(1e4), 0.01)
	// Recombination is faster in colder gas, and the fit stays finite.
	prev := 0.0
	for lt := 4.5; lt >= 1; lt -= 0.25 {
		a := feedback.CaseBRecombinationAt(math.Pow(10, lt))
		assert.Greater(t, a, prev)
		prev = a
	}
	assert.Equal(t, feedback.CaseBRecombinationAt(10), feedback.CaseBRecombinationAt(0))
}

// The electron fraction of neutral gas follows the phase: hydrogen ions
// from cosmic-ray and X-ray ionization give a few 1e-2 in the warm neutral
// medium (n = 0.5 cm^-3, 8000 K), and several 1e-4 in the cold neutral
// medium (n = 30 cm^-3, 100 K), where the carbon ions (C/H = 1.4e-4,
// Cardelli et al. 1996, ApJ 467, 334) count as much (Wolfire et al. 2003,
// ApJ 587, 278; from memory: x_e about 0.01-0.1 and a few 1e-4). The
// carbon floor alone, the library's old default, is 100 times too low in
// warm gas.
func TestNeutralElectronFraction(t *testing.T) {
	zeta := feedback.DefaultHydrogenIonizationRate
	wnm := feedback.NeutralElectronFraction(0.5, 8000, 1, zeta)
	assert.Greater(t, wnm, 0.01)
	assert.Less(t, wnm, 0.1)
	assert.Greater(t, wnm, 100*feedback.CarbonElectronFraction)
	cnm := feedback.NeutralElectronFraction(30, 100, 1, zeta)
	assert.Greater(t, cnm, 2e-4)
	assert.Less(t, cnm, 2e-3)
	// The ionization balance holds: zeta (1 - x_H) = alpha_B n x_H x_e.
	for _, c := range []struct{ n, T, z float64 }{{0.5, 8000, 1}, {30, 100, 1}, {1e4, 20, 0.3}, {1e-3, 1e4, 0.1}} {
		xe := feedback.NeutralElectronFraction(c.n, c.T, c.z, zeta)
		xh := xe - feedback.CarbonElectronFraction*c.z
		assert.InEpsilon(t, zeta*(1-xh), feedback.CaseBRecombinationAt(c.T)*c.n*xh*xe, 1e-9, "n %g T %g", c.n, c.T)
	}
	// Without ionization, and in very dense gas, the carbon ions remain,
	// scaled with the metallicity.
	assert.Equal(t, 0.5*feedback.CarbonElectronFraction, feedback.NeutralElectronFraction(1, 100, 0.5, 0))
	assert.InEpsilon(t, feedback.CarbonElectronFraction, feedback.NeutralElectronFraction(1e7, 20, 1, zeta), 0.05)
}

// By default each element's efficiency is taken at its own estimated
// electron density: in warm neutral gas (8000 K, n = 0.5 cm^-3) the heat
// is the Bakes & Tielens 1994 rate with x_e from NeutralElectronFraction,
// some 40 times what the carbon floor's electrons gave.
func TestPhotoelectricHeatingEstimatesElectrons(t *testing.T) {
	u := units.ParsecSolarMassKms()
	const nHWarm, tWarm = 0.5, 8000.0
	g := latticeGas(7, 4, nHWarm, u)
	// Neutral atomic gas: mu = (1/X) / (1 + n_He/n_H).
	mu := feedback.MassPerHydrogen / feedback.ElectronsPerHydrogen
	for i := range g.Energy {
		g.Energy[i] = 1.5 * units.Boltzmann * tWarm / (mu * units.ProtonMass) / u.SpecificEnergy()
	}
	star := [3]float64{0.3, -0.2, 0.1}
	const lum = 1e38
	floorOnly := 0.0
	out, _ := coupleOnce(t, g.Clone(), feedback.Config{Units: u, Scheme: feedback.DefaultPhotoelectricHeating(), Neighbors: 100}, []feedback.Source{fuvSource(1, star, lum, u)})
	xe := feedback.NeutralElectronFraction(nHWarm, tWarm, 1, feedback.DefaultHydrogenIonizationRate)
	for _, r := range out.Records {
		i := r.GasIndex
		hydrogen := g.Mass[i] * u.MassG / (feedback.MassPerHydrogen * units.ProtonMass)
		rate := 1e-24 * r.FUVField * hydrogen * units.Megayear / u.EnergyErg()
		want := rate * feedback.PhotoelectricEfficiency(r.FUVField*math.Sqrt(tWarm)/(xe*nHWarm), tWarm)
		assert.InEpsilon(t, want, r.Heat, 1e-6)
		floorOnly += rate * feedback.PhotoelectricEfficiency(r.FUVField*math.Sqrt(tWarm)/(feedback.CarbonElectronFraction*nHWarm), tWarm)
	}
	assert.Greater(t, out.Ledger.Heat, 10*floorOnly)
	t.Logf("x_e %.3g: heat %.3g, with the carbon floor's electrons %.3g (ratio %.1f)", xe, out.Ledger.Heat, floorOnly, out.Ledger.Heat/floorOnly)
}
