package neighbor

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/require"
)

// requireSame fails unless got holds exactly the neighbors of want, in the
// same order, with the same Dist2 bits.
func requireSame(t *testing.T, want, got []Neighbor, msg string, args ...any) {
	t.Helper()
	require.Equal(t, len(want), len(got), "length: "+fmt.Sprintf(msg, args...))
	for i := range want {
		if want[i].Index != got[i].Index || math.Float64bits(want[i].Dist2) != math.Float64bits(got[i].Dist2) {
			require.Failf(t, "neighbor lists differ", "at %d: want %+v, got %+v; %s", i, want[i], got[i], fmt.Sprintf(msg, args...))
		}
	}
}

// queryPoints returns query centers: random ones, points on and just inside
// every face, edge and corner of [0, 1)^3 (and of the box when it differs),
// and points outside the box, which periodic finders wrap.
func queryPoints(rng *rand.Rand, box Box, random int) [][3]float64 {
	var out [][3]float64
	for i := 0; i < random; i++ {
		out = append(out, [3]float64{rng.Float64(), rng.Float64(), rng.Float64()})
	}
	// Each axis takes a low, a high or a middle value: all 26 faces, edges
	// and corners plus the center.
	edgeVals := func(a int) []float64 {
		hi := 1.0
		if L := box.Size[a]; L > 0 {
			hi = L
		}
		return []float64{0, 1e-9, math.Nextafter(hi, 0), hi - 1e-7, 0.5 * hi}
	}
	xs, ys, zs := edgeVals(0), edgeVals(1), edgeVals(2)
	for i := 0; i < 40; i++ {
		out = append(out, [3]float64{xs[rng.IntN(len(xs))], ys[rng.IntN(len(ys))], zs[rng.IntN(len(zs))]})
	}
	out = append(out, [3]float64{-0.25, 1.3, 0.5}, [3]float64{2.75, -1e-12, -3.5})
	return out
}

// hostRows builds compressed rows from brute-force searches: row s holds,
// in shuffled order, every element within reach of query s.
func hostRows(rng *rand.Rand, brute *bruteFinder, queries [][3]float64, reach float64) (offsets, indices []int) {
	offsets = []int{0}
	for _, qp := range queries {
		nb, err := brute.Within(Query{Pos: qp}, reach, nil)
		if err != nil {
			panic(err)
		}
		rng.Shuffle(len(nb), func(i, j int) { nb[i], nb[j] = nb[j], nb[i] })
		for _, x := range nb {
			indices = append(indices, x.Index)
		}
		offsets = append(offsets, len(indices))
	}
	return offsets, indices
}

type gasKind struct {
	name string
	make func(rng *rand.Rand) ([]float64, []int64)
}

func gasKinds(short bool) []gasKind {
	n := 300
	if short {
		n = 120
	}
	return []gasKind{
		{"uniform", func(rng *rand.Rand) ([]float64, []int64) { return uniformGas(rng, n) }},
		{"clustered", func(rng *rand.Rand) ([]float64, []int64) { return clusteredGas(rng, n) }},
		{"lattice", func(rng *rand.Rand) ([]float64, []int64) { return latticeGas(rng, 5+rng.IntN(3)) }},
		{"tiny", func(rng *rand.Rand) ([]float64, []int64) { return clusteredGas(rng, 1+rng.IntN(12)) }},
	}
}

var testBoxes = []Box{
	{},
	{Size: [3]float64{1, 1, 1}},
	{Size: [3]float64{1, 0, 1}},
	{Size: [3]float64{0.75, 1.5, 0.5}},
}

// TestFindersAgreeWithReferences checks that Tree and HostLists return exactly what brute force and gonum's k-d tree return:
// same indices, same order (ties by ID), same Dist2 bits.
func TestFindersAgreeWithReferences(t *testing.T) {
	seeds := 4
	if testing.Short() {
		seeds = 2
	}
	for _, kind := range gasKinds(testing.Short()) {
		for bi, box := range testBoxes {
			for seed := 0; seed < seeds; seed++ {
				rng := rand.New(rand.NewPCG(uint64(seed), uint64(bi)))
				pos, ids := kind.make(rng)
				n := len(ids)
				brute := &bruteFinder{box, pos, ids}
				gon := newGonumFinder(pos, ids, box)
				tree, err := NewTree(pos, ids, box)
				require.NoError(t, err)
				queries := queryPoints(rng, box, 20)
				const reach = 0.45
				offsets, indices := hostRows(rng, brute, queries, reach)
				host, err := NewHostLists(pos, ids, box, offsets, indices)
				require.NoError(t, err)

				var want, got []Neighbor
				for s, qp := range queries {
					q := Query{Pos: qp, Star: s}
					ctx := fmt.Sprintf("%s box=%v seed=%d q=%v", kind.name, box.Size, seed, qp)
					k := 1 + rng.IntN(min(n, 64))
					if s%7 == 0 {
						k = n
					}
					want, err = brute.Nearest(q, k, want)
					require.NoError(t, err)
					for _, f := range []struct {
						name string
						f    Finder
					}{{"tree", tree}, {"gonum", gon}} {
						got, err = f.f.Nearest(q, k, got)
						require.NoError(t, err)
						requireSame(t, want, got, "%s nearest k=%d %s", f.name, k, ctx)
					}
					if want[k-1].Dist2 <= reach*reach && k <= offsets[s+1]-offsets[s] {
						got, err = host.Nearest(q, k, got)
						require.NoError(t, err)
						requireSame(t, want, got, "host nearest k=%d %s", k, ctx)
					}

					r := reach * rng.Float64()
					if s%5 == 0 { // exactly on a lattice distance
						r = math.Sqrt(want[k/2].Dist2)
					}
					want, err = brute.Within(q, r, want)
					require.NoError(t, err)
					for _, f := range []struct {
						name string
						f    Finder
					}{{"tree", tree}, {"gonum", gon}, {"host", host}} {
						if f.name == "host" && r > reach {
							continue
						}
						got, err = f.f.Within(q, r, got)
						require.NoError(t, err)
						requireSame(t, want, got, "%s within r=%v %s", f.name, r, ctx)
					}
				}
			}
		}
	}
}

// TestSelectionIndependentOfInputOrder: the same gas given in another order
// yields the same IDs in the same order.
func TestSelectionIndependentOfInputOrder(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	box := Box{Size: [3]float64{1, 1, 1}}
	pos, ids := latticeGas(rng, 6)
	perm := rng.Perm(len(ids))
	pos2, ids2 := make([]float64, len(pos)), make([]int64, len(ids))
	for i, p := range perm {
		copy(pos2[3*i:3*i+3], pos[3*p:3*p+3])
		ids2[i] = ids[p]
	}
	builders := map[string]func(pos []float64, ids []int64) (Finder, error){
		"tree": func(p []float64, i []int64) (Finder, error) { return NewTree(p, i, box) },
	}
	for name, build := range builders {
		a, err := build(pos, ids)
		require.NoError(t, err)
		b, err := build(pos2, ids2)
		require.NoError(t, err)
		for _, qp := range queryPoints(rng, box, 10) {
			na, err := a.Nearest(Query{Pos: qp}, 30, nil)
			require.NoError(t, err)
			nb, err := b.Nearest(Query{Pos: qp}, 30, nil)
			require.NoError(t, err)
			for i := range na {
				require.Equal(t, ids[na[i].Index], ids2[nb[i].Index], "%s at %v, rank %d", name, qp, i)
				require.Equal(t, na[i].Dist2, nb[i].Dist2)
			}
		}
	}
}

// TestTreeRebuild: a rebuilt tree answers like a fresh one, and rebuilding
// on a gas set that did not grow allocates nothing.
func TestTreeRebuild(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	box := Box{Size: [3]float64{1, 1, 1}}
	pos1, ids1 := uniformGas(rng, 500)
	pos2, ids2 := clusteredGas(rng, 500)
	pos3, ids3 := latticeGas(rng, 5) // 125: smaller
	tree, err := NewTree(pos1, ids1, box)
	require.NoError(t, err)
	for _, gas := range []struct {
		pos []float64
		ids []int64
	}{{pos2, ids2}, {pos3, ids3}, {pos1, ids1}} {
		require.NoError(t, tree.Rebuild(gas.pos, gas.ids))
		brute := &bruteFinder{box, gas.pos, gas.ids}
		for _, qp := range queryPoints(rng, box, 5) {
			want, err := brute.Nearest(Query{Pos: qp}, 20, nil)
			require.NoError(t, err)
			got, err := tree.Nearest(Query{Pos: qp}, 20, nil)
			require.NoError(t, err)
			requireSame(t, want, got, "after rebuild at %v", qp)
		}
	}
	allocs := testing.AllocsPerRun(5, func() {
		if err := tree.Rebuild(pos2, ids2); err != nil {
			t.Fatal(err)
		}
	})
	require.Zero(t, allocs, "Rebuild on a gas set that did not grow")

	// A failed rebuild leaves the previous tree in service.
	bad := append([]float64(nil), pos3...)
	bad[7] = math.NaN()
	require.ErrorIs(t, tree.Rebuild(bad, ids3), ErrInvalid)
	want, err := (&bruteFinder{box, pos2, ids2}).Nearest(Query{Pos: [3]float64{0.5, 0.5, 0.5}}, 10, nil)
	require.NoError(t, err)
	got, err := tree.Nearest(Query{Pos: [3]float64{0.5, 0.5, 0.5}}, 10, nil)
	require.NoError(t, err)
	requireSame(t, want, got, "after failed rebuild")
}

// TestQueriesAllocateNothing: with a buf of enough capacity, Tree and
// HostLists queries allocate nothing.
func TestQueriesAllocateNothing(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	box := Box{Size: [3]float64{1, 1, 1}}
	pos, ids := uniformGas(rng, 2000)
	tree, err := NewTree(pos, ids, box)
	require.NoError(t, err)
	all := make([]int, len(ids))
	for i := range all {
		all[i] = i
	}
	host, err := NewHostLists(pos, ids, box, []int{0, len(all)}, all)
	require.NoError(t, err)
	buf := make([]Neighbor, 0, len(ids))
	q := Query{Pos: [3]float64{0.01, 0.5, 0.99}}
	for name, f := range map[string]Finder{"tree": tree, "host": host} {
		require.Zero(t, testing.AllocsPerRun(20, func() { buf, _ = f.Nearest(q, 48, buf) }), name+" nearest")
		require.Len(t, buf, 48)
		require.Zero(t, testing.AllocsPerRun(20, func() { buf, _ = f.Within(q, 0.2, buf) }), name+" within")
		require.NotEmpty(t, buf)
	}
}
