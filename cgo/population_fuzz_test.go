package main

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// fuzzLedgerFinite says whether a ledger's amounts are small enough for a
// balance check at round-off (sums of amounts near the float64 limit
// overflow).
func fuzzLedgerFinite(l *ledgerABI) bool {
	for _, v := range []float64{l.Released.Mass, l.Released.Energy, l.Deposited.Mass, l.Deposited.Energy,
		l.Undeposited.Mass, l.Undeposited.Energy, l.Radiated, l.EnergyScale, l.MomentumScale} {
		if !(math.Abs(v) < 1e290) {
			return false
		}
	}
	return true
}

// underflowFloor is an absolute imbalance below which a ledger counts as
// balanced in the fuzz test although ejecta_ledger_balanced, whose
// tolerance is relative only, says it is not. Two things break a relative
// check near the bottom of float64 (a step of dt ~1e-300, a star of formed
// mass ~1e-300): subnormal amounts have round-off of one subnormal step
// (4.9e-324), more than any relative tolerance of themselves; and the
// momentum scale feedback books, the sum of sqrt(kick . kick) over
// neighbors, underflows to 0 once kicks fall below ~1e-154, so the
// isotropic kicks' round-off is judged against the net momentum alone.
// Any ledger whose amounts are 1e-130 or more is still held to 1e-9 of
// its scale, since its imbalance would exceed the floor.
const underflowFloor = 1e-140

// assertFuzzBalanced asserts that a finite ledger balances to 1e-9 of its
// scales through ejecta_ledger_balanced; where that fails, each component
// whose imbalance is within underflowFloor is taken as balanced (booked as
// undeposited) and the others must still balance to 1e-9.
func assertFuzzBalanced(t *testing.T, l *ledgerABI, what string) {
	t.Helper()
	var msg [256]byte
	code := entryLedgerBalanced(l, 1e-9, &msg[0], int64(len(msg)))
	if code == codeOK {
		return
	}
	require.Equal(t, codeImbalance, code, "%s: %s", what, msg[:])
	g := ledgerFromABI(l)
	imb := g.Imbalance()
	absorb := func(v float64, into *float64) {
		if math.Abs(v) <= underflowFloor {
			*into += v
		}
	}
	absorb(imb.Mass, &g.Undeposited.Mass)
	absorb(imb.Energy, &g.Undeposited.Energy)
	for i := range imb.Species {
		absorb(imb.Species[i], &g.Undeposited.Species[i])
	}
	for a := range imb.Momentum {
		absorb(imb.Momentum[a], &g.Undeposited.Momentum[a])
	}
	assert.NoError(t, g.Balanced(1e-9), "%s: beyond the underflow floor: %s", what, msg[:])
}

// FuzzPopulationEntryPoints drives the entry functions behind
// ejecta_population_defaults, ejecta_enable_population,
// ejecta_step_population, ejecta_copy_star_results, ejecta_suggested_step
// and ejecta_get_channel_ledger with random population configs (IMF names
// and mass ranges, switches, tables), star particles (fields NaN, infinite,
// negative or huge), step lengths, step indices, neighbor modes and host
// rows, for up to three steps per input, each applied and fed back into the
// stars as a host does. No call may return the internal-error code; every
// step that completes leaves balanced ledgers (the step's and each
// channel's), star results in the stars' order whose mass loss adds up to
// what was deposited, and a suggested step in [0, dt).
func FuzzPopulationEntryPoints(f *testing.F) {
	f.Add("kroupa", 0.1, 100.0, 10.0, uint8(0x0f), uint8(0), uint8(0), 0.0, int32(16), uint64(1), int64(4), 1.0, int64(0), uint8(0))
	f.Add("kroupa", 0.0, 0.0, 0.0, uint8(0x0f), uint8(0), uint8(0), 0.0, int32(16), uint64(1), int64(4), 1.0, int64(0), uint8(0))
	f.Add("chabrier", 0.08, 120.0, 2.0, uint8(0x0b), uint8(1), uint8(3), 2.5, int32(12), uint64(2), int64(8), 3.0, int64(7), uint8(1))
	f.Add("salpeter", 50.0, 8.0, 10.0, uint8(0x0f), uint8(0), uint8(1), 0.0, int32(8), uint64(3), int64(2), 0.5, int64(1), uint8(0))
	f.Add("", math.NaN(), math.Inf(1), -1.0, uint8(0x8f), uint8(2), uint8(2), 0.0, int32(4), uint64(4), int64(3), math.NaN(), int64(-1), uint8(2))
	f.Add("top-heavy", 0.5, 0.6, 0.0, uint8(0x00), uint8(3), uint8(4), 1.5, int32(32), uint64(5), int64(6), 1e6, int64(1<<62), uint8(1))
	f.Add("kroupa", 1e-300, 1e300, 1e300, uint8(0xcf), uint8(0), uint8(5), 3.0, int32(2), uint64(6), int64(5), 1e-300, int64(3), uint8(0))
	f.Add("chabrier", 0.1, 100.0, math.Inf(1), uint8(0x07), uint8(1), uint8(6), 0.0, int32(64), uint64(7), int64(1), 40.0, int64(2), uint8(1))
	f.Fuzz(func(t *testing.T, imf string, minMass, maxMass, perStep float64, switches, table, scheme uint8,
		radius float64, k int32, seed uint64, nStars int64, dt float64, step int64, modeSel uint8) {
		if nStars < -2 || nStars > 24 || k < -2 || k > 96 {
			return
		}
		const box = 8.0
		// The context's scheme by index; an index past the end names none.
		schemes := []string{
			"terminal-momentum", "kinetic", "thermal-dump", "stochastic-heating",
			"stellar-winds", "radiation-pressure", "photoionization",
		}
		c := pcConfig()
		c.Scheme = [nameCapacity]byte{}
		if int(scheme) < len(schemes) {
			copy(c.Scheme[:], schemes[scheme])
		} else {
			copy(c.Scheme[:], "no-such-scheme")
		}
		c.CouplingRadius, c.NeighborCount = radius, k
		c.BoxSize = [3]float64{box, box, box}
		c.Seed, c.WorkerThreads = seed, int32(1+seed%2)
		var h uint64
		var msg [256]byte
		code := entryCreate(&c, &h, &msg[0], int64(len(msg)))
		require.NotEqual(t, codeInternal, code, "%s", msg[:])
		if code != codeOK {
			return
		}
		defer entryDestroy(&h)
		rng := rand.New(rand.NewPCG(seed, 17))

		// Gas: 64 elements, now and then with an unusable element, or none
		// bound at all.
		g := denseGas(4, box, seed)
		switch rng.IntN(8) {
		case 0:
			g.elems[rng.IntN(len(g.elems))].Rho = math.NaN()
		case 1:
			g.elems[rng.IntN(len(g.elems))].Mass = 0
		case 2:
			g.elems[rng.IntN(len(g.elems))].U = 1e300
		}
		if rng.IntN(10) != 0 {
			require.NotEqual(t, codeInternal, entryBindGas(h, &g.desc), lastError(h))
		}

		// The population config, switches from the bits of 'switches':
		// bits 0-3 turn winds, radiation pressure, photoionization and
		// delayed cooling on; with bits 6 and 7 set, the switch named by
		// bits 4-5 takes a value that is not a switch (bit 3 picks which).
		var p populationConfigABI
		require.Equal(t, codeOK, entryPopulationDefaults(&p))
		p.IMF = [nameCapacity]byte{}
		copy(p.IMF[:], imf)
		p.LightestStarMass, p.HeaviestStarMass, p.MaxSupernovaePerStep = minMass, maxMass, perStep
		sw := []*int32{&p.Winds, &p.RadiationPressure, &p.Photoionization, &p.DelayedCooling}
		for i, s := range sw {
			*s = int32(switches>>i) & 1
		}
		if switches&0xc0 == 0xc0 {
			*sw[(switches>>4)&3] = []int32{2, -1}[(switches>>3)&1]
		}
		switch table % 4 {
		case 1:
			p.YieldsTable = cString(exampleTable)
		case 2:
			p.YieldsTable = cString("/nonexistent/ejecta/yields.csv")
		case 3:
			p.YieldsTable = cString("")
		}
		code = entryEnablePopulation(h, &p)
		require.NotEqual(t, codeInternal, code, lastError(h))

		// Star particles, ages in 0-50 Myr. In one input of three a field
		// now and then is NaN, infinite or negative; in the others now and
		// then zero, huge or tiny, which a step must take. Masses stay at or
		// below 1e250 and speeds at or below 1e20: beyond, a source's
		// lab-frame energy E + M v^2 / 2 can overflow inside feedback (to
		// +Inf, or NaN as 0 * Inf for a release of no mass once v^2
		// overflows), and the star's carried energy comes back infinite or
		// NaN.
		bad := []float64{-1, math.NaN(), math.Inf(1), math.Inf(-1), -5e-324}
		anywhere := []float64{0, 1e300, 1e-300, math.MaxFloat64, 5e-324, 1e30}
		masses := []float64{0, 1e250, 1e-300, 5e-324, 1e30}
		speeds := []float64{0, 1e20, -1e20, 1e-300, 5e-324}
		hostile := rng.IntN(3) == 0
		pickFrom := func(extreme []float64, normal float64) float64 {
			switch r := rng.IntN(40); {
			case hostile && r < 2:
				return bad[rng.IntN(len(bad))]
			case r < 3:
				return extreme[rng.IntN(len(extreme))]
			}
			return normal
		}
		pick := func(normal float64) float64 { return pickFrom(anywhere, normal) }
		stars := make([]starParticleABI, max(nStars, 1))
		for i := range stars {
			s := &stars[i]
			s.ID = int64(3 + 5*i)
			if rng.IntN(40) == 0 {
				s.ID = 3
			}
			for a := 0; a < 3; a++ {
				s.Position[a] = pick(box * rng.Float64())
				s.Velocity[a] = pickFrom(speeds, 10*(rng.Float64()-0.5))
			}
			s.FormedMass = pickFrom(masses, math.Pow(10, 2+3*rng.Float64()))
			s.Mass = pickFrom(masses, s.FormedMass)
			s.Metallicity = pick(0.03 * rng.Float64())
			if rng.IntN(30) == 0 {
				s.Metallicity = []float64{1, math.Nextafter(1, 0), 0.5}[rng.IntN(3)]
			}
			s.Age = pick(50 / myrPerCodeTime * rng.Float64())
			s.CarriedEnergy = pickFrom(masses, 0)
		}

		// Host rows: up to 12 candidates per star, now and then out of
		// range, repeated, or with offsets that do not start at 0 or fall.
		offsets := make([]int64, len(stars)+1)
		indices := make([]int64, 0, 16)
		for i := range stars {
			for j := rng.IntN(13); j > 0; j-- {
				ix := int64(rng.IntN(len(g.elems)))
				if rng.IntN(50) == 0 {
					ix = []int64{-1, int64(len(g.elems)), math.MaxInt64}[rng.IntN(3)]
				}
				indices = append(indices, ix)
			}
			offsets[i+1] = int64(len(indices))
		}
		switch rng.IntN(20) {
		case 0:
			offsets[0] = 1
		case 1:
			if len(offsets) > 2 {
				offsets[1] = offsets[len(offsets)-1] + 1
			}
		}
		indices = append(indices, 0) // never an empty slice to point into
		mode := int32(modeSel % 3)   // 2 is no mode

		for k := int64(0); k < 3; k++ {
			idx := step
			if idx >= 0 && idx < math.MaxInt64-k {
				idx += k
			}
			code = entryStepPopulation(h, &stars[0], nStars, dt, idx, mode, &offsets[0], &indices[0])
			require.NotEqual(t, codeInternal, code, lastError(h))
			if code != codeOK && code != codeUndeposited {
				return
			}
			n := int(nStars)
			var l ledgerABI
			require.Equal(t, codeOK, entryGetLedger(h, &l))
			assert.Equal(t, int64(n*numStepChannels), l.Stars, "one release per star and channel")
			finite := fuzzLedgerFinite(&l)
			if finite {
				assertFuzzBalanced(t, &l, "step ledger")
			}
			var released float64
			for ch := int32(0); ch < int32(numStepChannels); ch++ {
				var cl ledgerABI
				require.Equal(t, codeOK, entryGetChannelLedger(h, ch, &cl))
				released += cl.Released.Mass
				if fuzzLedgerFinite(&cl) {
					assertFuzzBalanced(t, &cl, fmt.Sprintf("channel %d ledger", ch))
				}
			}
			if finite {
				assert.InDelta(t, l.Released.Mass, released, 1e-12*l.Released.Mass, "channel ledgers add up")
			}

			// Results: a short buffer gets what fits, a full one all.
			var w int64
			if n > 1 {
				short := make([]starResultABI, 1)
				require.Equal(t, codeBufferTooSmall, entryCopyStarResults(h, &short[0], 1, &w))
				require.Equal(t, int64(1), w)
			}
			require.Equal(t, codeBufferTooSmall, entryCopyStarResults(h, nil, 0, &w))
			require.Zero(t, w)
			res := make([]starResultABI, n)
			require.Equal(t, codeOK, entryCopyStarResults(h, &res[0], int64(n), &w), lastError(h))
			require.Equal(t, int64(n), w)
			var loss float64
			for i, r := range res {
				require.Equal(t, stars[i].ID, r.ID, "results in the stars' order")
				// Exactly 0 would be right for a star whose whole release
				// came back; feedback.Stepper.Step takes the returned mass
				// of each channel off the sum of all channels, which leaves
				// round-off of either sign, so round-off of the formed mass
				// (more than any release) is allowed below 0.
				assert.GreaterOrEqual(t, r.MassLoss, -1e-12*stars[i].FormedMass, "star %d mass loss", r.ID)
				assert.True(t, r.CarriedEnergy >= 0 && !math.IsInf(r.CarriedEnergy, 0), "star %d carried energy %g", r.ID, r.CarriedEnergy)
				assert.GreaterOrEqual(t, r.SupernovaeCC, int64(0))
				assert.GreaterOrEqual(t, r.SupernovaeIa, int64(0))
				loss += r.MassLoss
			}
			if finite {
				assert.InDelta(t, l.Deposited.Mass, loss, 1e-9*(l.Released.Mass+l.Deposited.Mass), "mass loss is what was deposited")
			}
			var suggested float64
			require.Equal(t, codeOK, entrySuggestedStep(h, &suggested))
			if suggested != 0 {
				assert.True(t, suggested > 0 && suggested < dt, "suggested step %g for dt %g", suggested, dt)
			}

			code = entryApplyStepRecords(h, nil)
			require.NotEqual(t, codeInternal, code, lastError(h))
			// As a host does: the stars lose what was deposited, carry
			// what was not and age by dt.
			for i := range stars[:n] {
				stars[i].Mass = math.Max(stars[i].Mass-res[i].MassLoss, 0)
				stars[i].CarriedEnergy = res[i].CarriedEnergy
				stars[i].Age += dt
			}
		}
	})
}
