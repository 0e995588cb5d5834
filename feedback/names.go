package feedback

import "strings"

// SchemeOptions are the settings of a built-in scheme chosen by name.
type SchemeOptions struct {
	// Fit is the terminal momentum fit (terminal-momentum, stellar-winds).
	Fit RemnantFit
	// Table, when set, replaces Fit with a remnant table (terminal-momentum,
	// stellar-winds).
	Table *RemnantTable
	// KineticFraction is the kinetic scheme's fraction.
	KineticFraction float64
	// Seed keys the draws of stochastic heating and kicked winds;
	// TemperatureJump (K) sets stochastic heating.
	Seed            uint64
	TemperatureJump float64
	// MaxInfraredBoost bounds radiation pressure's infrared trapping
	// factor (RadiationPressure.MaxInfraredBoost): at least 1, +Inf for
	// no bound.
	MaxInfraredBoost float64
	// PhotonReach bounds photoionization's search for gas to ionize
	// (Photoionization.Reach); zero keeps it to the coupler's neighbors.
	PhotonReach int
	// WindEventEnergy is the energy in erg of one remnant stellar winds
	// count their energy in (Winds.EventEnergy).
	WindEventEnergy float64
}

// DefaultSchemeOptions are the published defaults: the Kim & Ostriker 2015
// fit, the Sedov–Taylor kinetic fraction SedovKineticFraction,
// DefaultTemperatureJump, the infrared boost bound and wind event energy
// of DefaultRadiationPressure and DefaultWinds, no photon search growth,
// with seed 0.
func DefaultSchemeOptions() SchemeOptions {
	return SchemeOptions{Fit: KimOstriker2015, KineticFraction: SedovKineticFraction, TemperatureJump: DefaultTemperatureJump,
		MaxInfraredBoost: DefaultRadiationPressure().MaxInfraredBoost, PhotonReach: Photoionization{}.Reach,
		WindEventEnergy: DefaultWinds(KimOstriker2015).EventEnergy}
}

// SchemeNames lists the built-in schemes' names, as Name returns them.
func SchemeNames() []string {
	names := []string{
		ThermalDump{}.Name(), Kinetic{}.Name(), TerminalMomentum{}.Name(), StochasticHeating{}.Name(),
		DelayedCooling{}.Name(), Winds{}.Name(), RadiationPressure{}.Name(), Photoionization{}.Name(),
		PhotoelectricHeating{}.Name(),
	}
	for _, s := range kickedWindsVariants() {
		names = append(names, s.Name())
	}
	return names
}

// kickedWindsVariants are the kicked-wind schemes reachable by name:
// constant and momentum-driven, loaded per supernova energy or per formed
// stellar mass.
func kickedWindsVariants() []KickedWinds {
	var out []KickedWinds
	for _, s := range []KickedWinds{DefaultKickedWinds(), DefaultMomentumDrivenWinds()} {
		out = append(out, s)
		s.Basis = LoadPerFormedMass
		out = append(out, s)
	}
	return out
}

// SchemeByName builds a built-in scheme from its name and options (start
// from DefaultSchemeOptions); every option is used as given (zero
// included), and the scheme is checked (Validate). Radiation pressure
// takes its opacities from DefaultRadiationPressure.
func SchemeByName(name string, o SchemeOptions) (Scheme, error) {
	switch name {
	case ThermalDump{}.Name():
		return ThermalDump{}, nil
	case Kinetic{}.Name():
		k := Kinetic{KineticFraction: o.KineticFraction}
		return k, k.Validate()
	case TerminalMomentum{}.Name():
		return TerminalMomentum{Fit: o.Fit, Table: o.Table}, nil
	case StochasticHeating{}.Name():
		sh := StochasticHeating{Seed: o.Seed, TemperatureJump: o.TemperatureJump}
		return sh, sh.Validate()
	case DelayedCooling{}.Name():
		return DelayedCooling{}, nil
	case Winds{}.Name():
		w := Winds{Fit: o.Fit, Table: o.Table, EventEnergy: o.WindEventEnergy}
		return w, w.Validate()
	case RadiationPressure{}.Name():
		r := DefaultRadiationPressure()
		r.MaxInfraredBoost = o.MaxInfraredBoost
		return r, r.Validate()
	case Photoionization{}.Name():
		p := Photoionization{Reach: o.PhotonReach}
		return p, p.Validate()
	case PhotoelectricHeating{}.Name():
		return DefaultPhotoelectricHeating(), nil
	}
	for _, s := range kickedWindsVariants() {
		if name == s.Name() {
			s.Seed = o.Seed
			return s, nil
		}
	}
	return nil, errorf(ErrUnknownName, "scheme %q: want one of %s", name, strings.Join(SchemeNames(), ", "))
}
