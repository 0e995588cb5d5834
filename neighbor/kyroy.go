package neighbor

import (
	"fmt"
	"math"

	"github.com/kyroy/kdtree"
	"github.com/kyroy/kdtree/kdrange"
)

// KyroyFinder is a Finder on github.com/kyroy/kdtree, for callers who
// prefer that library. kyroy knows neither periodic boxes nor IDs, so each
// query runs in two stages: kyroy's k nearest of the wrapped query point
// give an upper bound on the k-th minimum-image distance; kyroy range
// searches then collect every element inside that bound, over the shifted
// images of the search box where it crosses a periodic face, and the
// candidates are scored with Box.Dist2 and put in (Dist2, ID) order. Results
// are therefore exactly those of Tree.
//
// kyroy allocates on every query (its results are fresh slices); the
// neighbors are still written into the caller's buf. Safe for concurrent
// queries once built: kyroy's searches only read the tree.
type KyroyFinder struct {
	box  Box
	tree *kdtree.KDTree
	pts  []kyroyPoint
	ids  []int64
}

// kyroyPoint is a wrapped gas position and its index in the caller's arrays.
type kyroyPoint struct {
	p     [3]float64
	index int
}

// Dimensions implements kdtree.Point.
func (p *kyroyPoint) Dimensions() int { return 3 }

// Dimension implements kdtree.Point.
func (p *kyroyPoint) Dimension(i int) float64 { return p.p[i] }

// NewKyroyFinder builds a KyroyFinder on n gas elements given as 3n
// interleaved coordinates and n unique IDs. The caller's slices are copied.
func NewKyroyFinder(pos []float64, ids []int64, box Box) (*KyroyFinder, error) {
	var seen idScratch
	n, err := checkGas(pos, ids, box, &seen)
	if err != nil {
		return nil, fmt.Errorf("neighbor: building kyroy finder: %w", err)
	}
	f := &KyroyFinder{box: box, pts: make([]kyroyPoint, n), ids: append([]int64(nil), ids...)}
	points := make([]kdtree.Point, n)
	for i := range f.pts {
		f.pts[i] = kyroyPoint{box.Wrap([3]float64{pos[3*i], pos[3*i+1], pos[3*i+2]}), i}
		points[i] = &f.pts[i]
	}
	f.tree = kdtree.New(points)
	return f, nil
}

// Count returns the number of gas elements any query can reach: all of them.
func (f *KyroyFinder) Count(Query) (int, error) { return len(f.pts), nil }

// Nearest returns the k nearest gas elements to q.Pos in (Dist2, ID) order.
func (f *KyroyFinder) Nearest(q Query, k int, buf []Neighbor) ([]Neighbor, error) {
	if err := checkK(k, len(f.pts)); err != nil {
		return buf[:0], fmt.Errorf("neighbor: kyroy nearest: %w", err)
	}
	qp, err := f.box.checkQueryPos(q.Pos)
	if err != nil {
		return buf[:0], fmt.Errorf("neighbor: kyroy nearest: %w", err)
	}
	// Any k elements bound the k-th distance from above, and the plain
	// Euclidean distance between wrapped points bounds the minimum-image
	// one, so whatever kyroy returns gives a safe search radius.
	bound := 0.0
	for _, p := range f.tree.KNN(&kyroyPoint{p: qp}, k) {
		w := p.(*kyroyPoint).p
		dx, dy, dz := qp[0]-w[0], qp[1]-w[1], qp[2]-w[2]
		bound = max(bound, math.Sqrt(dx*dx+dy*dy+dz*dz))
	}
	out := f.collect(qp, bound, buf)
	sortNeighbors(out, f.ids)
	return out[:k], nil
}

// Within returns every gas element with Dist2 <= r*r from q.Pos in
// (Dist2, ID) order.
func (f *KyroyFinder) Within(q Query, r float64, buf []Neighbor) ([]Neighbor, error) {
	r2, err := checkRadius(r)
	if err != nil {
		return buf[:0], fmt.Errorf("neighbor: kyroy within: %w", err)
	}
	qp, err := f.box.checkQueryPos(q.Pos)
	if err != nil {
		return buf[:0], fmt.Errorf("neighbor: kyroy within: %w", err)
	}
	all := f.collect(qp, r, buf)
	out := all[:0]
	for _, nb := range all {
		if nb.Dist2 <= r2 {
			out = append(out, nb)
		}
	}
	sortNeighbors(out, f.ids)
	return out, nil
}

// collect appends to buf[:0] every element in the (periodic) cube of half
// side r around qp, widened a little against rounding, with its Dist2.
func (f *KyroyFinder) collect(qp [3]float64, r float64, buf []Neighbor) []Neighbor {
	// Per axis, one or two disjoint intervals inside [0, L) (or one on an
	// open axis) cover the cube side; every combination is one range search.
	var spans [3][2][2]float64
	var count [3]int
	for a := 0; a < 3; a++ {
		L := f.box.Size[a]
		ra := r*(1+1e-9) + 1e-13*(math.Abs(qp[a])+L)
		lo, hi := qp[a]-ra, qp[a]+ra
		switch {
		case L <= 0:
			spans[a][0], count[a] = [2]float64{lo, hi}, 1
		case 2*ra >= L:
			spans[a][0], count[a] = [2]float64{0, L}, 1
		case lo < 0:
			spans[a][0], spans[a][1], count[a] = [2]float64{0, hi}, [2]float64{lo + L, L}, 2
		case hi >= L:
			spans[a][0], spans[a][1], count[a] = [2]float64{lo, L}, [2]float64{0, hi - L}, 2
		default:
			spans[a][0], count[a] = [2]float64{lo, hi}, 1
		}
	}
	out := buf[:0]
	for i := 0; i < count[0]; i++ {
		for j := 0; j < count[1]; j++ {
			for l := 0; l < count[2]; l++ {
				rng := kdrange.Range{spans[0][i], spans[1][j], spans[2][l]}
				for _, p := range f.tree.RangeSearch(rng) {
					kp := p.(*kyroyPoint)
					out = append(out, Neighbor{kp.index, f.box.Dist2(qp, kp.p)})
				}
			}
		}
	}
	return out
}
