// Package kyroyfinder is a neighbor.Finder on github.com/kyroy/kdtree, kept
// as a comparator for package neighbor's default Tree: it returns exactly
// what Tree returns (same elements, same order, same distance bits) but is
// 30-50x slower per query (neighbor's package doc has the figures). Only
// tests, benchmarks and comparison tools import it; the library and its C
// ABI do not link kyroy.
package kyroyfinder

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"github.com/kyroy/kdtree"
	"github.com/kyroy/kdtree/kdrange"

	"github.com/ejecta-dev/ejecta/neighbor"
)

// Finder is a neighbor.Finder on github.com/kyroy/kdtree. kyroy knows neither periodic boxes nor IDs, so each
// query runs in two stages: kyroy's k nearest of the wrapped query point
// give an upper bound on the k-th minimum-image distance; kyroy range
// searches then collect every element inside that bound, over the shifted
// images of the search box where it crosses a periodic face, and the
// candidates are scored with neighbor.Box.Dist2 and put in (Dist2, ID) order. Results
// are therefore exactly those of neighbor.Tree.
//
// kyroy allocates on every query (its results are fresh slices); the
// neighbors are still written into the caller's buf. Safe for concurrent
// queries once built: kyroy's searches only read the tree.
type Finder struct {
	box  neighbor.Box
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

// New builds a Finder on n gas elements given as 3n interleaved
// coordinates and n unique IDs. The caller's slices are copied. Bad input
// is refused as neighbor.NewTree refuses it (errors wrap
// neighbor.ErrInvalid).
func New(pos []float64, ids []int64, box neighbor.Box) (*Finder, error) {
	n, err := checkGas(pos, ids, box)
	if err != nil {
		return nil, fmt.Errorf("kyroy finder: %w", err)
	}
	f := &Finder{box: box, pts: make([]kyroyPoint, n), ids: append([]int64(nil), ids...)}
	points := make([]kdtree.Point, n)
	for i := range f.pts {
		f.pts[i] = kyroyPoint{box.Wrap([3]float64{pos[3*i], pos[3*i+1], pos[3*i+2]}), i}
		points[i] = &f.pts[i]
	}
	f.tree = kdtree.New(points)
	return f, nil
}

// Count returns the number of gas elements any query can reach: all of them.
func (f *Finder) Count(neighbor.Query) (int, error) { return len(f.pts), nil }

// Nearest returns the k nearest gas elements to q.Pos in (Dist2, ID) order.
func (f *Finder) Nearest(q neighbor.Query, k int, buf []neighbor.Neighbor) ([]neighbor.Neighbor, error) {
	if err := checkK(k, len(f.pts)); err != nil {
		return buf[:0], fmt.Errorf("kyroy nearest: %w", err)
	}
	qp, err := checkQueryPos(f.box, q.Pos)
	if err != nil {
		return buf[:0], fmt.Errorf("kyroy nearest: %w", err)
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
	f.sort(out)
	return out[:k], nil
}

// Within returns every gas element with Dist2 <= r*r from q.Pos in
// (Dist2, ID) order.
func (f *Finder) Within(q neighbor.Query, r float64, buf []neighbor.Neighbor) ([]neighbor.Neighbor, error) {
	r2, err := checkRadius(r)
	if err != nil {
		return buf[:0], fmt.Errorf("kyroy within: %w", err)
	}
	qp, err := checkQueryPos(f.box, q.Pos)
	if err != nil {
		return buf[:0], fmt.Errorf("kyroy within: %w", err)
	}
	all := f.collect(qp, r, buf)
	out := all[:0]
	for _, nb := range all {
		if nb.Dist2 <= r2 {
			out = append(out, nb)
		}
	}
	f.sort(out)
	return out, nil
}

// collect appends to buf[:0] every element in the (periodic) cube of half
// side r around qp, widened a little against rounding, with its Dist2.
func (f *Finder) collect(qp [3]float64, r float64, buf []neighbor.Neighbor) []neighbor.Neighbor {
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
					out = append(out, neighbor.Neighbor{Index: kp.index, Dist2: f.box.Dist2(qp, kp.p)})
				}
			}
		}
	}
	return out
}

// sort puts neighbors in (Dist2, ID) order, the order of every Finder.
func (f *Finder) sort(nb []neighbor.Neighbor) {
	slices.SortFunc(nb, func(a, b neighbor.Neighbor) int {
		if c := cmp.Compare(a.Dist2, b.Dist2); c != 0 {
			return c
		}
		return cmp.Compare(f.ids[a.Index], f.ids[b.Index])
	})
}

// checkGas refuses what neighbor.NewTree refuses: a bad box, mismatched
// lengths, no gas, non-finite positions, duplicate IDs.
func checkGas(pos []float64, ids []int64, box neighbor.Box) (int, error) {
	if err := box.Validate(); err != nil {
		return 0, err
	}
	n := len(ids)
	if len(pos) != 3*n || n == 0 {
		return 0, fmt.Errorf("%d position values for %d IDs, want 3 per element and at least one: %w", len(pos), n, neighbor.ErrInvalid)
	}
	for i, x := range pos {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return 0, fmt.Errorf("gas element %d: coordinate %d is %v: %w", i/3, i%3, x, neighbor.ErrInvalid)
		}
	}
	seen := make(map[int64]bool, n)
	for _, id := range ids {
		if seen[id] {
			return 0, fmt.Errorf("gas ID %d appears twice: %w", id, neighbor.ErrInvalid)
		}
		seen[id] = true
	}
	return n, nil
}

// checkK refuses k outside [1, avail].
func checkK(k, avail int) error {
	if k <= 0 {
		return fmt.Errorf("k = %d: want k >= 1: %w", k, neighbor.ErrInvalid)
	}
	if k > avail {
		return fmt.Errorf("k = %d but only %d gas elements: %w", k, avail, neighbor.ErrTooFew)
	}
	return nil
}

// checkRadius refuses negative and NaN radii and returns r*r.
func checkRadius(r float64) (float64, error) {
	if math.IsNaN(r) || r < 0 {
		return 0, fmt.Errorf("radius %v: want r >= 0: %w", r, neighbor.ErrInvalid)
	}
	return r * r, nil
}

// checkQueryPos refuses non-finite query positions and wraps the rest.
func checkQueryPos(box neighbor.Box, p [3]float64) ([3]float64, error) {
	for a, x := range p {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return p, fmt.Errorf("query position %v: coordinate %d is not finite: %w", p, a, neighbor.ErrInvalid)
		}
	}
	return box.Wrap(p), nil
}
