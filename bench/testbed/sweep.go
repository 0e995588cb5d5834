package testbed

import (
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/bench/hydro"
)

// The hydrodynamics is dimensionally split (Strang 1968, SIAM J. Numer.
// Anal. 5, 506): a step sweeps x, y, z and the next z, y, x, so two steps
// are second order in time. Each sweep updates every pencil of cells along
// its axis with a second-order MUSCL–Hancock step (van Leer 1979, J. Comput.
// Phys. 32, 101; hydro.HancockFaces): limited linear reconstruction of
// the primitive variables, a half-step predictor, and the HLLC flux of
// package hydro through each face. Pencils wrap around the periodic box,
// and the flux through the face where a pencil closes on itself is computed
// once and used on both sides, so mass, momentum and energy are conserved
// to round-off.

// sweepScratch is one worker's buffers for one pencil.
type sweepScratch struct {
	idx   []int        // cell indices of the pencil, cells -1..n
	w     []hydro.Prim // primitive states of cells -1..n
	left  []hydro.Prim // state at the low face of cells 0..n-1
	right []hydro.Prim // state at the high face of cells 0..n-1
	flux  []hydro.Cons // flux through the low face of cells 0..n (face n = face 0)
}

func newSweepScratch(n int) sweepScratch {
	return sweepScratch{
		idx:   make([]int, n+2),
		w:     make([]hydro.Prim, n+2),
		left:  make([]hydro.Prim, n),
		right: make([]hydro.Prim, n),
		flux:  make([]hydro.Cons, n+1),
	}
}

// pencilOf returns the first cell and stride of pencil q in plane p of a
// sweep along axis a: x and y sweeps run over the z planes, z sweeps over
// the y planes; q is the other transverse index.
func (g *Grid) pencilOf(a, p, q int) (base, stride int) {
	n := g.n
	switch a {
	case 0:
		return n * (q + n*p), 1
	case 1:
		return q + n*n*p, n
	}
	return q + n*p, n * n
}

// sweepPlane updates every pencil of plane p along axis a.
func (g *Grid) sweepPlane(s *sweepScratch, a, p int) {
	ps := &g.planes[p]
	for q := 0; q < g.n; q++ {
		base, stride := g.pencilOf(a, p, q)
		g.sweepPencil(s, hydro.Axis(a), base, stride, ps)
	}
}

// prim reads cell c as a primitive state with axis a's velocity normal.
func (g *Grid) prim(c int, a hydro.Axis) hydro.Prim {
	rho := g.dens[c]
	w := hydro.Prim{Rho: rho, P: (g.gas.Gamma - 1) * rho * g.eint[c]}
	switch a {
	case hydro.X:
		w.Vx, w.Vy, w.Vz = g.vel[0][c], g.vel[1][c], g.vel[2][c]
	case hydro.Y:
		w.Vx, w.Vy, w.Vz = g.vel[1][c], g.vel[2][c], g.vel[0][c]
	default:
		w.Vx, w.Vy, w.Vz = g.vel[2][c], g.vel[0][c], g.vel[1][c]
	}
	w.Scalar[0] = g.metal[c]
	return w
}

// sweepPencil advances one periodic pencil by the sweep's time step.
func (g *Grid) sweepPencil(s *sweepScratch, a hydro.Axis, base, stride int, ps *planeSums) {
	n := g.n
	for j := -1; j <= n; j++ {
		jj := j
		if jj < 0 {
			jj += n
		} else if jj >= n {
			jj -= n
		}
		c := base + jj*stride
		s.idx[j+1] = c
		s.w[j+1] = g.prim(c, a)
	}
	g.pencilFluxes(s, true)
	tv := g.sweepDtDx * g.volume // code time × area: flux density → amount
	// Where the second-order fluxes would empty a cell (a steep jump, such
	// as a cell heated to 10^7.5 K next to cold gas), the whole pencil takes
	// first-order fluxes instead: the same on every worker, so results stay
	// bitwise the same.
	for j := 0; j < n; j++ {
		if !(g.mass[s.idx[j+1]]+tv*(s.flux[j].Mass-s.flux[j+1].Mass) > 0) {
			g.pencilFluxes(s, false)
			break
		}
	}
	for j := 0; j < n; j++ {
		c := s.idx[j+1]
		fl, fr := &s.flux[j], &s.flux[j+1]
		// What the two faces bring in, with the normal and transverse
		// momenta back in their Cartesian slots.
		dm := tv * (fl.Mass - fr.Mass)
		dn, dt1, dt2 := tv*(fl.MomX-fr.MomX), tv*(fl.MomY-fr.MomY), tv*(fl.MomZ-fr.MomZ)
		de := tv * (fl.Energy - fr.Energy)
		dz := tv * (fl.Scalar[0] - fr.Scalar[0])
		if dm == 0 && dn == 0 && dt1 == 0 && dt2 == 0 && de == 0 && dz == 0 {
			continue // nothing moved: the cell stays bit for bit (uniform gas at rest)
		}
		var dpx, dpy, dpz float64
		switch a {
		case hydro.X:
			dpx, dpy, dpz = dn, dt1, dt2
		case hydro.Y:
			dpx, dpy, dpz = dt2, dn, dt1
		default:
			dpx, dpy, dpz = dt1, dt2, dn
		}
		m := g.mass[c]
		vx, vy, vz := g.vel[0][c], g.vel[1][c], g.vel[2][c]
		e := m * (g.eint[c] + 0.5*(vx*vx+vy*vy+vz*vz))
		mz := m * g.metal[c]
		m1 := m + dm
		px, py, pz := m*vx+dpx, m*vy+dpy, m*vz+dpz
		e1 := e + de
		if !(m1 > 0) || math.IsInf(m1, 0) || math.IsNaN(e1) {
			if ps.bad == 0 {
				ps.bad = c + 1
			}
			continue
		}
		inv := 1 / m1
		vx, vy, vz = px*inv, py*inv, pz*inv
		u := e1*inv - 0.5*(vx*vx+vy*vy+vz*vz)
		if !(u >= g.eFloor) {
			ps.floor += m1 * (g.eFloor - u)
			u = g.eFloor
		}
		g.mass[c] = m1
		g.dens[c] = m1 / g.volume
		g.vel[0][c], g.vel[1][c], g.vel[2][c] = vx, vy, vz
		g.eint[c] = u
		g.metal[c] = (mz + dz) * inv
	}
}

// pencilFluxes fills s.flux from the pencil's states in s.w: with
// MUSCL–Hancock face states when secondOrder, else with the cell states
// themselves (first order).
func (g *Grid) pencilFluxes(s *sweepScratch, secondOrder bool) {
	n := g.n
	lim := g.cfg.Limiter
	for j := 0; j < n; j++ {
		w := s.w[j+1]
		l, r := w, w
		if secondOrder {
			slope := g.gas.CapVelocitySlope(w, lim.PrimSlope(s.w[j], w, s.w[j+2]), g.cfg.VelocitySlopeCap)
			l, r = g.gas.HancockFaces(w, slope, g.sweepDtDx)
			if !(l.Rho > 0 && r.Rho > 0 && l.P > 0 && r.P > 0) {
				l, r = w, w // first order where the reconstruction is not physical
			}
		}
		s.left[j], s.right[j] = l, r
	}
	// Face j lies between cells j-1 and j; face n closes the pencil on face 0.
	for j := 1; j < n; j++ {
		s.flux[j], _ = g.gas.HLLC(s.right[j-1], s.left[j])
	}
	s.flux[n], _ = g.gas.HLLC(s.right[n-1], s.left[0])
	s.flux[0] = s.flux[n]
}

// sweep runs one sweep along axis a over every plane and books its floor
// energy; it fails if a cell lost all its mass.
func (g *Grid) sweep(a int, dtdx float64) error {
	g.sweepDtDx = dtdx
	for p := range g.planes {
		g.planes[p].floor, g.planes[p].bad = 0, 0
	}
	g.run(taskSweepX+task(a), g.n)
	for p := range g.planes {
		g.ledger.Floor += g.planes[p].floor
		if b := g.planes[p].bad; b != 0 {
			return fmt.Errorf("testbed: sweep along axis %d at t = %v: cell %d emptied: %w", a, g.time, b-1, ErrState)
		}
	}
	return nil
}
