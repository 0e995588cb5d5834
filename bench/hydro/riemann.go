package hydro

import "math"

// HLLC returns the HLLC flux through an x-normal face between left state l
// and right state r, and the largest signal speed |S| (for the time step).
// Both states must have positive density and pressure.
func (g IdealGas) HLLC(l, r Prim) (Cons, float64) {
	cl, cr := g.SoundSpeed(l), g.SoundSpeed(r)
	// Einfeldt wave speeds with Roe averages.
	sl, sr := math.Sqrt(l.Rho), math.Sqrt(r.Rho)
	inv := 1 / (sl + sr)
	uRoe := (sl*l.Vx + sr*r.Vx) * inv
	hl := (g.Gamma*l.P/(g.Gamma-1) + 0.5*l.Rho*(l.Vx*l.Vx+l.Vy*l.Vy+l.Vz*l.Vz)) / l.Rho
	hr := (g.Gamma*r.P/(g.Gamma-1) + 0.5*r.Rho*(r.Vx*r.Vx+r.Vy*r.Vy+r.Vz*r.Vz)) / r.Rho
	hRoe := (sl*hl + sr*hr) * inv
	vy := (sl*l.Vy + sr*r.Vy) * inv
	vz := (sl*l.Vz + sr*r.Vz) * inv
	c2 := (g.Gamma - 1) * (hRoe - 0.5*(uRoe*uRoe+vy*vy+vz*vz))
	cRoe := math.Sqrt(math.Max(c2, 0))
	sL := math.Min(l.Vx-cl, uRoe-cRoe)
	sR := math.Max(r.Vx+cr, uRoe+cRoe)
	smax := math.Max(math.Abs(sL), math.Abs(sR))

	ul, ur := g.Cons(l), g.Cons(r)
	if sL >= 0 {
		return g.flux(l, ul), smax
	}
	if sR <= 0 {
		return g.flux(r, ur), smax
	}
	ml := l.Rho * (sL - l.Vx)
	mr := r.Rho * (sR - r.Vx)
	sStar := (r.P - l.P + l.Vx*ml - r.Vx*mr) / (ml - mr)
	if sStar >= 0 {
		return starFlux(g.flux(l, ul), l, ul, sL, sStar), smax
	}
	return starFlux(g.flux(r, ur), r, ur, sR, sStar), smax
}

// starFlux is F_K + S_K (U*_K − U_K) (Toro 2009, eqs. 10.38–10.39), with
// U*_K written so that S* = u_K gives U*_K = U_K exactly.
func starFlux(f Cons, w Prim, u Cons, sK, sStar float64) Cons {
	k := (sK - w.Vx) / (sK - sStar)
	st := Cons{
		Mass:   k * w.Rho,
		MomX:   k * w.Rho * sStar,
		MomY:   k * u.MomY,
		MomZ:   k * u.MomZ,
		Energy: k * (u.Energy + (sStar-w.Vx)*(w.Rho*sStar+w.P/(sK-w.Vx))),
	}
	for i, s := range u.Scalar {
		st.Scalar[i] = k * s
	}
	return f.Add(sK, st.Add(-1, u))
}
