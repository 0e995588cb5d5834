package neighbor

import (
	"fmt"
	"math"
	"slices"
)

// checkGas validates a gas set given as flat interleaved positions
// (x0, y0, z0, x1, ...) and one ID per element, and returns n. scratch is
// reusable memory for the uniqueness check; the possibly grown scratch is
// returned for the next call.
func checkGas(pos []float64, ids []int64, box Box, scratch *idScratch) (int, error) {
	if err := box.Validate(); err != nil {
		return 0, err
	}
	n := len(ids)
	if len(pos) != 3*n {
		return 0, fmt.Errorf("gas positions have %d values for %d IDs, want 3 per element: %w", len(pos), n, ErrInvalid)
	}
	if n == 0 {
		return 0, fmt.Errorf("gas set is empty: %w", ErrInvalid)
	}
	if n > math.MaxInt32 {
		return 0, fmt.Errorf("gas set has %d elements, at most %d supported: %w", n, math.MaxInt32, ErrInvalid)
	}
	for i, x := range pos {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return 0, fmt.Errorf("gas element %d (ID %d): coordinate %d is %v: %w", i/3, ids[i/3], i%3, x, ErrInvalid)
		}
	}
	if err := scratch.checkUnique(ids); err != nil {
		return 0, err
	}
	return n, nil
}

// idScratch holds reusable memory for checking that IDs are unique: a bit
// set when the IDs span a range not much wider than their count (the usual
// case: IDs are a permutation of a range), a sorted copy otherwise.
type idScratch struct {
	bits   []uint64
	sorted []int64
}

func (s *idScratch) checkUnique(ids []int64) error {
	lo, hi := ids[0], ids[0]
	for _, id := range ids {
		lo = min(lo, id)
		hi = max(hi, id)
	}
	span := uint64(hi) - uint64(lo) // exact for any int64 pair with hi >= lo
	if span < 8*uint64(len(ids)) {
		words := int(span/64) + 1
		if cap(s.bits) < words {
			s.bits = make([]uint64, words)
		}
		bits := s.bits[:words]
		clear(bits)
		for _, id := range ids {
			off := uint64(id) - uint64(lo)
			w, m := off/64, uint64(1)<<(off%64)
			if bits[w]&m != 0 {
				return fmt.Errorf("gas ID %d appears more than once; IDs must be unique for the tie order: %w", id, ErrInvalid)
			}
			bits[w] |= m
		}
		return nil
	}
	if cap(s.sorted) < len(ids) {
		s.sorted = make([]int64, len(ids))
	}
	sorted := s.sorted[:len(ids)]
	copy(sorted, ids)
	slices.Sort(sorted)
	for i := 1; i < len(sorted); i++ {
		if sorted[i] == sorted[i-1] {
			return fmt.Errorf("gas ID %d appears more than once; IDs must be unique for the tie order: %w", sorted[i], ErrInvalid)
		}
	}
	return nil
}
