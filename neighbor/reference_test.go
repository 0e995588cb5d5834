package neighbor

import (
	"cmp"
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/spatial/kdtree"
)

// bruteFinder is the reference: every gas element, Box.Dist2, full sort.
type bruteFinder struct {
	box Box
	pos []float64
	ids []int64
}

func (b *bruteFinder) all(q Query, buf []Neighbor) ([]Neighbor, error) {
	qp, err := b.box.checkQueryPos(q.Pos)
	if err != nil {
		return buf[:0], err
	}
	out := buf[:0]
	for i := range b.ids {
		out = append(out, Neighbor{i, b.box.Dist2(qp, [3]float64{b.pos[3*i], b.pos[3*i+1], b.pos[3*i+2]})})
	}
	slices.SortFunc(out, func(x, y Neighbor) int {
		return cmp.Or(cmp.Compare(x.Dist2, y.Dist2), cmp.Compare(b.ids[x.Index], b.ids[y.Index]))
	})
	return out, nil
}

func (b *bruteFinder) Nearest(q Query, k int, buf []Neighbor) ([]Neighbor, error) {
	if err := checkK(k, len(b.ids)); err != nil {
		return buf[:0], err
	}
	out, err := b.all(q, buf)
	if err != nil {
		return out, err
	}
	return out[:k], nil
}

func (b *bruteFinder) Within(q Query, r float64, buf []Neighbor) ([]Neighbor, error) {
	r2, err := checkRadius(r)
	if err != nil {
		return buf[:0], err
	}
	out, err := b.all(q, buf)
	if err != nil {
		return out, err
	}
	n := 0
	for n < len(out) && out[n].Dist2 <= r2 {
		n++
	}
	return out[:n], nil
}

// gonumFinder answers queries with gonum's spatial/kdtree, built on its own
// Points type, as an independent reference. gonum knows no periodic boxes
// and no IDs: the candidates it returns are found again by their coordinates
// (all elements sharing a position are expanded), scored with Box.Dist2 and
// ordered by (Dist2, ID). In a periodic box the shifted images of the query
// are searched where the search ball crosses a face.
type gonumFinder struct {
	box   Box
	pos   []float64
	ids   []int64
	tree  *kdtree.Tree
	byPos map[[3]float64][]int
}

func newGonumFinder(pos []float64, ids []int64, box Box) *gonumFinder {
	g := &gonumFinder{box: box, pos: pos, ids: ids, byPos: map[[3]float64][]int{}}
	pts := make(kdtree.Points, len(ids))
	for i := range ids {
		w := box.Wrap([3]float64{pos[3*i], pos[3*i+1], pos[3*i+2]})
		pts[i] = kdtree.Point{w[0], w[1], w[2]}
		g.byPos[w] = append(g.byPos[w], i)
	}
	g.tree = kdtree.New(pts, false)
	return g
}

// shifts lists the image offsets of qp whose ball of radius d reaches into
// the box across a face.
func (g *gonumFinder) shifts(qp [3]float64, d float64) [][3]float64 {
	var opts [3][]float64
	for a := 0; a < 3; a++ {
		opts[a] = []float64{0}
		if L := g.box.Size[a]; L > 0 {
			if qp[a]-d <= 0 {
				opts[a] = append(opts[a], L)
			}
			if qp[a]+d >= L {
				opts[a] = append(opts[a], -L)
			}
		}
	}
	var out [][3]float64
	for _, x := range opts[0] {
		for _, y := range opts[1] {
			for _, z := range opts[2] {
				out = append(out, [3]float64{x, y, z})
			}
		}
	}
	return out
}

// collect turns the coordinates gonum returned into (Dist2, ID)-sorted
// neighbors, each gas element once.
func (g *gonumFinder) collect(qp [3]float64, found map[[3]float64]bool, buf []Neighbor) []Neighbor {
	out := buf[:0]
	for w := range found {
		for _, i := range g.byPos[w] {
			out = append(out, Neighbor{i, g.box.Dist2(qp, w)})
		}
	}
	slices.SortFunc(out, func(x, y Neighbor) int {
		return cmp.Or(cmp.Compare(x.Dist2, y.Dist2), cmp.Compare(g.ids[x.Index], g.ids[y.Index]))
	})
	return out
}

func (g *gonumFinder) radiusSearch(qp [3]float64, d float64, found map[[3]float64]bool) {
	// Slightly widened: gonum's squared Euclidean distances to shifted
	// images are rounded differently from Box.Dist2; the final order is
	// decided on Box.Dist2 only.
	d = d*(1+1e-9) + 1e-12
	for _, s := range g.shifts(qp, d) {
		keep := kdtree.NewDistKeeper(d * d)
		g.tree.NearestSet(keep, kdtree.Point{qp[0] + s[0], qp[1] + s[1], qp[2] + s[2]})
		for _, c := range keep.Heap {
			if c.Comparable != nil {
				p := c.Comparable.(kdtree.Point)
				found[[3]float64{p[0], p[1], p[2]}] = true
			}
		}
	}
}

func (g *gonumFinder) Nearest(q Query, k int, buf []Neighbor) ([]Neighbor, error) {
	if err := checkK(k, len(g.ids)); err != nil {
		return buf[:0], err
	}
	qp, err := g.box.checkQueryPos(q.Pos)
	if err != nil {
		return buf[:0], err
	}
	// The k nearest of the unshifted query bound the k-th minimum-image
	// distance from above; every element within that bound is then found
	// by radius searches (on images where needed) and ordered exactly.
	keep := kdtree.NewNKeeper(k)
	g.tree.NearestSet(keep, kdtree.Point{qp[0], qp[1], qp[2]})
	d := 0.0
	for _, c := range keep.Heap {
		if c.Comparable != nil {
			d = max(d, math.Sqrt(c.Dist))
		}
	}
	found := map[[3]float64]bool{}
	g.radiusSearch(qp, d, found)
	return g.collect(qp, found, buf)[:k], nil
}

func (g *gonumFinder) Within(q Query, r float64, buf []Neighbor) ([]Neighbor, error) {
	r2, err := checkRadius(r)
	if err != nil {
		return buf[:0], err
	}
	qp, err := g.box.checkQueryPos(q.Pos)
	if err != nil {
		return buf[:0], err
	}
	found := map[[3]float64]bool{}
	g.radiusSearch(qp, r, found)
	out := g.collect(qp, found, buf)
	n := 0
	for n < len(out) && out[n].Dist2 <= r2 {
		n++
	}
	return out[:n], nil
}

// Gas sets for the property tests.

// uniformGas: n elements uniform in [0, 1)^3 with shuffled, sparse IDs.
func uniformGas(rng *rand.Rand, n int) ([]float64, []int64) {
	pos := make([]float64, 3*n)
	for i := range pos {
		pos[i] = rng.Float64()
	}
	return pos, shuffledIDs(rng, n)
}

// clusteredGas: most elements in a few tight Gaussian clumps (widths down
// to 1e-4), the rest uniform; a few exact duplicate positions.
func clusteredGas(rng *rand.Rand, n int) ([]float64, []int64) {
	pos := make([]float64, 3*n)
	centers := [][3]float64{{0.2, 0.3, 0.4}, {0.99, 0.01, 0.5}, {0.7, 0.7, 0.05}}
	widths := []float64{1e-2, 1e-3, 1e-4}
	for i := 0; i < n; i++ {
		if rng.IntN(5) == 0 {
			for a := 0; a < 3; a++ {
				pos[3*i+a] = rng.Float64()
			}
			continue
		}
		c := rng.IntN(len(centers))
		for a := 0; a < 3; a++ {
			pos[3*i+a] = centers[c][a] + widths[c]*rng.NormFloat64()
		}
	}
	for d := 0; d < n/10; d++ { // duplicate positions
		i, j := rng.IntN(n), rng.IntN(n)
		copy(pos[3*i:3*i+3], pos[3*j:3*j+3])
	}
	return pos, shuffledIDs(rng, n)
}

// latticeGas: m^3 points on a cubic lattice of spacing 1/m (many exact
// distance ties), in shuffled order.
func latticeGas(rng *rand.Rand, m int) ([]float64, []int64) {
	n := m * m * m
	pos := make([]float64, 0, 3*n)
	for i := 0; i < m; i++ {
		for j := 0; j < m; j++ {
			for l := 0; l < m; l++ {
				pos = append(pos, float64(i)/float64(m), float64(j)/float64(m), float64(l)/float64(m))
			}
		}
	}
	perm := rng.Perm(n)
	shuffled := make([]float64, 3*n)
	for i, p := range perm {
		copy(shuffled[3*i:3*i+3], pos[3*p:3*p+3])
	}
	return shuffled, shuffledIDs(rng, n)
}

func shuffledIDs(rng *rand.Rand, n int) []int64 {
	ids := make([]int64, n)
	for i, p := range rng.Perm(n) {
		ids[i] = int64(3*p + 1000)
	}
	return ids
}
