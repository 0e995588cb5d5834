package remnant

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/bench/cooling"
	"github.com/ejecta-dev/ejecta/bench/hydro"
	"github.com/ejecta-dev/ejecta/yields/units"
)

const kyr = 1e3 * units.JulianYear

// A uniform medium at rest stays exactly at rest: the geometric source
// term cancels the pressure flux bit for bit, and gas at its thermal
// equilibrium does not cool.
func TestUniformMediumStaysAtRest(t *testing.T) {
	for _, noCooling := range []bool{true, false} {
		cfg := DefaultConfig()
		cfg.NoCooling = noCooling
		cfg.ZonesPerShellRadius = 20
		cfg.InitialZones = 4
		s, err := New(cfg)
		require.NoError(t, err)
		for i := range s.u {
			s.u[i] = s.eos.Cons(s.ambient)
		}
		before := append([]hydro.Cons(nil), s.u...)
		for range 50 {
			require.NoError(t, s.Step())
		}
		assert.Equal(t, before, s.u, "cooling off: %v", noCooling)
		assert.Zero(t, s.Ledger().Radiated)
	}
}

// sedovRadius is R = 1.1517 (E t^2 / rho)^(1/5), the Sedov–Taylor blast
// wave for gamma = 5/3; the constant comes from the energy integral of the
// similarity solution (Sedov 1959, Similarity and Dimensional Methods in
// Mechanics, ch. IV; Kamm & Timmes 2007, LA-UR-07-2849, give 1.15167 for
// spherical gamma = 5/3; from memory).
func sedovRadius(e, t, rho float64) float64 {
	return 1.1517 * math.Pow(e*t*t/rho, 0.2)
}

// Without cooling the remnant follows the Sedov–Taylor solution once it has
// swept up many times its ejecta: shock radius within 2%, kinetic share of
// the blast energy 0.28 ± 0.01 (Chevalier 1974, ApJ 188, 501: 0.28 for
// gamma = 5/3; from memory), and total energy conserved to 1e-10.
func TestSedovTaylor(t *testing.T) {
	cfg := DefaultConfig()
	cfg.NoCooling = true
	cfg.AmbientAtEquilibrium = false
	cfg.AmbientTemperature = 1e3 // cold enough that the counter-pressure is negligible
	cfg.EjectaMass = 1
	cfg.ThermalFraction = 1 // a point explosion, as in the similarity solution
	cfg.InitialZones = 4
	cfg.ZonesPerShellRadius = 300
	cfg.DomainShellRadii = 1.3
	cfg.EndShellTimes = 1
	s, err := New(cfg)
	require.NoError(t, err)
	rho := s.ambient.Rho
	for _, tk := range []float64{10, 20, 30} {
		for s.Time() < tk*kyr {
			require.NoError(t, s.Step())
		}
		smp := s.sample(0)
		want := sedovRadius(cfg.Energy, s.Time(), rho)
		t.Logf("t = %.1f kyr: R = %.3f pc, Sedov %.3f pc; kinetic share %.4f", s.Time()/kyr, smp.ShockRadius/units.Parsec, want/units.Parsec, smp.Kinetic/cfg.Energy)
		assert.InEpsilon(t, want, smp.ShockRadius, 0.02, "Sedov–Taylor radius at %v kyr", tk)
		assert.InDelta(t, 0.28, smp.Kinetic/cfg.Energy, 0.01, "kinetic fraction (Chevalier 1974)")
	}
	l := s.Ledger()
	assert.Zero(t, l.FloorAdded)
	assert.Zero(t, l.Outflow)
	assert.Less(t, math.Abs(l.Total-l.Initial)/l.Initial, 1e-10, "total energy")
}

// koFit is the Kim & Ostriker 2015 (ApJ 802, 99, eqs. 8–11; from memory)
// uniform-medium shell formation point for E = 1e51 erg at density n:
// time in s, radius in cm, mass in g, momentum in g cm/s.
func koFit(n float64) (t, r, m, p float64) {
	return 4.4e4 * units.JulianYear * math.Pow(n, -0.55),
		22.1 * units.Parsec * math.Pow(n, -0.42),
		1.54e3 * units.SolarMass * math.Pow(n, -0.26),
		2.17e5 * units.MsunKms * math.Pow(n, -0.13)
}

// shellRun runs to two estimated shell times on a grid of 1.6 estimated
// shell radii: enough to pass the hot-mass maximum.
func shellRun(t *testing.T, n float64, zones int) Point {
	t.Helper()
	cfg := DefaultConfig()
	cfg.Density = n
	cfg.ZonesPerShellRadius = zones
	cfg.DomainShellRadii = 1.6
	cfg.EndShellTimes = 2.2
	res, err := Run(cfg)
	require.NoError(t, err)
	require.True(t, res.ShellFormation.Found, "n = %v: no shell formation", n)
	assert.False(t, res.ShockLeftGrid)
	assert.Less(t, math.Abs(res.Ledger.Residual()), 1e-10, "energy ledger")
	return res.ShellFormation
}

// With cooling (built-in curve, solar metallicity, 1e51 erg) the shell
// forms where Kim & Ostriker 2015 find it in uniform gas: time, radius,
// swept mass and momentum within 25% of their fits at n = 0.1 to 100, and
// p_sf falls with density with an exponent near their -0.13.
//
// Known deviation: at n = 0.1 the shell forms later and heavier than the
// fit (about 30% in time and mass, within 10% in radius and momentum). There
// the post-shock gas is near 3e5 K when it cools, just above the
// collisional-ionization peak that the built-in single power law (Draine
// 2011, fitted from 1e5 K up) does not reproduce; Kim & Ostriker's tabulated
// cooling cools it sooner. The looser bound for those two numbers keeps the
// deviation visible without hiding a change.
func TestShellFormationKimOstriker(t *testing.T) {
	densities := []float64{0.1, 1, 10, 100}
	if testing.Short() {
		densities = []float64{1}
	}
	var logN, logP []float64
	for _, n := range densities {
		sf := shellRun(t, n, 100)
		ft, fr, fm, fp := koFit(n)
		t.Logf("n = %5.1f: t_sf %.3g kyr (fit %.3g), r_sf %.3g pc (%.3g), M_sf %.3g Msun (%.3g), p_sf %.3g Msun km/s (%.3g)",
			n, sf.Time/kyr, ft/kyr, sf.ShockRadius/units.Parsec, fr/units.Parsec, sf.Mass/units.SolarMass, fm/units.SolarMass, sf.Momentum/units.MsunKms, fp/units.MsunKms)
		tolTM := 0.25
		if n < 1 {
			tolTM = 0.35 // the known deviation above
		}
		assert.InEpsilon(t, ft, sf.Time, tolTM, "t_sf at n = %v (Kim & Ostriker 2015)", n)
		assert.InEpsilon(t, fr, sf.ShockRadius, 0.25, "r_sf at n = %v", n)
		assert.InEpsilon(t, fm, sf.Mass, tolTM, "M_sf at n = %v", n)
		assert.InEpsilon(t, fp, sf.Momentum, 0.25, "p_sf at n = %v", n)
		logN = append(logN, math.Log(n))
		logP = append(logP, math.Log(sf.Momentum))
	}
	if len(logN) < 2 {
		return
	}
	slope := leastSquaresSlope(logN, logP)
	t.Logf("p_sf ∝ n^%.3f", slope)
	assert.True(t, slope >= -0.17 && slope <= -0.09, "density exponent of p_sf %.3f (Kim & Ostriker 2015: -0.13)", slope)
}

func leastSquaresSlope(x, y []float64) float64 {
	var mx, my float64
	for i := range x {
		mx += x[i]
		my += y[i]
	}
	mx /= float64(len(x))
	my /= float64(len(y))
	var sxy, sxx float64
	for i := range x {
		sxy += (x[i] - mx) * (y[i] - my)
		sxx += (x[i] - mx) * (x[i] - mx)
	}
	return sxy / sxx
}

// lateRun runs the default configuration at density n and resolution
// zones to ten shell-formation times and checks its energy ledger: closed
// to round-off, with the energy the temperature floor added and the energy
// the internal-energy switch added or removed each below 1% of the
// explosion energy (the floor held 70% at n = 1 before the velocity slopes
// were capped), and no more radiated than the explosion put in.
func lateRun(t *testing.T, n float64, zones int) *Result {
	t.Helper()
	cfg := DefaultConfig()
	cfg.Density = n
	cfg.ZonesPerShellRadius = zones
	res, err := Run(cfg)
	require.NoError(t, err)
	require.True(t, res.ShellFormation.Found)
	l := res.Ledger
	t.Logf("n = %v, %d zones: floor %.2g E_SN, switch %+.2g E_SN, radiated %.3f E_SN", n, zones, l.FloorAdded/cfg.Energy, l.SwitchAdded/cfg.Energy, l.Radiated/cfg.Energy)
	assert.Less(t, math.Abs(l.Residual()), 1e-10, "energy ledger")
	assert.Less(t, l.FloorAdded, 0.01*cfg.Energy, "energy added by the floor")
	assert.Less(t, math.Abs(l.SwitchAdded), 0.01*cfg.Energy, "energy added or removed by the internal-energy switch")
	assert.Less(t, l.Radiated, cfg.Energy, "radiated energy")
	return res
}

// Late in the snowplough phase the momentum has grown by about 30% over its
// shell-formation value (Kim & Ostriker 2015, abstract: the final momentum
// is "only 30% greater than the momentum at the time of shell formation",
// stated for two-phase media that come within 5% of uniform ones).
func TestLateMomentum(t *testing.T) {
	if testing.Short() {
		t.Skip("runs to ten shell-formation times")
	}
	for _, n := range []float64{1, 100} {
		res := lateRun(t, n, 100)
		ratio := res.Late.Momentum / res.ShellFormation.Momentum
		t.Logf("n = %v: p(%.0f kyr) / p_sf = %.3f", n, res.Late.Time/kyr, ratio)
		assert.InDelta(t, 1.3, ratio, 0.15, "late momentum over p_sf (Kim & Ostriker 2015)")
	}
}

// The late energetics hold at twice the resolution too: the floor and the
// switch stay below 1% of the explosion energy. The same run without the
// velocity-slope cap and the switch needs the floor for a large part of
// it (or the switch, which replaces it where the total energy leaves
// negative heat), the defect the cap removes.
func TestLateEnergeticsConverge(t *testing.T) {
	if testing.Short() {
		t.Skip("runs to ten shell-formation times at 200 zones per shell radius")
	}
	lateRun(t, 1, 200)
	cfg := DefaultConfig()
	cfg.VelocitySlopeCap, cfg.InternalEnergySwitch = math.Inf(1), 0
	res, err := Run(cfg)
	require.NoError(t, err)
	added := res.Ledger.FloorAdded + res.Ledger.SwitchAdded
	t.Logf("uncapped, switch 0: floor and switch added %.3f E_SN", added/cfg.Energy)
	assert.Greater(t, added, 0.3*cfg.Energy)
}

// The switch to the separate internal energy resets the total energy and
// books the difference; above the switch the separate internal energy
// follows the total energy and nothing is booked.
func TestInternalEnergySwitchBooked(t *testing.T) {
	cfg := DefaultConfig()
	cfg.ZonesPerShellRadius = 20
	cfg.InitialZones = 4
	s, err := New(cfg)
	require.NoError(t, err)
	i := 10
	c := s.u[i]
	c.MomX = c.Mass * 3e7 // 300 km/s
	kin := 0.5 * c.MomX * c.MomX / c.Mass
	heat := c.Scalar[internalScalar]
	c.Energy = kin - 0.5*heat // the total energy implies negative heat
	s.reconcile(i, &c, 1)
	assert.Equal(t, kin+heat, c.Energy)
	assert.InEpsilon(t, 4*math.Pi*s.vol[i]*1.5*heat, s.Ledger().SwitchAdded, 1e-12)
	assert.Zero(t, s.Ledger().FloorAdded)

	c.Energy = kin + 3*heat // 3 heat / E above the switch: trusted
	before := s.switchAdded
	s.reconcile(i, &c, 1)
	assert.Equal(t, kin+3*heat, c.Energy)
	assert.InEpsilon(t, 3*heat, c.Scalar[internalScalar], 1e-12)
	assert.Equal(t, before, s.switchAdded)

	c.Energy, c.Scalar[internalScalar] = kin-heat, -heat // both negative: the floor
	s.reconcile(i, &c, 0.5)
	assert.InEpsilon(t, kin+c.Mass*s.eFloor, c.Energy, 1e-15)
	assert.InEpsilon(t, 0.5*4*math.Pi*s.vol[i]*(c.Mass*s.eFloor+heat), s.Ledger().FloorAdded, 1e-12)
}

// The shell-formation momentum is converged: doubling and quadrupling the
// zones change it by less than 5%.
func TestResolutionConvergence(t *testing.T) {
	if testing.Short() {
		t.Skip("runs at four times the default resolution")
	}
	base := shellRun(t, 1, 100).Momentum
	for _, k := range []int{2, 4} {
		p := shellRun(t, 1, 100*k).Momentum
		t.Logf("%dx zones: p_sf changes by %+.2f%%", k, 100*(p/base-1))
		assert.InEpsilon(t, base, p, 0.05, "p_sf at %dx zones", k)
	}
}

// A step allocates nothing, and two runs of the same configuration are
// bitwise the same.
func TestStepAllocationFreeAndDeterministic(t *testing.T) {
	cfg := DefaultConfig()
	cfg.ZonesPerShellRadius = 30
	cfg.DomainShellRadii = 1.6
	cfg.EndShellTimes = 0.3
	s, err := New(cfg)
	require.NoError(t, err)
	allocs := testing.AllocsPerRun(50, func() {
		if err := s.Step(); err != nil {
			t.Fatal(err)
		}
	})
	assert.Zero(t, allocs)
	a, err := Run(cfg)
	require.NoError(t, err)
	b, err := Run(cfg)
	require.NoError(t, err)
	assert.Equal(t, a, b)
}

func TestConfigErrors(t *testing.T) {
	for name, change := range map[string]func(*Config){
		"zero density":        func(c *Config) { c.Density = 0 },
		"NaN metallicity":     func(c *Config) { c.Metallicity = math.NaN() },
		"zero energy":         func(c *Config) { c.Energy = 0 },
		"negative ejecta":     func(c *Config) { c.EjectaMass = -1 },
		"zero temperature":    func(c *Config) { c.AmbientAtEquilibrium, c.AmbientTemperature = false, 0 },
		"few zones":           func(c *Config) { c.ZonesPerShellRadius = 4 },
		"small domain":        func(c *Config) { c.DomainShellRadii = 0.5 },
		"zero run":            func(c *Config) { c.EndShellTimes = 0 },
		"big initial remnant": func(c *Config) { c.InitialZones = 40 },
		"thermal fraction":    func(c *Config) { c.ThermalFraction = 1.5 },
		"switch":              func(c *Config) { c.InternalEnergySwitch = 1 },
		"slope cap":           func(c *Config) { c.VelocitySlopeCap = math.NaN() },
		"CFL":                 func(c *Config) { c.CFL = 0 },
		"cooling step":        func(c *Config) { c.CoolingStep = 0 },
		"limiter":             func(c *Config) { c.Limiter = 17 },
		"history":             func(c *Config) { c.HistorySamples = 1 },
		"gas":                 func(c *Config) { c.Gas = cooling.Gas{} },
	} {
		cfg := DefaultConfig()
		change(&cfg)
		_, err := New(cfg)
		assert.ErrorIs(t, err, ErrConfig, name)
	}
}
