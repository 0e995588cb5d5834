package bench

import (
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/neighbor"
)

// oneSidedTolerance is how far below a candidate plane (in units of the
// unit directions) a neighbor may lie and still count as on it, so that
// round-off does not decide whether gas on a lattice plane through the star
// is one-sided.
const oneSidedTolerance = 1e-12

// OneSided reports whether unit directions (zero vectors, for gas at the
// star's position, are ignored) lie on one side of the star: some direction
// u has u . n_j >= 0 for every j and > 0 for at least one. By Stiemke's
// theorem of the alternative that is exactly when no strictly positive
// weights make the weighted sum of the directions vanish, so the isotropy
// correction cannot balance the star and the residual it reports is what
// remained, not a corrected figure. Directions in a plane or on a line
// through the star are one-sided only if they are so within it (a ring of
// gas around the star is balanced).
//
// The test is exact up to round-off (oneSidedTolerance): in three
// dimensions the cone of such u is pointed, and when it is not empty one of
// its extreme rays is the cross product of two directions on its boundary,
// so trying every pair settles it, O(k^3) for k directions (a few dozen
// here); in a plane with normal m the candidates are m x n_i; on a line the
// directions are one-sided unless both senses occur.
func OneSided(dirs [][3]float64) bool {
	live := make([][3]float64, 0, len(dirs))
	for _, d := range dirs {
		if d != ([3]float64{}) {
			live = append(live, d)
		}
	}
	if len(live) == 0 {
		return false // nothing to balance
	}
	normal, dim := span(live)
	switch dim {
	case 1:
		for _, d := range live {
			if dot(d, live[0]) < 0 {
				return false
			}
		}
		return true
	case 2:
		for _, d := range live {
			c := cross(normal, d)
			if allAbove(c, live) || allAbove([3]float64{-c[0], -c[1], -c[2]}, live) {
				return true
			}
		}
		return false
	}
	for i := range live {
		for j := i + 1; j < len(live); j++ {
			c := cross(live[i], live[j])
			if norm2(c) < parallel*parallel {
				continue
			}
			if allAbove(c, live) || allAbove([3]float64{-c[0], -c[1], -c[2]}, live) {
				return true
			}
		}
	}
	return false
}

// parallel is the sine of the angle below which two unit directions count
// as parallel, and the cosine above which one counts as out of a plane.
const parallel = 1e-12

// span returns the dimension (1, 2 or 3) of the space the unit directions
// span and, for 2, the unit normal of their plane.
func span(dirs [][3]float64) ([3]float64, int) {
	for i := range dirs {
		for j := i + 1; j < len(dirs); j++ {
			c := cross(dirs[i], dirs[j])
			cn := math.Sqrt(norm2(c))
			if cn < parallel {
				continue
			}
			for _, d := range dirs {
				if math.Abs(dot(c, d)) > parallel*cn {
					return [3]float64{}, 3
				}
			}
			return [3]float64{c[0] / cn, c[1] / cn, c[2] / cn}, 2
		}
	}
	return [3]float64{}, 1
}

// allAbove reports whether every direction has u . n >= -tolerance |u|.
func allAbove(u [3]float64, dirs [][3]float64) bool {
	tol := -oneSidedTolerance * math.Sqrt(norm2(u))
	for _, d := range dirs {
		if dot(u, d) < tol {
			return false
		}
	}
	return true
}

func cross(a, b [3]float64) [3]float64 {
	return [3]float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}

func dot(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }

func norm2(a [3]float64) float64 { return dot(a, a) }

// countOneSided counts the stars of a case whose k nearest gas elements
// (the gas the coupler shares their release over) lie on one side of them.
func countOneSided(c *Case, tree neighbor.Finder, k int) (int, error) {
	var buf []neighbor.Neighbor
	var dirs [][3]float64
	n := 0
	for s := range c.Stars {
		st := &c.Stars[s]
		var err error
		buf, err = tree.Nearest(neighbor.Query{Pos: st.Pos, Star: s}, k, buf)
		if err != nil {
			return 0, fmt.Errorf("one-sided check: star %d: %w", st.ID, err)
		}
		dirs = dirs[:0]
		for _, nb := range buf {
			d := c.Box.MinImage([3]float64{
				c.Gas.Pos[0][nb.Index] - st.Pos[0],
				c.Gas.Pos[1][nb.Index] - st.Pos[1],
				c.Gas.Pos[2][nb.Index] - st.Pos[2],
			})
			if r := math.Sqrt(norm2(d)); r > 0 {
				d = [3]float64{d[0] / r, d[1] / r, d[2] / r}
			}
			dirs = append(dirs, d)
		}
		if OneSided(dirs) {
			n++
		}
	}
	return n, nil
}
