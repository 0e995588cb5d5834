package neighbor

import (
	"errors"
	"fmt"
	"math"
)

// Neighbor is one gas element found around a query point: its index in the
// gas arrays the finder was built on, and its squared (minimum-image)
// distance from the query point.
type Neighbor struct {
	Index int
	Dist2 float64
}

// Query is a search around one star. Pos is the center; Star is the star's
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

// Counter is implemented by finders that can tell how many gas elements a
// query can reach: all of them for spatial finders, the star's row for
// host-supplied lists. The adaptive radius helpers use it to report an
// unreachable target instead of probing.
type Counter interface {
	Count(q Query) (int, error)
}

// Errors wrapped by every finder, so callers can tell bad input from a
// request the gas cannot satisfy with errors.Is.
var (
	// ErrInvalid marks malformed input: NaN or infinite positions, bad box
	// sizes, mismatched lengths, duplicate IDs, negative radii, k <= 0.
	ErrInvalid = errors.New("neighbor: invalid input")
	// ErrTooFew marks a request for more gas elements than the query can
	// reach (k larger than the gas set or the star's row).
	ErrTooFew = errors.New("neighbor: not enough gas elements")
	// ErrUnreachable marks an adaptive-radius target the gas cannot meet.
	ErrUnreachable = errors.New("neighbor: target cannot be reached")
)

// Box is a periodic domain [0, L) on each axis. The zero Box is open (no
// periodicity). A zero size leaves that axis open; negative, NaN or
// infinite sizes are rejected by Validate and by every finder constructor.
type Box struct {
	Size [3]float64
}

// Periodic reports whether the box wraps.
func (b Box) Periodic() bool { return b.Size[0] > 0 || b.Size[1] > 0 || b.Size[2] > 0 }

// Validate reports an error wrapping ErrInvalid if a size is negative, NaN
// or infinite.
func (b Box) Validate() error {
	for a, L := range b.Size {
		if math.IsNaN(L) || math.IsInf(L, 0) || L < 0 {
			return fmt.Errorf("box size on axis %d is %v, want a finite value >= 0 (0 = open): %w", a, L, ErrInvalid)
		}
	}
	return nil
}

// MinImage maps a separation vector to its nearest periodic image. On a
// periodic axis the result lies in [-L/2, L/2] (a separation of exactly
// ±L/2 is kept as is); open axes are unchanged.
func (b Box) MinImage(d [3]float64) [3]float64 {
	for a := 0; a < 3; a++ {
		d[a] = minImage1(d[a], b.Size[a], 0.5*b.Size[a])
	}
	return d
}

// minImage1 is MinImage on one axis with h = L/2 precomputed. Separations of
// wrapped points lie in (-L, L) and take the single-subtraction path; any
// other separation falls back to rounding to the nearest multiple of L.
// Explicit float64 conversions keep the compiler from fusing operations, so
// every caller gets the same bits on every architecture.
func minImage1(d, L, h float64) float64 {
	if L > 0 {
		if d > h {
			d -= L
			if d > h {
				d -= float64(L * math.Floor(d/L+0.5))
			}
		} else if d < -h {
			d += L
			if d < -h {
				d -= float64(L * math.Floor(d/L+0.5))
			}
		}
	}
	return d
}

// Wrap maps a position into [0, L) on each periodic axis; open axes are
// unchanged. Coordinates already inside the box are returned bit for bit.
func (b Box) Wrap(p [3]float64) [3]float64 {
	for a := 0; a < 3; a++ {
		p[a] = wrap1(p[a], b.Size[a])
	}
	return p
}

func wrap1(x, L float64) float64 {
	if L <= 0 || (x >= 0 && x < L) {
		return x
	}
	x -= float64(L * math.Floor(x/L))
	if x < 0 || x >= L {
		// Rounding landed on the boundary; 0 is the same point modulo L.
		x = 0
	}
	return x
}

// Dist2 is the squared minimum-image distance between q and p, the one
// formula every finder in this package uses: both points are wrapped, the
// separation q - p goes through MinImage, and the squares are summed x, y, z
// in that order. Two finders given the same gas therefore report the same
// Dist2 bits.
func (b Box) Dist2(q, p [3]float64) float64 {
	q, p = b.Wrap(q), b.Wrap(p)
	d := b.MinImage([3]float64{q[0] - p[0], q[1] - p[1], q[2] - p[2]})
	return float64(d[0]*d[0]) + float64(d[1]*d[1]) + float64(d[2]*d[2])
}

// checkQueryPos rejects NaN and infinite query positions and wraps the rest.
func (b Box) checkQueryPos(p [3]float64) ([3]float64, error) {
	for a, x := range p {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return p, fmt.Errorf("query position %v: coordinate %d is not finite: %w", p, a, ErrInvalid)
		}
	}
	return b.Wrap(p), nil
}

// checkRadius rejects negative and NaN radii and returns r*r, the bound
// Within compares Dist2 against.
func checkRadius(r float64) (float64, error) {
	if math.IsNaN(r) || r < 0 {
		return 0, fmt.Errorf("radius %v: want r >= 0: %w", r, ErrInvalid)
	}
	return r * r, nil
}

// checkK rejects k outside [1, avail].
func checkK(k, avail int) error {
	if k <= 0 {
		return fmt.Errorf("k = %d: want k >= 1: %w", k, ErrInvalid)
	}
	if k > avail {
		return fmt.Errorf("k = %d but only %d gas elements can be reached: %w", k, avail, ErrTooFew)
	}
	return nil
}
