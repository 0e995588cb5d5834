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
	// gas of solar metallicity whose free electrons come from singly
	// ionized carbon, the gas-phase carbon abundance C/H = 1.4e-4
	// (Cardelli, Meyer, Jura & Savage 1996, ApJ 467, 334; from memory): the
	// floor of n_e in neutral gas, reached where the gas is too dense for
	// cosmic rays to keep much hydrogen ionized.
	CarbonElectronFraction = 1.4e-4
	// DefaultHydrogenIonizationRate is the rate, per hydrogen atom, at
	// which cosmic rays and X-rays ionize neutral atomic gas in the solar
	// neighborhood, 1e-16 s^-1: the scale Wolfire et al. 2003 (ApJ 587,
	// 278) give their ionization rates in; Indriolo et al. 2015 (ApJ 800,
	// 40) measure about 2e-16 s^-1 in diffuse atomic clouds (both from
	// memory).
	DefaultHydrogenIonizationRate = 1e-16
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

// CaseBRecombinationAt is the case B recombination coefficient of
// hydrogen at temperature T (K), in cm^3 s^-1, the fit of Hui & Gnedin 1997
// (MNRAS 292, 27; from memory) to the rates of Ferland et al. 1992:
//
//	alpha_B = 2.753e-14 lambda^1.5 / (1 + (lambda / 2.74)^0.407)^2.242,
//
// lambda = 2 T_H / T with T_H = 157807 K, the ionization energy of
// hydrogen over Boltzmann's constant. It gives 2.59e-13 at 1e4 K
// (CaseBRecombination rounds it). Temperatures below 10 K are taken as
// 10 K.
func CaseBRecombinationAt(T float64) float64 {
	lambda := 2 * 157807 / math.Max(T, 10)
	return 2.753e-14 * math.Pow(lambda, 1.5) / math.Pow(1+math.Pow(lambda/2.74, 0.407), 2.242)
}

// NeutralElectronFraction is an estimate of the electron fraction x_e =
// n_e / n_H of neutral atomic gas of hydrogen density nH (cm^-3),
// temperature T (K) and metallicity zeta (in solar units) whose hydrogen
// is ionized by cosmic rays and X-rays at the rate ionRate (s^-1 per
// hydrogen atom): the electrons of singly ionized carbon,
// CarbonElectronFraction zeta, plus those of the hydrogen ions x_H that
// the ionization balance keeps,
//
//	ionRate (1 - x_H) = alpha_B(T) nH x_H (x_C + x_H),
//
// with the case B coefficient CaseBRecombinationAt (the recombination
// photons are absorbed nearby in neutral gas). This is the balance behind
// the electron fractions of the neutral phases in Wolfire et al. 2003 (ApJ
// 587, 278; from memory): a few 1e-2 in the warm neutral medium, where
// hydrogen ions dominate, and several 1e-4 in the cold neutral medium,
// where carbon ions count as much; with ionRate = 0 it is the carbon floor.
// It leaves out the recombination of ions on small grains, which lowers
// x_e in cold gas by a factor of a few (Weingartner & Draine 2001, ApJ
// 563, 842; from memory).
func NeutralElectronFraction(nH, T, zeta, ionRate float64) float64 {
	xc := CarbonElectronFraction * zeta
	if !(ionRate > 0) {
		return xc
	}
	a := CaseBRecombinationAt(T) * nH
	b := a*xc + ionRate
	// The positive root of a x^2 + b x - ionRate = 0, in the form that
	// does not cancel.
	xh := 2 * ionRate / (b + math.Sqrt(b*b+4*a*ionRate))
	return xc + xh
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
// capped at PhotoelectricFitMaxTemperature) and electron density x_e n_H,
// scaled with the dust-to-gas ratio Z_j / Z_sun, and never more than A_j.
// The electron fraction x_e is NeutralElectronFraction of the neighbor's
// density, temperature and metallicity at IonizationRate (a few 1e-2 in
// warm gas, several 1e-4 in cold gas), or ElectronFraction where set. The rest of the light, absorbed without heating
// (re-emitted by the dust in the infrared) or passing beyond the
// neighborhood, is booked as radiated. The light carries no momentum here
// (RadiationPressure couples that). Any ejected mass the source carries is
// shared by weight as in a thermal dump.
type PhotoelectricHeating struct {
	// FUVOpacity is the far-ultraviolet dust opacity of gas at solar
	// metallicity in cm^2 per gram of gas; zero is dust-free (clear) gas,
	// which absorbs and heats nothing.
	FUVOpacity float64
	// ElectronFraction, when positive, is n_e / n_H in all the heated gas
	// (a host's own value, say); zero estimates it for each neighbor with
	// NeutralElectronFraction. Non-negative.
	ElectronFraction float64
	// IonizationRate is the rate (s^-1 per hydrogen atom) at which cosmic
	// rays and X-rays ionize the gas, for the estimate of the electron
	// fraction; finite and non-negative (zero leaves the carbon ions'
	// electrons only).
	IonizationRate float64
}

// DefaultPhotoelectricHeating is the scheme with DustUVOpacity and the
// electron fraction estimated at DefaultHydrogenIonizationRate.
func DefaultPhotoelectricHeating() PhotoelectricHeating {
	return PhotoelectricHeating{FUVOpacity: DustUVOpacity, IonizationRate: DefaultHydrogenIonizationRate}
}

// Name is "photoelectric-heating".
func (PhotoelectricHeating) Name() string { return "photoelectric-heating" }

// Validate checks the opacity and the electron fraction.
func (s PhotoelectricHeating) Validate() error {
	if !(s.FUVOpacity >= 0) || math.IsInf(s.FUVOpacity, 0) {
		return errorf(ErrInvalidArgument, "photoelectric heating: opacity %g cm^2/g must be finite and non-negative", s.FUVOpacity)
	}
	if !(s.ElectronFraction >= 0) || math.IsInf(s.ElectronFraction, 0) {
		return errorf(ErrInvalidArgument, "photoelectric heating: electron fraction %g must be finite and non-negative (0 estimates it)", s.ElectronFraction)
	}
	if !(s.IonizationRate >= 0) || math.IsInf(s.IonizationRate, 0) {
		return errorf(ErrInvalidArgument, "photoelectric heating: ionization rate %g s^-1 must be finite and non-negative", s.IonizationRate)
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
			nH := hydrogenDensity(nb.Density[j], u)
			xe := s.ElectronFraction
			if xe == 0 {
				xe = NeutralElectronFraction(nH, T, zeta, s.IonizationRate)
			}
			// Without electrons the grains charge up completely (x = +Inf,
			// eps = 0).
			x := math.Inf(1)
			if ne := xe * nH; ne > 0 {
				x = g0[j] * math.Sqrt(T) / ne
			}
			eps := PhotoelectricEfficiency(x, T) * zeta
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
