package neighbor

import (
	"fmt"
)

// HostLists is a Finder on neighbor lists the host code already has, in
// compressed rows: the candidates of star s are indices[offsets[s]:offsets[s+1]]
// into the gas arrays. The row is chosen by Query.Star; distances are
// computed from the gas positions with Box.Dist2 around Query.Pos, so results
// match those of a spatial finder restricted to the row. Nearest returns the
// k nearest of the row, Within the members of the row within r.
//
// The gas positions and IDs are read in place, not copied: the caller must
// not change them while HostLists is in use. Queries allocate nothing once
// buf has capacity and are safe to run concurrently.
type HostLists struct {
	box     Box
	pos     []float64
	ids     []int64
	offsets []int
	indices []int
	seen    idScratch
	mark    []int
}

// NewHostLists validates the gas (3n interleaved coordinates, n unique IDs)
// and the rows: offsets has one entry per star plus one, starts at 0, never
// decreases and ends at len(indices); every index lies in [0, n) and no row
// names the same element twice.
func NewHostLists(pos []float64, ids []int64, box Box, offsets, indices []int) (*HostLists, error) {
	h := &HostLists{}
	if err := h.Reset(pos, ids, box, offsets, indices); err != nil {
		return nil, err
	}
	return h, nil
}

// Reset points h at new gas and rows, validated as NewHostLists does, and
// reuses h's scratch so a host that hands over its lists every step
// allocates nothing once the gas stops growing. A failed Reset leaves h as
// it was.
func (h *HostLists) Reset(pos []float64, ids []int64, box Box, offsets, indices []int) error {
	n, err := checkGas(pos, ids, box, &h.seen)
	if err != nil {
		return fmt.Errorf("neighbor: host lists: %w", err)
	}
	if len(offsets) == 0 {
		return fmt.Errorf("neighbor: host lists: offsets is empty, want one entry per star plus one: %w", ErrInvalid)
	}
	if offsets[0] != 0 {
		return fmt.Errorf("neighbor: host lists: offsets[0] = %d, want 0: %w", offsets[0], ErrInvalid)
	}
	if last := offsets[len(offsets)-1]; last != len(indices) {
		return fmt.Errorf("neighbor: host lists: last offset %d, want len(indices) = %d: %w", last, len(indices), ErrInvalid)
	}
	// mark holds, per element, the last row (plus one) that named it.
	if cap(h.mark) < n {
		h.mark = make([]int, n)
	}
	mark := h.mark[:n]
	clear(mark)
	for s := 0; s+1 < len(offsets); s++ {
		if offsets[s+1] < offsets[s] {
			return fmt.Errorf("neighbor: host lists: offsets[%d] = %d < offsets[%d] = %d: %w", s+1, offsets[s+1], s, offsets[s], ErrInvalid)
		}
		for _, i := range indices[offsets[s]:offsets[s+1]] {
			if i < 0 || i >= n {
				return fmt.Errorf("neighbor: host lists: row %d names gas index %d, want [0, %d): %w", s, i, n, ErrInvalid)
			}
			if mark[i] == s+1 {
				return fmt.Errorf("neighbor: host lists: row %d names gas index %d twice: %w", s, i, ErrInvalid)
			}
			mark[i] = s + 1
		}
	}
	h.box, h.pos, h.ids, h.offsets, h.indices = box, pos, ids, offsets, indices
	return nil
}

// Stars returns the number of rows.
func (h *HostLists) Stars() int { return len(h.offsets) - 1 }

func (h *HostLists) row(q Query) ([]int, error) {
	if q.Star < 0 || q.Star >= len(h.offsets)-1 {
		return nil, fmt.Errorf("query star %d, want [0, %d): %w", q.Star, len(h.offsets)-1, ErrInvalid)
	}
	return h.indices[h.offsets[q.Star]:h.offsets[q.Star+1]], nil
}

// Count returns the length of the star's row.
func (h *HostLists) Count(q Query) (int, error) {
	row, err := h.row(q)
	if err != nil {
		return 0, fmt.Errorf("neighbor: host lists count: %w", err)
	}
	return len(row), nil
}

func (h *HostLists) dist2(qp [3]float64, i int) float64 {
	return h.box.Dist2(qp, [3]float64{h.pos[3*i], h.pos[3*i+1], h.pos[3*i+2]})
}

// Nearest returns the k nearest members of row q.Star to q.Pos in
// (Dist2, ID) order; an error wrapping ErrTooFew if the row is shorter
// than k.
func (h *HostLists) Nearest(q Query, k int, buf []Neighbor) ([]Neighbor, error) {
	row, err := h.row(q)
	if err != nil {
		return buf[:0], fmt.Errorf("neighbor: host lists nearest: %w", err)
	}
	if err := checkK(k, len(row)); err != nil {
		return buf[:0], fmt.Errorf("neighbor: host lists nearest, star %d: %w", q.Star, err)
	}
	qp, err := h.box.checkQueryPos(q.Pos)
	if err != nil {
		return buf[:0], fmt.Errorf("neighbor: host lists nearest: %w", err)
	}
	heap := growBuf(buf, k)
	for _, i := range row {
		heap = keepNearest(heap, k, Neighbor{i, h.dist2(qp, i)}, h.ids)
	}
	heapSortAscending(heap, h.ids)
	return heap, nil
}

// Within returns the members of row q.Star with Dist2 <= r*r from q.Pos in
// (Dist2, ID) order.
func (h *HostLists) Within(q Query, r float64, buf []Neighbor) ([]Neighbor, error) {
	row, err := h.row(q)
	if err != nil {
		return buf[:0], fmt.Errorf("neighbor: host lists within: %w", err)
	}
	r2, err := checkRadius(r)
	if err != nil {
		return buf[:0], fmt.Errorf("neighbor: host lists within: %w", err)
	}
	qp, err := h.box.checkQueryPos(q.Pos)
	if err != nil {
		return buf[:0], fmt.Errorf("neighbor: host lists within: %w", err)
	}
	out := buf[:0]
	for _, i := range row {
		if d2 := h.dist2(qp, i); d2 <= r2 {
			out = append(out, Neighbor{i, d2})
		}
	}
	sortNeighbors(out, h.ids)
	return out, nil
}
