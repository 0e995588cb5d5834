package kyroyfinder_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os/exec"
	"strings"
	"sync"
	"testing"

	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/neighbor/kyroyfinder"
)

// randomGas is n elements uniform in the unit cube.
func randomGas(rng *rand.Rand, n int) ([]float64, []int64) {
	pos := make([]float64, 3*n)
	ids := make([]int64, n)
	for i := range ids {
		pos[3*i], pos[3*i+1], pos[3*i+2] = rng.Float64(), rng.Float64(), rng.Float64()
		ids[i] = int64(rng.IntN(1<<20))<<20 | int64(i)
	}
	return pos, ids
}

// latticeGas is a side^3 lattice in the unit cube: many exactly equal
// distances, so the tie order by ID is exercised.
func latticeGas(rng *rand.Rand, side int) ([]float64, []int64) {
	var pos []float64
	var ids []int64
	for i := 0; i < side*side*side; i++ {
		pos = append(pos, float64(i%side)/float64(side), float64(i/side%side)/float64(side), float64(i/(side*side))/float64(side))
		ids = append(ids, int64(rng.IntN(1<<20))<<20|int64(i))
	}
	return pos, ids
}

// The comparator returns exactly what the default tree returns: the same
// elements in the same order with the same distance bits, for k nearest
// and within a radius, in open and periodic boxes, ties included.
func TestAgreesWithTree(t *testing.T) {
	boxes := []neighbor.Box{{}, {Size: [3]float64{1, 1, 1}}, {Size: [3]float64{1, 0, 1}}}
	for bi, box := range boxes {
		for _, kind := range []string{"random", "lattice"} {
			rng := rand.New(rand.NewPCG(uint64(bi), 5))
			pos, ids := randomGas(rng, 1500)
			if kind == "lattice" {
				pos, ids = latticeGas(rng, 10)
			}
			tree, err := neighbor.NewTree(pos, ids, box)
			require.NoError(t, err)
			kyr, err := kyroyfinder.New(pos, ids, box)
			require.NoError(t, err)
			var want, got []neighbor.Neighbor
			for s := 0; s < 40; s++ {
				q := neighbor.Query{Pos: [3]float64{rng.Float64(), rng.Float64(), rng.Float64()}, Star: s}
				if kind == "lattice" && s%2 == 0 {
					q.Pos = [3]float64{pos[3*s], pos[3*s+1], pos[3*s+2]} // on an element: many ties
				}
				ctx := fmt.Sprintf("%s box=%v query %v", kind, box.Size, q.Pos)
				k := 1 + rng.IntN(64)
				want, err = tree.Nearest(q, k, want)
				require.NoError(t, err)
				got, err = kyr.Nearest(q, k, got)
				require.NoError(t, err)
				require.Equal(t, want, got, "nearest k=%d %s", k, ctx)
				r := 0.3 * rng.Float64()
				if s%5 == 0 {
					r = math.Sqrt(want[k/2].Dist2) // exactly on an element's distance
				}
				want, err = tree.Within(q, r, want)
				require.NoError(t, err)
				got, err = kyr.Within(q, r, got)
				require.NoError(t, err)
				require.Equal(t, want, got, "within r=%v %s", r, ctx)
			}
		}
	}
}

// Bad input is refused the way the tree refuses it, never with a panic.
func TestRefusesWhatTheTreeRefuses(t *testing.T) {
	good := []float64{0, 0, 0, 0.5, 0.5, 0.5, 0.9, 0.1, 0.3}
	ids := []int64{7, 8, 9}
	builds := []struct {
		name string
		pos  []float64
		ids  []int64
		box  neighbor.Box
	}{
		{"nan position", []float64{0, math.NaN(), 0, 0.5, 0.5, 0.5, 0.9, 0.1, 0.3}, ids, neighbor.Box{}},
		{"duplicate ID", good, []int64{7, 7, 9}, neighbor.Box{}},
		{"mismatched lengths", good[:6], ids, neighbor.Box{}},
		{"empty", nil, nil, neighbor.Box{}},
		{"negative box", good, ids, neighbor.Box{Size: [3]float64{-1, 1, 1}}},
	}
	for _, c := range builds {
		_, treeErr := neighbor.NewTree(c.pos, c.ids, c.box)
		_, err := kyroyfinder.New(c.pos, c.ids, c.box)
		require.Error(t, treeErr, c.name)
		require.ErrorIs(t, err, neighbor.ErrInvalid, c.name)
	}
	f, err := kyroyfinder.New(good, ids, neighbor.Box{})
	require.NoError(t, err)
	_, err = f.Nearest(neighbor.Query{}, 0, nil)
	require.ErrorIs(t, err, neighbor.ErrInvalid)
	_, err = f.Nearest(neighbor.Query{}, 4, nil)
	require.ErrorIs(t, err, neighbor.ErrTooFew)
	_, err = f.Within(neighbor.Query{}, -1, nil)
	require.ErrorIs(t, err, neighbor.ErrInvalid)
	_, err = f.Nearest(neighbor.Query{Pos: [3]float64{math.Inf(1), 0, 0}}, 1, nil)
	require.ErrorIs(t, err, neighbor.ErrInvalid)
}

// Concurrent queries on one finder give the answers of serial ones.
func TestConcurrentQueries(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	pos, ids := randomGas(rng, 800)
	f, err := kyroyfinder.New(pos, ids, neighbor.Box{Size: [3]float64{1, 1, 1}})
	require.NoError(t, err)
	queries := make([]neighbor.Query, 64)
	want := make([][]neighbor.Neighbor, len(queries))
	for i := range queries {
		queries[i] = neighbor.Query{Pos: [3]float64{rng.Float64(), rng.Float64(), rng.Float64()}}
		want[i], err = f.Nearest(queries[i], 24, nil)
		require.NoError(t, err)
	}
	var wg sync.WaitGroup
	errs := make([]error, 4)
	for w := range errs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var buf []neighbor.Neighbor
			for i, q := range queries {
				var err error
				if buf, err = f.Nearest(q, 24, buf); err != nil {
					errs[w] = err
					return
				}
				for j := range buf {
					if buf[j] != want[i][j] {
						errs[w] = fmt.Errorf("query %d rank %d: %v, want %v", i, j, buf[j], want[i][j])
						return
					}
				}
			}
		}()
	}
	wg.Wait()
	for _, err := range errs {
		require.NoError(t, err)
	}
}

// The library and its C ABI do not link kyroy: only this comparator does.
func TestLibraryDoesNotLinkKyroy(t *testing.T) {
	if testing.Short() {
		t.Skip("runs go list")
	}
	for _, pkg := range []string{"github.com/ejecta-dev/ejecta/cgo", "github.com/ejecta-dev/ejecta/feedback", "github.com/ejecta-dev/ejecta/neighbor"} {
		cmd := exec.Command("go", "list", "-deps", pkg)
		cmd.Env = append(cmd.Environ(), "CGO_ENABLED=1")
		out, err := cmd.CombinedOutput()
		require.NoError(t, err, "%s", out)
		for _, dep := range strings.Fields(string(out)) {
			if strings.Contains(dep, "kyroy") {
				t.Errorf("%s links %s", pkg, dep)
			}
		}
	}
}

// BenchmarkNearest compares the comparator with the default tree in the
// same run (k = 48, random queries in the unit periodic box, uniform gas).
func BenchmarkNearest(b *testing.B) {
	for _, n := range []int{65536, 1048576} {
		rng := rand.New(rand.NewPCG(1, uint64(n)))
		pos, ids := randomGas(rng, n)
		box := neighbor.Box{Size: [3]float64{1, 1, 1}}
		queries := make([]neighbor.Query, 4096)
		for i := range queries {
			queries[i] = neighbor.Query{Pos: [3]float64{rng.Float64(), rng.Float64(), rng.Float64()}}
		}
		builders := []struct {
			name  string
			build func() (neighbor.Finder, error)
		}{
			{"tree", func() (neighbor.Finder, error) { return neighbor.NewTree(pos, ids, box) }},
			{"kyroy", func() (neighbor.Finder, error) { return kyroyfinder.New(pos, ids, box) }},
		}
		for _, f := range builders {
			b.Run(fmt.Sprintf("%s/n=%d", f.name, n), func(b *testing.B) {
				finder, err := f.build()
				if err != nil {
					b.Fatal(err)
				}
				buf := make([]neighbor.Neighbor, 0, 4*48)
				b.ReportAllocs()
				b.ResetTimer()
				for i := 0; i < b.N; i++ {
					if buf, err = finder.Nearest(queries[i%len(queries)], 48, buf); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

// BenchmarkBuild compares building the comparator with rebuilding the
// default tree in place, in the same run.
func BenchmarkBuild(b *testing.B) {
	const n = 1048576
	rng := rand.New(rand.NewPCG(2, 2))
	pos, ids := randomGas(rng, n)
	box := neighbor.Box{Size: [3]float64{1, 1, 1}}
	b.Run(fmt.Sprintf("tree/n=%d", n), func(b *testing.B) {
		tree, err := neighbor.NewTree(pos, ids, box)
		if err != nil {
			b.Fatal(err)
		}
		b.ReportAllocs()
		b.ResetTimer()
		for i := 0; i < b.N; i++ {
			if err := tree.Rebuild(pos, ids); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run(fmt.Sprintf("kyroy/n=%d", n), func(b *testing.B) {
		b.ReportAllocs()
		for i := 0; i < b.N; i++ {
			if _, err := kyroyfinder.New(pos, ids, box); err != nil {
				b.Fatal(err)
			}
		}
	})
}
