package hydro

import "math"

// HLLC returns the HLLC flux through an x-normal face between left state l
// and right state r, and the largest signal speed |S| (for the time step).
// Both states must have positive density and pressure.
func (g IdealGas) HLLC(l, r Prim) (Cons, float64) {
	f, smax, _ := g.HLLCContact(l, r)
	return f, smax
}

// HLLCContact is HLLC that also returns the normal velocity of the gas at
// the face: the contact speed S* where the face lies between the two outer
// waves, or the upwind state's velocity where both waves move the same way.
// It is the face velocity of a p dV term (a separately evolved internal
// energy: Bryan et al. 1995, Comput. Phys. Commun. 89, 149), taken from the
// same Riemann solution as the flux.
func (g IdealGas) HLLCContact(l, r Prim) (f Cons, smax, contact float64) {
	gm1 := g.Gamma - 1
	// Total energy densities and sound speeds.
	el := l.P/gm1 + 0.5*l.Rho*(l.Vx*l.Vx+l.Vy*l.Vy+l.Vz*l.Vz)
	er := r.P/gm1 + 0.5*r.Rho*(r.Vx*r.Vx+r.Vy*r.Vy+r.Vz*r.Vz)
	cl := math.Sqrt(g.Gamma * l.P / l.Rho)
	cr := math.Sqrt(g.Gamma * r.P / r.Rho)
	// Einfeldt wave speeds with Roe averages.
	sl, sr := math.Sqrt(l.Rho), math.Sqrt(r.Rho)
	inv := 1 / (sl + sr)
	uRoe := (sl*l.Vx + sr*r.Vx) * inv
	hRoe := ((el+l.P)/sl + (er+r.P)/sr) * inv
	vy := (sl*l.Vy + sr*r.Vy) * inv
	vz := (sl*l.Vz + sr*r.Vz) * inv
	c2 := gm1 * (hRoe - 0.5*(uRoe*uRoe+vy*vy+vz*vz))
	cRoe := math.Sqrt(math.Max(c2, 0))
	sL := math.Min(l.Vx-cl, uRoe-cRoe)
	sR := math.Max(r.Vx+cr, uRoe+cRoe)
	smax = math.Max(math.Abs(sL), math.Abs(sR))

	switch {
	case sL >= 0:
		return physicalFlux(l, el), smax, l.Vx
	case sR <= 0:
		return physicalFlux(r, er), smax, r.Vx
	}
	ml := l.Rho * (sL - l.Vx)
	mr := r.Rho * (sR - r.Vx)
	sStar := (r.P - l.P + l.Vx*ml - r.Vx*mr) / (ml - mr)
	if sStar >= 0 {
		return starFlux(l, el, sL, sStar), smax, sStar
	}
	return starFlux(r, er, sR, sStar), smax, sStar
}

// physicalFlux is the x-flux of state w with total energy density e.
func physicalFlux(w Prim, e float64) Cons {
	m := w.Rho * w.Vx
	f := Cons{
		Mass:   m,
		MomX:   m*w.Vx + w.P,
		MomY:   m * w.Vy,
		MomZ:   m * w.Vz,
		Energy: (e + w.P) * w.Vx,
	}
	for i, s := range w.Scalar {
		f.Scalar[i] = m * s
	}
	return f
}

// starFlux is F_K + S_K (U*_K − U_K) (Toro 2009, eqs. 10.38–10.39) for
// state w with total energy density e, with U*_K written so that S* = u_K
// gives U*_K = U_K exactly.
func starFlux(w Prim, e, sK, sStar float64) Cons {
	k := (sK - w.Vx) / (sK - sStar)
	m := w.Rho * w.Vx
	f := Cons{
		Mass:   m + sK*(k*w.Rho-w.Rho),
		MomX:   m*w.Vx + w.P + sK*(k*w.Rho*sStar-m),
		MomY:   m*w.Vy + sK*(k*w.Rho*w.Vy-w.Rho*w.Vy),
		MomZ:   m*w.Vz + sK*(k*w.Rho*w.Vz-w.Rho*w.Vz),
		Energy: (e+w.P)*w.Vx + sK*(k*(e+(sStar-w.Vx)*(w.Rho*sStar+w.P/(sK-w.Vx)))-e),
	}
	for i, s := range w.Scalar {
		rs := w.Rho * s
		f.Scalar[i] = m*s + sK*(k*rs-rs)
	}
	return f
}
