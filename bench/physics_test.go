package bench

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// shellFormationMass is the swept mass at shell formation of a 1e51 erg
// remnant in gas of hydrogen density n (cm^-3): M_sf = 1.54e3 Msun
// n^-0.26 (from memory: Kim & Ostriker 2015, ApJ 802, 99).
func shellFormationMass(n float64) float64 { return 1.54e3 * math.Pow(n, -0.26) }

// runQuick runs the quick suite on the named set-ups without timing; in
// -short runs (the race detector) on fewer densities and resolutions.
func runQuick(t testing.TB, setups ...string) *Result {
	t.Helper()
	s := QuickSuite()
	s.Speed.Stars = 0
	s.Outcome = OutcomeSpec{}
	var err error
	s.Setups, err = SelectSetups(setups)
	require.NoError(t, err)
	if testing.Short() {
		s.DensitiesCm3 = []float64{0.1, 1, 1000}
		s.GasMassesMsun = []float64{1, 1e3, 1e5}
	}
	res, err := Run(s, Options{})
	require.NoError(t, err)
	return res
}

func rowsOf(res *Result, scheme string, setups ...string) []Convergence {
	var out []Convergence
	for _, r := range res.Convergence {
		if r.Scheme != scheme {
			continue
		}
		for _, s := range setups {
			if r.Setup == s {
				out = append(out, r)
			}
		}
	}
	return out
}

func TestAnalyticReferences(t *testing.T) {
	// Free ejecta: sqrt(2 M_ej E) for 10 Msun and 1e51 erg is about 3.2e4
	// Msun km/s (arithmetic from the definition).
	assert.InEpsilon(t, 3.2e4, EnergyConservingMomentum(1e51, 10, 0), 0.02)
	// At the shell-formation mass, energy-conserving sweep-up with the
	// Sedov kinetic fraction lands within about 10% of the shell-formation
	// momentum p_sf = 2.17e5 Msun km/s at n = 1 (from memory: Kim &
	// Ostriker 2015, ApJ 802, 99; Sedov split from Chevalier 1974).
	assert.InEpsilon(t, 2.17e5, EnergyConservingMomentum(1e51, 10, shellFormationMass(1)), 0.10)
}

func TestTerminalColumnFollowsKimOstriker(t *testing.T) {
	res := runQuick(t, "uniform-lattice")
	for _, r := range rowsOf(res, "terminal-momentum", "uniform-lattice") {
		// p_sf = 2.17e5 Msun km/s n^-0.13 for one 1e51 erg SN (from memory:
		// Kim & Ostriker 2015, ApJ 802, 99) and the final momentum about
		// 30% above it (their abstract); the lattice is uniform, so the
		// shared terminal momentum is the fit's at the set-up density.
		assert.InEpsilon(t, 1.3*2.17e5*math.Pow(r.DensityCm3, -0.13), r.TerminalMsunKms, 0.01, "n=%g m=%g", r.DensityCm3, r.GasMassMsun)
		// Coupled mass is the k nearest equal-mass elements.
		assert.InEpsilon(t, float64(res.Neighbors)*r.GasMassMsun, r.CoupledMassMsun, 1e-12)
	}
}

// The convergence picture of the terminal-momentum scheme. Well below the
// shell-formation mass (coupled mass under M_sf/10, Kim & Ostriker 2015
// from memory) the remnant is still energy conserving: the scheme hands
// out the momentum of energy-conserving sweep-up of the coupled mass,
// sqrt(2 E (M_ej + 0.28 M_sw)) with the Sedov–Taylor kinetic share
// (Chevalier 1974, from memory), within 5% whatever the weighting (the
// star's total is computed and shared; its sweep-up law meets the fit's
// own shell-formation point, a kinetic share of 0.30, so it sits up to 3%
// above the 0.28 form; measured 1.01–1.02). Well above it (coupled mass
// over 10 M_sf) the total is the terminal momentum to 1e-6 (measured:
// round-off) and every neighbor is flagged capped.
func TestTerminalMomentumConvergence(t *testing.T) {
	res := runQuick(t, "uniform-lattice", "glass")
	below, above := 0, 0
	for _, r := range rowsOf(res, "terminal-momentum", "uniform-lattice", "glass") {
		msf := shellFormationMass(r.DensityCm3)
		switch {
		case r.CoupledMassMsun <= msf/10:
			below++
			ratio := r.RadialMomentumMsunKms / r.EnergyConservingMsunKm
			assert.InDelta(t, 1, ratio, 0.05, "%s n=%g m=%g", r.Setup, r.DensityCm3, r.GasMassMsun)
		case r.CoupledMassMsun >= 10*msf:
			above++
			assert.InEpsilon(t, r.TerminalMsunKms, r.RadialMomentumMsunKms, 1e-6, "%s n=%g m=%g", r.Setup, r.DensityCm3, r.GasMassMsun)
			assert.InDelta(t, 1, r.CappedFraction, 1e-12)
		}
	}
	require.Positive(t, below, "no case well below the shell-formation mass")
	require.Positive(t, above, "no case well above the shell-formation mass")
}

// A thermal dump hands out no radial momentum at any resolution: below
// 1e-3 of the terminal momentum (measured: exactly zero), so at coarse
// resolution, where the host radiates the heat at once (common practice:
// the overcooling problem), it delivers none of the momentum a remnant
// really carries.
func TestThermalDumpHandsOutNoMomentum(t *testing.T) {
	res := runQuick(t, "uniform-lattice", "glass", "interface")
	rows := rowsOf(res, "thermal-dump", "uniform-lattice", "glass", "interface")
	require.NotEmpty(t, rows)
	for _, r := range rows {
		assert.Less(t, r.RadialMomentumMsunKms, 1e-3*r.TerminalMsunKms, "%s n=%g m=%g", r.Setup, r.DensityCm3, r.GasMassMsun)
	}
}

// The kinetic scheme has no cap: it follows Sedov–Taylor sweep-up,
// sqrt(2 x 0.28 E (M_sw + M_ej)) (Chevalier 1974, from memory), at every
// resolution, from 75% to 100% of it with unequal shares, and so
// overshoots the terminal momentum of a resolved remnant many times at
// coarse resolution.
func TestKineticFollowsSedovSweepUp(t *testing.T) {
	res := runQuick(t, "uniform-lattice")
	for _, r := range rowsOf(res, "kinetic", "uniform-lattice") {
		// sqrt(2 e M) with M = 0.28 (M_sw + M_ej).
		sedov := EnergyConservingMomentum(1e51, 0.28*(r.CoupledMassMsun+EjectaMassMsun), 0)
		ratio := r.RadialMomentumMsunKms / sedov
		assert.GreaterOrEqual(t, ratio, 0.75, "n=%g m=%g", r.DensityCm3, r.GasMassMsun)
		assert.LessOrEqual(t, ratio, 1+1e-9, "n=%g m=%g", r.DensityCm3, r.GasMassMsun)
		if r.CoupledMassMsun >= 1000*shellFormationMass(r.DensityCm3) {
			assert.Greater(t, r.RadialMomentumMsunKms, 10*r.TerminalMsunKms)
		}
	}
}

// On the interface (a star at the face of a slab 100 times denser) the
// isotropy-corrected schemes balance the radial momentum to below 1e-6
// (measured: at most 2e-9), while uncorrected kernel-volume weights leave
// more than a tenth of it as a net push (measured: about 0.5).
func TestIsotropyOnInterface(t *testing.T) {
	res := runQuick(t, "interface", "uniform-lattice")
	got := map[string]map[string]float64{}
	for _, r := range res.Isotropy {
		if got[r.Setup] == nil {
			got[r.Setup] = map[string]float64{}
		}
		got[r.Setup][r.Scheme] = r.Residual
		assert.GreaterOrEqual(t, r.Residual, r.MeanResidual)
	}
	for _, s := range []string{"kinetic", "terminal-momentum", "terminal-momentum-cmb88", "terminal-momentum-solid-angle"} {
		assert.Less(t, got["interface"][s], 1e-6, s)
		assert.Less(t, got["uniform-lattice"][s], 1e-6, s)
	}
	for _, s := range []string{"terminal-momentum-uncorrected", "kinetic-uncorrected"} {
		assert.Greater(t, got["interface"][s], 0.1, s)
		// Even a lattice leaves a net push without the correction: the 64
		// nearest cut a shell of equidistant elements (measured: 5e-3).
		assert.Greater(t, got["uniform-lattice"][s], 1e-3, s)
	}
	// A thermal dump hands out no radial momentum, so no residual.
	assert.Zero(t, got["interface"]["thermal-dump"])
}

// Every joule is accounted for: the shares of every scheme on every case
// sum to one to round-off, none is negative, and a thermal dump on gas at
// rest is all heat.
func TestEnergyBudgetCloses(t *testing.T) {
	res := runQuick(t, "uniform-lattice", "interface", "clumpy-cloud")
	require.NotEmpty(t, res.Energy)
	for _, r := range res.Energy {
		sum := r.Kinetic + r.Thermal + r.Radiated + r.Undeposited
		assert.InDelta(t, 1, sum, 1e-12, "%s %s n=%g m=%g", r.Scheme, r.Setup, r.DensityCm3, r.GasMassMsun)
		assert.GreaterOrEqual(t, r.Thermal, 0.0)
		assert.GreaterOrEqual(t, r.Radiated, 0.0)
		if r.Scheme != "stochastic-heating" {
			// Stochastic heating hands back what cannot pay for a whole
			// temperature jump (Dalla Vecchia & Schaye 2012); the rest
			// deposit everything.
			assert.Zero(t, r.Undeposited, "%s", r.Scheme)
		}
		if r.Scheme == "thermal-dump" && r.Setup == "uniform-lattice" {
			assert.InDelta(t, 1, r.Thermal, 1e-12)
		}
		// Far past shell formation a terminal-momentum remnant has
		// radiated nearly all its energy (Thornton et al. 1998, from
		// memory: thermal energy falls as (R/R_cool)^-6.5).
		if r.Scheme == "terminal-momentum" && r.Setup == "uniform-lattice" &&
			float64(res.Neighbors)*r.GasMassMsun >= 100*shellFormationMass(r.DensityCm3) {
			assert.Greater(t, r.Radiated, 0.9, "n=%g m=%g", r.DensityCm3, r.GasMassMsun)
		}
	}
}

// Same suite, same rows, bitwise, for any worker count.
func TestRunDeterministic(t *testing.T) {
	s := QuickSuite()
	s.Speed.Stars = 0
	s.DensitiesCm3 = []float64{1, 100}
	s.Outcome = OutcomeSpec{}

	s.GasMassesMsun = []float64{10, 1e4}
	a, err := Run(s, Options{Workers: 1})
	require.NoError(t, err)
	b, err := Run(s, Options{Workers: 2})
	require.NoError(t, err)
	assert.Equal(t, a.Convergence, b.Convergence)
	assert.Equal(t, a.Isotropy, b.Isotropy)
	assert.Equal(t, a.Energy, b.Energy)
	assert.Len(t, a.Convergence, len(s.Setups)*2*2*len(Schemes()))
}

func TestRunRejectsBadInput(t *testing.T) {
	good := QuickSuite()
	good.Speed.Stars = 0
	good.Outcome = OutcomeSpec{}
	tests := []struct {
		name  string
		suite func() Suite
		opts  Options
	}{
		{"no set-ups", func() Suite { s := good; s.Setups = nil; return s }, Options{}},
		{"no densities", func() Suite { s := good; s.DensitiesCm3 = nil; return s }, Options{}},
		{"negative density", func() Suite { s := good; s.DensitiesCm3 = []float64{-1}; return s }, Options{}},
		{"NaN mass", func() Suite { s := good; s.GasMassesMsun = []float64{math.NaN()}; return s }, Options{}},
		{"no neighbors", func() Suite { s := good; s.Neighbors = 0; return s }, Options{}},
		{"too few elements", func() Suite { s := good; s.Elements = 10; return s }, Options{}},
		{"empty scheme list", func() Suite { return good }, Options{Schemes: []SchemeSpec{}}},
		{"unknown speed set-up", func() Suite { s := good; s.Speed.Stars = 4; s.Speed.Setup = "nowhere"; return s }, Options{}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Run(tc.suite(), tc.opts)
			require.Error(t, err)
		})
	}
}

func TestSelectSchemes(t *testing.T) {
	all, err := SelectSchemes(nil)
	require.NoError(t, err)
	assert.Equal(t, Schemes(), all)
	two, err := SelectSchemes([]string{"kinetic", " thermal-dump"})
	require.NoError(t, err)
	require.Len(t, two, 2)
	assert.Equal(t, "kinetic", two[0].Name)
	assert.Equal(t, "thermal-dump", two[1].Name)
	_, err = SelectSchemes([]string{"nope"})
	assert.ErrorContains(t, err, "unknown scheme")
	_, err = SelectSchemes([]string{"kinetic", "kinetic"})
	assert.ErrorContains(t, err, "twice")
	names := map[string]bool{}
	for _, s := range Schemes() {
		assert.False(t, names[s.Name], "duplicate name %s", s.Name)
		names[s.Name] = true
		assert.NotEmpty(t, s.Description)
		assert.NotNil(t, s.Scheme)
	}
}
