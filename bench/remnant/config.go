package remnant

import (
	"errors"
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/bench/cooling"
	"github.com/ejecta-dev/ejecta/bench/hydro"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// ErrConfig marks an invalid configuration.
var ErrConfig = errors.New("invalid remnant configuration")

// Config describes one remnant run. Start from DefaultConfig: every
// setting is used as given (no zero stands for a default), and New refuses
// settings that have no meaning.
type Config struct {
	// Density is the ambient hydrogen number density n_H in cm^-3.
	Density float64
	// Metallicity is the ambient (and ejecta) metallicity in solar units;
	// it selects the built-in cooling curve when Cooling is nil.
	Metallicity float64
	// Energy is the explosion energy in erg (DefaultConfig: 1e51).
	Energy float64
	// EjectaMass is the ejecta mass in Msun (DefaultConfig: 3, our own
	// choice).
	EjectaMass float64
	// AmbientAtEquilibrium sets the ambient temperature to the thermal
	// equilibrium of the cooling curve at Density (DefaultConfig: true;
	// with NoCooling, where there is no equilibrium, 1e4 K); otherwise
	// AmbientTemperature is used.
	AmbientAtEquilibrium bool
	// AmbientTemperature is the ambient temperature in K when
	// AmbientAtEquilibrium is false (DefaultConfig: 1e4).
	AmbientTemperature float64
	// Cooling is the cooling curve; nil means cooling.Builtin(Metallicity).
	Cooling *cooling.Curve
	// NoCooling switches radiative cooling and heating off.
	NoCooling bool
	// Gas relates temperature and internal energy (DefaultConfig:
	// cooling.DefaultGas(), whose mean mass per particle follows the
	// ionization of hydrogen and helium: 1.25 in the cold shell and the
	// neutral ambient gas, 0.6 in the hot interior). The hydrodynamics use
	// its Gamma.
	Gas cooling.Gas
	// ZonesPerShellRadius sets the resolution: zones across the estimated
	// shell-formation radius (DefaultConfig: 100). The grid is uniform in
	// radius.
	ZonesPerShellRadius int
	// DomainShellRadii is the outer radius in estimated shell-formation
	// radii (DefaultConfig: 3).
	DomainShellRadii float64
	// EndShellTimes is the run length in estimated shell-formation times
	// (DefaultConfig: 10).
	EndShellTimes float64
	// InitialZones is the number of zones the ejecta start in
	// (DefaultConfig: 8; the initial radius must stay below a third of the
	// shell-formation radius, Kim & Ostriker 2015).
	InitialZones int
	// ThermalFraction is the share of the energy the ejecta start with as
	// heat, the rest being the kinetic energy of homologous expansion.
	// Zero is a cold ejecta ball; DefaultConfig sets 0.5 (our own choice:
	// cold ejecta moving at 1e4 km/s stress the total-energy scheme, and
	// the shell-formation point does not depend on the split once the
	// ejecta have swept up several times their mass).
	ThermalFraction float64
	// InternalEnergySwitch is the share of a zone's total energy below which
	// the thermal energy it implies (total minus kinetic) is replaced by the
	// separately evolved internal energy, the difference booked as
	// Ledger.SwitchAdded (the dual-energy formalism of Bryan et al. 1995,
	// Comput. Phys. Commun. 89, 149; see the package documentation). Zero
	// uses the separate internal energy only where the total energy leaves
	// negative heat.
	// DefaultConfig: 0.001 (our own choice, see the package documentation;
	// Bryan et al. use a value of this order, from memory).
	InternalEnergySwitch float64
	// VelocitySlopeCap caps each zone's velocity slope so that the kinetic
	// energy of the reconstructed velocity profile stays below this share of
	// the zone's internal energy (hydro.CapVelocitySlope; see the package
	// documentation). +Inf switches the cap off. DefaultConfig: 0.3 (our own
	// choice).
	VelocitySlopeCap float64
	// CFL is the Courant number (DefaultConfig: 0.4).
	CFL float64
	// CoolingStep limits the step to this fraction of the shortest cooling
	// time among zones hotter than 2e4 K, but never below a tenth of the
	// Courant step (DefaultConfig: 0.3; the cooling itself is exact at any
	// step).
	CoolingStep float64
	// Limiter is the slope limiter of the reconstruction (DefaultConfig:
	// monotonized central).
	Limiter hydro.Limiter
	// HistorySamples is the number of log-spaced history records
	// (DefaultConfig: 200).
	HistorySamples int
}

// DefaultConfig is a 1e51 erg supernova with 3 Msun of ejecta in solar
// metallicity gas of n_H = 1 cm^-3 at its thermal equilibrium, with the
// built-in cooling, at the default resolution and run length.
func DefaultConfig() Config {
	return Config{
		Density: 1, Metallicity: 1, Energy: units.FOE, EjectaMass: 3,
		AmbientAtEquilibrium: true, AmbientTemperature: 1e4,
		Gas: cooling.DefaultGas(), ZonesPerShellRadius: 100, DomainShellRadii: 3, EndShellTimes: 10,
		InitialZones: 8, ThermalFraction: 0.5, InternalEnergySwitch: 1e-3, VelocitySlopeCap: 0.3, CFL: 0.4, CoolingStep: 0.3,
		Limiter: hydro.MonotonizedCentral, HistorySamples: 200,
	}
}

func (c Config) validate() error {
	pos := func(v float64) bool { return v > 0 && !math.IsInf(v, 0) }
	switch {
	case !pos(c.Density):
		return fmt.Errorf("remnant: density %v cm^-3, want finite > 0: %w", c.Density, ErrConfig)
	case !(c.Metallicity >= 0) || math.IsInf(c.Metallicity, 0):
		return fmt.Errorf("remnant: metallicity %v solar, want finite >= 0: %w", c.Metallicity, ErrConfig)
	case !pos(c.Energy):
		return fmt.Errorf("remnant: energy %v erg, want finite > 0: %w", c.Energy, ErrConfig)
	case !pos(c.EjectaMass):
		return fmt.Errorf("remnant: ejecta mass %v Msun, want finite > 0: %w", c.EjectaMass, ErrConfig)
	case !c.AmbientAtEquilibrium && !pos(c.AmbientTemperature):
		return fmt.Errorf("remnant: ambient temperature %v K, want finite > 0: %w", c.AmbientTemperature, ErrConfig)
	case c.ZonesPerShellRadius < 8 || c.ZonesPerShellRadius > 1<<16:
		return fmt.Errorf("remnant: %d zones per shell radius, want 8 to 65536: %w", c.ZonesPerShellRadius, ErrConfig)
	case !(c.DomainShellRadii >= 1) || c.DomainShellRadii > 100:
		return fmt.Errorf("remnant: domain %v shell radii, want 1 to 100: %w", c.DomainShellRadii, ErrConfig)
	case !pos(c.EndShellTimes) || c.EndShellTimes > 1000:
		return fmt.Errorf("remnant: run length %v shell times, want (0, 1000]: %w", c.EndShellTimes, ErrConfig)
	case c.InitialZones < 2:
		return fmt.Errorf("remnant: %d initial zones, want >= 2: %w", c.InitialZones, ErrConfig)
	case float64(c.InitialZones) > float64(c.ZonesPerShellRadius)/3:
		return fmt.Errorf("remnant: %d initial zones reach past a third of the shell-formation radius (%d zones; Kim & Ostriker 2015): %w", c.InitialZones, c.ZonesPerShellRadius, ErrConfig)
	case !(c.ThermalFraction >= 0 && c.ThermalFraction <= 1):
		return fmt.Errorf("remnant: thermal fraction %v, want in [0, 1]: %w", c.ThermalFraction, ErrConfig)
	case !(c.InternalEnergySwitch >= 0 && c.InternalEnergySwitch < 1):
		return fmt.Errorf("remnant: internal energy switch %v, want in [0, 1): %w", c.InternalEnergySwitch, ErrConfig)
	case !(c.VelocitySlopeCap >= 0):
		return fmt.Errorf("remnant: velocity slope cap %v, want >= 0: %w", c.VelocitySlopeCap, ErrConfig)
	case !(c.CFL > 0 && c.CFL <= 0.8):
		return fmt.Errorf("remnant: CFL %v, want in (0, 0.8]: %w", c.CFL, ErrConfig)
	case !pos(c.CoolingStep):
		return fmt.Errorf("remnant: cooling step fraction %v, want finite > 0: %w", c.CoolingStep, ErrConfig)
	case c.Limiter > hydro.FirstOrder:
		return fmt.Errorf("remnant: limiter %v: %w", c.Limiter, ErrConfig)
	case c.HistorySamples < 2 || c.HistorySamples > 1<<20:
		return fmt.Errorf("remnant: %d history samples, want 2 to 2^20: %w", c.HistorySamples, ErrConfig)
	}
	if err := c.Gas.Validate(); err != nil {
		return fmt.Errorf("remnant: %w: %w", ErrConfig, err)
	}
	return nil
}

// Kim & Ostriker 2015 (ApJ 802, 99, eqs. 8–11 for a uniform medium; from
// memory) shell-formation fits, used here only to size the grid and the run.
func shellEstimate(e, n float64) (t, r float64) {
	e51 := e / units.FOE
	t = 4.4e4 * units.JulianYear * math.Pow(e51, 0.22) * math.Pow(n, -0.55)
	r = 22.1 * units.Parsec * math.Pow(e51, 0.29) * math.Pow(n, -0.42)
	return t, r
}
