package feedback

import "strings"

// SchemeOptions are the settings of a built-in scheme chosen by name.
type SchemeOptions struct {
	// Fit is the terminal momentum fit (terminal-momentum, stellar-winds).
	Fit RemnantFit
	// KineticFraction is the kinetic scheme's fraction (0 means the
	// Sedov–Taylor 0.28).
	KineticFraction float64
	// Seed keys the draws of stochastic heating and kicked winds;
	// TemperatureJump sets stochastic heating (0 means 10^7.5 K).
	Seed            uint64
	TemperatureJump float64
}

// SchemeNames lists the built-in schemes' names, as Name returns them.
func SchemeNames() []string {
	return []string{
		ThermalDump{}.Name(), Kinetic{}.Name(), TerminalMomentum{}.Name(), StochasticHeating{}.Name(),
		DelayedCooling{}.Name(), Winds{}.Name(), RadiationPressure{}.Name(), Photoionization{}.Name(),
		PhotoelectricHeating{}.Name(), DefaultKickedWinds().Name(), DefaultMomentumDrivenWinds().Name(),
	}
}

// SchemeByName builds a built-in scheme from its name and options.
func SchemeByName(name string, o SchemeOptions) (Scheme, error) {
	switch name {
	case ThermalDump{}.Name():
		return ThermalDump{}, nil
	case Kinetic{}.Name():
		return Kinetic{KineticFraction: o.KineticFraction}, nil
	case TerminalMomentum{}.Name():
		return TerminalMomentum{Fit: o.Fit}, nil
	case StochasticHeating{}.Name():
		return StochasticHeating{Seed: o.Seed, TemperatureJump: o.TemperatureJump}, nil
	case DelayedCooling{}.Name():
		return DelayedCooling{}, nil
	case Winds{}.Name():
		return Winds{Fit: o.Fit}, nil
	case RadiationPressure{}.Name():
		return RadiationPressure{}, nil
	case Photoionization{}.Name():
		return Photoionization{}, nil
	case PhotoelectricHeating{}.Name():
		return DefaultPhotoelectricHeating(), nil
	case DefaultKickedWinds().Name():
		s := DefaultKickedWinds()
		s.Seed = o.Seed
		return s, nil
	case DefaultMomentumDrivenWinds().Name():
		s := DefaultMomentumDrivenWinds()
		s.Seed = o.Seed
		return s, nil
	}
	return nil, errorf(ErrUnknownName, "scheme %q: want one of %s", name, strings.Join(SchemeNames(), ", "))
}
