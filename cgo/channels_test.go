package main

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// copyAll copies the last step's records and, after applying them, the
// touched elements.
func copyAll(t *testing.T, h uint64) ([]recordABI, []touchedABI) {
	t.Helper()
	var n, w int64
	require.Equal(t, codeOK, entryRecordCount(h, &n))
	require.Positive(t, n)
	recs := make([]recordABI, n)
	require.Equal(t, codeOK, entryCopyRecords(h, &recs[0], n, &w))
	require.Equal(t, codeOK, entryApplyStepRecords(h, nil), lastError(h))
	touched := make([]touchedABI, n)
	require.Equal(t, codeOK, entryCopyTouched(h, &touched[0], n, &w))
	return recs, touched[:w]
}

func TestPhotoelectricFieldThroughTheABI(t *testing.T) {
	// A star's far-ultraviolet light through ejecta_step: records and
	// touched elements carry G0. In clear gas the nearest element would see
	// L / (4 pi r^2) / 1.6e-3 (Habing 1968); the default dust only dims it.
	c := pcConfig()
	copy(c.Scheme[:], "photoelectric-heating\x00")
	c.BoxSize = [3]float64{12, 12, 12}
	h := create(t, c)
	g := newTestGas(6, 12, 7)
	require.Equal(t, codeOK, entryBindGas(h, &g.desc))
	const lum = 1e39 // erg/s
	dt := 0.1 * units.Megayear / (units.Parsec / units.Kilometer)
	star := starABI{ID: 5, Position: [3]float64{6.1, 5.9, 6.05}, Mass: 1e3, Metallicity: 0.0134,
		Energy: lum * 0.1 * units.Megayear / (units.SolarMass * units.Kilometer * units.Kilometer), Duration: dt}
	require.Equal(t, codeOK, entryStep(h, &star, 1, 0, modeOwnFinder, nil, nil), lastError(h))
	var l ledgerABI
	require.Equal(t, codeOK, entryGetLedger(h, &l))
	require.Equal(t, codeOK, entryLedgerBalanced(&l, 1e-12, nil, 0))
	assert.Positive(t, l.Heat)
	assert.InEpsilon(t, l.Released.Energy-l.Heat, l.Radiated, 1e-9, "light not turned into heat is radiated")
	recs, touched := copyAll(t, h)
	for _, r := range recs {
		e := &g.elems[0]
		for k := range g.elems {
			if g.elems[k].ID == r.GasID {
				e = &g.elems[k]
			}
		}
		var d2 float64
		for a := 0; a < 3; a++ {
			d := float64(e.Pos[a]) - star.Position[a]
			d2 += d * d
		}
		clear := lum / (4 * math.Pi * d2 * units.Parsec * units.Parsec) / 1.6e-3
		assert.Positive(t, r.FUVField)
		if math.Sqrt(d2) > 1.3 { // beyond the element's own radius
			assert.Less(t, r.FUVField, clear)
			assert.Greater(t, r.FUVField, 0.01*clear)
		}
	}
	require.Len(t, touched, len(recs))
	for _, tc := range touched {
		assert.Positive(t, tc.FUVField)
	}
}

func TestKickedWindsThroughTheABI(t *testing.T) {
	// Every kicked-wind name works through ejecta_step; records of kicked
	// elements carry EJECTA_FLAG_HYDRO_DECOUPLED and the decoupling time
	// (20 kpc at 484 km/s, about 40 Myr), the ledger the energy the kicks
	// used; the formed-mass variants load 2 times new_stellar_mass.
	for _, name := range []string{"kicked-winds", "kicked-winds-formed-mass", "kicked-winds-momentum-driven", "kicked-winds-momentum-driven-formed-mass"} {
		t.Run(name, func(t *testing.T) {
			c := pcConfig()
			copy(c.Scheme[:], name+"\x00")
			c.BoxSize = [3]float64{12, 12, 12}
			c.Seed = 3
			h := create(t, c)
			g := newTestGas(6, 12, 7)
			require.Equal(t, codeOK, entryBindGas(h, &g.desc))
			stars := supernovae(20, 12, 8)
			for i := range stars {
				stars[i].Energy *= 5 // enough for every kick
				stars[i].NewStellarMass = 0.5 * float64(i%3)
				stars[i].Dispersion = 40
			}
			require.Equal(t, codeOK, entryStep(h, &stars[0], int64(len(stars)), 2, modeOwnFinder, nil, nil), lastError(h))
			var l ledgerABI
			require.Equal(t, codeOK, entryGetLedger(h, &l))
			require.Equal(t, codeOK, entryLedgerBalanced(&l, 1e-12, nil, 0))
			assert.Positive(t, l.KickEnergy)
			assert.InEpsilon(t, l.Released.Energy-0.5*sumKE(stars), l.KickEnergy+l.Heat, 1e-9, "used plus left is the budget")
			recs, touched := copyAll(t, h)
			kicked := 0
			for _, r := range recs {
				if r.Flags&uint32(feedback.FlagHydroDecoupled) == 0 {
					assert.Zero(t, r.HydroDecoupledUntil)
					continue
				}
				kicked++
				assert.Positive(t, r.HydroDecoupledUntil)
				if name == "kicked-winds" {
					assert.InDelta(t, 40.4, r.HydroDecoupledUntil*myrPerCodeTime, 0.1)
				}
			}
			assert.Positive(t, kicked)
			decoupled := 0
			for _, tc := range touched {
				if tc.Flags&uint32(feedback.FlagHydroDecoupled) != 0 {
					decoupled++
					assert.Positive(t, tc.HydroDecoupledUntil)
				}
			}
			assert.Positive(t, decoupled)
		})
	}
}

// sumKE is sum m_ej v^2 over the stars (twice the ejecta's kinetic energy).
func sumKE(stars []starABI) float64 {
	s := 0.0
	for _, st := range stars {
		v := st.Velocity
		s += st.EjectedMass * (v[0]*v[0] + v[1]*v[1] + v[2]*v[2])
	}
	return s
}

func TestPopulationStepLightsTheGas(t *testing.T) {
	// A population step couples the far-ultraviolet light as its own
	// channel unless switched off; the light is coupled once.
	for _, on := range []int32{1, 0} {
		h := withPopulation(t, pcConfig(), func(p *populationConfigABI) { p.PhotoelectricHeating = on })
		g := denseGas(6, 12, 3)
		require.Equal(t, codeOK, entryBindGas(h, &g.desc))
		st := cluster(1, 1e4, 12, 1)
		require.Equal(t, codeOK, entryStepPopulation(h, &st, 1, 0.1/myrPerCodeTime, 0, modeOwnFinder, nil, nil), lastError(h))
		var pe, all ledgerABI
		require.Equal(t, codeOK, entryGetChannelLedger(h, int32(yields.PhotoelectricHeating), &pe))
		require.Equal(t, codeOK, entryGetLedger(h, &all))
		require.Equal(t, codeOK, entryLedgerBalanced(&all, 1e-12, nil, 0))
		recs, _ := copyAll(t, h)
		lit := 0
		for _, r := range recs {
			if r.Channel == int32(yields.PhotoelectricHeating) {
				lit++
				assert.Positive(t, r.FUVField)
			} else {
				assert.Zero(t, r.FUVField)
			}
		}
		if on == 1 {
			assert.Positive(t, lit)
			assert.Positive(t, pe.Deposited.Energy)
		} else {
			assert.Zero(t, lit)
			assert.Zero(t, pe.Released.Energy)
		}
	}
	bad := defaultPopulationConfig()
	bad.PhotoelectricHeating = 2
	h := create(t, pcConfig())
	assert.Equal(t, codeInvalidArgument, entryEnablePopulation(h, &bad))
}

// A population step hands each star particle's new_stellar_mass to the
// "-formed-mass" kicked winds: with 500 Msun formed, the loading (2 times
// it) is above the 32 neighbors' 880 Msun, so every neighbor of the
// core-collapse channel is launched; with none formed, none is.
func TestPopulationStepLaunchesWindsOnNewStellarMass(t *testing.T) {
	for _, formed := range []float64{500, 0} {
		c := pcConfig()
		copy(c.Scheme[:], "kicked-winds-formed-mass\x00")
		c.Seed = 5
		h := withPopulation(t, c, nil)
		g := denseGas(6, 12, 3)
		require.Equal(t, codeOK, entryBindGas(h, &g.desc))
		st := cluster(1, 1e4, 12, 10)
		st.NewStellarMass = formed
		require.Equal(t, codeOK, entryStepPopulation(h, &st, 1, 1/myrPerCodeTime, 0, modeOwnFinder, nil, nil), lastError(h))
		var cc ledgerABI
		require.Equal(t, codeOK, entryGetChannelLedger(h, int32(yields.CoreCollapse), &cc))
		require.Positive(t, cc.Released.Energy, "supernovae pay the wind")
		recs, _ := copyAll(t, h)
		ccRecords, launched := 0, 0
		for _, r := range recs {
			if r.Channel != int32(yields.CoreCollapse) {
				assert.Zero(t, r.Flags&uint32(feedback.FlagHydroDecoupled), "channel %d", r.Channel)
				continue
			}
			ccRecords++
			if r.Flags&uint32(feedback.FlagHydroDecoupled) != 0 {
				launched++
			}
		}
		require.Equal(t, 32, ccRecords)
		if formed > 0 {
			assert.Equal(t, ccRecords, launched)
			assert.Positive(t, cc.KickEnergy)
		} else {
			assert.Zero(t, launched)
			// Without kicks only the ejecta's mixing changes the kinetic
			// energy, and it can only lose some.
			assert.LessOrEqual(t, cc.KickEnergy, 0.0)
		}
	}
	// A bad new_stellar_mass is refused like any other star field.
	h := withPopulation(t, pcConfig(), nil)
	g := denseGas(6, 12, 3)
	require.Equal(t, codeOK, entryBindGas(h, &g.desc))
	st := cluster(1, 1e4, 12, 10)
	st.NewStellarMass = -1
	assert.Equal(t, codeBadValue, entryStepPopulation(h, &st, 1, 1/myrPerCodeTime, 0, modeOwnFinder, nil, nil))
	assert.Contains(t, lastError(h), "new stellar mass -1")
}
