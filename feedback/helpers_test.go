package feedback_test

import (
	"testing"

	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
)

// newTree is the default finder on g's gas in an open box.
func newTree(t testing.TB, g *audit.GasArrays) *neighbor.Tree {
	t.Helper()
	f, err := neighbor.NewTree(g.Packed(), g.ID, neighbor.Box{})
	require.NoError(t, err)
	return f
}

// defaultPopulation is the built-in population at its defaults.
func defaultPopulation(t testing.TB) *yields.Population {
	t.Helper()
	pop, err := yields.NewPopulation(yields.DefaultConfig())
	require.NoError(t, err)
	return pop
}
