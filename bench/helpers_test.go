package bench

import (
	"testing"

	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/neighbor"
)

func newTestTree(t testing.TB, c *Case) *neighbor.Tree {
	t.Helper()
	tree, err := neighbor.NewTree(c.Gas.Packed(), c.Gas.ID, c.Box)
	require.NoError(t, err)
	return tree
}
