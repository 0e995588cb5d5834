package cooling

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// equilibriumKI is T_eq(n) of the analytic Koyama & Inutsuka fit by
// bisection in log T, independent of the tabulated curve.
func equilibriumKI(n, zeta float64) float64 {
	lo, hi := 1.0, 1e4
	for range 200 {
		m := math.Sqrt(lo * hi)
		if n*KoyamaInutsukaLambda(m, zeta) > KoyamaInutsukaHeating {
			hi = m
		} else {
			lo = m
		}
	}
	return lo
}

// The thermal-equilibrium pressure n T_eq(n) of the Koyama & Inutsuka fit
// has its local maximum at the warm end and its local minimum at the cold
// end of the thermally unstable range. Kim & Ostriker 2015 (ApJ 802, 99,
// sect. 2; from memory) bound the phases there: warm above 5050 K, cold
// below 184 K. Finding both turning points at those temperatures checks
// the fit's form, including the Vázquez-Semadeni et al. 2007 correction.
func TestKoyamaInutsukaPhaseBoundaries(t *testing.T) {
	var turns []float64
	prevP, prevD := 0.0, 0.0
	for i := range 30000 {
		n := math.Pow(10, -2+float64(i)*2e-4)
		teq := equilibriumKI(n, 1)
		p := n * teq
		d := p - prevP
		if i > 1 && (d > 0) != (prevD > 0) {
			turns = append(turns, teq)
		}
		prevP, prevD = p, d
	}
	require.Len(t, turns, 2, "one maximum and one minimum of the equilibrium pressure")
	assert.InEpsilon(t, 5050, turns[0], 0.02, "warm boundary (Kim & Ostriker 2015, from memory)")
	assert.InEpsilon(t, 184, turns[1], 0.02, "cold boundary (Kim & Ostriker 2015, from memory)")
}

// The tabulated built-in curve's equilibrium matches the analytic fit's,
// and gas there stays there.
func TestBuiltinEquilibrium(t *testing.T) {
	c, err := Builtin(1)
	require.NoError(t, err)
	g := DefaultGas()
	k, err := NewCooler(c, g)
	require.NoError(t, err)
	for _, n := range []float64{0.1, 1, 10, 100} {
		assert.InEpsilon(t, equilibriumKI(n, 1), c.EquilibriumTemperature(n), 1e-3, "n=%v", n)
		rho := g.MassDensity(n)
		eeq := k.EquilibriumEnergy(rho)
		assert.InEpsilon(t, c.EquilibriumTemperature(n), g.Temperature(eeq), 1e-13)
		assert.Equal(t, eeq, k.Evolve(rho, eeq, 1e15, math.NaN()))
		// Round-off in the density or energy does not move it either.
		near := eeq * (1 + 4e-16)
		assert.Equal(t, near, k.Evolve(rho*(1+2e-16), near, 1e15, math.NaN()))
	}
}

func TestHighTemperatureFits(t *testing.T) {
	// Free–free per n_H^2 at 1e6 K: 2.3e-24 T6^0.5 erg cm^3 s^-1 (Draine
	// 2011, ch. 34; from memory) — within 20% (Gaunt factor and helium
	// abundance differ).
	assert.InEpsilon(t, 2.3e-24, FreeFreeLambda(1e6), 0.2)
	assert.InEpsilon(t, 2.3e-24*10, FreeFreeLambda(1e8), 0.2)
	// Free–free dominates metal lines above a few 1e7 K in solar gas
	// (Draine 2011, ch. 34; from memory).
	assert.Less(t, FreeFreeLambda(1e7), MetalLineLambda(1e7))
	assert.Greater(t, FreeFreeLambda(1e8), MetalLineLambda(1e8))
	// The built-in function is continuous at the piece boundaries.
	for _, z := range []float64{0, 0.1, 1, 3} {
		for _, tb := range []float64{lowFitTop, ionizedBottom} {
			assert.InEpsilon(t, BuiltinLambda(tb*(1-1e-9), z), BuiltinLambda(tb*(1+1e-9), z), 1e-6, "T=%v Z=%v", tb, z)
		}
	}
	// Metals scale the high-temperature lines.
	assert.InEpsilon(t, 2, (BuiltinLambda(1e6, 2)-FreeFreeLambda(1e6))/(BuiltinLambda(1e6, 1)-FreeFreeLambda(1e6)), 1e-12)
}

// The tabulated curve reproduces the analytic fit between nodes.
func TestBuiltinTabulation(t *testing.T) {
	c, err := Builtin(1)
	require.NoError(t, err)
	for lt := 1.013; lt < 9; lt += 0.0371 {
		tk := math.Pow(10, lt)
		assert.InEpsilon(t, BuiltinLambda(tk, 1), c.Lambda(tk), 2e-3, "T=%v", tk)
	}
	assert.Zero(t, c.Lambda(5))
	assert.InEpsilon(t, FreeFreeLambda(4e9)+MetalLineLambda(4e9), c.Lambda(4e9), 0.05, "continued past the top node")
}

// The mean mass per particle of solar gas: 1/(X + Y/4) while hydrogen and
// helium are neutral, 1/(2X + 3Y/4 + Z/2) once both are fully ionized (the
// count of atoms, ions and electrons per proton mass; common practice), the
// latter the library's feedback.IonizedMeanMolecularWeight. Hydrogen is
// half ionized in collisional ionization equilibrium near log T = 4.2
// (Sutherland & Dopita 1993, ApJS 88, 253; from memory), and helium is
// mostly doubly ionized above 1e5 K.
func TestMeanMass(t *testing.T) {
	g := DefaultGas()
	x, y := yields.SolarHydrogen, yields.SolarHelium
	neutral := 1 / (x + y/4)
	for _, tk := range []float64{1, 10, 100, 1000, 5000} {
		assert.InEpsilon(t, neutral, g.MeanMass(tk), 1e-9, "T=%v", tk)
	}
	assert.InEpsilon(t, neutral, g.MeanMass(8000), 1e-4)
	assert.InDelta(t, 1.25, neutral, 0.005)
	for _, tk := range []float64{1e6, 1e7, 1e8, 1e9} {
		assert.InEpsilon(t, feedback.IonizedMeanMolecularWeight, g.MeanMass(tk), 1e-4, "T=%v", tk)
	}
	half := func(f func(float64) float64) float64 {
		lo, hi := 1e3, 1e7
		for range 100 {
			if m := math.Sqrt(lo * hi); f(m) < 0.5 {
				lo = m
			} else {
				hi = m
			}
		}
		return lo
	}
	tH := half(func(tk float64) float64 { h, _, _ := IonizationEquilibrium(tk); return h })
	assert.True(t, tH > math.Pow(10, 4.1) && tH < math.Pow(10, 4.3), "hydrogen half ionized at %v K", tH)
	_, he1, he2 := IonizationEquilibrium(2e5)
	assert.Greater(t, he2, 0.99*(he1+he2))
	// μ falls (never rises) with temperature, so T/μ rises strictly.
	prev := math.Inf(1)
	for i := range 20000 {
		tk := math.Pow(10, 2+7*float64(i)/20000)
		mu := g.MeanMass(tk)
		require.LessOrEqual(t, mu, prev*(1+1e-14), "T=%v", tk)
		prev = mu
	}
	// Fixed gas.
	f, err := NewFixedMeanMassGas(1/x, 0.6, 5.0/3)
	require.NoError(t, err)
	assert.Equal(t, 0.6, f.MeanMass(50))
	assert.Equal(t, 0.6, f.MeanMass(5e6))
}

// e = k_B T / ((γ − 1) μ(T) m_p) both ways: the temperature of the energy
// of a temperature is that temperature to round-off, across the ionization
// range and the table's ends, and temperature never falls as energy rises.
func TestGasConversions(t *testing.T) {
	g := DefaultGas()
	for i := range 5000 {
		tk := math.Pow(10, -1+11*float64(i)/4999)
		e := g.SpecificEnergy(tk)
		require.InEpsilon(t, tk, g.Temperature(e), 1e-13, "T=%v", tk)
		require.InEpsilon(t, e, g.SpecificEnergy(g.Temperature(e)), 1e-13, "T=%v", tk)
	}
	// Node temperatures, and the energies one ulp around them.
	prev := 0.0
	for _, tk := range g.energy.temp {
		e := g.SpecificEnergy(tk)
		for _, ee := range []float64{math.Nextafter(e, 0), e, math.Nextafter(e, math.Inf(1))} {
			tt := g.Temperature(ee)
			require.GreaterOrEqual(t, tt, prev, "e=%v", ee)
			prev = tt
		}
	}
	// 3/2 k T per particle of an ideal monatomic gas.
	for _, tk := range []float64{100, 1e4, 1.6e4, 1e6} {
		mu := g.MeanMass(tk)
		assert.InEpsilon(t, 1.5*units.Boltzmann*tk/(mu*units.ProtonMass), g.SpecificEnergy(tk), 1e-12, "T=%v", tk)
	}
	assert.InEpsilon(t, 2.5, g.HydrogenDensity(g.MassDensity(2.5)), 1e-14)
	assert.InEpsilon(t, 1/yields.SolarHydrogen, g.MassPerHydrogen(), 1e-15)
	allocs := testing.AllocsPerRun(100, func() {
		_ = g.Temperature(g.SpecificEnergy(1.7e4))
	})
	assert.Zero(t, allocs)
}

// rk4Cool integrates de/dt = −(n_H^2 Λ(T(e)) − n_H Γ [withHeating]) / ρ
// with many small RK4 steps in ln e: the fine ODE reference for
// Cooler.Evolve, through the gas's T(e) and the curve's Λ(T) only.
func rk4Cool(c *Curve, g Gas, rho, e, dt float64, withHeating bool, steps int) float64 {
	n := g.HydrogenDensity(rho)
	f := func(le float64) float64 {
		ee := math.Exp(le)
		r := -n * n * c.Lambda(g.Temperature(ee))
		if withHeating {
			r += n * c.Heating()
		}
		return r / (rho * ee)
	}
	le, h := math.Log(e), dt/float64(steps)
	for range steps {
		k1 := f(le)
		k2 := f(le + h/2*k1)
		k3 := f(le + h/2*k2)
		k4 := f(le + h*k3)
		le += h / 6 * (k1 + 2*k2 + 2*k3 + k4)
	}
	return math.Exp(le)
}

func TestEvolveMatchesFineIntegration(t *testing.T) {
	hot, err := Builtin(1)
	require.NoError(t, err)
	tk, lam := hot.Nodes()
	cold, err := NewCurve(tk, lam, 0) // cooling only
	require.NoError(t, err)
	fixed, err := NewFixedMeanMassGas(1/yields.SolarHydrogen, 0.6, 5.0/3)
	require.NoError(t, err)
	cases := []struct {
		name    string
		gas     Gas
		n, t0   float64
		tcFrac  float64 // dt in units of the initial cooling time
		heating bool
	}{
		{"hot, short", DefaultGas(), 1, 1e7, 0.01, false},
		{"hot, long", DefaultGas(), 1, 1e7, 0.5, false},
		{"peak crossing", DefaultGas(), 10, 3e5, 0.3, false},
		{"through the bridge", DefaultGas(), 100, 2e5, 0.9, false},
		{"through hydrogen recombination", DefaultGas(), 100, 3e4, 0.9, false},
		{"dense low T", DefaultGas(), 100, 3e3, 0.5, false},
		{"with heating, well above T_eq", DefaultGas(), 1, 1e6, 0.5, true},
		{"fixed mean mass, through the bridge", fixed, 100, 2e5, 0.9, false},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			c := cold
			if tc.heating {
				c = hot
			}
			k, err := NewCooler(c, tc.gas)
			require.NoError(t, err)
			rho := tc.gas.MassDensity(tc.n)
			e0 := tc.gas.SpecificEnergy(tc.t0)
			dt := tc.tcFrac * k.CoolingTime(rho, e0)
			got := k.Evolve(rho, e0, dt, math.NaN())
			want := rk4Cool(c, tc.gas, rho, e0, dt, tc.heating, 20000)
			tol := 1e-8
			if tc.heating {
				tol = 1e-3 // heating neglected above T_eq
			}
			t.Logf("relative difference %.1e", math.Abs(got/want-1))
			assert.InEpsilon(t, want, got, tol)
			assert.Less(t, got, e0)
		})
	}
}

// Cooling never carries gas past its equilibrium, from above or below, for
// any step, and a long step ends on it.
func TestEvolveNeverOvershoots(t *testing.T) {
	c, err := Builtin(1)
	require.NoError(t, err)
	for _, g := range []Gas{DefaultGas(), must(NewFixedMeanMassGas(1.355, 0.6, 5.0/3))} {
		k, err := NewCooler(c, g)
		require.NoError(t, err)
		for _, n := range []float64{0.01, 1, 100, 1e4} {
			rho := g.MassDensity(n)
			eeq := k.EquilibriumEnergy(rho)
			teq := c.EquilibriumTemperature(n)
			for _, t0 := range []float64{2e9, 1e7, 1e5, 2e4, 1.5e4, 2 * teq, 0.5 * teq, 11} {
				e0 := g.SpecificEnergy(t0)
				for _, dt := range []float64{1e6, 1e10, 1e14, 1e20} {
					e1 := k.Evolve(rho, e0, dt, math.NaN())
					require.False(t, math.IsNaN(e1))
					if t0 > teq {
						assert.True(t, e1 >= eeq && e1 <= e0, "n=%v T0=%v dt=%v: %v", n, t0, dt, e1)
					} else {
						assert.True(t, e1 <= eeq && e1 >= e0, "n=%v T0=%v dt=%v: %v", n, t0, dt, e1)
					}
				}
				assert.Equal(t, eeq, k.Evolve(rho, e0, 1e30, eeq), "a long step ends at the floor")
			}
		}
	}
}

func must[T any](v T, err error) T {
	if err != nil {
		panic(err)
	}
	return v
}

// Splitting a step in two gives the same energy (the integration is exact,
// not a first-order update), also across hydrogen's recombination.
func TestEvolveComposes(t *testing.T) {
	c, err := Builtin(0.3)
	require.NoError(t, err)
	g := DefaultGas()
	k, err := NewCooler(c, g)
	require.NoError(t, err)
	for _, tc := range []struct{ n, t0 float64 }{{3, 4e6}, {300, 3e4}} {
		rho := g.MassDensity(tc.n)
		e0 := g.SpecificEnergy(tc.t0)
		dt := 0.8 * k.CoolingTime(rho, e0)
		one := k.Evolve(rho, e0, dt, math.NaN())
		two := k.Evolve(rho, k.Evolve(rho, e0, 0.65*dt, math.NaN()), 0.35*dt, math.NaN())
		assert.InEpsilon(t, one, two, 1e-10)
		assert.Less(t, one, 0.9*e0)
	}
	allocs := testing.AllocsPerRun(100, func() {
		_ = k.Evolve(g.MassDensity(3), g.SpecificEnergy(4e6), 2e11, math.NaN())
	})
	assert.Zero(t, allocs)
}

func TestNewCurveErrors(t *testing.T) {
	for _, tc := range []struct {
		name    string
		temp    []float64
		lam     []float64
		heating float64
	}{
		{"one node", []float64{10}, []float64{1}, 0},
		{"length mismatch", []float64{10, 20}, []float64{1}, 0},
		{"not rising", []float64{10, 10}, []float64{1, 1}, 0},
		{"zero cooling", []float64{10, 20}, []float64{1, 0}, 0},
		{"NaN cooling", []float64{10, 20}, []float64{1, math.NaN()}, 0},
		{"negative heating", []float64{10, 20}, []float64{1, 1}, -1},
		{"negative temperature", []float64{-1, 20}, []float64{1, 1}, 0},
	} {
		_, err := NewCurve(tc.temp, tc.lam, tc.heating)
		assert.ErrorIs(t, err, ErrInput, tc.name)
	}
	_, err := Builtin(math.NaN())
	assert.ErrorIs(t, err, ErrInput)
	assert.Error(t, Gas{}.Validate())
	assert.NoError(t, DefaultGas().Validate())
	for _, f := range [][4]float64{{0, 0.9, 0.1, 5.0 / 3}, {0.7, 0.2, 0.2, 5.0 / 3}, {0.7, 0.3, 0, 1}, {math.NaN(), 0.3, 0, 5.0 / 3}, {1.1, -0.1, 0, 5.0 / 3}} {
		_, err := NewGas(f[0], f[1], f[2], f[3])
		assert.ErrorIs(t, err, ErrInput, "%v", f)
	}
	for _, f := range [][3]float64{{0, 0.6, 5.0 / 3}, {1.4, math.Inf(1), 5.0 / 3}, {1.4, 0.6, 0.9}} {
		_, err := NewFixedMeanMassGas(f[0], f[1], f[2])
		assert.ErrorIs(t, err, ErrInput, "%v", f)
	}
	c, err := Builtin(1)
	require.NoError(t, err)
	_, err = NewCooler(c, Gas{})
	assert.ErrorIs(t, err, ErrInput)
	_, err = NewCooler(nil, DefaultGas())
	assert.ErrorIs(t, err, ErrInput)
}

func TestTableRoundTrip(t *testing.T) {
	zs := []float64{0.1, 1}
	var curves []*Curve
	for _, z := range zs {
		c, err := Builtin(z)
		require.NoError(t, err)
		curves = append(curves, c)
	}
	var sb strings.Builder
	require.NoError(t, WriteTable(&sb, zs, curves))
	tab, err := ReadTable(strings.NewReader("# built-in fit at two metallicities\n" + sb.String()))
	require.NoError(t, err)
	assert.Equal(t, zs, tab.Metallicities())
	c1, err := tab.Curve(1)
	require.NoError(t, err)
	for _, tk := range []float64{50, 8000, 3e5, 1e8} {
		assert.InEpsilon(t, curves[1].Lambda(tk), c1.Lambda(tk), 1e-12)
	}
	assert.Equal(t, KoyamaInutsukaHeating, c1.Heating())
	// Between blocks log Λ is linear in log Z.
	cm, err := tab.Curve(math.Sqrt(0.1))
	require.NoError(t, err)
	tk := 2e6
	assert.InEpsilon(t, math.Sqrt(curves[0].Lambda(tk)*curves[1].Lambda(tk)), cm.Lambda(tk), 1e-12)
	_, err = tab.Curve(2)
	assert.ErrorIs(t, err, ErrOutsideTable)
	_, err = tab.Curve(0.05)
	assert.ErrorIs(t, err, ErrOutsideTable)
}

func TestTableErrors(t *testing.T) {
	const h = "log10_temperature[K],metallicity[solar],cooling[erg cm^3 s^-1]\n"
	cases := []struct {
		name, text, want string
	}{
		{"empty", "", "empty"},
		{"comments only", "# nothing\n", "empty"},
		{"no unit", "log10_temperature,metallicity[solar],cooling[erg cm^3 s^-1]\n", "line 1: column 1"},
		{"wrong unit", "log10_temperature[K],metallicity[Z],cooling[erg cm^3 s^-1]\n", `line 1: column "metallicity": unit "Z"`},
		{"unknown column", h[:len(h)-1] + ",density[cm^-3]\n", `unknown quantity "density"`},
		{"missing cooling", "log10_temperature[K],metallicity[solar]\n4,1\n", "missing column cooling"},
		{"twice", h[:len(h)-1] + ",cooling[erg cm^3 s^-1]\n", "appears twice"},
		{"no rows", h, "no data rows"},
		{"not a number", h + "4,1,1e-22\n5,1,x\n", `line 3: column "cooling": "x"`},
		{"NaN", h + "4,1,NaN\n", "line 2:"},
		{"wrong field count", h + "4,1,1e-22\n5,1\n", "line 3:"},
		{"zero cooling", h + "4,1,0\n5,1,1e-22\n", "line 2: cooling 0"},
		{"zero metallicity", h + "4,0,1e-22\n", "line 2: metallicity 0"},
		{"falling temperature", h + "4,1,1e-22\n5,1,1e-22\n4.5,1,1e-22\n", "line 4: log10 temperature 4.5 does not rise"},
		{"one temperature", h + "4,1,1e-22\n", "line 2: metallicity 1 has 1 temperature"},
		{"falling metallicity", h + "4,1,1e-22\n5,1,1e-22\n4,0.5,1e-22\n5,0.5,1e-22\n", "line 4: metallicity 0.5 after 1"},
		{"different grid", h + "4,0.5,1e-22\n5,0.5,1e-22\n4,1,1e-22\n6,1,1e-22\n", "line 5: metallicity 1: temperature grid differs"},
		{"short block", h + "4,0.5,1e-22\n5,0.5,1e-22\n6,0.5,1e-22\n4,1,1e-22\n5,1,1e-22\n", "line 6: metallicity 1 has 2 temperatures, want 3"},
		{"heating varies", "log10_temperature[K],metallicity[solar],cooling[erg cm^3 s^-1],heating[erg s^-1]\n4,1,1e-22,1e-26\n5,1,1e-22,2e-26\n", "line 3: heating 2e-26 differs"},
		{"negative heating", "log10_temperature[K],metallicity[solar],cooling[erg cm^3 s^-1],heating[erg s^-1]\n4,1,1e-22,-1\n", "line 2: heating -1"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadTable(strings.NewReader(tc.text))
			require.Error(t, err)
			assert.True(t, errors.Is(err, ErrTable), "%v", err)
			assert.Contains(t, err.Error(), tc.want)
		})
	}
	_, err := ReadTableFile("no/such/file.csv")
	assert.Error(t, err)
}
