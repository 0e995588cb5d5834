package hydro

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// toroTests are the five Riemann problems of Toro 2009 (Riemann Solvers and
// Numerical Methods for Fluid Dynamics, 3rd ed., Table 4.1, gamma = 1.4) and
// the exact star-region values of Table 4.2 (quoted to the printed digits;
// from memory).
var toroTests = []struct {
	name               string
	l, r               Prim
	pStar, uStar       float64
	rhoStarL, rhoStarR float64
	tEnd               float64
}{
	{"test 1 (Sod)", Prim{Rho: 1, P: 1}, Prim{Rho: 0.125, P: 0.1}, 0.30313, 0.92745, 0.42632, 0.26557, 0.25},
	{"test 2 (123 problem)", Prim{Rho: 1, Vx: -2, P: 0.4}, Prim{Rho: 1, Vx: 2, P: 0.4}, 0.00189, 0, 0.02185, 0.02185, 0.15},
	{"test 3", Prim{Rho: 1, P: 1000}, Prim{Rho: 1, P: 0.01}, 460.894, 19.5975, 0.57506, 5.99924, 0.012},
	{"test 4", Prim{Rho: 1, P: 0.01}, Prim{Rho: 1, P: 100}, 46.0950, -6.19633, 5.99242, 0.57511, 0.035},
	{"test 5", Prim{Rho: 5.99924, Vx: 19.5975, P: 460.894}, Prim{Rho: 5.99242, Vx: -6.19633, P: 46.0950}, 1691.64, 8.68975, 14.2823, 31.0426, 0.035},
}

func TestExactRiemannToro(t *testing.T) {
	g := IdealGas{Gamma: 1.4}
	for _, tc := range toroTests {
		t.Run(tc.name, func(t *testing.T) {
			s, err := g.Exact(tc.l, tc.r)
			require.NoError(t, err)
			// Tolerances: half a unit of the last printed digit.
			assert.InDelta(t, tc.pStar, s.PStar, 5e-6*math.Max(1, tc.pStar), "p* (Toro 2009 Table 4.2)")
			if tc.uStar == 0 {
				assert.InDelta(t, 0, s.UStar, 1e-10, "u*")
			} else {
				assert.InEpsilon(t, tc.uStar, s.UStar, 5e-5, "u* (Toro 2009 Table 4.2)")
			}
			assert.InDelta(t, tc.rhoStarL, s.RhoStarL, 5e-5*math.Max(1, tc.rhoStarL), "rho*L")
			assert.InDelta(t, tc.rhoStarR, s.RhoStarR, 5e-5*math.Max(1, tc.rhoStarR), "rho*R")
			// Far from the fan the sample is the initial state.
			assert.Equal(t, tc.l.Rho, s.Sample(-1e6).Rho)
			assert.Equal(t, tc.r.Rho, s.Sample(1e6).Rho)
		})
	}
	_, err := g.Exact(Prim{Rho: 1, Vx: -20, P: 0.1}, Prim{Rho: 1, Vx: 20, P: 0.1})
	assert.ErrorIs(t, err, ErrVacuum)
	_, err = g.Exact(Prim{Rho: -1, P: 1}, Prim{Rho: 1, P: 1})
	assert.ErrorIs(t, err, ErrState)
}

// runTube evolves a shock tube on [0, 1] with n cells (discontinuity at x0),
// PLM + HLLC + second-order SSP Runge–Kutta, zero-gradient ends, CFL 0.8,
// and returns the final primitive states.
func runTube(g IdealGas, lim Limiter, l, r Prim, x0, tEnd float64, n int) []Prim {
	dx := 1.0 / float64(n)
	u := make([]Cons, n)
	for i := range u {
		if (float64(i)+0.5)*dx < x0 {
			u[i] = g.Cons(l)
		} else {
			u[i] = g.Cons(r)
		}
	}
	w := make([]Prim, n+4)
	flux := make([]Cons, n+1)
	u1 := make([]Cons, n)
	fill := func(src []Cons) {
		for i := range src {
			w[i+2] = g.Prim(src[i])
		}
		w[0], w[1] = w[2], w[2]
		w[n+2], w[n+3] = w[n+1], w[n+1]
	}
	var t float64
	for t < tEnd {
		fill(u)
		var smax float64
		for i := 2; i < n+2; i++ {
			smax = math.Max(smax, math.Abs(w[i].Vx)+g.SoundSpeed(w[i]))
		}
		dt := math.Min(0.8*dx/smax, tEnd-t)
		g.PencilFluxes(lim, w, flux)
		for i := range u {
			u1[i] = u[i].Add(-dt/dx, flux[i+1].Add(-1, flux[i]))
		}
		fill(u1)
		g.PencilFluxes(lim, w, flux)
		for i := range u {
			u[i] = u[i].Add(1, u1[i].Add(-dt/dx, flux[i+1].Add(-1, flux[i]))).Scale(0.5)
		}
		t += dt
	}
	out := make([]Prim, n)
	for i := range u {
		out[i] = g.Prim(u[i])
	}
	return out
}

func l1Density(g IdealGas, tc int, w []Prim) float64 {
	s, err := g.Exact(toroTests[tc].l, toroTests[tc].r)
	if err != nil {
		panic(err)
	}
	n := len(w)
	var sum float64
	for i := range w {
		x := (float64(i) + 0.5) / float64(n)
		sum += math.Abs(w[i].Rho - s.Sample((x-0.5)/toroTests[tc].tEnd).Rho)
	}
	return sum / float64(n)
}

// Sod's shock tube (Toro 2009 sect. 4.3.3, test 1, gamma = 1.4, t = 0.25):
// the HLLC scheme converges to the exact solution. L1 density errors of
// second-order schemes on this problem are a few 1e-3 at 400 cells (common
// practice); the bounds below are set just above what this scheme gives and
// the ratio checks convergence.
func TestSodShockTube(t *testing.T) {
	g := IdealGas{Gamma: 1.4}
	tc := toroTests[0]
	errs := map[int]float64{}
	for _, n := range []int{100, 400} {
		w := runTube(g, MonotonizedCentral, tc.l, tc.r, 0.5, tc.tEnd, n)
		errs[n] = l1Density(g, 0, w)
		for _, wi := range w {
			require.NoError(t, CheckPrim(wi))
		}
	}
	t.Logf("L1 density error: 100 cells %.3g, 400 cells %.3g", errs[100], errs[400])
	assert.Less(t, errs[400], 3e-3)
	assert.Greater(t, errs[100]/errs[400], 2.5, "converges (discontinuities limit it to first order)")
	// First order is worse than limited second order at the same resolution.
	first := l1Density(g, 0, runTube(g, FirstOrder, tc.l, tc.r, 0.5, tc.tEnd, 400))
	assert.Greater(t, first, 1.5*errs[400])
}

// The strong tests of Toro's set run without losing positivity and land
// near the exact solution.
func TestToroTubesPositive(t *testing.T) {
	g := IdealGas{Gamma: 1.4}
	for k, tc := range toroTests[1:] {
		t.Run(tc.name, func(t *testing.T) {
			w := runTube(g, MonotonizedCentral, tc.l, tc.r, 0.5, tc.tEnd, 400)
			for _, wi := range w {
				require.NoError(t, CheckPrim(wi))
			}
			e := l1Density(g, k+1, w)
			scale := math.Max(math.Max(tc.rhoStarL, tc.rhoStarR), math.Max(tc.l.Rho, tc.r.Rho))
			t.Logf("L1 density error / peak density: %.3g", e/scale)
			assert.Less(t, e/scale, 0.015, "L1 density error relative to the peak density")
		})
	}
}

func TestHLLCConsistency(t *testing.T) {
	g := Monatomic()
	for _, w := range []Prim{
		{Rho: 1, P: 1},
		{Rho: 3e-24, P: 1e-12, Scalar: [NumScalars]float64{0.3, 1}},
		{Rho: 1, Vx: 0.5, Vy: -2, Vz: 3, P: 2, Scalar: [NumScalars]float64{1, 0}},
		{Rho: 1, Vx: -5, P: 2},
		{Rho: 1, Vx: 5, P: 2},
	} {
		f, s := g.HLLC(w, w)
		want := g.Flux(w)
		assert.InDelta(t, want.Mass, f.Mass, 1e-14*math.Abs(want.MomX)+1e-300)
		assert.InEpsilon(t, want.MomX, f.MomX, 1e-14)
		assert.InDelta(t, want.Energy, f.Energy, 1e-14*(math.Abs(want.Energy)+w.P*g.SoundSpeed(w)))
		assert.InDelta(t, math.Abs(w.Vx)+g.SoundSpeed(w), s, 1e-12*s)
		if w.Vx == 0 && w.Vy == 0 && w.Vz == 0 {
			// At rest the flux is exactly (0, p, 0, 0, 0): uniform gas stays put bit for bit.
			assert.Equal(t, Cons{MomX: w.P}, f)
		}
	}
}

// A y-face is evaluated by permuting: the flux of a state moving along y
// through a y-face equals the x-face flux of the same state with the axes
// renamed.
func TestPermute(t *testing.T) {
	g := Monatomic()
	l := Prim{Rho: 1, Vx: 0.3, Vy: 1.2, Vz: -0.4, P: 1, Scalar: [NumScalars]float64{1, 0.5}}
	r := Prim{Rho: 0.2, Vx: -0.1, Vy: 0.4, Vz: 0.7, P: 0.3}
	for _, a := range []Axis{X, Y, Z} {
		p := l.Permute(a)
		assert.Equal(t, [3]float64{l.Vx, l.Vy, l.Vz}[a], p.Vx, "axis a's velocity comes first")
		p.Vx, p.Vy, p.Vz = unpermute(a, p.Vx, p.Vy, p.Vz)
		assert.Equal(t, l, p, "unpermute undoes Permute")
		u := g.Cons(l)
		assert.Equal(t, u, u.Permute(a).Unpermute(a))
		assert.Equal(t, g.Cons(l.Permute(a)), u.Permute(a))
		f, _ := g.HLLC(l.Permute(a), r.Permute(a))
		f = f.Unpermute(a)
		// The mass flux is the density times the a-velocity for a single state.
		fs := g.Flux(l.Permute(a)).Unpermute(a)
		va := [3]float64{l.Vx, l.Vy, l.Vz}[a]
		assert.InEpsilon(t, l.Rho*va, fs.Mass, 1e-14)
		assert.InEpsilon(t, l.Rho*va*va+l.P, [3]float64{fs.MomX, fs.MomY, fs.MomZ}[a], 1e-14)
		assert.False(t, math.IsNaN(f.Energy))
	}
}

// On a periodic row the fluxes telescope: mass, momentum, energy and
// scalars are conserved to round-off, and a scalar stays within its bounds.
func TestPencilConservation(t *testing.T) {
	g := Monatomic()
	n := 64
	u := make([]Cons, n)
	for i := range u {
		x := (float64(i) + 0.5) / float64(n)
		w := Prim{Rho: 1 + 0.5*math.Sin(2*math.Pi*x), Vx: 0.3, Vy: 0.1 * math.Cos(2*math.Pi*x), P: 1 + 0.2*math.Cos(4*math.Pi*x)}
		if x > 0.25 && x < 0.5 {
			w.Scalar[0] = 1
		}
		w.Scalar[1] = 0.5
		u[i] = g.Cons(w)
	}
	sum := func() Cons {
		var s Cons
		for _, c := range u {
			s = s.Add(1, c)
		}
		return s
	}
	before := sum()
	w := make([]Prim, n+4)
	flux := make([]Cons, n+1)
	dx := 1.0 / float64(n)
	for range 200 {
		for i := range u {
			w[i+2] = g.Prim(u[i])
		}
		w[0], w[1], w[n+2], w[n+3] = w[n], w[n+1], w[2], w[3]
		smax := g.PencilFluxes(MonotonizedCentral, w, flux)
		dt := 0.5 * dx / smax
		for i := range u {
			u[i] = u[i].Add(-dt/dx, flux[i+1].Add(-1, flux[i]))
		}
	}
	after := sum()
	assert.InDelta(t, before.Mass, after.Mass, 1e-13*before.Mass)
	assert.InDelta(t, before.MomX, after.MomX, 1e-13*before.Mass)
	assert.InDelta(t, before.MomY, after.MomY, 1e-13*before.Mass)
	assert.InDelta(t, before.Energy, after.Energy, 1e-13*before.Energy)
	assert.InDelta(t, before.Scalar[0], after.Scalar[0], 1e-13*before.Mass)
	for _, c := range u {
		p := g.Prim(c)
		assert.True(t, p.Scalar[0] > -1e-12 && p.Scalar[0] < 1+1e-12)
		assert.InDelta(t, 0.5, p.Scalar[1], 1e-12)
	}
}

func TestLimiters(t *testing.T) {
	for _, lim := range []Limiter{MonotonizedCentral, VanLeer, MinMod, FirstOrder} {
		assert.Zero(t, lim.Slope(1, -1), lim.String())
		assert.Zero(t, lim.Slope(0, 1), lim.String())
		for _, d := range [][2]float64{{1, 3}, {3, 1}, {-1, -0.1}, {2, 2}} {
			s := lim.Slope(d[0], d[1])
			// Faces stay between the neighbors' values.
			assert.LessOrEqual(t, math.Abs(s/2), math.Min(math.Abs(d[0]), math.Abs(d[1]))+1e-15, lim.String())
		}
	}
	assert.Equal(t, 2.0, MonotonizedCentral.Slope(2, 2))
	assert.Equal(t, 1.0, MinMod.Slope(1, 3))
	assert.Equal(t, 1.5, VanLeer.Slope(1, 3))
	assert.Equal(t, 2.0, MonotonizedCentral.Slope(1, 3))
}

func TestHancockFaces(t *testing.T) {
	g := Monatomic()
	// A linear density and scalar profile carried at uniform velocity and
	// pressure is a solution of the Euler equations (pure advection, the
	// contact wave): at half a step the face values are the initial profile
	// shifted by u dt/2, which the predictor must reproduce exactly.
	w := Prim{Rho: 2, Vx: 0.7, Vy: -0.2, Vz: 0.1, P: 1.5}
	w.Scalar[0] = 0.3
	s := Prim{Rho: 0.4}
	s.Scalar[0] = -0.05
	dtdx := 0.6
	shift := 0.5 * dtdx * w.Vx // in cell widths
	left, right := g.HancockFaces(w, s, dtdx)
	assert.InDelta(t, w.Rho+s.Rho*(-0.5-shift), left.Rho, 1e-15)
	assert.InDelta(t, w.Rho+s.Rho*(0.5-shift), right.Rho, 1e-15)
	assert.InDelta(t, w.Scalar[0]+s.Scalar[0]*(0.5-shift), right.Scalar[0], 1e-15)
	assert.Equal(t, w.P, left.P)
	assert.Equal(t, w.Vx, right.Vx)

	// Gas at rest with a pressure slope accelerates as du/dt = -(1/rho)
	// dp/dx (Euler's momentum equation) over the half step.
	w = Prim{Rho: 2, P: 1}
	s = Prim{P: 0.3}
	left, right = g.HancockFaces(w, s, dtdx)
	assert.InDelta(t, -0.5*dtdx*s.P/w.Rho, left.Vx, 1e-15)
	assert.InDelta(t, w.P+0.5*s.P, right.P, 1e-15)

	// Without slopes the faces are the cell state, bit for bit.
	w = Prim{Rho: 1.3, Vx: -4, Vy: 2, Vz: 1, P: 0.2}
	left, right = g.HancockFaces(w, Prim{}, 0.9)
	assert.Equal(t, w, left)
	assert.Equal(t, w, right)
}

// The face velocity HLLCContact reports: the velocity itself across a pure
// contact (equal pressure and velocity, any densities), the upwind state's
// velocity when both waves move one way, and a mirrored problem's mirror.
func TestHLLCContact(t *testing.T) {
	g := Monatomic()
	c := Prim{Rho: 1, Vx: 0.7, P: 1}
	d := Prim{Rho: 1e-3, Vx: 0.7, P: 1}
	_, _, v := g.HLLCContact(c, d)
	assert.InDelta(t, 0.7, v, 1e-14)
	fast := Prim{Rho: 1, Vx: 30, P: 1}
	f0, _ := g.HLLC(fast, d)
	f1, _, v := g.HLLCContact(fast, d)
	assert.Equal(t, 30.0, v)
	assert.Equal(t, f0, f1)
	l, r := Prim{Rho: 1, Vx: 0.2, P: 2}, Prim{Rho: 0.3, Vx: -0.5, P: 0.4}
	ml, mr := r, l
	ml.Vx, mr.Vx = -r.Vx, -l.Vx
	_, _, v1 := g.HLLCContact(l, r)
	_, _, v2 := g.HLLCContact(ml, mr)
	assert.InDelta(t, v1, -v2, 1e-14)
}

// CapVelocitySlope scales the velocity slopes, all by one factor, to
// |s_v|^2 = 24 share e where they exceed it, and nothing else.
func TestCapVelocitySlope(t *testing.T) {
	g := Monatomic()
	w := Prim{Rho: 2, Vx: 50, P: 3} // e = 2.25
	s := Prim{Rho: 0.1, Vx: 3, Vy: -4, P: 0.2}
	s.Scalar[0] = 0.01
	e := g.InternalEnergy(w)
	capped := g.CapVelocitySlope(w, s, 0.3)
	assert.InEpsilon(t, 24*0.3*e, capped.Vx*capped.Vx+capped.Vy*capped.Vy+capped.Vz*capped.Vz, 1e-14)
	assert.InEpsilon(t, s.Vx/s.Vy, capped.Vx/capped.Vy, 1e-14, "one factor for every component")
	assert.Equal(t, s.Rho, capped.Rho)
	assert.Equal(t, s.P, capped.P)
	assert.Equal(t, s.Scalar, capped.Scalar)
	assert.Equal(t, s, g.CapVelocitySlope(w, s, 10), "within the cap: unchanged")
	w.P = 0
	assert.Zero(t, g.CapVelocitySlope(w, s, 0.3).Vx, "no heat: no velocity slope")
}
