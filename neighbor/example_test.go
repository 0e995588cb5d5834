package neighbor_test

import (
	"fmt"

	"github.com/ejecta-dev/ejecta/neighbor"
)

// Build the default finder on a small periodic gas set and ask for the three
// nearest elements around a star sitting near a corner: the nearest one is
// found across the periodic faces. Reusing buf makes later queries
// allocation-free.
func ExampleNewTree() {
	pos := []float64{ // x, y, z per element
		0.05, 0.05, 0.05,
		0.95, 0.95, 0.95,
		0.50, 0.50, 0.50,
		0.10, 0.00, 0.00,
		0.90, 0.10, 0.00,
	}
	ids := []int64{100, 101, 102, 103, 104}
	tree, err := neighbor.NewTree(pos, ids, neighbor.Box{Size: [3]float64{1, 1, 1}})
	if err != nil {
		fmt.Println(err)
		return
	}
	var buf []neighbor.Neighbor
	buf, err = tree.Nearest(neighbor.Query{Pos: [3]float64{0.99, 0.99, 0.99}}, 3, buf)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, nb := range buf {
		fmt.Printf("gas %d (ID %d) at distance^2 %.4f\n", nb.Index, ids[nb.Index], nb.Dist2)
	}
	// Output:
	// gas 1 (ID 101) at distance^2 0.0048
	// gas 0 (ID 100) at distance^2 0.0108
	// gas 3 (ID 103) at distance^2 0.0123
}
