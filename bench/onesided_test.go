package bench

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"
)

func unit(x, y, z float64) [3]float64 {
	r := math.Sqrt(x*x + y*y + z*z)
	return [3]float64{x / r, y / r, z / r}
}

func TestOneSidedGeometry(t *testing.T) {
	axes := [][3]float64{{1, 0, 0}, {-1, 0, 0}, {0, 1, 0}, {0, -1, 0}, {0, 0, 1}, {0, 0, -1}}
	s3 := 1 / math.Sqrt(3)
	tetra := [][3]float64{{s3, s3, s3}, {s3, -s3, -s3}, {-s3, s3, -s3}, {-s3, -s3, s3}}
	var ring, halfRing [][3]float64
	for i := 0; i < 8; i++ {
		a := 2 * math.Pi * float64(i) / 8
		ring = append(ring, [3]float64{math.Cos(a), math.Sin(a), 0})
		if i <= 4 {
			halfRing = append(halfRing, [3]float64{math.Cos(a), math.Sin(a), 0})
		}
	}
	tests := []struct {
		name string
		dirs [][3]float64
		want bool
	}{
		{"six axes", axes, false},
		{"five axes (no -z)", axes[:5], true},
		{"tetrahedron", tetra, false},
		{"three tetrahedron vertices", tetra[:3], true},
		{"tetrahedron and gas at the star", append([][3]float64{{}}, tetra...), false},
		{"ring in a plane is balanced", ring, false},
		{"half ring (closed) is one-sided", halfRing, true},
		{"line, both senses", [][3]float64{{0, 1, 0}, {0, -1, 0}}, false},
		{"line, one sense", [][3]float64{{0, 1, 0}, {0, 1, 0}}, true},
		{"one direction", [][3]float64{unit(1, 2, 3)}, true},
		{"only gas at the star", [][3]float64{{}}, false},
		// A star on the face of a cube of lattice gas: its neighbors fill
		// the closed half-space x >= 0.
		{"face of a lattice", [][3]float64{unit(0, 1, 0), unit(0, -1, 0), unit(0, 0, 1), unit(0, 0, -1),
			unit(1, 0, 0), unit(1, 1, 0), unit(1, -1, 1), unit(1, 1, -1)}, true},
		{"tilted cap", [][3]float64{unit(1, 0, 0.01), unit(-1, 0, 0.01), unit(0, 1, 0.01), unit(0, -1, 0.01), unit(0, 0, 1)}, true},
		{"cap with one below", [][3]float64{unit(1, 0, 0.01), unit(-1, 0, 0.01), unit(0, 1, 0.01), unit(0, -1, 0.01), unit(0, 0, 1), unit(0.1, 0.1, -1)}, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			assert.Equal(t, tc.want, OneSided(tc.dirs))
		})
	}
}

// balancedByLP is the other side of Stiemke's alternative, solved as a
// linear program with gonum: do weights w_j >= 1 exist with sum w_j n_j
// = 0? (Any strictly positive solution scales to one.) With w = 1 + x,
// x >= 0: sum x_j n_j = -sum n_j.
func balancedByLP(t *testing.T, dirs [][3]float64) bool {
	k := len(dirs)
	a := mat.NewDense(3, k, nil)
	b := make([]float64, 3)
	for j, d := range dirs {
		for r := 0; r < 3; r++ {
			a.Set(r, j, d[r])
			b[r] -= d[r]
		}
	}
	c := make([]float64, k)
	for j := range c {
		c[j] = 1
	}
	_, _, err := lp.Simplex(c, a, b, 1e-10, nil)
	if errors.Is(err, lp.ErrInfeasible) {
		return false
	}
	require.NoError(t, err)
	return true
}

// On random directions in caps of every opening, OneSided agrees with an
// independent linear-programming answer to the same question.
func TestOneSidedAgreesWithLinearProgram(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	sides := 0
	for trial := 0; trial < 300; trial++ {
		k := 4 + rng.IntN(40)
		// Directions with z >= zmin: one-sided when zmin >= 0 for sure;
		// for zmin < 0 it depends on the draw.
		zmin := -1 + 1.4*rng.Float64()
		dirs := make([][3]float64, k)
		for j := range dirs {
			z := zmin + (1-zmin)*rng.Float64()
			phi := 2 * math.Pi * rng.Float64()
			r := math.Sqrt(1 - z*z)
			dirs[j] = [3]float64{r * math.Cos(phi), r * math.Sin(phi), z}
		}
		got := OneSided(dirs)
		if got {
			sides++
		}
		require.Equal(t, !balancedByLP(t, dirs), got, "trial %d: k %d, zmin %.3f", trial, k, zmin)
	}
	// Both answers occur often enough for the comparison to mean something.
	assert.Greater(t, sides, 50)
	assert.Less(t, sides, 250)
}
