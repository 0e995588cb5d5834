package neighbor

import (
	"errors"
	"fmt"
	"math"
)

// CubicSplineW is the cubic-spline (M4) smoothing kernel of Monaghan &
// Lattanzio (1985), written with h the radius of its compact support:
//
//	W(r, h) = 8/(π h³) × { 1 - 6q² + 6q³   for 0 <= q <= 1/2
//	                     { 2(1 - q)³        for 1/2 < q <= 1
//	                     { 0                for q > 1,        q = r/h,
//
// normalized so that its integral over space is 1.
func CubicSplineW(r, h float64) float64 {
	return 8 / (math.Pi * h * h * h) * cubicSplineShape(r/h)
}

// cubicSplineShape is W without its normalization, as a function of q.
func cubicSplineShape(q float64) float64 {
	switch {
	case q <= 0.5:
		return 1 - 6*q*q + 6*q*q*q
	case q < 1:
		t := 1 - q
		return 2 * t * t * t
	}
	return 0
}

// EffectiveNeighbors returns the kernel-weighted neighbor number
// N_eff = (4π/3) h³ Σ W(r_i, h) of the neighbors nb (sorted by distance,
// as every Finder returns them) for the cubic spline with support radius h.
// In gas of uniform density it approaches the number of elements inside h.
func EffectiveNeighbors(nb []Neighbor, h float64) float64 {
	s := 0.0
	for _, x := range nb {
		q := math.Sqrt(x.Dist2) / h
		if q >= 1 {
			break
		}
		s += cubicSplineShape(q)
	}
	// (4π/3) h³ × 8/(π h³) = 32/3
	return 32.0 / 3.0 * s
}

// reach returns how many elements f can return for q, or MaxInt if f does
// not say.
func reach(f Finder, q Query) (int, error) {
	c, ok := f.(Counter)
	if !ok {
		return math.MaxInt, nil
	}
	return c.Count(q)
}

// nearestOrCount asks f for the k nearest. A finder that does not
// implement Counter reports ErrTooFew when k exceeds what it holds; the
// largest k it accepts is then found by bisection on k (lastOK is known to
// succeed, or is 0) and returned as the new reach, with a nil slice.
func nearestOrCount(f Finder, q Query, k, lastOK int, buf []Neighbor) (nb []Neighbor, avail int, err error) {
	nb, err = f.Nearest(q, k, buf)
	if err == nil || !errors.Is(err, ErrTooFew) {
		return nb, math.MaxInt, err
	}
	if _, counted := f.(Counter); counted {
		return nb, 0, fmt.Errorf("%w: %w", ErrUnreachable, err)
	}
	lo, hi := lastOK, k // Nearest(lo) works (or lo = 0), Nearest(hi) does not
	for hi-lo > 1 {
		m := lo + (hi-lo)/2
		if _, err := f.Nearest(q, m, nb); err == nil {
			lo = m
		} else if !errors.Is(err, ErrTooFew) {
			return nb, 0, err
		} else {
			hi = m
		}
	}
	if lo < 1 {
		return nb, 0, fmt.Errorf("%w: %w", ErrUnreachable, err)
	}
	return nil, lo, nil
}

// KernelRadius returns the smallest radius h around q.Pos at which the
// cubic-spline neighbor number EffectiveNeighbors reaches target, found by
// bisection to float64 resolution over the Nearest results of f, together
// with the neighbors that carry kernel weight (those EffectiveNeighbors
// counts: r_i/h < 1), sorted. The returned slice
// reuses buf; pass it back on the next call and the helper allocates
// nothing once it has grown.
//
// N_eff grows with h towards (32/3) n for n reachable elements (distances
// are the minimum-image ones, so in a periodic box h may exceed L/2 when
// the target asks for it), so a target of (32/3) n or more is unreachable (an error wrapping ErrUnreachable), as
// is a target already met by elements coincident with q, for which no
// smallest positive radius exists.
func KernelRadius(f Finder, q Query, target float64, buf []Neighbor) (float64, []Neighbor, error) {
	if !(target > 0) || math.IsInf(target, 0) {
		return 0, buf[:0], fmt.Errorf("neighbor: kernel radius: target %v, want a finite value > 0: %w", target, ErrInvalid)
	}
	avail, err := reach(f, q)
	if err != nil {
		return 0, buf[:0], fmt.Errorf("neighbor: kernel radius: %w", err)
	}
	if avail < 1 {
		return 0, buf[:0], fmt.Errorf("neighbor: kernel radius: no gas reachable: %w", ErrUnreachable)
	}
	// In uniform gas about target elements lie inside h.
	k := min(avail, int(math.Min(1.25*target+8, float64(math.MaxInt32))))
	lastOK := 0
	for {
		nb, probed, err := nearestOrCount(f, q, k, lastOK, buf)
		if err != nil {
			return 0, nb, fmt.Errorf("neighbor: kernel radius: %w", err)
		}
		if nb == nil {
			avail, k = probed, probed
			continue
		}
		buf, lastOK = nb, k
		hk := math.Sqrt(nb[k-1].Dist2)
		// Elements from the k-th on lie at or beyond hk and weigh nothing
		// for h <= hk, so nb decides N_eff on (0, hk]. With every element in
		// nb, it decides N_eff everywhere.
		lo, hi := 0.0, hk
		switch {
		case hk > 0 && EffectiveNeighbors(nb, hk) >= target:
		case k == avail:
			if target >= 32.0/3.0*float64(k) {
				return 0, nb, fmt.Errorf("neighbor: kernel radius: target %v not below the limit %v that all %d reachable elements approach: %w",
					target, 32.0/3.0*float64(k), k, ErrUnreachable)
			}
			lo, hi = hk, max(2*hk, math.SmallestNonzeroFloat64)
			for EffectiveNeighbors(nb, hi) < target && !math.IsInf(hi, 0) {
				lo, hi = hi, 2*hi
			}
		default:
			k = min(avail, 2*k)
			continue
		}
		coincident := 0
		for coincident < len(nb) && nb[coincident].Dist2 == 0 {
			coincident++
		}
		if 32.0/3.0*float64(coincident) >= target {
			return 0, nb, fmt.Errorf("neighbor: kernel radius: target %v met by %d elements at the query point alone: %w", target, coincident, ErrUnreachable)
		}
		for {
			mid := lo + 0.5*(hi-lo)
			if mid <= lo || mid >= hi {
				break
			}
			if EffectiveNeighbors(nb, mid) >= target {
				hi = mid
			} else {
				lo = mid
			}
		}
		n := 0
		for n < len(nb) && math.Sqrt(nb[n].Dist2)/hi < 1 {
			n++
		}
		return hi, nb[:n], nil
	}
}

// MassRadius returns the smallest float64 radius r around q.Pos such that
// the gas within r (Dist2 <= r*r, as Within counts it) holds at least target
// mass, by ordered accumulation over the Nearest results of f, together with
// exactly those neighbors (all elements tied at the last distance
// included), sorted. masses[i] is
// the mass of gas element i. The returned slice reuses buf; once it has grown
// the helper allocates nothing.
//
// Errors: a target that is not finite and positive, a neighbor whose index
// has no mass or whose mass is negative or not finite (ErrInvalid), and a
// target above the mass of all reachable gas (ErrUnreachable).
func MassRadius(f Finder, q Query, masses []float64, target float64, buf []Neighbor) (float64, []Neighbor, error) {
	if !(target > 0) || math.IsInf(target, 0) {
		return 0, buf[:0], fmt.Errorf("neighbor: mass radius: target %v, want a finite value > 0: %w", target, ErrInvalid)
	}
	avail, err := reach(f, q)
	if err != nil {
		return 0, buf[:0], fmt.Errorf("neighbor: mass radius: %w", err)
	}
	if avail < 1 {
		return 0, buf[:0], fmt.Errorf("neighbor: mass radius: no gas reachable: %w", ErrUnreachable)
	}
	k := min(avail, 32)
	lastOK := 0
	for {
		nb, probed, err := nearestOrCount(f, q, k, lastOK, buf)
		if err != nil {
			return 0, nb, fmt.Errorf("neighbor: mass radius: %w", err)
		}
		if nb == nil {
			avail, k = probed, probed
			continue
		}
		buf, lastOK = nb, k
		sum := 0.0
		for i, x := range nb {
			if x.Index < 0 || x.Index >= len(masses) {
				return 0, nb, fmt.Errorf("neighbor: mass radius: gas index %d has no mass (%d masses given): %w", x.Index, len(masses), ErrInvalid)
			}
			m := masses[x.Index]
			if !(m >= 0) || math.IsInf(m, 0) {
				return 0, nb, fmt.Errorf("neighbor: mass radius: gas element %d has mass %v: %w", x.Index, m, ErrInvalid)
			}
			sum += m
			if sum < target {
				continue
			}
			// The smallest float64 radius whose square reaches x.Dist2,
			// so Within(q, r) finds x.
			r := math.Sqrt(x.Dist2)
			if r*r < x.Dist2 {
				r = math.Nextafter(r, math.Inf(1))
			}
			end := i + 1
			for end < len(nb) && nb[end].Dist2 <= r*r {
				end++
			}
			if end < len(nb) || k == avail {
				return r, nb[:end], nil
			}
			break // ties may continue past the k-th: look further
		}
		if k == avail {
			return 0, nb, fmt.Errorf("neighbor: mass radius: target mass %v above the %v of all %d reachable elements: %w", target, sum, k, ErrUnreachable)
		}
		k = min(avail, 2*k)
	}
}
