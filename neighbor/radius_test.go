package neighbor

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/integrate/quad"
)

// The cubic spline integrates to one over space: ∫ W(r, h) 4π r² dr = 1
// (normalization of the M4 kernel, Monaghan & Lattanzio 1985, A&A 149, 135;
// from memory, support-radius form common practice). Checked with gonum's
// Gauss–Legendre quadrature on each polynomial piece, which is exact for
// these degrees.
func TestCubicSplineNormalized(t *testing.T) {
	for _, h := range []float64{0.1, 1, 3.7} {
		f := func(r float64) float64 { return 4 * math.Pi * r * r * CubicSplineW(r, h) }
		got := quad.Fixed(f, 0, h/2, 8, nil, 0) + quad.Fixed(f, h/2, h, 8, nil, 0)
		assert.InDelta(t, 1, got, 1e-13, "h=%v", h)
		assert.Zero(t, CubicSplineW(h, h))
		assert.Zero(t, CubicSplineW(1.5*h, h))
	}
	// EffectiveNeighbors is (4π/3) h³ Σ W by definition.
	nb := []Neighbor{{0, 0}, {1, 0.04}, {2, 0.2}, {3, 0.7}, {4, 1.2}}
	h := 0.9
	want := 0.0
	for _, x := range nb {
		want += CubicSplineW(math.Sqrt(x.Dist2), h)
	}
	want *= 4 * math.Pi / 3 * h * h * h
	assert.InEpsilon(t, want, EffectiveNeighbors(nb, h), 1e-14)
}

// On a periodic cubic lattice of spacing a (density 1/a³), N_eff(h) is a
// kernel-weighted count that tends to the mean number inside h,
// (4π/3)(h/a)³, since W integrates to one; the lattice sum of a smooth kernel
// a few spacings wide matches the integral to well under a percent (common
// practice: SPH density estimates on lattices).
func TestKernelRadiusOnLattice(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	const m = 16
	pos, ids := latticeGas(rng, m)
	box := Box{Size: [3]float64{1, 1, 1}}
	tree, err := NewTree(pos, ids, box)
	require.NoError(t, err)
	for _, target := range []float64{100, 200, 400} {
		q := Query{Pos: [3]float64{rng.Float64(), rng.Float64(), rng.Float64()}}
		h, nb, err := KernelRadius(tree, q, target, nil)
		require.NoError(t, err)
		want := math.Cbrt(3*target/(4*math.Pi)) / m
		assert.InEpsilon(t, want, h, 0.01, "target %v", target)
		assert.InDelta(t, target, EffectiveNeighbors(nb, h), 1e-9*target)
	}
}

// KernelRadius returns the smallest h: N_eff(h) >= target and
// N_eff(h') < target for the next float below; the same h from every
// finder.
func TestKernelRadiusIsSmallest(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	box := Box{Size: [3]float64{1, 1, 1}}
	for _, kind := range gasKinds(true)[:3] {
		pos, ids := kind.make(rng)
		tree, err := NewTree(pos, ids, box)
		require.NoError(t, err)
		brute := &bruteFinder{box, pos, ids}
		for i := 0; i < 10; i++ {
			q := Query{Pos: [3]float64{rng.Float64(), rng.Float64(), rng.Float64()}}
			target := 20 + 60*rng.Float64()
			h, nb, err := KernelRadius(tree, q, target, nil)
			require.NoError(t, err)
			all, err := brute.Nearest(q, len(ids), nil)
			require.NoError(t, err)
			assert.GreaterOrEqual(t, EffectiveNeighbors(all, h), target)
			assert.Less(t, EffectiveNeighbors(all, math.Nextafter(h, 0)), target)
			for _, x := range nb {
				assert.Less(t, math.Sqrt(x.Dist2)/h, 1.0)
			}
			require.Less(t, len(nb), len(all))
			assert.GreaterOrEqual(t, math.Sqrt(all[len(nb)].Dist2)/h, 1.0)
			for _, f := range []Finder{brute} {
				h2, nb2, err := KernelRadius(f, q, target, nil)
				require.NoError(t, err)
				assert.Equal(t, h, h2, kind.name)
				requireSame(t, nb, nb2, "%s", kind.name)
			}
		}
	}
}

// A finder that does not say how much gas it holds (the brute-force
// reference implements no Counter) gets the same answers near the limit of
// what its gas can give.
func TestRadiusHelpersWithoutCounter(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	box := Box{Size: [3]float64{1, 1, 1}}
	pos, ids := uniformGas(rng, 150)
	masses := make([]float64, len(ids))
	for i := range masses {
		masses[i] = 1
	}
	tree, err := NewTree(pos, ids, box)
	require.NoError(t, err)
	brute := &bruteFinder{box, pos, ids}
	q := Query{Pos: [3]float64{0.4, 0.6, 0.1}}
	for _, target := range []float64{1000, 1500} {
		h1, nb1, err := KernelRadius(tree, q, target, nil)
		require.NoError(t, err)
		h2, nb2, err := KernelRadius(brute, q, target, nil)
		require.NoError(t, err)
		assert.Equal(t, h1, h2)
		requireSame(t, nb1, nb2, "target %v", target)
	}
	_, _, err = KernelRadius(brute, q, 32.0/3.0*150, nil)
	require.ErrorIs(t, err, ErrUnreachable)
	r1, nb1, err := MassRadius(tree, q, masses, 149.5, nil)
	require.NoError(t, err)
	r2, nb2, err := MassRadius(brute, q, masses, 149.5, nil)
	require.NoError(t, err)
	assert.Equal(t, r1, r2)
	requireSame(t, nb1, nb2, "mass")
	_, _, err = MassRadius(brute, q, masses, 150.5, nil)
	require.ErrorIs(t, err, ErrUnreachable)
}

// MassRadius: the gas within r holds the target, the gas within the next
// float below does not; Within(r) returns the same neighbors.
func TestMassRadius(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	box := Box{Size: [3]float64{1, 1, 1}}
	for _, kind := range gasKinds(true)[:3] {
		pos, ids := kind.make(rng)
		masses := make([]float64, len(ids))
		total := 0.0
		for i := range masses {
			masses[i] = 0.5 + rng.Float64()
			if i%17 == 0 {
				masses[i] = 0
			}
			total += masses[i]
		}
		tree, err := NewTree(pos, ids, box)
		require.NoError(t, err)
		enclosed := func(q Query, r float64) float64 {
			nb, err := tree.Within(q, r, nil)
			require.NoError(t, err)
			s := 0.0
			for _, x := range nb {
				s += masses[x.Index]
			}
			return s
		}
		for i := 0; i < 10; i++ {
			q := Query{Pos: [3]float64{rng.Float64(), rng.Float64(), rng.Float64()}}
			target := total * rng.Float64() * 0.5
			r, nb, err := MassRadius(tree, q, masses, target, nil)
			require.NoError(t, err)
			assert.GreaterOrEqual(t, enclosed(q, r), target)
			assert.Less(t, enclosed(q, math.Nextafter(r, 0)), target)
			within, err := tree.Within(q, r, nil)
			require.NoError(t, err)
			requireSame(t, within, nb, "%s", kind.name)
		}
		// All of the mass is reachable; a little more is not.
		_, _, err = MassRadius(tree, Query{}, masses, 0.9999*total, nil)
		require.NoError(t, err)
		_, _, err = MassRadius(tree, Query{}, masses, 1.0001*total, nil)
		require.ErrorIs(t, err, ErrUnreachable)
	}
}

func TestRadiusHelpersBadInput(t *testing.T) {
	pos := []float64{0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.9, 0.9, 0.9}
	ids := []int64{1, 2, 3, 4}
	tree, err := NewTree(pos, ids, Box{})
	require.NoError(t, err)
	at := Query{Pos: [3]float64{0.1, 0.1, 0.1}}
	away := Query{Pos: [3]float64{0.5, 0.5, 0.5}}
	masses := []float64{1, 1, 1, 1}
	cases := []struct {
		name string
		run  func() error
		want error
	}{
		{"kernel target NaN", func() error { _, _, err := KernelRadius(tree, away, math.NaN(), nil); return err }, ErrInvalid},
		{"kernel target zero", func() error { _, _, err := KernelRadius(tree, away, 0, nil); return err }, ErrInvalid},
		{"kernel target inf", func() error { _, _, err := KernelRadius(tree, away, math.Inf(1), nil); return err }, ErrInvalid},
		{"kernel target above (32/3)n", func() error { _, _, err := KernelRadius(tree, away, 32.0/3.0*4, nil); return err }, ErrUnreachable},
		{"kernel target met by coincident gas", func() error { _, _, err := KernelRadius(tree, at, 30, nil); return err }, ErrUnreachable},
		{"kernel query NaN", func() error {
			_, _, err := KernelRadius(tree, Query{Pos: [3]float64{math.NaN(), 0, 0}}, 5, nil)
			return err
		}, ErrInvalid},
		{"mass target negative", func() error { _, _, err := MassRadius(tree, away, masses, -1, nil); return err }, ErrInvalid},
		{"mass above total", func() error { _, _, err := MassRadius(tree, away, masses, 4.5, nil); return err }, ErrUnreachable},
		{"mass negative", func() error { _, _, err := MassRadius(tree, away, []float64{1, -1, 1, 1}, 2, nil); return err }, ErrInvalid},
		{"mass NaN", func() error { _, _, err := MassRadius(tree, away, []float64{math.NaN(), 1, 1, 1}, 2, nil); return err }, ErrInvalid},
		{"masses too short", func() error { _, _, err := MassRadius(tree, away, []float64{1}, 2, nil); return err }, ErrInvalid},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.run()
			require.ErrorIs(t, err, c.want)
			t.Log(err)
		})
	}
}

// Both helpers allocate nothing once the caller's buf has grown.
func TestRadiusHelpersAllocateNothing(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 16))
	pos, ids := uniformGas(rng, 3000)
	masses := make([]float64, len(ids))
	for i := range masses {
		masses[i] = 1
	}
	tree, err := NewTree(pos, ids, Box{Size: [3]float64{1, 1, 1}})
	require.NoError(t, err)
	q := Query{Pos: [3]float64{0.3, 0.02, 0.97}}
	var buf []Neighbor
	_, buf, err = KernelRadius(tree, q, 64, buf)
	require.NoError(t, err)
	_, buf, err = MassRadius(tree, q, masses, 100, buf)
	require.NoError(t, err)
	assert.Zero(t, testing.AllocsPerRun(10, func() { _, buf, _ = KernelRadius(tree, q, 64, buf) }))
	assert.Zero(t, testing.AllocsPerRun(10, func() { _, buf, _ = MassRadius(tree, q, masses, 100, buf) }))
}
