package feedback

import (
	"math"

	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Sedov–Taylor energy partition for gamma = 5/3: about 28% of a blast
// wave's energy is kinetic and 72% thermal (Chevalier 1974, ApJ 188, 501;
// from memory).
const (
	SedovKineticFraction = 0.28
	SedovThermalFraction = 0.72
)

// Thornton et al. 1998 (ApJ 500, 95; from memory): once a remnant has
// cooled, its thermal energy falls roughly as (R/R_cool)^-6.5 while the
// kinetic energy falls as (R/R_cool)^-1.5. The thermal exponent sets how
// much heat an unresolved remnant leaves behind.
const PostCoolingThermalExponent = -6.5

// SolarMetallicity is the present-day solar metal mass fraction used to
// express gas metallicity in solar units, Z_sun = 0.0134 (Asplund, Grevesse,
// Sauval & Scott 2009, ARA&A 47, 481; from memory).
const SolarMetallicity = 0.0134

// MassPerHydrogen is the gas mass per hydrogen atom in units of the proton
// mass, 1/X with X = yields.SolarHydrogen the hydrogen mass fraction the
// library uses everywhere else (Asplund, Grevesse, Sauval & Scott 2009,
// ARA&A 47, 481; from memory): about 1.355. It converts gas densities to
// the hydrogen number densities n_H the remnant fits and the
// photoionization balance are written in.
const MassPerHydrogen = 1 / yields.SolarHydrogen

// Remnant describes a supernova remnant at the end of its energy-conserving
// phase: the momentum it ends with once radiative (terminal momentum) and
// the radius at which it cools (shell formation).
type Remnant struct {
	// TerminalMomentum in g cm/s.
	TerminalMomentum float64
	// CoolingRadius in cm.
	CoolingRadius float64
}

// RemnantFit gives the terminal momentum and cooling radius of a remnant of
// energy e (erg) in gas of hydrogen number density n (cm^-3) and
// metallicity z (in solar units).
type RemnantFit uint8

const (
	// KimOstriker2015 is the shell-formation fit of Kim & Ostriker 2015
	// (ApJ 802, 99; from memory) for a uniform medium:
	//   p_sf = 2.17e5 Msun km/s E51^0.93 n0^-0.13,
	//   R_sf = 22.1 pc E51^0.29 n0^-0.42.
	// The fit has no metallicity dependence.
	KimOstriker2015 RemnantFit = iota
	// CioffiMcKeeBertschinger1988 is the pressure-driven-snowplough
	// solution of Cioffi, McKee & Bertschinger 1988 (ApJ 334, 252; from
	// memory, normalization to be checked against the paper):
	//   p_t = 4.8e5 Msun km/s E51^(13/14) n0^(-1/7) zeta^(-3/14),
	//   R_PDS = 14 pc E51^(2/7) n0^(-3/7) zeta^(-1/7),
	// with zeta the metallicity in solar units.
	CioffiMcKeeBertschinger1988
)

// String names the fit.
func (f RemnantFit) String() string {
	switch f {
	case KimOstriker2015:
		return "kim-ostriker-2015"
	case CioffiMcKeeBertschinger1988:
		return "cioffi-mckee-bertschinger-1988"
	}
	return "unknown-fit"
}

// ParseRemnantFit reads a fit's name as String gives it.
func ParseRemnantFit(s string) (RemnantFit, error) {
	for _, f := range []RemnantFit{KimOstriker2015, CioffiMcKeeBertschinger1988} {
		if f.String() == s {
			return f, nil
		}
	}
	return 0, errorf(ErrUnknownName, "remnant fit %q: want kim-ostriker-2015 or cioffi-mckee-bertschinger-1988", s)
}

// metallicityFloor keeps zeta^(-3/14) finite in metal-free gas; 1e-3 solar
// is a floor of our own choosing (the fits were not calibrated below it).
const metallicityFloor = 1e-3

// Remnant evaluates the fit for energy e in erg, hydrogen number density n
// in cm^-3 and metallicity zeta in solar units.
func (f RemnantFit) Remnant(e, n, zeta float64) Remnant {
	e51 := e / units.FOE
	le, ln := math.Log(e51), math.Log(n)
	switch f {
	case CioffiMcKeeBertschinger1988:
		lz := math.Log(math.Max(zeta, metallicityFloor))
		return Remnant{
			TerminalMomentum: 4.8e5 * units.MsunKms * math.Exp(13.0/14*le-1.0/7*ln-3.0/14*lz),
			CoolingRadius:    14 * units.Parsec * math.Exp(2.0/7*le-3.0/7*ln-1.0/7*lz),
		}
	default:
		return Remnant{
			TerminalMomentum: 2.17e5 * units.MsunKms * math.Exp(0.93*le-0.13*ln),
			CoolingRadius:    22.1 * units.Parsec * math.Exp(0.29*le-0.42*ln),
		}
	}
}

// CoolingMass is the gas mass in g inside the cooling radius for gas of
// mass density rho (g/cm^3): the swept-up mass at which the remnant turns
// radiative.
func (r Remnant) CoolingMass(rho float64) float64 {
	return 4 * math.Pi / 3 * rho * r.CoolingRadius * r.CoolingRadius * r.CoolingRadius
}

// FreeEjectaMomentum is sqrt(2 M E), the momentum of ejecta of mass m
// carrying all of energy e as kinetic energy.
func FreeEjectaMomentum(m, e float64) float64 { return math.Sqrt(2 * m * e) }
