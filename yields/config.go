package yields

import (
	"fmt"
	"math"
)

// HubbleTime is the age of the Universe in Myr used to normalize the Type Ia
// delay-time distribution (13.8 Gyr; Planck 2018 gives 13.79 Gyr, from memory).
const HubbleTime = 13800.0

// RemnantConfig is the compact remnant a massive star (at least
// MassiveWindConfig.MinMass) leaves: a neutron star below BlackHoleMinMass, a
// black hole of fixed mass above. It is a deliberately simple model.
type RemnantConfig struct {
	// NeutronStarMass in Msun. Default 1.4 (the Chandrasekhar mass; common practice).
	NeutronStarMass float64
	// BlackHoleMinMass is the lightest initial mass in Msun that leaves a
	// black hole. Default 25 (from memory: Heger et al. 2003, ApJ 591, 288,
	// single stars near solar metallicity).
	BlackHoleMinMass float64
	// BlackHoleMass in Msun. Default 10 (from memory: typical dynamically
	// measured stellar black holes in X-ray binaries are 5–15 Msun).
	BlackHoleMass float64
}

// CoreCollapseConfig sets the core-collapse supernova channel. Each star in
// [MinMass, MaxMass] explodes at the end of its lifetime and ejects
// m − remnant − (mass already lost in winds). Of the ejecta, a mass of new
// metals NewMetalsPerMsun·(m − NewMetalsMinMass) (zero below
// NewMetalsMinMass) has the element pattern NewMetalPattern; the rest has
// the star's initial composition. This is a simple model sized to the order
// of magnitude of Woosley & Weaver 1995 (ApJS 101, 181; from memory: about
// 1 Msun of metals from a 15 Msun star, 3 from 25, 6 from 40, mostly oxygen).
type CoreCollapseConfig struct {
	// MinMass and MaxMass bound the progenitor window in Msun. Default 8–100
	// (common practice).
	MinMass, MaxMass float64
	// Energy per supernova in erg. Default 1e51 (common practice, units.FOE).
	Energy float64
	// NewMetalsPerMsun is the slope of the new-metal mass with progenitor
	// mass. Default 0.2.
	NewMetalsPerMsun float64
	// NewMetalsMinMass in Msun is where new metals start. Default 10.
	NewMetalsMinMass float64
	// NewMetalPattern gives each element's fraction of the new metals
	// (entries for Metals, Hydrogen and Helium are ignored; the rest must sum
	// to at most 1, the remainder being untracked elements). Default
	// (from memory, order of magnitude of Woosley & Weaver 1995 yields
	// integrated over an IMF): O 0.55, C 0.10, Ne 0.10, Si 0.07, Mg 0.05,
	// Fe 0.04, S 0.03, Ca 0.005, N 0.005.
	NewMetalPattern Abundances
}

// TypeIaConfig sets the Type Ia channel: a delay-time distribution
// R(t) = A/t for t >= MinDelay (zero before), with A chosen so that
// EventsPerMsun events happen between MinDelay and HubbleTime; it goes on
// past HubbleTime. Default numbers from memory: the t^-1 shape and 1.3e-3
// events per Msun formed over a Hubble time are the review values of Maoz,
// Mannucci & Nelemans 2014 (ARA&A 52, 107); W7 (Iwamoto et al. 1999, ApJS
// 125, 439) for the ejecta.
type TypeIaConfig struct {
	// EventsPerMsun is the number of SNe Ia per Msun formed by HubbleTime.
	// Default 1.3e-3 (Maoz, Mannucci & Nelemans 2014; the low end of the
	// published range is about 1e-3).
	EventsPerMsun float64
	// MinDelay in Myr. Default 40 (about the lifetime of an 8 Msun star).
	MinDelay float64
	// EjectaMass per event in Msun, all of it metals. Default 1.4.
	EjectaMass float64
	// Energy per event in erg. Default 1e51 (common practice).
	Energy float64
	// ElementMass is the mass of each element per event in Msun (entries for
	// Metals, Hydrogen, Helium ignored; the rest sum to at most EjectaMass).
	// Default W7 from memory: Fe 0.70, Si 0.15, O 0.14, S 0.085, C 0.048,
	// Ca 0.012, Mg 0.0086, Ne 0.002.
	ElementMass Abundances
}

// MassiveWindConfig sets the winds of stars of at least MinMass before they
// die. A star of mass m loses, spread evenly over its lifetime, a fraction
// f = LostFractionAt100·(m/100 Msun)·(Z/Zsun)^MetallicityExponent of the
// mass it will not keep as a remnant (Z clamped to the lifetime fit's range).
// This is a simple model: its numbers are chosen from memory so that a
// 20 Msun star at solar metallicity loses about 1.5 Msun and a 100 Msun star
// about 40 Msun; the metallicity exponent is that of Vink, de Koter &
// Lamers 2001 (A&A 369, 574; from memory, Mdot ∝ Z^0.69). Of the wind mass a
// fraction HeliumEnrichment is helium made from hydrogen; the rest has the
// star's initial composition.
type MassiveWindConfig struct {
	// MinMass in Msun. Default 8 (common practice).
	MinMass float64
	// LostFractionAt100 is f for a 100 Msun star at solar metallicity. Default 0.4.
	LostFractionAt100 float64
	// MetallicityExponent is the power of Z/Zsun. Default 0.69.
	MetallicityExponent float64
	// Speed is the wind speed in km/s. Default 2000 (from memory: O-star
	// terminal speeds are 1500–3000 km/s, Lamers & Cassinelli 1999).
	Speed float64
	// HeliumEnrichment is the mass fraction of the wind turned from H to He. Default 0.05.
	HeliumEnrichment float64
}

// AGBConfig sets the mass loss of stars below MaxMass: at the end of its
// life a star of mass m sheds m − m_final, with the linear initial–final
// mass relation m_final = FinalMassSlope·m + FinalMassIntercept (default
// Kalirai et al. 2008, ApJ 676, 594, from memory: 0.109 m + 0.394 Msun).
// The ejecta have the star's initial composition with a fraction of their
// mass turned from hydrogen into He, C and N (defaults 0.01, 0.002, 0.001,
// order of magnitude from memory of Karakas 2010, MNRAS 403, 1413).
type AGBConfig struct {
	// MaxMass in Msun. Default 8 (common practice).
	MaxMass float64
	// FinalMassSlope and FinalMassIntercept (Msun) define m_final.
	FinalMassSlope, FinalMassIntercept float64
	// Speed is the wind speed in km/s. Default 15 (from memory: AGB winds
	// blow at 5–30 km/s, Höfner & Olofsson 2018, A&ARv 26, 1).
	Speed float64
	// Enrichment of the ejecta, mass fractions made from hydrogen.
	HeliumEnrichment, CarbonEnrichment, NitrogenEnrichment float64
}

// Config sets up a Population.
type Config struct {
	// IMF is the initial mass function's form. Default Kroupa.
	IMF IMFForm
	// LightestStarMass and HeaviestStarMass give the IMF's mass range in Msun. Default 0.1–100.
	LightestStarMass, HeaviestStarMass float64
	// Remnants left by massive stars.
	Remnants RemnantConfig
	// CoreCollapse, TypeIa, MassiveWinds and AGB set the channels.
	CoreCollapse CoreCollapseConfig
	TypeIa       TypeIaConfig
	MassiveWinds MassiveWindConfig
	AGB          AGBConfig
	// Species is the set of elements releases report, in its order (see
	// SpeciesSet); the zero value is DefaultSpeciesSet. The built-in
	// population has yields for the default set's elements only: a set
	// naming another element is refused (use a Table for others).
	Species SpeciesSet
}

// DefaultTypeIaPerMsun is the default number of Type Ia supernovae per Msun
// formed over a Hubble time, 1.3e-3 (Maoz, Mannucci & Nelemans 2014, ARA&A
// 52, 107; from memory).
const DefaultTypeIaPerMsun = 1.3e-3

// DefaultConfig is a Kroupa population over 0.1–100 Msun with every channel
// at its documented default.
func DefaultConfig() Config {
	var ccPattern Abundances
	ccPattern[Oxygen] = 0.55
	ccPattern[Carbon] = 0.10
	ccPattern[Neon] = 0.10
	ccPattern[Silicon] = 0.07
	ccPattern[Magnesium] = 0.05
	ccPattern[Iron] = 0.04
	ccPattern[Sulfur] = 0.03
	ccPattern[Calcium] = 0.005
	ccPattern[Nitrogen] = 0.005
	var ia Abundances
	ia[Iron] = 0.70
	ia[Silicon] = 0.15
	ia[Oxygen] = 0.14
	ia[Sulfur] = 0.085
	ia[Carbon] = 0.048
	ia[Calcium] = 0.012
	ia[Magnesium] = 0.0086
	ia[Neon] = 0.002
	return Config{
		IMF:              Kroupa,
		LightestStarMass: DefaultLightestStarMass,
		HeaviestStarMass: DefaultHeaviestStarMass,
		Remnants:         RemnantConfig{NeutronStarMass: 1.4, BlackHoleMinMass: 25, BlackHoleMass: 10},
		CoreCollapse: CoreCollapseConfig{
			MinMass: 8, MaxMass: 100, Energy: 1e51,
			NewMetalsPerMsun: 0.2, NewMetalsMinMass: 10, NewMetalPattern: ccPattern,
		},
		TypeIa: TypeIaConfig{EventsPerMsun: DefaultTypeIaPerMsun, MinDelay: 40, EjectaMass: 1.4, Energy: 1e51, ElementMass: ia},
		MassiveWinds: MassiveWindConfig{
			MinMass: 8, LostFractionAt100: 0.4, MetallicityExponent: 0.69, Speed: 2000, HeliumEnrichment: 0.05,
		},
		AGB: AGBConfig{
			MaxMass: 8, FinalMassSlope: 0.109, FinalMassIntercept: 0.394, Speed: 15,
			HeliumEnrichment: 0.01, CarbonEnrichment: 0.002, NitrogenEnrichment: 0.001,
		},
	}
}

func finiteNonNeg(name string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
		return fmt.Errorf("%s = %g: want finite and >= 0", name, v)
	}
	return nil
}

func finitePos(name string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) || v <= 0 {
		return fmt.Errorf("%s = %g: want finite and > 0", name, v)
	}
	return nil
}

// validate checks the numbers one by one; the physical consistency of the
// channels together (no negative ejecta) is checked by NewPopulation.
func (c Config) validate() error {
	checks := []error{
		finitePos("Remnants.NeutronStarMass", c.Remnants.NeutronStarMass),
		finitePos("Remnants.BlackHoleMinMass", c.Remnants.BlackHoleMinMass),
		finitePos("Remnants.BlackHoleMass", c.Remnants.BlackHoleMass),
		finitePos("CoreCollapse.MinMass", c.CoreCollapse.MinMass),
		finitePos("CoreCollapse.MaxMass", c.CoreCollapse.MaxMass),
		finiteNonNeg("CoreCollapse.Energy", c.CoreCollapse.Energy),
		finiteNonNeg("CoreCollapse.NewMetalsPerMsun", c.CoreCollapse.NewMetalsPerMsun),
		finiteNonNeg("CoreCollapse.NewMetalsMinMass", c.CoreCollapse.NewMetalsMinMass),
		finiteNonNeg("TypeIa.EventsPerMsun", c.TypeIa.EventsPerMsun),
		finitePos("TypeIa.MinDelay", c.TypeIa.MinDelay),
		finiteNonNeg("TypeIa.EjectaMass", c.TypeIa.EjectaMass),
		finiteNonNeg("TypeIa.Energy", c.TypeIa.Energy),
		finitePos("MassiveWinds.MinMass", c.MassiveWinds.MinMass),
		finiteNonNeg("MassiveWinds.LostFractionAt100", c.MassiveWinds.LostFractionAt100),
		finiteNonNeg("MassiveWinds.MetallicityExponent", c.MassiveWinds.MetallicityExponent),
		finiteNonNeg("MassiveWinds.Speed", c.MassiveWinds.Speed),
		finiteNonNeg("MassiveWinds.HeliumEnrichment", c.MassiveWinds.HeliumEnrichment),
		finitePos("AGB.MaxMass", c.AGB.MaxMass),
		finiteNonNeg("AGB.FinalMassSlope", c.AGB.FinalMassSlope),
		finiteNonNeg("AGB.FinalMassIntercept", c.AGB.FinalMassIntercept),
		finiteNonNeg("AGB.Speed", c.AGB.Speed),
		finiteNonNeg("AGB.HeliumEnrichment", c.AGB.HeliumEnrichment),
		finiteNonNeg("AGB.CarbonEnrichment", c.AGB.CarbonEnrichment),
		finiteNonNeg("AGB.NitrogenEnrichment", c.AGB.NitrogenEnrichment),
	}
	for _, err := range checks {
		if err != nil {
			return err
		}
	}
	for s := Carbon; s < NumSpecies; s++ {
		if err := finiteNonNeg("CoreCollapse.NewMetalPattern["+s.Symbol()+"]", c.CoreCollapse.NewMetalPattern[s]); err != nil {
			return err
		}
		if err := finiteNonNeg("TypeIa.ElementMass["+s.Symbol()+"]", c.TypeIa.ElementMass[s]); err != nil {
			return err
		}
	}
	var ps, is float64
	for s := Carbon; s < NumSpecies; s++ {
		ps += c.CoreCollapse.NewMetalPattern[s]
		is += c.TypeIa.ElementMass[s]
	}
	if ps > 1+1e-12 {
		return fmt.Errorf("CoreCollapse.NewMetalPattern sums to %g > 1", ps)
	}
	if is > c.TypeIa.EjectaMass*(1+1e-12) {
		return fmt.Errorf("TypeIa.ElementMass sums to %g Msun > EjectaMass %g", is, c.TypeIa.EjectaMass)
	}
	if c.CoreCollapse.MaxMass <= c.CoreCollapse.MinMass {
		return fmt.Errorf("CoreCollapse window [%g, %g] Msun is empty", c.CoreCollapse.MinMass, c.CoreCollapse.MaxMass)
	}
	if c.CoreCollapse.MinMass < c.MassiveWinds.MinMass {
		return fmt.Errorf("CoreCollapse.MinMass %g below MassiveWinds.MinMass %g: supernova progenitors must be massive stars", c.CoreCollapse.MinMass, c.MassiveWinds.MinMass)
	}
	if c.AGB.MaxMass > c.MassiveWinds.MinMass {
		return fmt.Errorf("AGB.MaxMass %g above MassiveWinds.MinMass %g: the ranges overlap", c.AGB.MaxMass, c.MassiveWinds.MinMass)
	}
	if c.AGB.FinalMassSlope >= 1 {
		return fmt.Errorf("AGB.FinalMassSlope %g: want < 1", c.AGB.FinalMassSlope)
	}
	if c.Remnants.BlackHoleMass > c.Remnants.BlackHoleMinMass || c.Remnants.NeutronStarMass > c.MassiveWinds.MinMass {
		return fmt.Errorf("remnants (NS %g, BH %g above %g Msun) heavier than their progenitors", c.Remnants.NeutronStarMass, c.Remnants.BlackHoleMass, c.Remnants.BlackHoleMinMass)
	}
	return nil
}
