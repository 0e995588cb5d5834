package neighbor

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"testing"

	"gonum.org/v1/gonum/spatial/kdtree"
)

// Benchmarks compare the finders on uniform random gas in the unit
// periodic box, one k = 48 query at a random point per op. Run the large
// sizes sparingly, e.g.
//
//	go test ./neighbor -run '^$' -bench . -benchtime=2000x -benchmem
//
// Every figure in a ratio comes from the same run.

const benchK = 48

var benchSizes = []int{65536, 1048576}

// benchGas is a lazily built gas set with its finders, local to one
// benchmark function.
type benchGas struct {
	n       int
	pos     []float64
	ids     []int64
	queries []Query
	box     Box
}

func newBenchGas(n int) *benchGas {
	rng := rand.New(rand.NewPCG(uint64(n), 42))
	g := &benchGas{n: n, box: Box{Size: [3]float64{1, 1, 1}}}
	g.pos, g.ids = make([]float64, 3*n), make([]int64, n)
	for i := range g.pos {
		g.pos[i] = rng.Float64()
	}
	for i := range g.ids {
		g.ids[i] = int64(i)
	}
	g.queries = make([]Query, 4096)
	for i := range g.queries {
		g.queries[i] = Query{Pos: [3]float64{rng.Float64(), rng.Float64(), rng.Float64()}}
	}
	return g
}

// lazyGas returns a getter that builds each size once per benchmark
// function (sub-benchmark bodies run more than once).
func lazyGas() func(n int) *benchGas {
	sets := map[int]*benchGas{}
	return func(n int) *benchGas {
		if sets[n] == nil {
			sets[n] = newBenchGas(n)
		}
		return sets[n]
	}
}

// gonumBench runs gonum's k-d tree the cheapest way that is still right in
// a periodic box: an NKeeper search at the wrapped query, plus one at each
// shifted image whose ball crosses a face. It stops there (no exact tie
// order, no mapping back to gas indices), so it is a lower bound on what a
// gonum-based finder costs.
type gonumBench struct {
	tree *kdtree.Tree
	box  Box
}

func newGonumBench(g *benchGas) *gonumBench {
	pts := make(kdtree.Points, g.n)
	for i := range pts {
		w := g.box.Wrap([3]float64{g.pos[3*i], g.pos[3*i+1], g.pos[3*i+2]})
		pts[i] = kdtree.Point{w[0], w[1], w[2]}
	}
	return &gonumBench{kdtree.New(pts, false), g.box}
}

func (gb *gonumBench) nearest(q Query, k int) int {
	keep := kdtree.NewNKeeper(k)
	p := kdtree.Point{q.Pos[0], q.Pos[1], q.Pos[2]}
	gb.tree.NearestSet(keep, p)
	d := math.Sqrt(keep.Heap[0].Dist)
	found := len(keep.Heap)
	for a := 0; a < 3; a++ {
		for _, s := range []float64{-1, 1} {
			if (s < 0 && p[a]+d >= 1) || (s > 0 && p[a]-d <= 0) {
				img := kdtree.Point{p[0], p[1], p[2]}
				img[a] += s
				ik := kdtree.NewNKeeper(k)
				gb.tree.NearestSet(ik, img)
				found += len(ik.Heap)
			}
		}
	}
	return found
}

// bruteScan is brute force done sensibly: one pass with a bounded heap.
func bruteScan(g *benchGas, q Query, k int, buf []Neighbor) []Neighbor {
	h := growBuf(buf, k)
	for i := 0; i < g.n; i++ {
		d2 := g.box.Dist2(q.Pos, [3]float64{g.pos[3*i], g.pos[3*i+1], g.pos[3*i+2]})
		h = keepNearest(h, k, Neighbor{i, d2}, g.ids)
	}
	heapSortAscending(h, g.ids)
	return h
}

func BenchmarkNearest(b *testing.B) {
	gas := lazyGas()
	for _, n := range benchSizes {
		b.Run(fmt.Sprintf("default/n=%d", n), func(b *testing.B) { benchNearestTree(b, gas(n)) })
		b.Run(fmt.Sprintf("gonum/n=%d", n), func(b *testing.B) { benchNearestGonum(b, gas(n)) })
		if n <= 65536 {
			b.Run(fmt.Sprintf("brute/n=%d", n), func(b *testing.B) {
				g := gas(n)
				buf := make([]Neighbor, 0, benchK)
				b.ReportAllocs()
				b.ResetTimer()
				for i := 0; i < b.N; i++ {
					buf = bruteScan(g, g.queries[i%len(g.queries)], benchK, buf)
				}
			})
		}
	}
}

// BenchmarkNearestClustered: the same k = 48 queries on strongly clustered
// gas (clusteredGas: 80% in three Gaussian clumps of widths 1e-2 to 1e-4),
// centered on gas elements, where stars form.
func BenchmarkNearestClustered(b *testing.B) {
	const n = 65536
	rng := rand.New(rand.NewPCG(8, 9))
	g := &benchGas{n: n, box: Box{Size: [3]float64{1, 1, 1}}}
	g.pos, g.ids = clusteredGas(rng, n)
	g.queries = make([]Query, 4096)
	for i := range g.queries {
		j := rng.IntN(n)
		g.queries[i] = Query{Pos: g.box.Wrap([3]float64{g.pos[3*j], g.pos[3*j+1], g.pos[3*j+2]})}
	}
	b.Run(fmt.Sprintf("default/n=%d", n), func(b *testing.B) { benchNearestTree(b, g) })
	b.Run(fmt.Sprintf("gonum/n=%d", n), func(b *testing.B) { benchNearestGonum(b, g) })
}

// benchNearestTree times the default tree's k = benchK queries on g.
func benchNearestTree(b *testing.B, g *benchGas) {
	tree, err := NewTree(g.pos, g.ids, g.box)
	if err != nil {
		b.Fatal(err)
	}
	buf := make([]Neighbor, 0, benchK)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if buf, err = tree.Nearest(g.queries[i%len(g.queries)], benchK, buf); err != nil {
			b.Fatal(err)
		}
	}
}

// benchNearestGonum times the same queries on gonum's k-d tree, the
// baseline.
func benchNearestGonum(b *testing.B, g *benchGas) {
	gb := newGonumBench(g)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if gb.nearest(g.queries[i%len(g.queries)], benchK) < benchK {
			b.Fatal("too few")
		}
	}
}

func BenchmarkBuild(b *testing.B) {
	gas := lazyGas()
	for _, n := range benchSizes {
		// default: Rebuild in place, the per-step cost once the arrays
		// exist (the first NewTree allocates them outside the timer).
		b.Run(fmt.Sprintf("default/n=%d", n), func(b *testing.B) {
			g := gas(n)
			tree, err := NewTree(g.pos, g.ids, g.box)
			if err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				if err := tree.Rebuild(g.pos, g.ids); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("gonum/n=%d", n), func(b *testing.B) {
			g := gas(n)
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				newGonumBench(g)
			}
		})
	}
	// sortbaseline: sort.Float64s on 1048576 random values; the copy is
	// refilled from the pristine values outside the timer.
	b.Run("sortbaseline/n=1048576", func(b *testing.B) {
		rng := rand.New(rand.NewPCG(1, 2))
		src := make([]float64, 1048576)
		for i := range src {
			src[i] = rng.Float64()
		}
		work := make([]float64, len(src))
		b.ReportAllocs()
		b.ResetTimer()
		for i := 0; i < b.N; i++ {
			b.StopTimer()
			copy(work, src)
			b.StartTimer()
			sort.Float64s(work)
		}
	})
}
