package neighbor

// Neighbor is one gas element found around a query point: its index in the
// gas arrays the finder was built on, and its squared (minimum-image)
// distance from the query point.
type Neighbor struct {
	Index int
	Dist2 float64
}

// Query is a search around one star. Pos is the centre; Star is the star's
// index in the caller's batch, used by finders that hold a precomputed list
// per star (host-supplied lists) and ignored by spatial finders.
type Query struct {
	Pos  [3]float64
	Star int
}

// Finder finds the gas around a point. Results are sorted by distance, ties
// broken by gas ID, so the selection does not depend on input order. Both
// queries write into buf (grown only if too small) and return the filled
// slice; once buf is large enough they allocate nothing. Implementations are
// safe for concurrent queries once built.
type Finder interface {
	// Nearest returns the k nearest gas elements to q.
	Nearest(q Query, k int, buf []Neighbor) ([]Neighbor, error)
	// Within returns every gas element with distance <= r from q.
	Within(q Query, r float64, buf []Neighbor) ([]Neighbor, error)
}

// Box is a periodic domain [0, L) on each axis. The zero Box is open (no
// periodicity).
type Box struct {
	Size [3]float64
}

// Periodic reports whether the box wraps.
func (b Box) Periodic() bool { return b.Size[0] > 0 || b.Size[1] > 0 || b.Size[2] > 0 }

// MinImage maps a separation vector to its nearest periodic image.
func (b Box) MinImage(d [3]float64) [3]float64 {
	for a := 0; a < 3; a++ {
		L := b.Size[a]
		if L <= 0 {
			continue
		}
		if d[a] > 0.5*L {
			d[a] -= L * float64(int((d[a]+0.5*L)/L))
		} else if d[a] < -0.5*L {
			d[a] += L * float64(int((-d[a]+0.5*L)/L))
		}
	}
	return d
}
