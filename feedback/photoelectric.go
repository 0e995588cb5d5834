package feedback

import (
	"math"

	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Constants of photoelectric heating.
const (
	// HabingFlux is the far-ultraviolet (6-13.6 eV) flux of the average
	// interstellar field estimated by Habing 1968 (Bull. Astron. Inst.
	// Netherlands 19, 421), 1.6e-3 erg s^-1 cm^-2 (from memory): the unit
	// of G0.
	HabingFlux = 1.6e-3
	// DustUVOpacity is the ultraviolet dust opacity of gas at solar
	// metallicity, 1000 cm^2 per gram of gas, the value RadiationPressure
	// uses by default (Draine 2011 order of magnitude; from memory).
	DustUVOpacity = 1000
	// CarbonElectronFraction is the electron fraction n_e / n_H of neutral
	// gas whose free electrons come from singly ionized carbon, the
	// gas-phase carbon abundance C/H = 1.4e-4 (Cardelli, Meyer, Jura &
	// Savage 1996, ApJ 467, 334; from memory): the floor of n_e in
	// photodissociation regions around young stars.
	CarbonElectronFraction = 1.4e-4
	// PhotoelectricFitMaxTemperature is the warmest gas the Bakes &
	// Tielens 1994 efficiency fit was made for, 1e4 K (from memory); the
	// scheme evaluates it at no higher temperature.
	PhotoelectricFitMaxTemperature = 1e4
	// photoelectricRate is the coefficient of the heating rate per
	// hydrogen nucleus, 1e-24 eps G0 erg/s (Bakes & Tielens 1994).
	photoelectricRate = 1e-24
)

// PhotoelectricEfficiency is the fraction of the far-ultraviolet energy
// absorbed by small grains and PAHs that photoelectrons turn into gas heat,
// the fit of Bakes & Tielens 1994 (ApJ 427, 822, eq. 43; from memory):
//
//	eps = 4.87e-2 / (1 + 4e-3 x^0.73) + 3.65e-2 (T/1e4)^0.7 / (1 + 2e-4 x),
//
// with x = G0 sqrt(T) / n_e the grain charging parameter (G0 in Habing
// units, T in K, n_e in cm^-3). The first term falls as grains charge up
// (fewer, slower photoelectrons); the second is the contribution of
// recombining electrons in warm gas. T is taken as given: the scheme caps it
// at PhotoelectricFitMaxTemperature.
func PhotoelectricEfficiency(x, T float64) float64 {
	return 4.87e-2/(1+4e-3*math.Pow(x, 0.73)) + 3.65e-2*math.Pow(T/1e4, 0.7)/(1+2e-4*x)
}

// FUVFieldAt is the far-ultraviolet field in Habing units at distance r
// (cm) from a source of far-ultraviolet luminosity l (erg/s) seen through
// optical depth tau: G0 = l exp(-tau) / (4 pi r^2) / HabingFlux.
func FUVFieldAt(l, r, tau float64) float64 {
	return l * math.Exp(-tau) / (4 * math.Pi * r * r) / HabingFlux
}

// PhotoelectricHeating heats the gas around a star with the photoelectrons
// its far-ultraviolet light (6-13.6 eV) knocks out of small dust grains.
//
// A source's Energy is the far-ultraviolet energy emitted over the step and
// Duration the step's length, so the luminosity is L = Energy / Duration.
// The light is followed outwards through the neighbors, nearest first, each
// treated as a spherical shell of its mass at its distance (the spherical
// average of the gas around the star): neighbor j, of mass m_j at distance
// r_j, adds the dust optical depth
//
//	dtau_j = kappa (Z_j / Z_sun) m_j / (4 pi r_j^2),
//
// with kappa the dust opacity at solar metallicity (the dust model of
// RadiationPressure, scaled with the gas metallicity; for uniform gas the
// summed depth is the radiation-pressure column 3 M / (4 pi R^2) times
// kappa). A neighbor closer to the star than its own radius (3 m / 4 pi
// rho)^(1/3) is taken at that radius. Neighbor j absorbs the light entering
// its shell less the light leaving it, A_j = E (exp(-tau_<j) - exp(-tau_<j
// - dtau_j)), so the absorbed energies add up to E (1 - exp(-tau)) exactly,
// and it sees the field at its middle,
//
//	G0_j = L exp(-tau_<j - dtau_j / 2) / (4 pi r_j^2) / HabingFlux
//
// (Habing 1968), which its records carry (Deposit.FUVField). Its heating
// over the step is the Bakes & Tielens 1994 (ApJ 427, 822) rate of 1e-24
// eps G0 erg/s per hydrogen nucleus, with the efficiency eps of
// PhotoelectricEfficiency at the neighbor's temperature (neutral gas,
// capped at PhotoelectricFitMaxTemperature) and electron density
// ElectronFraction n_H, scaled with the dust-to-gas ratio Z_j / Z_sun, and
// never more than A_j. The rest of the light, absorbed without heating
// (re-emitted by the dust in the infrared) or passing beyond the
// neighborhood, is booked as radiated. The light carries no momentum here
// (RadiationPressure couples that). Any ejected mass the source carries is
// shared by weight as in a thermal dump.
type PhotoelectricHeating struct {
	// FUVOpacity is the far-ultraviolet dust opacity of gas at solar
	// metallicity in cm^2 per gram of gas; zero is dust-free (clear) gas,
	// which absorbs and heats nothing.
	FUVOpacity float64
	// ElectronFraction is n_e / n_H in the heated gas; it must be positive.
	ElectronFraction float64
}

// DefaultPhotoelectricHeating is the scheme with DustUVOpacity and
// CarbonElectronFraction.
func DefaultPhotoelectricHeating() PhotoelectricHeating {
	return PhotoelectricHeating{FUVOpacity: DustUVOpacity, ElectronFraction: CarbonElectronFraction}
}

// Name is "photoelectric-heating".
func (PhotoelectricHeating) Name() string { return "photoelectric-heating" }

// Validate checks the opacity and the electron fraction.
func (s PhotoelectricHeating) Validate() error {
	if !(s.FUVOpacity >= 0) || math.IsInf(s.FUVOpacity, 0) {
		return errorf(ErrInvalidArgument, "photoelectric heating: opacity %g cm^2/g must be finite and non-negative", s.FUVOpacity)
	}
	if !(s.ElectronFraction > 0) || math.IsInf(s.ElectronFraction, 0) {
		return errorf(ErrInvalidArgument, "photoelectric heating: electron fraction %g must be finite and positive", s.ElectronFraction)
	}
	return nil
}

// Deposit implements Scheme.
func (s PhotoelectricHeating) Deposit(nb *Neighborhood, out []Deposit) (float64, error) {
	if err := s.Validate(); err != nil {
		return 0, err
	}
	src := nb.Source
	u := nb.Units
	e := src.Energy
	if e > 0 && !(src.Duration > 0) {
		return 0, errorf(ErrBadValue, "photoelectric heating: far-ultraviolet energy %g over a step of length %g: the luminosity needs a positive duration", e, src.Duration)
	}
	g0 := nb.scratch // free: no kicks, so CoupleRadial does not tilt
	heat := nb.EnergyWeight
	need := 0.0
	if e > 0 {
		ergs := u.EnergyErg()
		dt := src.Duration * u.TimeS()
		eErg := e * ergs
		lum := eErg / dt
		// (3/2) k T = u mu m_p for neutral atomic gas.
		tempPerEnergy := 2.0 / 3 * u.SpecificEnergy() * MassPerHydrogen / (1 + heliumPerHydrogen) * units.ProtonMass / units.Boltzmann
		tau := 0.0
		for j := range heat {
			mass := nb.Mass[j] * u.MassG
			size := math.Cbrt(3 * mass / (4 * math.Pi * nb.Density[j] * u.DensityGCm3()))
			r := math.Max(nb.Dist[j]*u.LengthCm, size)
			area := 4 * math.Pi * r * r
			zeta := nb.Metallicity[j] / yields.SolarMetals
			dtau := s.FUVOpacity * zeta * mass / area
			g0[j] = FUVFieldAt(lum, r, tau+dtau/2)
			absorbed := eErg * math.Exp(-tau) * -math.Expm1(-dtau)
			tau += dtau
			T := math.Min(nb.InternalEnergy[j]*tempPerEnergy, PhotoelectricFitMaxTemperature)
			ne := s.ElectronFraction * hydrogenDensity(nb.Density[j], u)
			eps := PhotoelectricEfficiency(g0[j]*math.Sqrt(T)/ne, T) * zeta
			hydrogen := mass / (MassPerHydrogen * units.ProtonMass)
			h := math.Min(photoelectricRate*eps*g0[j]*hydrogen*dt, absorbed)
			heat[j] = h / ergs
			need += heat[j]
		}
	} else {
		clear(g0)
		clear(heat)
	}
	// Round-off must not hand out more than the light brought.
	scale := 1.0
	if need > e {
		scale = e / need
		need = e
	}
	for j := range heat {
		nb.Momentum[j] = 0
		nb.HeatCap[j] = math.Inf(1)
		if e > 0 {
			heat[j] *= scale / e
		}
	}
	rad := nb.CoupleRadial(out)
	for j := range out {
		out[j].FUVField = g0[j]
	}
	return rad + e - need, nil
}
