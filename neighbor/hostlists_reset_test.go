package neighbor

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestHostListsResetReusesAndKeepsOnFailure(t *testing.T) {
	pos := []float64{0, 0, 0, 1, 0, 0, 0, 2, 0, 0, 0, 3}
	ids := []int64{10, 11, 12, 13}
	h, err := NewHostLists(pos, ids, Box{}, []int{0, 2, 4}, []int{0, 1, 2, 3})
	require.NoError(t, err)
	offsets, indices := []int{0, 3, 4}, []int{0, 1, 2, 3}
	allocs := testing.AllocsPerRun(5, func() {
		_ = h.Reset(pos, ids, Box{}, offsets, indices)
	})
	assert.Zero(t, allocs, "Reset reuses its scratch")
	got, err := h.Within(Query{Star: 0}, 10, nil)
	require.NoError(t, err)
	assert.Len(t, got, 3)
	// A bad reset leaves the previous rows in place.
	require.Error(t, h.Reset(pos, ids, Box{}, []int{0, 1}, []int{7}))
	got, err = h.Within(Query{Star: 0}, 10, nil)
	require.NoError(t, err)
	assert.Len(t, got, 3)
}
