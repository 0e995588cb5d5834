package neighbor

import (
	"fmt"
	"math"
	"math/bits"
	"slices"
)

// treeLeafSize is the most gas elements a leaf holds, chosen with
// BenchmarkNearest (k = 48; figures in doc.go).
const treeLeafSize = 16

// treePoint is one gas element in tree order: its wrapped position and its
// index in the caller's arrays.
type treePoint struct {
	p    [3]float64
	orig int
}

// treeNode is the tight bounding box of a contiguous run of tree points.
type treeNode struct {
	lo, hi     [3]float64
	begin, end int32
}

// Tree is the default Finder: a balanced k-d tree over flat arrays. Nodes
// live in one slice in heap order (children of node i are 2i and 2i+1), every
// leaf sits at the same depth and holds at most treeLeafSize elements, and
// the gas is stored in tree order so a leaf is a contiguous run of memory.
// Each node keeps the tight bounding box of its elements, which is what lets
// the search skip empty space in strongly clustered gas.
//
// Build splits each node at its median along the widest axis of its bounding
// box (quickselect on the flat arrays), O(n log n) in total. Queries keep
// their state in the caller's buf (Nearest keeps its k best so far there,
// sorted) and a fixed-size stack array, so a built Tree is safe for any number
// of concurrent queries and a query allocates nothing once buf has capacity.
type Tree struct {
	box   Box
	half  [3]float64 // L/2 per axis, 0 on open axes
	slack [3]float64 // absolute slack on wrapped gaps, see axisGap
	pts   []treePoint
	ids   []int64 // gas IDs in tree order
	nodes []treeNode
	first int // index of the first leaf node
	seen  idScratch
}

// NewTree builds a Tree on n gas elements: pos holds 3n interleaved
// coordinates (x0, y0, z0, x1, ...) and ids one unique ID per element. On
// periodic axes the positions are wrapped into [0, L) inside the tree; the
// caller's slices are read, never kept or modified.
func NewTree(pos []float64, ids []int64, box Box) (*Tree, error) {
	if err := box.Validate(); err != nil {
		return nil, fmt.Errorf("neighbor: building tree: %w", err)
	}
	t := &Tree{box: box}
	for a, L := range box.Size {
		t.half[a] = 0.5 * L
		// A few ulps of L: covers rounding in the wrapped gap, which is
		// formed in a different order than the point separations.
		t.slack[a] = 4e-15 * L
	}
	if err := t.Rebuild(pos, ids); err != nil {
		return nil, err
	}
	return t, nil
}

// Rebuild rebuilds the tree in place on new gas in the same box, reusing
// every array when the gas set has not grown. On an error the previous tree
// is left untouched. Rebuild must not run concurrently with queries.
func (t *Tree) Rebuild(pos []float64, ids []int64) error {
	n, err := checkGas(pos, ids, t.box, &t.seen)
	if err != nil {
		return fmt.Errorf("neighbor: building tree: %w", err)
	}
	if cap(t.pts) < n {
		t.pts = make([]treePoint, n)
		t.ids = make([]int64, n)
	}
	t.pts, t.ids = t.pts[:n], t.ids[:n]
	L := t.box.Size
	for i := range t.pts {
		t.pts[i] = treePoint{
			p:    [3]float64{wrap1(pos[3*i], L[0]), wrap1(pos[3*i+1], L[1]), wrap1(pos[3*i+2], L[2])},
			orig: i,
		}
	}
	depth := 0
	for (n+(1<<depth)-1)>>depth > treeLeafSize {
		depth++
	}
	t.first = 1 << depth
	if cap(t.nodes) < 2*t.first {
		t.nodes = make([]treeNode, 2*t.first)
	}
	t.nodes = t.nodes[:2*t.first]
	t.build(1, 0, n)
	for i := range t.pts {
		t.ids[i] = ids[t.pts[i].orig]
	}
	return nil
}

func (t *Tree) build(node, begin, end int) {
	nd := &t.nodes[node]
	nd.begin, nd.end = int32(begin), int32(end)
	first := &t.pts[begin].p
	x0, y0, z0 := first[0], first[1], first[2]
	x1, y1, z1 := x0, y0, z0
	for i := begin + 1; i < end; i++ {
		p := &t.pts[i].p
		if p[0] < x0 {
			x0 = p[0]
		} else if p[0] > x1 {
			x1 = p[0]
		}
		if p[1] < y0 {
			y0 = p[1]
		} else if p[1] > y1 {
			y1 = p[1]
		}
		if p[2] < z0 {
			z0 = p[2]
		} else if p[2] > z1 {
			z1 = p[2]
		}
	}
	lo, hi := [3]float64{x0, y0, z0}, [3]float64{x1, y1, z1}
	nd.lo, nd.hi = lo, hi
	if node >= t.first {
		return
	}
	axis := 0
	for a := 1; a < 3; a++ {
		if hi[a]-lo[a] > hi[axis]-lo[axis] {
			axis = a
		}
	}
	mid := begin + (end-begin)/2
	selectNth(t.pts[begin:end], mid-begin, axis)
	t.build(2*node, begin, mid)
	t.build(2*node+1, mid, end)
}

// selectNth reorders p so that p[nth] holds the element that would be there
// if p were sorted along axis, with no larger element before it and no
// smaller one after (quickselect, median-of-three pivot, Hoare partition).
// After too many rounds it sorts the remaining range, bounding the worst
// case at O(n log n).
func selectNth(p []treePoint, nth, axis int) {
	lo, hi := 0, len(p)-1
	budget := 2*bits.Len(uint(len(p))) + 4
	for hi-lo > 16 {
		if budget == 0 {
			slices.SortFunc(p[lo:hi+1], func(a, b treePoint) int {
				switch {
				case a.p[axis] < b.p[axis]:
					return -1
				case a.p[axis] > b.p[axis]:
					return 1
				}
				return 0
			})
			return
		}
		budget--
		m := lo + (hi-lo)/2
		if p[m].p[axis] < p[lo].p[axis] {
			p[m], p[lo] = p[lo], p[m]
		}
		if p[hi].p[axis] < p[lo].p[axis] {
			p[hi], p[lo] = p[lo], p[hi]
		}
		if p[hi].p[axis] < p[m].p[axis] {
			p[hi], p[m] = p[m], p[hi]
		}
		pivot := p[m].p[axis]
		i, j := lo, hi
		for i <= j {
			for p[i].p[axis] < pivot {
				i++
			}
			for p[j].p[axis] > pivot {
				j--
			}
			if i <= j {
				p[i], p[j] = p[j], p[i]
				i++
				j--
			}
		}
		switch {
		case nth <= j:
			hi = j
		case nth >= i:
			lo = i
		default:
			return // p[j+1 : i] all equal the pivot and hold nth
		}
	}
	for i := lo + 1; i <= hi; i++ {
		for j := i; j > lo && p[j].p[axis] < p[j-1].p[axis]; j-- {
			p[j], p[j-1] = p[j-1], p[j]
		}
	}
}

// Len returns the number of gas elements in the tree.
func (t *Tree) Len() int { return len(t.pts) }

// Box returns the box the tree was built with.
func (t *Tree) Box() Box { return t.box }

// Count returns the number of gas elements any query can reach: all of them.
func (t *Tree) Count(Query) (int, error) { return len(t.pts), nil }

// axisGap is a lower bound on the (minimum-image) separation along one axis
// between q and any coordinate in [lo, hi]. On a periodic axis the way round
// the box is considered too; that gap is computed in a different order from
// a point separation, so it is lowered by slack to stay a bound after
// rounding. Without wrapping, rounding is monotonic and the bound is exact.
func axisGap(q, lo, hi, L, slack float64) float64 {
	if q < lo {
		g := lo - q
		if L > 0 {
			if w := q + L - hi - slack; w < g {
				g = max(w, 0)
			}
		}
		return g
	}
	if q > hi {
		g := q - hi
		if L > 0 {
			if w := lo + L - q - slack; w < g {
				g = max(w, 0)
			}
		}
		return g
	}
	return 0
}

// gap2 is a lower bound on Dist2 from q to any element of node nd.
func (t *Tree) gap2(nd *treeNode, q [3]float64) float64 {
	gx := axisGap(q[0], nd.lo[0], nd.hi[0], t.box.Size[0], t.slack[0])
	gy := axisGap(q[1], nd.lo[1], nd.hi[1], t.box.Size[1], t.slack[1])
	gz := axisGap(q[2], nd.lo[2], nd.hi[2], t.box.Size[2], t.slack[2])
	return float64(gx*gx) + float64(gy*gy) + float64(gz*gz)
}

type treeVisit struct {
	node int
	gap2 float64
}

// Nearest returns the k nearest gas elements to q.Pos in (Dist2, ID) order.
// buf holds the k best found so far, in order, during the search.
func (t *Tree) Nearest(q Query, k int, buf []Neighbor) ([]Neighbor, error) {
	if err := checkK(k, len(t.pts)); err != nil {
		return buf[:0], fmt.Errorf("neighbor: tree nearest: %w", err)
	}
	qp, err := t.box.checkQueryPos(q.Pos)
	if err != nil {
		return buf[:0], fmt.Errorf("neighbor: tree nearest: %w", err)
	}
	h := growBuf(buf, k)
	ids := t.ids
	worst := math.Inf(1)
	var d2 [treeLeafSize]float64
	var stack [64]treeVisit
	sp := 0
	node, gap := 1, 0.0
	for {
		if gap <= worst {
			for node < t.first {
				l, r := 2*node, 2*node+1
				gl, gr := t.gap2(&t.nodes[l], qp), t.gap2(&t.nodes[r], qp)
				if gr < gl {
					l, r, gl, gr = r, l, gr, gl
				}
				if gr <= worst {
					stack[sp] = treeVisit{r, gr}
					sp++
				}
				if gl > worst {
					node = 0
					break
				}
				node = l
			}
			if node != 0 {
				nd := &t.nodes[node]
				n := t.leafDist2(qp, nd, &d2)
				for j := range n {
					if d2[j] > worst {
						continue
					}
					h = keepSorted(h, k, Neighbor{int(nd.begin) + j, d2[j]}, ids)
					if len(h) == k {
						worst = h[k-1].Dist2
					}
				}
			}
		}
		if sp == 0 {
			break
		}
		sp--
		node, gap = stack[sp].node, stack[sp].gap2
	}
	for i := range h {
		h[i].Index = t.pts[h[i].Index].orig
	}
	return h, nil
}

// leafDist2 writes to d2 the squared minimum-image distance from q to each
// element of leaf nd, in tree order, and returns how many it wrote. A
// separation within half the box (always, in an open box) is taken as it
// is. The products are rounded before they are summed (no fused
// multiply-add), so the distances are the same on every platform.
func (t *Tree) leafDist2(q [3]float64, nd *treeNode, d2 *[treeLeafSize]float64) int {
	L, half := &t.box.Size, &t.half
	pts := t.pts[nd.begin:nd.end]
	for j := range pts {
		p := &pts[j].p
		dx, dy, dz := q[0]-p[0], q[1]-p[1], q[2]-p[2]
		if dx > half[0] || dx < -half[0] {
			dx = minImage1(dx, L[0], half[0])
		}
		if dy > half[1] || dy < -half[1] {
			dy = minImage1(dy, L[1], half[1])
		}
		if dz > half[2] || dz < -half[2] {
			dz = minImage1(dz, L[2], half[2])
		}
		d2[j] = float64(dx*dx) + float64(dy*dy) + float64(dz*dz)
	}
	return len(pts)
}

// Within returns every gas element with Dist2 <= r*r from q.Pos in
// (Dist2, ID) order.
func (t *Tree) Within(q Query, r float64, buf []Neighbor) ([]Neighbor, error) {
	r2, err := checkRadius(r)
	if err != nil {
		return buf[:0], fmt.Errorf("neighbor: tree within: %w", err)
	}
	qp, err := t.box.checkQueryPos(q.Pos)
	if err != nil {
		return buf[:0], fmt.Errorf("neighbor: tree within: %w", err)
	}
	out := buf[:0]
	var d2 [treeLeafSize]float64
	var stack [64]int
	stack[0] = 1
	sp := 1
	for sp > 0 {
		sp--
		node := stack[sp]
		nd := &t.nodes[node]
		if t.gap2(nd, qp) > r2 {
			continue
		}
		if node < t.first {
			stack[sp], stack[sp+1] = 2*node+1, 2*node
			sp += 2
			continue
		}
		n := t.leafDist2(qp, nd, &d2)
		for j := range n {
			if d2[j] <= r2 {
				out = append(out, Neighbor{int(nd.begin) + j, d2[j]})
			}
		}
	}
	sortNeighbors(out, t.ids)
	for i := range out {
		out[i].Index = t.pts[out[i].Index].orig
	}
	return out, nil
}
