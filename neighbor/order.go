package neighbor

// The helpers below keep neighbor lists in (Dist2, ID) order. Index in the
// Neighbor values they see is an index into ids (a finder may use its own
// internal order and map to gas indices afterwards).

// before reports whether a sorts before b: nearer first, equal distances by
// smaller gas ID.
func before(a, b Neighbor, ids []int64) bool {
	return a.Dist2 < b.Dist2 || (a.Dist2 == b.Dist2 && ids[a.Index] < ids[b.Index])
}

// heapPush appends x to the max-heap h (largest (Dist2, ID) on top).
func heapPush(h []Neighbor, x Neighbor, ids []int64) []Neighbor {
	h = append(h, x)
	i := len(h) - 1
	for i > 0 {
		p := (i - 1) / 2
		if !before(h[p], h[i], ids) {
			break
		}
		h[p], h[i] = h[i], h[p]
		i = p
	}
	return h
}

func siftDown(h []Neighbor, i, n int, ids []int64) {
	for {
		l := 2*i + 1
		if l >= n {
			return
		}
		c := l
		if r := l + 1; r < n && before(h[l], h[r], ids) {
			c = r
		}
		if !before(h[i], h[c], ids) {
			return
		}
		h[i], h[c] = h[c], h[i]
		i = c
	}
}

// heapSortAscending turns the max-heap h into ascending (Dist2, ID) order in
// place.
func heapSortAscending(h []Neighbor, ids []int64) {
	for end := len(h) - 1; end > 0; end-- {
		h[0], h[end] = h[end], h[0]
		siftDown(h, 0, end, ids)
	}
}

// sortNeighbors sorts s in ascending (Dist2, ID) order in place without
// allocating: build a max-heap, then heap-sort it.
func sortNeighbors(s []Neighbor, ids []int64) {
	for i := len(s)/2 - 1; i >= 0; i-- {
		siftDown(s, i, len(s), ids)
	}
	heapSortAscending(s, ids)
}

// keepNearest offers x to the bounded max-heap h of capacity k and returns
// the heap. Once h holds k elements, x replaces the top only if it sorts
// before it.
func keepNearest(h []Neighbor, k int, x Neighbor, ids []int64) []Neighbor {
	if len(h) < k {
		return heapPush(h, x, ids)
	}
	if before(x, h[0], ids) {
		replaceTop(h, x, ids)
	}
	return h
}

// replaceTop puts x in place of the top of the max-heap h and restores the
// heap, moving the larger child up into the hole until x fits. Distances
// are compared first; IDs are read only on exact ties.
func replaceTop(h []Neighbor, x Neighbor, ids []int64) {
	n := len(h)
	i := 0
	for {
		c := 2*i + 1
		if c >= n {
			break
		}
		if r := c + 1; r < n && (h[r].Dist2 > h[c].Dist2 || (h[r].Dist2 == h[c].Dist2 && ids[h[r].Index] > ids[h[c].Index])) {
			c = r
		}
		if h[c].Dist2 < x.Dist2 || (h[c].Dist2 == x.Dist2 && ids[h[c].Index] < ids[x.Index]) {
			break
		}
		h[i] = h[c]
		i = c
	}
	h[i] = x
}

// growBuf returns buf[:0] with capacity at least n.
func growBuf(buf []Neighbor, n int) []Neighbor {
	if cap(buf) < n {
		return make([]Neighbor, 0, n)
	}
	return buf[:0]
}

// keepSorted offers x to s, kept in ascending (Dist2, ID) order and bounded
// at k elements: x is inserted at its place (binary search, then a shift)
// if s is not full or x sorts before the last element, which then drops.
func keepSorted(s []Neighbor, k int, x Neighbor, ids []int64) []Neighbor {
	n := len(s)
	if n == k {
		if !before(x, s[n-1], ids) {
			return s
		}
		n--
	} else {
		s = s[:n+1]
	}
	lo, hi := 0, n
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if before(s[m], x, ids) {
			lo = m + 1
		} else {
			hi = m
		}
	}
	copy(s[lo+1:n+1], s[lo:n])
	s[lo] = x
	return s
}
