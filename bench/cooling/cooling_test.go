package cooling

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
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

// The tabulated built-in curve's equilibrium matches the analytic fit's.
func TestBuiltinEquilibrium(t *testing.T) {
	c, err := Builtin(1)
	require.NoError(t, err)
	for _, n := range []float64{0.1, 1, 10, 100} {
		assert.InEpsilon(t, equilibriumKI(n, 1), c.EquilibriumTemperature(n), 1e-3, "n=%v", n)
		// A zone at its equilibrium stays there.
		teq := c.EquilibriumTemperature(n)
		assert.Equal(t, teq, c.Evolve(n, teq, 1e15, 1e-14, math.NaN()))
		// Round-off in the density or temperature does not move it either.
		near := teq * (1 + 4e-16)
		assert.Equal(t, near, c.Evolve(n*(1+2e-16), near, 1e15, 1e-14, math.NaN()))
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

// rk4Cool integrates c_V dT/dt = −n^2 Λ(T) (+ n Γ when withHeating) with
// many small RK4 steps in ln T: the fine ODE reference for Evolve.
func rk4Cool(c *Curve, n, t, dt, cv float64, withHeating bool, steps int) float64 {
	f := func(lt float64) float64 {
		tk := math.Exp(lt)
		r := -n * n * c.Lambda(tk)
		if withHeating {
			r += n * c.Heating()
		}
		return r / (cv * tk)
	}
	lt, h := math.Log(t), dt/float64(steps)
	for range steps {
		k1 := f(lt)
		k2 := f(lt + h/2*k1)
		k3 := f(lt + h/2*k2)
		k4 := f(lt + h*k3)
		lt += h / 6 * (k1 + 2*k2 + 2*k3 + k4)
	}
	return math.Exp(lt)
}

func TestEvolveMatchesFineIntegration(t *testing.T) {
	g := DefaultGas()
	hot, err := Builtin(1)
	require.NoError(t, err)
	cold, err := NewCurve(hot.temp, hot.lambda, 0) // cooling only
	require.NoError(t, err)
	cases := []struct {
		name    string
		n, t0   float64
		tcFrac  float64 // dt in units of the initial cooling time
		heating bool
	}{
		{"hot, short", 1, 1e7, 0.01, false},
		{"hot, long", 1, 1e7, 0.5, false},
		{"peak crossing", 10, 3e5, 0.3, false},
		{"through the bridge", 100, 2e5, 0.9, false},
		{"dense low T", 100, 3e3, 0.5, false},
		{"with heating, well above T_eq", 1, 1e6, 0.5, true},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			c := cold
			if tc.heating {
				c = hot
			}
			rho := g.MassDensity(tc.n)
			cv := g.HeatCapacity(rho)
			dt := tc.tcFrac * c.CoolingTime(tc.n, tc.t0, cv)
			got := c.Evolve(tc.n, tc.t0, dt, cv, math.NaN())
			want := rk4Cool(c, tc.n, tc.t0, dt, cv, tc.heating, 200000)
			tol := 1e-6
			if tc.heating {
				tol = 1e-3 // heating neglected above T_eq
			}
			assert.InEpsilon(t, want, got, tol)
			assert.Less(t, got, tc.t0)
		})
	}
}

func TestEvolveNeverOvershoots(t *testing.T) {
	c, err := Builtin(1)
	require.NoError(t, err)
	g := DefaultGas()
	for _, n := range []float64{0.01, 1, 100, 1e4} {
		cv := g.HeatCapacity(g.MassDensity(n))
		teq := c.EquilibriumTemperature(n)
		for _, t0 := range []float64{2e9, 1e7, 1e5, 1.5e4, 2 * teq, 0.5 * teq, 11} {
			for _, dt := range []float64{1e6, 1e10, 1e14, 1e20} {
				t1 := c.Evolve(n, t0, dt, cv, math.NaN())
				require.False(t, math.IsNaN(t1))
				if t0 > teq {
					assert.True(t, t1 >= teq && t1 <= t0, "n=%v T0=%v dt=%v: %v", n, t0, dt, t1)
				} else {
					assert.True(t, t1 <= teq && t1 >= t0, "n=%v T0=%v dt=%v: %v", n, t0, dt, t1)
				}
			}
			assert.Equal(t, teq, c.Evolve(n, t0, 1e30, cv, teq), "a long step ends at the floor")
		}
	}
}

// Splitting a step in two gives the same temperature (the integration is
// exact, not a first-order update).
func TestEvolveComposes(t *testing.T) {
	c, err := Builtin(0.3)
	require.NoError(t, err)
	g := DefaultGas()
	n := 3.0
	cv := g.HeatCapacity(g.MassDensity(n))
	one := c.Evolve(n, 4e6, 2e11, cv, math.NaN())
	two := c.Evolve(n, c.Evolve(n, 4e6, 1.3e11, cv, math.NaN()), 0.7e11, cv, math.NaN())
	assert.InEpsilon(t, one, two, 1e-10)
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
}

func TestGasConversions(t *testing.T) {
	g := DefaultGas()
	assert.InEpsilon(t, 1e4, g.Temperature(g.SpecificEnergy(1e4)), 1e-14)
	assert.InEpsilon(t, 2.5, g.HydrogenDensity(g.MassDensity(2.5)), 1e-14)
	// 1.5 n k T of an ideal monatomic gas: c_V T = n k T / (γ − 1).
	rho := g.MassDensity(1)
	assert.InEpsilon(t, rho*g.SpecificEnergy(1e6), g.HeatCapacity(rho)*1e6, 1e-14)
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
