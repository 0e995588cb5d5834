package main

import (
	"bytes"
	"cmp"
	"slices"
	"testing"
	"unsafe"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// stochasticConfig is a context whose scheme draws: stochastic heating
// picks the heated elements with the counter-based generator keyed by
// (seed, star ID, step index).
func stochasticConfig() configABI {
	c := pcConfig()
	c.Scheme = [nameCapacity]byte{}
	copy(c.Scheme[:], "stochastic-heating")
	c.Seed = 2024
	c.BoxSize = [3]float64{12, 12, 12}
	return c
}

// stepRecords runs one ejecta_step of stars at the host's step index k
// and returns its records sorted by star ID and gas ID.
func stepRecords(t *testing.T, h uint64, stars []starABI, k int64) []recordABI {
	t.Helper()
	require.Equal(t, codeOK, entryStep(h, &stars[0], int64(len(stars)), k, modeOwnFinder, nil, nil), lastError(h))
	var n, w int64
	require.Equal(t, codeOK, entryRecordCount(h, &n))
	recs := make([]recordABI, n)
	if n > 0 {
		require.Equal(t, codeOK, entryCopyRecords(h, &recs[0], n, &w))
	}
	sortRecords(recs)
	return recs
}

// differing counts the records that are not bitwise the same in a and b
// (a record missing from either counts).
func differing(a, b []recordABI) int {
	n := max(len(a), len(b)) - min(len(a), len(b))
	for i := range min(len(a), len(b)) {
		if !bytes.Equal(recordBytes(&a[i]), recordBytes(&b[i])) {
			n++
		}
	}
	return n
}

// recordBytes is the memory of a record (which has no padding).
func recordBytes(r *recordABI) []byte {
	return unsafe.Slice((*byte)(unsafe.Pointer(r)), unsafe.Sizeof(*r))
}

func sortRecords(recs []recordABI) {
	slices.SortFunc(recs, func(a, b recordABI) int {
		return cmp.Or(cmp.Compare(a.StarID, b.StarID), cmp.Compare(a.GasID, b.GasID), cmp.Compare(a.Channel, b.Channel))
	})
}

// TestStepDrawsSurviveRestart restarts a run from a checkpoint: the host
// destroys its context after step 1 and creates a new one for steps 2 and
// 3. Its records must be bitwise those of a run that never stopped,
// because every draw is keyed by the step index the host passes, not by
// how many steps a context has run.
func TestStepDrawsSurviveRestart(t *testing.T) {
	g := denseGas(6, 12, 31)
	stars := supernovae(6, 12, 32)
	const steps = 4

	straight := create(t, stochasticConfig())
	require.Equal(t, codeOK, entryBindGas(straight, &g.desc))
	want := make([][]recordABI, steps)
	for k := range want {
		want[k] = stepRecords(t, straight, stars, int64(k))
	}
	// The draws differ from step to step, so a restart that lost count
	// would show.
	require.NotZero(t, differing(want[0], want[2]), "stochastic heating draws the same elements at steps 0 and 2")

	c := stochasticConfig()
	var before uint64
	require.Equal(t, codeOK, entryCreate(&c, &before, nil, 0))
	require.Equal(t, codeOK, entryBindGas(before, &g.desc))
	for k := range 2 {
		assert.Zero(t, differing(want[k], stepRecords(t, before, stars, int64(k))), "step %d before the restart", k)
	}
	require.Equal(t, codeOK, entryDestroy(&before))

	after := create(t, stochasticConfig())
	require.Equal(t, codeOK, entryBindGas(after, &g.desc))
	for k := 2; k < steps; k++ {
		assert.Zero(t, differing(want[k], stepRecords(t, after, stars, int64(k))), "step %d after the restart", k)
	}
}

// TestStepDrawsIgnoreSkippedSteps splits the stars over three contexts, as
// three MPI ranks would (by star ID), and empties one rank at step 1: that
// rank skips the call. Every step's records, gathered over the ranks, must
// be bitwise those of one context stepping all stars, the skip included.
func TestStepDrawsIgnoreSkippedSteps(t *testing.T) {
	g := denseGas(6, 12, 41)
	stars := supernovae(9, 12, 42)
	const ranks, steps, idle, idleStep = 3, 4, 2, 1
	rankOf := func(s starABI) int { return int(s.ID/7) % ranks }
	active := func(k int) (all []starABI, per [ranks][]starABI) {
		for _, s := range stars {
			r := rankOf(s)
			if r == idle && k == idleStep {
				continue
			}
			all = append(all, s)
			per[r] = append(per[r], s)
		}
		return all, per
	}

	one := create(t, stochasticConfig())
	require.Equal(t, codeOK, entryBindGas(one, &g.desc))
	var split [ranks]uint64
	for r := range split {
		split[r] = create(t, stochasticConfig())
		require.Equal(t, codeOK, entryBindGas(split[r], &g.desc))
	}
	for k := range steps {
		all, per := active(k)
		want := stepRecords(t, one, all, int64(k))
		var got []recordABI
		for r, h := range split {
			if len(per[r]) == 0 {
				require.True(t, r == idle && k == idleStep)
				continue // a rank without stars skips the step
			}
			got = append(got, stepRecords(t, h, per[r], int64(k))...)
		}
		sortRecords(got)
		require.NotEmpty(t, want)
		assert.Zero(t, differing(want, got), "step %d over %d ranks", k, ranks)
	}
}
