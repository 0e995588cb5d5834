package main

import (
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
	"unsafe"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// testElement is one gas element of an array-of-structs host, float32
// positions and float64 otherwise, as in examples/host.c.
type testElement struct {
	Pos    [3]float32
	Vel    [3]float64
	Mass   float64
	Rho    float64
	U      float64
	Metals float64
	ID     int64
}

func fieldOf(p unsafe.Pointer, t int32) fieldABI {
	return fieldABI{Data: p, Stride: int64(unsafe.Sizeof(testElement{})), Type: t}
}

// testGas is a jittered lattice of side^3 elements in a periodic box of
// side 'box' (pc, Msun, km/s; n_H ~ 1 cm^-3), with its descriptor.
type testGas struct {
	elems     []testElement
	species   []int32
	fractions []fieldABI
	desc      gasABI
}

func newTestGas(side int, box float64, seed uint64) *testGas {
	rng := rand.New(rand.NewPCG(seed, 9))
	h := box / float64(side)
	g := &testGas{elems: make([]testElement, side*side*side)}
	for i := range g.elems {
		e := &g.elems[i]
		idx := [3]int{i % side, (i / side) % side, i / (side * side)}
		for a := 0; a < 3; a++ {
			e.Pos[a] = float32((float64(idx[a]) + 0.5 + 0.3*(rng.Float64()-0.5)) * h)
			e.Vel[a] = rng.Float64() - 0.5
		}
		e.Rho = 0.0345
		e.Mass = e.Rho * h * h * h
		e.U = 100
		e.Metals = 0.0134
		e.ID = int64(100 + 3*i)
	}
	g.describe()
	return g
}

func (g *testGas) describe() {
	e := &g.elems[0]
	g.species = []int32{int32(yields.Metals)}
	g.fractions = []fieldABI{fieldOf(unsafe.Pointer(&e.Metals), 1)}
	g.desc = gasABI{Count: int64(len(g.elems)), NSpecies: 1, Species: &g.species[0], SpeciesFraction: &g.fractions[0]}
	for a := 0; a < 3; a++ {
		g.desc.Position[a] = fieldOf(unsafe.Pointer(&e.Pos[a]), 2)
		g.desc.Velocity[a] = fieldOf(unsafe.Pointer(&e.Vel[a]), 1)
	}
	g.desc.Mass = fieldOf(unsafe.Pointer(&e.Mass), 1)
	g.desc.Density = fieldOf(unsafe.Pointer(&e.Rho), 1)
	g.desc.InternalEnergy = fieldOf(unsafe.Pointer(&e.U), 1)
	g.desc.ID = fieldOf(unsafe.Pointer(&e.ID), 3)
}

func (g *testGas) clone() *testGas {
	c := &testGas{elems: append([]testElement(nil), g.elems...)}
	c.describe()
	return c
}

func pcConfig() configABI {
	c := defaultConfig()
	c.LengthCm, c.MassG, c.VelocityCmPerS = units.Parsec, units.SolarMass, units.Kilometer
	return c
}

// supernovae are n stars of one 1e51 erg supernova each (10 Msun of
// ejecta, 2 of metals) inside a box of side box.
func supernovae(n int, box float64, seed uint64) []starABI {
	rng := rand.New(rand.NewPCG(seed, 5))
	foe := units.FOE / (units.SolarMass * units.Kilometer * units.Kilometer)
	stars := make([]starABI, n)
	for i := range stars {
		s := &stars[i]
		s.ID = int64(1 + 7*i)
		for a := 0; a < 3; a++ {
			s.Position[a] = box * rng.Float64()
			s.Velocity[a] = 4 * (rng.Float64() - 0.5)
		}
		s.Mass, s.Metallicity, s.Age = 1e3, 0.0134, 5
		s.EjectedMass = 10
		s.SpeciesMass[yields.Metals] = 2
		s.Energy, s.Events = foe, 1
		s.Duration = 0.01 // code time (about 10 kyr): the light schemes need a step length
	}
	return stars
}

func create(t *testing.T, c configABI) uint64 {
	t.Helper()
	var h uint64
	var msg [256]byte
	require.Equal(t, codeOK, entryCreate(&c, &h, &msg[0], int64(len(msg))), "%s", msg[:])
	t.Cleanup(func() { entryDestroy(&h) })
	return h
}

func lastError(h uint64) string {
	var buf [512]byte
	var n int64
	entryLastError(h, &buf[0], int64(len(buf)), &n)
	return string(buf[:min(n, int64(len(buf)-1))])
}

func TestABILayoutMatchesHeader(t *testing.T) {
	assert.Empty(t, abiMismatches())
}

func TestConfigErrors(t *testing.T) {
	tests := []struct {
		name   string
		change func(c *configABI)
		want   int32
		text   string
	}{
		{"defaults", func(*configABI) {}, codeOK, ""},
		{"unknown scheme", func(c *configABI) { c.Scheme = [nameCapacity]byte{}; copy(c.Scheme[:], "hypernova") }, codeUnknownName, "hypernova"},
		{"unknown fit", func(c *configABI) { c.RemnantFit = [nameCapacity]byte{}; copy(c.RemnantFit[:], "guess") }, codeUnknownName, "guess"},
		{"unterminated", func(c *configABI) {
			for i := range c.Scheme {
				c.Scheme[i] = 'k'
			}
		}, codeUnknownName, "NUL"},
		{"NaN length", func(c *configABI) { c.LengthCm = math.NaN() }, codeInvalidArgument, "units"},
		{"zero mass unit", func(c *configABI) { c.MassG = 0 }, codeInvalidArgument, "config units: code mass unit must be finite and positive, got 0"},
		{"negative count", func(c *configABI) { c.NeighborCount = -1 }, codeInvalidArgument, "neighbor_count"},
		{"zero count", func(c *configABI) { c.NeighborCount = 0 }, codeInvalidArgument, "neighbor_count 0 must be >= 1"},
		{"zero count in radius mode", func(c *configABI) { c.NeighborCount, c.CouplingRadius = 0, 3 }, codeInvalidArgument, "neighbor_count"},
		{"empty remnant fit", func(c *configABI) { c.RemnantFit = [nameCapacity]byte{} }, codeUnknownName, "remnant fit \"\""},
		{"empty weighting", func(c *configABI) { c.Weighting = [nameCapacity]byte{} }, codeUnknownName, "weighting \"\""},
		{"empty scheme", func(c *configABI) { c.Scheme = [nameCapacity]byte{} }, codeUnknownName, "scheme \"\""},
		{"NaN radius", func(c *configABI) { c.CouplingRadius = math.NaN() }, codeInvalidArgument, "coupling_radius"},
		{"negative box", func(c *configABI) { c.BoxSize[1] = -1 }, codeInvalidArgument, "box"},
		{"too many workers", func(c *configABI) { c.WorkerThreads = 5000 }, codeInvalidArgument, "worker_threads"},
		{"zero workers", func(c *configABI) { c.WorkerThreads = 0 }, codeInvalidArgument, "worker_threads 0 outside 1..4096"},
		{"kinetic fraction", func(c *configABI) { c.KineticFraction = 1.5 }, codeInvalidArgument, "kinetic_fraction"},
		{"zero kinetic fraction", func(c *configABI) { c.KineticFraction = 0 }, codeOK, ""},
		{"NaN kinetic fraction", func(c *configABI) { c.KineticFraction = math.NaN() }, codeInvalidArgument, "kinetic_fraction"},
		{"infrared boost below 1", func(c *configABI) { c.MaxInfraredBoost = 0.5 }, codeInvalidArgument, "max_infrared_boost 0.5"},
		{"zero infrared boost", func(c *configABI) { c.MaxInfraredBoost = 0 }, codeInvalidArgument, "max_infrared_boost"},
		{"NaN infrared boost", func(c *configABI) { c.MaxInfraredBoost = math.NaN() }, codeInvalidArgument, "max_infrared_boost"},
		{"unbounded infrared boost", func(c *configABI) { c.MaxInfraredBoost = math.Inf(1) }, codeOK, ""},
		{"no infrared boost", func(c *configABI) { c.MaxInfraredBoost = 1 }, codeOK, ""},
		{"zero wind event energy", func(c *configABI) { c.WindEventEnergyErg = 0 }, codeInvalidArgument, "wind_event_energy_erg"},
		{"infinite wind event energy", func(c *configABI) { c.WindEventEnergyErg = math.Inf(1) }, codeInvalidArgument, "wind_event_energy_erg"},
		{"negative photon reach", func(c *configABI) { c.PhotonReach = -1 }, codeInvalidArgument, "photon_reach"},
		{"photon reach", func(c *configABI) { c.PhotonReach = 5000 }, codeOK, ""},
		{"isotropy flag", func(c *configABI) { c.IsotropyCorrection = 2 }, codeInvalidArgument, "isotropy"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			c := pcConfig()
			tc.change(&c)
			var h uint64
			var msg [256]byte
			got := entryCreate(&c, &h, &msg[0], int64(len(msg)))
			assert.Equal(t, tc.want, got)
			text := string(msg[:strings.IndexByte(string(msg[:]), 0)])
			assert.Contains(t, text, tc.text)
			if got == codeOK {
				assert.NotZero(t, h)
				assert.Equal(t, codeOK, entryDestroy(&h))
			} else {
				assert.Zero(t, h)
			}
		})
	}
	var h uint64
	assert.Equal(t, codeNullPointer, entryCreate(nil, &h, nil, 0))
	c := pcConfig()
	assert.Equal(t, codeNullPointer, entryCreate(&c, nil, nil, 0))
}

func TestGasDescriptorErrors(t *testing.T) {
	h := create(t, pcConfig())
	tests := []struct {
		name   string
		change func(d *gasABI)
		want   int32
	}{
		{"zero count", func(d *gasABI) { d.Count = 0 }, codeInvalidArgument},
		{"negative count", func(d *gasABI) { d.Count = -4 }, codeInvalidArgument},
		{"stride below element", func(d *gasABI) { d.Mass.Stride = 4 }, codeInvalidArgument},
		{"negative stride", func(d *gasABI) { d.Density.Stride = -8 }, codeInvalidArgument},
		{"misaligned stride", func(d *gasABI) { d.Mass.Stride = 12 }, codeInvalidArgument},
		{"null column", func(d *gasABI) { d.Velocity[2].Data = nil }, codeNullPointer},
		{"unknown type", func(d *gasABI) { d.ID.Type = 9 }, codeInvalidArgument},
		{"integer written column", func(d *gasABI) { d.Mass.Type = 3 }, codeInvalidArgument},
		{"overlapping written columns", func(d *gasABI) { d.InternalEnergy = d.Mass }, codeInvalidArgument},
		{"too many species", func(d *gasABI) { d.NSpecies = 13 }, codeInvalidArgument},
		{"null species list", func(d *gasABI) { d.Species = nil }, codeNullPointer},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			g := newTestGas(4, 8, 1)
			tc.change(&g.desc)
			assert.Equal(t, tc.want, entryBindGas(h, &g.desc))
			assert.NotEmpty(t, lastError(h))
			s := supernovae(1, 8, 1)
			assert.Equal(t, codeNoGas, entryStep(h, &s[0], 1, 0, modeOwnFinder, nil, nil), "a failed bind leaves no gas bound")
		})
	}
	assert.Equal(t, codeNullPointer, entryBindGas(h, nil))
}

func TestStepAndApplyErrors(t *testing.T) {
	g := newTestGas(5, 10, 2)
	h := create(t, pcConfig())
	require.Equal(t, codeOK, entryBindGas(h, &g.desc))
	good := supernovae(2, 10, 3)
	nan := supernovae(1, 10, 3)
	nan[0].Position[1] = math.NaN()
	heavy := supernovae(1, 10, 3)
	heavy[0].SpeciesMass[yields.Iron] = 11
	dup := supernovae(2, 10, 3)
	dup[1].ID = dup[0].ID
	badChannel := supernovae(1, 10, 3)
	badChannel[0].Channel = 17
	offs := []int64{0, 1, 40}
	idx := make([]int64, 40)
	tests := []struct {
		name string
		call func() int32
		want int32
	}{
		{"null stars", func() int32 { return entryStep(h, nil, 1, 0, modeOwnFinder, nil, nil) }, codeNullPointer},
		{"zero stars", func() int32 { return entryStep(h, &good[0], 0, 0, modeOwnFinder, nil, nil) }, codeInvalidArgument},
		{"negative stars", func() int32 { return entryStep(h, &good[0], -2, 0, modeOwnFinder, nil, nil) }, codeInvalidArgument},
		{"unknown mode", func() int32 { return entryStep(h, &good[0], 1, 0, 7, nil, nil) }, codeInvalidArgument},
		{"NaN position", func() int32 { return entryStep(h, &nan[0], 1, 0, modeOwnFinder, nil, nil) }, codeBadValue},
		{"species above ejecta", func() int32 { return entryStep(h, &heavy[0], 1, 0, modeOwnFinder, nil, nil) }, codeBadValue},
		{"duplicate star IDs", func() int32 { return entryStep(h, &dup[0], 2, 0, modeOwnFinder, nil, nil) }, codeInvalidArgument},
		{"unknown channel", func() int32 { return entryStep(h, &badChannel[0], 1, 0, modeOwnFinder, nil, nil) }, codeInvalidArgument},
		{"rows without offsets", func() int32 { return entryStep(h, &good[0], 2, 0, modeHostRows, nil, nil) }, codeNullPointer},
		{"row naming one element twice", func() int32 { return entryStep(h, &good[0], 2, 0, modeHostRows, &offs[0], &idx[0]) }, codeNeighbors},
		{"apply before step", func() int32 { return entryApplyStepRecords(h, nil) }, codeInvalidArgument},
		{"negative record count", func() int32 { return entryApplyRecords(h, nil, -1, locateByID, nil) }, codeInvalidArgument},
		{"null records", func() int32 { return entryApplyRecords(h, nil, 3, locateByID, nil) }, codeNullPointer},
		{"no records", func() int32 { return entryApplyRecords(h, nil, 0, locateByID, nil) }, codeOK},
		{"unknown locate", func() int32 { r := recordABI{}; return entryApplyRecords(h, &r, 1, 5, nil) }, codeInvalidArgument},
		{"unknown gas ID", func() int32 { r := recordABI{GasID: 1}; return entryApplyRecords(h, &r, 1, locateByID, nil) }, codeUnknownGas},
		{"index not holding ID", func() int32 {
			r := recordABI{GasIndex: 3, GasID: 100}
			return entryApplyRecords(h, &r, 1, locateByIndex, nil)
		}, codeUnknownGas},
		{"NaN record", func() int32 {
			r := recordABI{GasID: 100, Mass: math.NaN()}
			return entryApplyRecords(h, &r, 1, locateByID, nil)
		}, codeBadValue},
		{"negative capacity", func() int32 { var n int64; return entryCopyRecords(h, nil, -1, &n) }, codeInvalidArgument},
		{"null written", func() int32 { return entryCopyRecords(h, nil, 0, nil) }, codeNullPointer},
		{"null ledger", func() int32 { return entryGetLedger(h, nil) }, codeNullPointer},
	}
	before := append([]testElement(nil), g.elems...)
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			assert.Equal(t, tc.want, tc.call())
			if tc.want != codeOK {
				assert.NotEmpty(t, lastError(h))
			}
			assert.Equal(t, before, g.elems, "a failed call changes no gas")
		})
	}
}

func TestUndepositedStarIsReported(t *testing.T) {
	// A star farther than the coupling radius from all gas (open box) is
	// returned: the step reports it and the ledger books it undeposited.
	g := newTestGas(4, 8, 4)
	c := pcConfig()
	c.CouplingRadius = 3
	h := create(t, c)
	require.Equal(t, codeOK, entryBindGas(h, &g.desc))
	stars := supernovae(2, 8, 5)
	stars[1].Position = [3]float64{100, 100, 100}
	require.Equal(t, codeUndeposited, entryStep(h, &stars[0], 2, 0, modeOwnFinder, nil, nil))
	assert.Contains(t, lastError(h), "step: releases returned undeposited: 1; the first, index 1, channel core-collapse: star 8: ")
	var l ledgerABI
	require.Equal(t, codeOK, entryGetLedger(h, &l))
	assert.Equal(t, int64(1), l.Skipped)
	assert.Equal(t, 10.0, l.Undeposited.Mass)
	// The host learns which star to keep.
	ids := make([]int64, l.Skipped)
	chans := make([]int32, l.Skipped)
	var w int64
	require.Equal(t, codeOK, entryCopyUndeposited(h, &ids[0], &chans[0], l.Skipped, &w))
	assert.Equal(t, int64(1), w)
	assert.Equal(t, stars[1].ID, ids[0])
	assert.Equal(t, stars[1].Channel, chans[0])
	assert.Equal(t, codeBufferTooSmall, entryCopyUndeposited(h, nil, nil, 0, &w))
	assert.Equal(t, int64(1), w, "capacity 0 asks for the count")
	assert.Equal(t, codeNullPointer, entryCopyUndeposited(h, nil, nil, 1, &w))
	assert.Equal(t, codeInvalidArgument, entryCopyUndeposited(h, &ids[0], nil, -1, &w))
	assert.Equal(t, codeNullPointer, entryCopyUndeposited(h, &ids[0], nil, 1, nil))
	var msg [256]byte
	assert.Equal(t, codeOK, entryLedgerBalanced(&l, 1e-12, &msg[0], int64(len(msg))))
	l.Deposited.Mass *= 2
	assert.Equal(t, codeImbalance, entryLedgerBalanced(&l, 1e-12, &msg[0], int64(len(msg))))
	assert.Contains(t, string(msg[:]), "mass imbalance")
}

func TestDestroyedAndBusyContexts(t *testing.T) {
	c := pcConfig()
	var h uint64
	require.Equal(t, codeOK, entryCreate(&c, &h, nil, 0))
	stale := h
	// Busy: a call while another holds the context is refused.
	s, err := contexts().lookup(h)
	require.NoError(t, err)
	s.mu.Lock()
	g := newTestGas(3, 6, 1)
	assert.Equal(t, codeBusy, entryBindGas(h, &g.desc))
	assert.Equal(t, codeBusy, entryDestroy(&h))
	s.mu.Unlock()
	require.Equal(t, codeOK, entryDestroy(&h))
	assert.Zero(t, h)
	assert.Equal(t, codeOK, entryDestroy(&h), "destroying 0 is a no-op")
	assert.Equal(t, codeInvalidContext, entryDestroy(&stale))
	assert.Equal(t, codeInvalidContext, entryBindGas(stale, &g.desc))
	var n int64
	assert.Equal(t, codeInvalidContext, entryRecordCount(stale, &n))
	var buf [128]byte
	assert.Equal(t, codeInvalidContext, entryLastError(stale, &buf[0], int64(len(buf)), nil))
	assert.Contains(t, string(buf[:]), "not a live ejecta context")
	assert.Equal(t, codeInvalidContext, entryRecordCount(987654321, &n), "never created")
	assert.Equal(t, codeInvalidContext, entryRecordCount(0, &n))
}

func TestVersionAndDefaults(t *testing.T) {
	var buf [32]byte
	var abi int32
	require.Equal(t, codeOK, entryVersion(&buf[0], int64(len(buf)), &abi))
	assert.Equal(t, feedback.Version, string(buf[:len(feedback.Version)]))
	assert.Equal(t, abiVersion, abi)
	assert.Equal(t, codeBufferTooSmall, entryVersion(&buf[0], 3, nil))
	assert.Equal(t, byte(0), buf[2])
	assert.Equal(t, codeNullPointer, entryVersion(nil, 4, nil))
	var c configABI
	require.Equal(t, codeOK, entryConfigDefaults(&c))
	assert.Equal(t, defaultConfig(), c)
	assert.Equal(t, codeNullPointer, entryConfigDefaults(nil))
}

// TestRecordsFromAnotherRank couples on one context, ships the records by
// value to a second context bound to an identical copy of the gas, and
// applies them there located by gas ID: both copies must end bitwise
// identical, also when the records arrive in reverse order.
func TestRecordsFromAnotherRank(t *testing.T) {
	for _, scheme := range feedback.SchemeNames() {
		t.Run(scheme, func(t *testing.T) {
			c := pcConfig()
			c.Scheme = [nameCapacity]byte{}
			copy(c.Scheme[:], scheme)
			c.BoxSize = [3]float64{12, 12, 12}
			c.WorkerThreads = 2
			a, b := create(t, c), create(t, c)
			ga := newTestGas(6, 12, 7)
			gb := ga.clone()
			require.Equal(t, codeOK, entryBindGas(a, &ga.desc))
			require.Equal(t, codeOK, entryBindGas(b, &gb.desc))
			stars := supernovae(20, 12, 8)
			require.Equal(t, codeOK, entryStep(a, &stars[0], int64(len(stars)), 0, modeOwnFinder, nil, nil), lastError(a))
			var n, w int64
			require.Equal(t, codeOK, entryRecordCount(a, &n))
			recs := make([]recordABI, n)
			require.Equal(t, codeOK, entryCopyRecords(a, &recs[0], n, &w))
			require.Equal(t, n, w)
			var l ledgerABI
			require.Equal(t, codeOK, entryGetLedger(a, &l))
			require.Equal(t, codeOK, entryLedgerBalanced(&l, 1e-12, nil, 0))
			var repA, repB applyReportABI
			require.Equal(t, codeOK, entryApplyStepRecords(a, &repA), lastError(a))
			assert.Equal(t, codeAlreadyApplied, entryApplyStepRecords(a, nil))
			for i, j := 0, len(recs)-1; i < j; i, j = i+1, j-1 {
				recs[i], recs[j] = recs[j], recs[i]
			}
			for k := range recs {
				recs[k].GasIndex = -1 // ignored when located by ID
			}
			require.Equal(t, codeOK, entryApplyRecords(b, &recs[0], n, locateByID, &repB), lastError(b))
			assert.Equal(t, repA, repB)
			assert.Equal(t, ga.elems, gb.elems)
			assert.InEpsilon(t, l.Deposited.Mass, repA.Deposited.Mass, 1e-12)
			var touched [1]touchedABI
			assert.Equal(t, codeBufferTooSmall, entryCopyTouched(b, &touched[0], 1, &w))
			assert.Equal(t, repB.Elements, w)
		})
	}
}

// FuzzEntryPoints drives the entry points behind the exports with random
// configurations, gas descriptors (counts, strides, element types, offsets
// into one buffer) and field values (NaN, infinities, negatives, zeros).
// Whatever the input, no call may end in an internal error (a recovered
// panic), and a step that succeeds must leave a balanced ledger.
func FuzzEntryPoints(f *testing.F) {
	f.Add("terminal-momentum", "kernel-volume", int64(27), int64(88), uint8(1), uint64(1), int32(8), 0.0, int64(3))
	f.Add("kinetic", "solid-angle", int64(64), int64(96), uint8(0), uint64(2), int32(16), 2.5, int64(5))
	f.Add("thermal-dump", "kernel-volume", int64(8), int64(4), uint8(2), uint64(3), int32(2), 0.0, int64(1))
	f.Add("nonsense", "", int64(-1), int64(0), uint8(9), uint64(4), int32(-3), -1.0, int64(0))
	f.Add("kinetic", "", int64(40), int64(48), uint8(3), uint64(5), int32(4), math.NaN(), int64(-2))
	f.Fuzz(func(t *testing.T, scheme, weighting string, count, stride int64, typ uint8, seed uint64, k int32, radius float64, nStars int64) {
		if count > 512 || stride > 256 || nStars > 64 || count < -4 || stride < -16 || nStars < -4 {
			return
		}
		c := pcConfig()
		c.Scheme, c.Weighting = [nameCapacity]byte{}, [nameCapacity]byte{}
		copy(c.Scheme[:], scheme)
		copy(c.Weighting[:], weighting)
		c.NeighborCount, c.CouplingRadius = k, radius
		c.BoxSize = [3]float64{8, 8, 8}
		var h uint64
		var msg [128]byte
		code := entryCreate(&c, &h, &msg[0], int64(len(msg)))
		require.NotEqual(t, codeInternal, code, "%s", msg[:])
		if code != codeOK {
			return
		}
		defer entryDestroy(&h)

		rng := rand.New(rand.NewPCG(seed, 1))
		values := []float64{1, 0.5, 2, 7.9, 0, -1, math.NaN(), math.Inf(1), 1e300, 3}
		pick := func() float64 {
			if rng.IntN(6) == 0 {
				return values[rng.IntN(len(values))]
			}
			return 8 * rng.Float64()
		}
		words := int(max(count, 0)*max(stride, 0)/8) + 32
		buf := make([]uint64, words)
		for i := range buf {
			buf[i] = math.Float64bits(pick())
		}
		// IDs in the last column are mostly distinct integers.
		types := []int32{1, 2, 3, 4, 0, 7}
		field := func(slot int) fieldABI {
			off := 0
			if stride > 0 {
				off = (slot * 8) % int(stride)
			}
			tp := int32(1)
			if rng.IntN(4) == 0 {
				tp = types[(int(typ)+slot)%len(types)]
			}
			return fieldABI{Data: unsafe.Pointer(&buf[off/8]), Stride: stride, Type: tp}
		}
		var d gasABI
		d.Count = count
		for a := 0; a < 3; a++ {
			d.Position[a] = field(a)
			d.Velocity[a] = field(3 + a)
		}
		d.Mass, d.Density, d.InternalEnergy = field(6), field(7), field(8)
		d.ID = field(9)
		species := []int32{int32(seed % 14), 0}
		fractions := []fieldABI{field(10), field(11)}
		d.NSpecies = int32(typ % 3)
		d.Species, d.SpeciesFraction = &species[0], &fractions[0]
		if count > 0 && stride >= 80 && stride%8 == 0 {
			for i := int64(0); i < count; i++ {
				buf[(i*stride+72)/8] = uint64(i + 1)
			}
		}
		code = entryBindGas(h, &d)
		require.NotEqual(t, codeInternal, code, lastError(h))

		stars := make([]starABI, max(nStars, 1))
		for i := range stars {
			s := &stars[i]
			s.ID = int64(i)
			for a := 0; a < 3; a++ {
				s.Position[a], s.Velocity[a] = pick(), pick()-4
			}
			s.Mass, s.Metallicity, s.Age = pick(), 0.01, pick()
			s.EjectedMass, s.Energy, s.Events = pick(), pick()*1e6, 1
			s.SpeciesMass[yields.Metals] = 0.1 * s.EjectedMass
		}
		offsets := make([]int64, len(stars)+1)
		indices := make([]int64, 0)
		for i := range stars {
			for j := 0; j < int(k%8); j++ {
				indices = append(indices, int64(rng.IntN(int(max(count, 1)))))
			}
			offsets[i+1] = int64(len(indices))
		}
		indices = append(indices, 0)
		mode := int32(seed % 3)
		code = entryStep(h, &stars[0], nStars, int64(seed%7)-1, mode, &offsets[0], &indices[0])
		require.NotEqual(t, codeInternal, code, lastError(h))
		if code == codeOK || code == codeUndeposited {
			var l ledgerABI
			require.Equal(t, codeOK, entryGetLedger(h, &l))
			finite := math.Abs(l.Released.Energy) < 1e290 && math.Abs(l.Released.Mass) < 1e290
			if finite {
				assert.Equal(t, codeOK, entryLedgerBalanced(&l, 1e-9, nil, 0))
			}
			code = entryApplyStepRecords(h, nil)
			require.NotEqual(t, codeInternal, code, lastError(h))
		}
	})
}

// ejecta_copy_records gives the records grouped by star in the order the
// stars were given, and applying them does not reorder them: the copy
// after ejecta_apply_step_records is the copy before.
func TestRecordsKeepTheirOrderAcrossApply(t *testing.T) {
	h := create(t, pcConfig())
	g := newTestGas(8, 16, 3)
	require.Equal(t, codeOK, entryBindGas(h, &g.desc))
	stars := supernovae(3, 16, 4)
	stars[0].ID, stars[1].ID, stars[2].ID = 30, 10, 20 // given out of ID order
	require.Equal(t, codeOK, entryStep(h, &stars[0], 3, 0, modeOwnFinder, nil, nil), lastError(h))
	copyAll := func() []recordABI {
		var n, w int64
		require.Equal(t, codeOK, entryRecordCount(h, &n))
		recs := make([]recordABI, n)
		require.Equal(t, codeOK, entryCopyRecords(h, &recs[0], n, &w), lastError(h))
		return recs
	}
	before := copyAll()
	var starOrder []int64
	for k, r := range before {
		if k == 0 || before[k-1].StarID != r.StarID {
			starOrder = append(starOrder, r.StarID)
		}
	}
	assert.Equal(t, []int64{30, 10, 20}, starOrder, "grouped by star, in the order given")
	require.Equal(t, codeOK, entryApplyStepRecords(h, nil), lastError(h))
	assert.Equal(t, before, copyAll())

	// A population step: by channel in the documented order, then by star
	// in the order given.
	c := pcConfig()
	c.BoxSize = [3]float64{12, 12, 12}
	h = withPopulation(t, c, nil)
	pg := denseGas(8, 12, 5)
	require.Equal(t, codeOK, entryBindGas(h, &pg.desc))
	young := []starParticleABI{cluster(9, 1e4, 12, 8), cluster(4, 1e4, 12, 8)}
	young[1].Position[0] -= 3
	require.Equal(t, codeOK, entryStepPopulation(h, &young[0], 2, 1/myrPerCodeTime, 0, modeOwnFinder, nil, nil), lastError(h))
	type block struct {
		channel int32
		star    int64
	}
	var blocks []block
	for k, r := range copyAll() {
		if b := (block{r.Channel, r.StarID}); k == 0 || blocks[len(blocks)-1] != b {
			blocks = append(blocks, b)
		}
	}
	var want []block
	for _, ch := range []yields.Channel{yields.CoreCollapse, yields.TypeIa, yields.MassiveWinds, yields.AGBWinds,
		yields.Photoionization, yields.PhotoelectricHeating, yields.RadiationPressure} {
		for _, st := range young {
			want = append(want, block{int32(ch), st.ID})
		}
	}
	// Channels that released nothing this step (Type Ia at 8 Myr) leave
	// no records: keep the blocks seen, in order.
	var seen []block
	for _, b := range want {
		if slices.Contains(blocks, b) {
			seen = append(seen, b)
		}
	}
	assert.Equal(t, seen, blocks)
	assert.GreaterOrEqual(t, len(blocks), 8, "several channels coupled")
}
