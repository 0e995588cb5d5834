// Package units holds the physical constants ejecta uses, each with its
// published source, and the conversion between a host code's units and the
// internal system.
//
// Internal system. Physics inside ejecta is done in cgs: lengths in cm,
// masses in g, times in s, velocities in cm/s, energies in erg. Stellar
// population quantities in package yields are quoted per solar mass formed,
// with ages in Myr; conversions to cgs go through the constants here.
//
// Code units. A host states once how long, how heavy and how fast one of its
// code units is (CodeUnits); every column read from or written to the host is
// converted with the factors derived from those three numbers.
package units

import (
	"fmt"
	"math"
)

// Published constants in cgs.
const (
	// SpeedOfLight c in cm/s: exact by definition of the meter (SI, BIPM 2019).
	SpeedOfLight = 2.99792458e10
	// Gravitational constant G in cm^3 g^-1 s^-2 (CODATA 2018: 6.67430e-11 m^3 kg^-1 s^-2).
	Gravitational = 6.67430e-8
	// Boltzmann k_B in erg/K: exact in the 2019 SI (CODATA 2018: 1.380649e-23 J/K).
	Boltzmann = 1.380649e-16
	// ProtonMass m_p in g (CODATA 2018: 1.67262192369e-27 kg).
	ProtonMass = 1.67262192369e-24
	// SolarMass in g: nominal (GM)_sun of IAU 2015 Resolution B3, 1.3271244e26 cm^3 s^-2,
	// divided by the CODATA 2018 G; the result is 1.98841e33 g to the quoted digits.
	SolarMass = 1.3271244e26 / Gravitational
	// SolarLuminosity nominal L_sun in erg/s: IAU 2015 Resolution B3, exact by definition.
	SolarLuminosity = 3.828e33
	// Parsec in cm: IAU 2015 Resolution B2 defines 1 pc = 648000/pi au, with the au
	// exact at 149597870700 m (IAU 2012 Resolution B2).
	Parsec = 648000 / math.Pi * 1.495978707e13
	// Kilometer in cm (SI).
	Kilometer = 1e5
	// JulianYear in s: 365.25 days of 86400 s (IAU).
	JulianYear = 3.15576e7
	// Megayear is 1e6 Julian years in s.
	Megayear = 1e6 * JulianYear
	// Gigayear is 1e9 Julian years in s.
	Gigayear = 1e9 * JulianYear
	// SolarRadius nominal R_sun in cm: IAU 2015 Resolution B3 (6.957e8 m), exact by definition.
	SolarRadius = 6.957e10
	// Planck h in erg s: exact in the 2019 SI (CODATA 2018: 6.62607015e-34 J s).
	Planck = 6.62607015e-27
	// ElectronVolt in erg: exact in the 2019 SI (CODATA 2018: 1.602176634e-19 J).
	ElectronVolt = 1.602176634e-12
	// FOE is the canonical supernova energy, 1e51 erg (common practice in the trade:
	// "one foe", no single source).
	FOE = 1e51
)

// Derived conveniences.
const (
	// StefanBoltzmann σ = 2π⁵k⁴/(15h³c²) in erg cm^-2 s^-1 K^-4, exact in the
	// 2019 SI from h, k_B and c (CODATA 2018 quotes 5.670374419e-8 W m^-2 K^-4).
	StefanBoltzmann = 2 * math.Pi * math.Pi * math.Pi * math.Pi * math.Pi * Boltzmann * Boltzmann * Boltzmann * Boltzmann /
		(15 * Planck * Planck * Planck * SpeedOfLight * SpeedOfLight)
	// MsunKms is one solar mass moving at one km/s, in g cm/s: the unit in which
	// remnant momenta are quoted in the literature.
	MsunKms = SolarMass * Kilometer
)

// CodeUnits states a host code's units: how many cm, g and cm/s one code unit
// of length, mass and velocity is. The code unit of time is length/velocity,
// of energy mass*velocity^2, of density mass/length^3.
type CodeUnits struct {
	LengthCm     float64 // cm per code length unit
	MassG        float64 // g per code mass unit
	VelocityCmPS float64 // cm/s per code velocity unit
}

// CGS returns the identity unit system: code units are cgs.
func CGS() CodeUnits { return CodeUnits{LengthCm: 1, MassG: 1, VelocityCmPS: 1} }

// Astro returns a common galaxy-simulation system: kpc, 1e10 Msun and km/s
// (common practice in the trade).
func Astro() CodeUnits {
	return CodeUnits{LengthCm: 1e3 * Parsec, MassG: 1e10 * SolarMass, VelocityCmPS: Kilometer}
}

// ParsecSolarMassKms returns the system of star-cluster and interstellar
// medium simulations: parsec, solar mass and km/s (code time about 0.98
// Myr).
func ParsecSolarMassKms() CodeUnits {
	return CodeUnits{LengthCm: Parsec, MassG: SolarMass, VelocityCmPS: Kilometer}
}

// Validate reports an error unless the three factors are finite and positive.
func (u CodeUnits) Validate() error {
	for _, f := range []struct {
		name string
		v    float64
	}{{"length", u.LengthCm}, {"mass", u.MassG}, {"velocity", u.VelocityCmPS}} {
		if !(f.v > 0) || math.IsInf(f.v, 0) {
			return fmt.Errorf("units: code %s unit must be finite and positive, got %g", f.name, f.v)
		}
	}
	return nil
}

// TimeS is seconds per code time unit.
func (u CodeUnits) TimeS() float64 { return u.LengthCm / u.VelocityCmPS }

// EnergyErg is erg per code energy unit.
func (u CodeUnits) EnergyErg() float64 { return u.MassG * u.VelocityCmPS * u.VelocityCmPS }

// SpecificEnergy is erg/g per code specific energy unit (velocity squared).
func (u CodeUnits) SpecificEnergy() float64 { return u.VelocityCmPS * u.VelocityCmPS }

// DensityGCm3 is g/cm^3 per code density unit.
func (u CodeUnits) DensityGCm3() float64 {
	return u.MassG / (u.LengthCm * u.LengthCm * u.LengthCm)
}

// MomentumGCmPS is g cm/s per code momentum unit.
func (u CodeUnits) MomentumGCmPS() float64 { return u.MassG * u.VelocityCmPS }
