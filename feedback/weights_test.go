package feedback

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func randomDirs(rng *rand.Rand, k int, halfSpace bool) [][3]float64 {
	n := make([][3]float64, k)
	for j := range n {
		v := [3]float64{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
		if halfSpace {
			v[0] = math.Abs(v[0]) + 0.01
		}
		r := math.Sqrt(dot(v, v))
		n[j] = [3]float64{v[0] / r, v[1] / r, v[2] / r}
	}
	return n
}

func TestTiltBalancesSurroundedGas(t *testing.T) {
	for seed := uint64(1); seed <= 50; seed++ {
		rng := rand.New(rand.NewPCG(seed, 1))
		k := 8 + rng.IntN(120)
		n := randomDirs(rng, k, false)
		a := make([]float64, k)
		total := 0.0
		for j := range a {
			a[j] = math.Exp(3 * rng.NormFloat64()) // weights over many decades
			total += a[j]
		}
		before := netVector(a, n)
		res := tilt(a, n, make([]float64, k))
		sum := 0.0
		for _, v := range a {
			require.Greater(t, v, 0.0, "weights stay positive")
			sum += v
		}
		assert.InEpsilon(t, total, sum, 1e-12, "total kept")
		// Random directions surround the origin for k >= 8 with overwhelming
		// probability; the correction must then reach round-off (bound 1e-10 for weights spread over ~20 decades).
		if before > 0 {
			assert.Less(t, res, 1e-10, "seed %d k %d: residual %g (before %g)", seed, k, res, before)
		}
	}
}

func TestTiltReportsOneSidedResidual(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	n := randomDirs(rng, 40, true)
	a := make([]float64, 40)
	for j := range a {
		a[j] = 1
	}
	res := tilt(a, n, make([]float64, 40))
	assert.Greater(t, res, 0.001, "all gas in a half-space cannot be balanced; the residual must show it")
	for _, v := range a {
		assert.Greater(t, v, 0.0)
	}
}

func TestBaseWeights(t *testing.T) {
	dist := []float64{0, 1, 2, 3}
	mass := []float64{1, 1, 1, 1}
	rho := []float64{1, 1, 1, 1}
	for _, kind := range []Weighting{KernelVolume, SolidAngle} {
		w := make([]float64, 4)
		baseWeights(kind, dist, mass, rho, w)
		sum := 0.0
		for j := range w {
			assert.Greater(t, w[j], 0.0, "%v weight %d", kind, j)
			sum += w[j]
			if j > 0 {
				assert.Less(t, w[j], w[j-1], "%v: nearer gas gets more", kind)
			}
		}
		assert.InDelta(t, 1, sum, 1e-15)
	}
	// Solid angle of a disc of radius R seen on axis from distance r:
	// Omega/4pi = (1 - r/sqrt(r^2+R^2))/2 (elementary geometry).
	w := make([]float64, 1)
	baseWeights(SolidAngle, []float64{2}, []float64{4 * math.Pi / 3}, []float64{1}, w)
	assert.InDelta(t, 1, w[0], 0) // a single neighbor takes everything
}

func TestExpNonPositive(t *testing.T) {
	for x := -700.0; x <= 0; x += 0.0137 {
		want := math.Exp(x)
		got := expNonPositive(x)
		if want == 0 {
			assert.Zero(t, got)
			continue
		}
		require.InEpsilon(t, want, got, 1e-13, "x = %g", x)
	}
	assert.Equal(t, 1.0, expNonPositive(0))
	assert.Zero(t, expNonPositive(-800))
}

func TestTiltStaysFiniteInAdversarialGeometry(t *testing.T) {
	// One-sided, nearly coplanar and clustered directions make the
	// covariance nearly singular; the tilt must still return finite
	// positive weights with the same total.
	for seed := uint64(1); seed <= 400; seed++ {
		rng := rand.New(rand.NewPCG(seed, 9))
		k := 2 + rng.IntN(63)
		n := randomDirs(rng, k, seed%2 == 0)
		if seed%3 == 0 { // squash into a thin slab
			for j := range n {
				n[j][2] *= 1e-6
				r := math.Sqrt(dot(n[j], n[j]))
				n[j] = [3]float64{n[j][0] / r, n[j][1] / r, n[j][2] / r}
			}
		}
		a := make([]float64, k)
		total := 0.0
		for j := range a {
			a[j] = math.Exp(2 * rng.NormFloat64())
			total += a[j]
		}
		res := tilt(a, n, make([]float64, k))
		require.False(t, math.IsNaN(res), "seed %d", seed)
		sum := 0.0
		for _, v := range a {
			require.True(t, v > 0 && !math.IsInf(v, 0), "seed %d: weight %g", seed, v)
			sum += v
		}
		require.InEpsilon(t, total, sum, 1e-12, "seed %d", seed)
	}
}
