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

// Config describes one remnant run. Zero fields take the defaults
// documented on each (ThermalFraction excepted: zero is a valid choice);
// start from DefaultConfig.
type Config struct {
	// Density is the ambient hydrogen number density n_H in cm^-3.
	Density float64
	// Metallicity is the ambient (and ejecta) metallicity in solar units;
	// it selects the built-in cooling curve when Cooling is nil.
	Metallicity float64
	// Energy is the explosion energy in erg (default 1e51).
	Energy float64
	// EjectaMass is the ejecta mass in Msun (default 3, our own choice).
	EjectaMass float64
	// AmbientTemperature is the ambient temperature in K; zero means the
	// thermal equilibrium of the cooling curve at Density (or 1e4 K with
	// cooling off).
	AmbientTemperature float64
	// Cooling is the cooling curve; nil means cooling.Builtin(Metallicity).
	Cooling *cooling.Curve
	// NoCooling switches radiative cooling and heating off.
	NoCooling bool
	// Gas relates temperature and internal energy (default
	// cooling.DefaultGas()). The hydrodynamics use its Gamma.
	Gas cooling.Gas
	// ZonesPerShellRadius sets the resolution: zones across the estimated
	// shell-formation radius (default 100). The grid is uniform in radius.
	ZonesPerShellRadius int
	// DomainShellRadii is the outer radius in estimated shell-formation
	// radii (default 3).
	DomainShellRadii float64
	// EndShellTimes is the run length in estimated shell-formation times
	// (default 10).
	EndShellTimes float64
	// InitialZones is the number of zones the ejecta start in (default 8;
	// the initial radius must stay below a third of the shell-formation
	// radius, Kim & Ostriker 2015).
	InitialZones int
	// ThermalFraction is the share of the energy the ejecta start with as
	// heat, the rest being the kinetic energy of homologous expansion.
	// Zero is a cold ejecta ball; DefaultConfig sets 0.5 (our own choice:
	// cold ejecta moving at 1e4 km/s stress the total-energy scheme, and
	// the shell-formation point does not depend on the split once the
	// ejecta have swept up several times their mass).
	ThermalFraction float64
	// CFL is the Courant number (default 0.4).
	CFL float64
	// CoolingStep limits the step to this fraction of the shortest cooling
	// time among zones hotter than 2e4 K, but never below a tenth of the
	// Courant step (default 0.3; the cooling itself is exact at any step).
	CoolingStep float64
	// Limiter is the slope limiter of the reconstruction (default
	// monotonized central).
	Limiter hydro.Limiter
	// HistorySamples is the number of log-spaced history records (default
	// 200).
	HistorySamples int
}

// DefaultConfig is a 1e51 erg supernova with 3 Msun of ejecta in solar
// metallicity gas of n_H = 1 cm^-3, with the built-in cooling.
func DefaultConfig() Config {
	return Config{Density: 1, Metallicity: 1, ThermalFraction: 0.5}.withDefaults()
}

func (c Config) withDefaults() Config {
	if c.Energy == 0 {
		c.Energy = units.FOE
	}
	if c.EjectaMass == 0 {
		c.EjectaMass = 3
	}
	if c.Gas == (cooling.Gas{}) {
		c.Gas = cooling.DefaultGas()
	}
	if c.ZonesPerShellRadius == 0 {
		c.ZonesPerShellRadius = 100
	}
	if c.DomainShellRadii == 0 {
		c.DomainShellRadii = 3
	}
	if c.EndShellTimes == 0 {
		c.EndShellTimes = 10
	}
	if c.InitialZones == 0 {
		c.InitialZones = 8
	}
	if c.CFL == 0 {
		c.CFL = 0.4
	}
	if c.CoolingStep == 0 {
		c.CoolingStep = 0.3
	}
	if c.HistorySamples == 0 {
		c.HistorySamples = 200
	}
	return c
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
	case !(c.AmbientTemperature >= 0) || math.IsInf(c.AmbientTemperature, 0):
		return fmt.Errorf("remnant: ambient temperature %v K, want finite >= 0: %w", c.AmbientTemperature, ErrConfig)
	case c.ZonesPerShellRadius < 8 || c.ZonesPerShellRadius > 1<<16:
		return fmt.Errorf("remnant: %d zones per shell radius, want 8 to 65536: %w", c.ZonesPerShellRadius, ErrConfig)
	case !(c.DomainShellRadii >= 1) || c.DomainShellRadii > 100:
		return fmt.Errorf("remnant: domain %v shell radii, want 1 to 100: %w", c.DomainShellRadii, ErrConfig)
	case !pos(c.EndShellTimes) || c.EndShellTimes > 1000:
		return fmt.Errorf("remnant: run length %v shell times, want (0, 1000]: %w", c.EndShellTimes, ErrConfig)
	case c.InitialZones < 2:
		return fmt.Errorf("remnant: %d initial zones, want >= 2: %w", c.InitialZones, ErrConfig)
	case !(c.ThermalFraction >= 0 && c.ThermalFraction <= 1):
		return fmt.Errorf("remnant: thermal fraction %v, want in [0, 1]: %w", c.ThermalFraction, ErrConfig)
	case !(c.CFL > 0 && c.CFL <= 0.8):
		return fmt.Errorf("remnant: CFL %v, want in (0, 0.8]: %w", c.CFL, ErrConfig)
	case !pos(c.CoolingStep):
		return fmt.Errorf("remnant: cooling step fraction %v, want finite > 0: %w", c.CoolingStep, ErrConfig)
	case c.HistorySamples < 2 || c.HistorySamples > 1<<20:
		return fmt.Errorf("remnant: %d history samples, want 2 to 2^20: %w", c.HistorySamples, ErrConfig)
	}
	if err := c.Gas.Validate(); err != nil {
		return fmt.Errorf("remnant: %w", err)
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
