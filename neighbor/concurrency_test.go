package neighbor

import (
	"math/rand/v2"
	"sync"
	"testing"

	"github.com/stretchr/testify/require"
)

// Many goroutines query one finder at once (run with -race); every answer
// equals the one computed alone beforehand.
func TestConcurrentQueries(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 18))
	box := Box{Size: [3]float64{1, 1, 1}}
	n := 1200
	if testing.Short() {
		n = 400
	}
	pos, ids := clusteredGas(rng, n)
	queries := queryPoints(rng, box, 30)
	offsets, indices := hostRows(rng, &bruteFinder{box, pos, ids}, queries, 0.3)
	tree, err := NewTree(pos, ids, box)
	require.NoError(t, err)
	host, err := NewHostLists(pos, ids, box, offsets, indices)
	require.NoError(t, err)

	for name, f := range map[string]Finder{"tree": tree, "host": host} {
		type answer struct{ near, within []Neighbor }
		want := make([]answer, len(queries))
		for s, qp := range queries {
			q := Query{Pos: qp, Star: s}
			k := min(24, offsets[s+1]-offsets[s])
			if k > 0 {
				want[s].near, err = f.Nearest(q, k, nil)
				require.NoError(t, err)
			}
			want[s].within, err = f.Within(q, 0.1, nil)
			require.NoError(t, err)
		}
		var wg sync.WaitGroup
		errs := make(chan string, 64)
		for g := 0; g < 6; g++ {
			wg.Add(1)
			go func(g int) {
				defer wg.Done()
				var buf []Neighbor
				for rep := 0; rep < 2; rep++ {
					for i := range queries {
						s := (i + g*7) % len(queries)
						q := Query{Pos: queries[s], Star: s}
						if k := len(want[s].near); k > 0 {
							buf, _ = f.Nearest(q, k, buf)
							if !sameNeighbors(want[s].near, buf) {
								errs <- name + ": nearest differs under concurrency"
								return
							}
						}
						buf, _ = f.Within(q, 0.1, buf)
						if !sameNeighbors(want[s].within, buf) {
							errs <- name + ": within differs under concurrency"
							return
						}
					}
				}
			}(g)
		}
		wg.Wait()
		close(errs)
		for e := range errs {
			t.Error(e)
		}
	}
}

func sameNeighbors(a, b []Neighbor) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}
