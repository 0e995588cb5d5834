package hydro

import (
	"fmt"
	"math"
)

// Limiter picks the slope of a linear reconstruction from the one-sided
// differences dl = w_i − w_{i−1} and dr = w_{i+1} − w_i.
type Limiter uint8

const (
	// MonotonizedCentral is minmod(2 dl, 2 dr, (dl + dr)/2) (van Leer 1977,
	// J. Comput. Phys. 23, 263): the sharpest of the three.
	MonotonizedCentral Limiter = iota
	// VanLeer is the harmonic mean 2 dl dr / (dl + dr) where dl dr > 0
	// (van Leer 1974, J. Comput. Phys. 14, 361).
	VanLeer
	// MinMod is the smaller of dl and dr in magnitude where they agree in
	// sign (Roe 1986, Annu. Rev. Fluid Mech. 18, 337): the most diffusive.
	MinMod
	// FirstOrder is a zero slope (piecewise constant, Godunov 1959).
	FirstOrder
)

// String names the limiter.
func (l Limiter) String() string {
	switch l {
	case MonotonizedCentral:
		return "monotonized-central"
	case VanLeer:
		return "van-leer"
	case MinMod:
		return "minmod"
	case FirstOrder:
		return "first-order"
	}
	return fmt.Sprintf("limiter(%d)", uint8(l))
}

// Slope is the limited slope for one-sided differences dl and dr. Every
// limiter here keeps w ± slope/2 between the neighbors' values.
func (l Limiter) Slope(dl, dr float64) float64 {
	if dl*dr <= 0 {
		return 0
	}
	switch l {
	case VanLeer:
		return 2 * dl * dr / (dl + dr)
	case MinMod:
		if math.Abs(dl) < math.Abs(dr) {
			return dl
		}
		return dr
	case FirstOrder:
		return 0
	}
	c := 0.5 * (dl + dr)
	m := math.Min(2*math.Abs(dl), math.Min(2*math.Abs(dr), math.Abs(c)))
	return math.Copysign(m, c)
}

// PrimSlope is the limited slope of every primitive component of cell w
// between neighbors wl (left) and wr (right), per cell width.
func (l Limiter) PrimSlope(wl, w, wr Prim) Prim {
	s := Prim{
		Rho: l.Slope(w.Rho-wl.Rho, wr.Rho-w.Rho),
		Vx:  l.Slope(w.Vx-wl.Vx, wr.Vx-w.Vx),
		Vy:  l.Slope(w.Vy-wl.Vy, wr.Vy-w.Vy),
		Vz:  l.Slope(w.Vz-wl.Vz, wr.Vz-w.Vz),
		P:   l.Slope(w.P-wl.P, wr.P-w.P),
	}
	for i := range s.Scalar {
		s.Scalar[i] = l.Slope(w.Scalar[i]-wl.Scalar[i], wr.Scalar[i]-w.Scalar[i])
	}
	return s
}

// Faces returns the reconstructed values of cell w with slope s at its
// left (−x) and right (+x) faces, w ∓ s/2.
func Faces(w, s Prim) (left, right Prim) {
	left, right = w, w
	left.Rho -= 0.5 * s.Rho
	right.Rho += 0.5 * s.Rho
	left.Vx -= 0.5 * s.Vx
	right.Vx += 0.5 * s.Vx
	left.Vy -= 0.5 * s.Vy
	right.Vy += 0.5 * s.Vy
	left.Vz -= 0.5 * s.Vz
	right.Vz += 0.5 * s.Vz
	left.P -= 0.5 * s.P
	right.P += 0.5 * s.P
	for i := range s.Scalar {
		left.Scalar[i] -= 0.5 * s.Scalar[i]
		right.Scalar[i] += 0.5 * s.Scalar[i]
	}
	return left, right
}

// PencilFluxes computes the HLLC fluxes through the faces of a row of
// cells along x. w holds n+4 primitive states: two ghost cells, the n
// cells, two ghost cells. flux must hold n+1 entries; flux[i] is the flux
// through the face between w[i+1] and w[i+2] (the left face of the row's
// cell i). Faces are reconstructed with limiter lim. It returns the
// largest signal speed. Nothing is allocated; lengths that do not fit are
// a programming error and panic.
func (g IdealGas) PencilFluxes(lim Limiter, w []Prim, flux []Cons) float64 {
	n := len(w) - 4
	if n < 1 || len(flux) < n+1 {
		panic(fmt.Sprintf("hydro: PencilFluxes: %d states and %d fluxes, want n+4 and n+1 with n >= 1", len(w), len(flux)))
	}
	var smax float64
	// Right face value of cell w[1], carried along the row.
	_, prevRight := Faces(w[1], lim.PrimSlope(w[0], w[1], w[2]))
	for i := 0; i <= n; i++ {
		c := i + 2
		left, right := Faces(w[c], lim.PrimSlope(w[c-1], w[c], w[c+1]))
		f, s := g.HLLC(prevRight, left)
		flux[i] = f
		smax = math.Max(smax, s)
		prevRight = right
	}
	return smax
}

// HancockFaces returns the face values of the MUSCL–Hancock scheme (van
// Leer 1984, SIAM J. Sci. Stat. Comput. 5, 1; Toro 2009, ch. 14; from
// memory) for cell w with slope s (per cell width, e.g. from PrimSlope) and
// dtdx = dt/dx: the cell is first evolved over half a step by the
// primitive equations, w̃ = w − (dt / 2dx) A(w) s, with
//
//	A(w) s = (u s_ρ + ρ s_u,  u s_u + s_p/ρ,  u s_v,  u s_w,  γ p s_u + u s_p,  u s_X),
//
// and the faces are w̃ ∓ s/2. Fluxes between such faces make the scheme
// second order in time with a single flux evaluation per face. The result
// is not checked: a caller should fall back to w (first order) where a
// face density or pressure is not positive.
func (g IdealGas) HancockFaces(w, s Prim, dtdx float64) (left, right Prim) {
	h := 0.5 * dtdx
	u := w.Vx
	p := w
	p.Rho -= h * (u*s.Rho + w.Rho*s.Vx)
	p.Vx -= h * (u*s.Vx + s.P/w.Rho)
	p.Vy -= h * u * s.Vy
	p.Vz -= h * u * s.Vz
	p.P -= h * (g.Gamma*w.P*s.Vx + u*s.P)
	for i := range s.Scalar {
		p.Scalar[i] -= h * u * s.Scalar[i]
	}
	return Faces(p, s)
}

// CapVelocitySlope returns slope s of cell w (per cell width, as from
// PrimSlope) with its three velocity slopes scaled down by one common
// factor, where needed, so that the kinetic energy the linear velocity
// profile adds to the cell, ρ |s_v|^2 / 24 per unit volume (the mean of
// ½ ρ (s_v ξ)^2 over ξ in [−½, ½]), is at most share times the cell's
// internal energy ρ e:
//
//	|s_v|^2 <= 24 share e,   e = p / ((γ − 1) ρ).
//
// A limited slope scaled toward zero stays limited. Where cold gas moves
// fast and kinetic energy dwarfs heat, an uncapped slope gives the face
// states more kinetic energy than the cell holds beyond its mean motion,
// and the total-energy fluxes then drain the cell's heat below zero. With
// γ = 5/3, share = 0.3 allows a velocity change across the cell of about
// 2.5 sound speeds: smooth flow and hot gas stay well inside it, shocks
// into cold gas and the cold shells behind them do not. Density, pressure
// and scalar slopes are left as they are.
func (g IdealGas) CapVelocitySlope(w, s Prim, share float64) Prim {
	v2 := s.Vx*s.Vx + s.Vy*s.Vy + s.Vz*s.Vz
	if v2 == 0 {
		return s
	}
	limit := 24 * share * g.InternalEnergy(w)
	if !(v2 > limit) {
		return s
	}
	f := 0.0
	if limit > 0 {
		f = math.Sqrt(limit / v2)
	}
	s.Vx *= f
	s.Vy *= f
	s.Vz *= f
	return s
}
