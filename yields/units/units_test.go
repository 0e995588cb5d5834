package units

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestPublishedConstants(t *testing.T) {
	tests := []struct {
		name   string
		got    float64
		want   float64
		relTol float64
	}{
		// IAU 2015 Resolution B3 (GM)_sun over CODATA 2018 G: 1.98841e33 g (from memory; IAU/CODATA).
		{"solar mass", SolarMass, 1.98841e33, 1e-5},
		// IAU 2015 Resolution B2: exact definition 648000/π au with the au exact (IAU 2012 B2).
		{"parsec", Parsec, 3.0856775814913673e18, 1e-15},
		// IAU: Julian year of 365.25 days.
		{"julian year", JulianYear, 3.15576e7, 0},
		// SI: c exact.
		{"speed of light", SpeedOfLight, 2.99792458e10, 0},
		// IAU 2015 Resolution B3 nominal solar luminosity, exact.
		{"solar luminosity", SolarLuminosity, 3.828e33, 0},
		// CODATA 2018: G = 6.67430e-11 m^3 kg^-1 s^-2.
		{"G", Gravitational, 6.67430e-8, 0},
		// IAU 2015 Resolution B3 nominal solar radius, exact.
		{"solar radius", SolarRadius, 6.957e10, 0},
		// CODATA 2018 (exact in the 2019 SI): h = 6.62607015e-34 J s, 1 eV = 1.602176634e-19 J.
		{"planck", Planck, 6.62607015e-27, 0},
		{"electron volt", ElectronVolt, 1.602176634e-12, 0},
		// CODATA 2018: σ = 5.670374419e-8 W m^-2 K^-4 (the quoted digits of the exact value).
		{"stefan-boltzmann", StefanBoltzmann, 5.670374419e-5, 1e-9},
		// 1 Msun km/s in g cm/s: 1.98841e33 g × 1e5 cm/s (arithmetic on the values above).
		{"Msun km/s", MsunKms, 1.98841e38, 1e-5},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.relTol == 0 {
				assert.Equal(t, tc.want, tc.got)
				return
			}
			assert.InEpsilon(t, tc.want, tc.got, tc.relTol)
		})
	}
}

func TestCodeUnitsRoundTrip(t *testing.T) {
	// Two systems: cgs (identity) and kpc / 1e10 Msun / km/s (common practice).
	systems := map[string]CodeUnits{"cgs": CGS(), "astro": Astro()}
	for name, u := range systems {
		t.Run(name, func(t *testing.T) {
			require.NoError(t, u.Validate())
			conv := []struct {
				what   string
				factor float64
			}{
				{"length", u.LengthCm}, {"mass", u.MassG}, {"velocity", u.VelocityCmPS},
				{"time", u.TimeS()}, {"energy", u.EnergyErg()}, {"specific energy", u.SpecificEnergy()},
				{"density", u.DensityGCm3()}, {"momentum", u.MomentumGCmPS()},
			}
			for _, c := range conv {
				for _, x := range []float64{1, 3.7e-5, 2.2e12} {
					cgs := x * c.factor
					back := cgs / c.factor
					assert.InEpsilon(t, x, back, 1e-15, "%s code→cgs→code", c.what)
					code := x / c.factor
					assert.InEpsilon(t, x, code*c.factor, 1e-15, "%s cgs→code→cgs", c.what)
				}
			}
			// Derived factors agree with their definitions.
			assert.InEpsilon(t, u.LengthCm/u.VelocityCmPS, u.TimeS(), 1e-15)
			assert.InEpsilon(t, u.MassG*u.VelocityCmPS*u.VelocityCmPS, u.EnergyErg(), 1e-15)
			assert.InEpsilon(t, u.MassG/math.Pow(u.LengthCm, 3), u.DensityGCm3(), 1e-14)
		})
	}
	// The astro system's time unit is about 0.978 Gyr (kpc/(km/s); common practice).
	assert.InDelta(t, 0.9778, Astro().TimeS()/Gigayear, 5e-4)
}

func TestValidateRejects(t *testing.T) {
	bad := []CodeUnits{
		{LengthCm: 0, MassG: 1, VelocityCmPS: 1},
		{LengthCm: 1, MassG: -1, VelocityCmPS: 1},
		{LengthCm: 1, MassG: 1, VelocityCmPS: math.NaN()},
		{LengthCm: math.Inf(1), MassG: 1, VelocityCmPS: 1},
	}
	for _, u := range bad {
		assert.Error(t, u.Validate(), "%+v", u)
	}
}
