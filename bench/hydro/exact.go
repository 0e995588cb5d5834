package hydro

import (
	"errors"
	"fmt"
	"math"
)

// ErrVacuum marks a Riemann problem whose states generate vacuum: the
// exact solver does not treat it.
var ErrVacuum = errors.New("riemann problem generates vacuum")

// ExactSolution is the exact solution of a Riemann problem for an ideal
// gas (Toro 2009, ch. 4): the star-region pressure and velocity and the
// sampled state at any x/t.
type ExactSolution struct {
	g          IdealGas
	l, r       Prim
	cl, cr     float64
	PStar      float64 // star-region pressure
	UStar      float64 // star-region (contact) velocity
	RhoStarL   float64 // density left of the contact
	RhoStarR   float64 // density right of the contact
	iterations int
}

// Exact solves the Riemann problem between left state l and right state r
// with Newton iteration on the pressure function (Toro 2009, sect. 4.3).
func (g IdealGas) Exact(l, r Prim) (ExactSolution, error) {
	if err := CheckPrim(l); err != nil {
		return ExactSolution{}, fmt.Errorf("hydro: exact Riemann: left: %w", err)
	}
	if err := CheckPrim(r); err != nil {
		return ExactSolution{}, fmt.Errorf("hydro: exact Riemann: right: %w", err)
	}
	s := ExactSolution{g: g, l: l, r: r, cl: g.SoundSpeed(l), cr: g.SoundSpeed(r)}
	gm := g.Gamma
	if 2/(gm-1)*(s.cl+s.cr) <= r.Vx-l.Vx {
		return ExactSolution{}, fmt.Errorf("hydro: exact Riemann: %w", ErrVacuum)
	}
	// Start from the two-rarefaction guess clipped below (Toro 2009, eq. 4.46),
	// or the linearized guess.
	du := r.Vx - l.Vx
	p := math.Max(1e-12*math.Min(l.P, r.P), 0.5*(l.P+r.P)-0.125*du*(l.Rho+r.Rho)*(s.cl+s.cr))
	for s.iterations = 0; s.iterations < 100; s.iterations++ {
		fl, dl := s.pressureFunction(p, l, s.cl)
		fr, dr := s.pressureFunction(p, r, s.cr)
		next := p - (fl+fr+du)/(dl+dr)
		if next <= 0 {
			next = 1e-6 * p
		}
		change := 2 * math.Abs(next-p) / (next + p)
		p = next
		if change < 1e-14 {
			break
		}
	}
	fl, _ := s.pressureFunction(p, l, s.cl)
	fr, _ := s.pressureFunction(p, r, s.cr)
	s.PStar = p
	s.UStar = 0.5*(l.Vx+r.Vx) + 0.5*(fr-fl)
	s.RhoStarL = s.starDensity(l, p)
	s.RhoStarR = s.starDensity(r, p)
	return s, nil
}

// pressureFunction is f_K(p) and its derivative (Toro 2009, eqs. 4.6–4.7, 4.37).
func (s ExactSolution) pressureFunction(p float64, w Prim, c float64) (float64, float64) {
	gm := s.g.Gamma
	if p > w.P { // shock
		a := 2 / ((gm + 1) * w.Rho)
		b := (gm - 1) / (gm + 1) * w.P
		q := math.Sqrt(a / (p + b))
		return (p - w.P) * q, q * (1 - 0.5*(p-w.P)/(p+b))
	}
	// rarefaction
	pr := p / w.P
	f := 2 * c / (gm - 1) * (math.Pow(pr, (gm-1)/(2*gm)) - 1)
	d := 1 / (w.Rho * c) * math.Pow(pr, -(gm+1)/(2*gm))
	return f, d
}

func (s ExactSolution) starDensity(w Prim, p float64) float64 {
	gm := s.g.Gamma
	if p > w.P {
		r := p / w.P
		k := (gm - 1) / (gm + 1)
		return w.Rho * (r + k) / (k*r + 1)
	}
	return w.Rho * math.Pow(p/w.P, 1/gm)
}

// Sample is the state at x/t = xi (Toro 2009, sect. 4.5). Transverse
// velocities and scalars are those of the side of the contact xi is on.
func (s ExactSolution) Sample(xi float64) Prim {
	gm := s.g.Gamma
	l, r := s.l, s.r
	if xi <= s.UStar { // left of the contact
		out := l
		if s.PStar > l.P { // left shock
			sl := l.Vx - s.cl*math.Sqrt((gm+1)/(2*gm)*s.PStar/l.P+(gm-1)/(2*gm))
			if xi >= sl {
				out.Rho, out.Vx, out.P = s.RhoStarL, s.UStar, s.PStar
			}
			return out
		}
		head := l.Vx - s.cl
		cStar := s.cl * math.Pow(s.PStar/l.P, (gm-1)/(2*gm))
		tail := s.UStar - cStar
		switch {
		case xi <= head:
		case xi >= tail:
			out.Rho, out.Vx, out.P = s.RhoStarL, s.UStar, s.PStar
		default:
			k := 2/(gm+1) + (gm-1)/((gm+1)*s.cl)*(l.Vx-xi)
			out.Rho = l.Rho * math.Pow(k, 2/(gm-1))
			out.Vx = 2 / (gm + 1) * (s.cl + (gm-1)/2*l.Vx + xi)
			out.P = l.P * math.Pow(k, 2*gm/(gm-1))
		}
		return out
	}
	out := r
	if s.PStar > r.P { // right shock
		sr := r.Vx + s.cr*math.Sqrt((gm+1)/(2*gm)*s.PStar/r.P+(gm-1)/(2*gm))
		if xi <= sr {
			out.Rho, out.Vx, out.P = s.RhoStarR, s.UStar, s.PStar
		}
		return out
	}
	head := r.Vx + s.cr
	cStar := s.cr * math.Pow(s.PStar/r.P, (gm-1)/(2*gm))
	tail := s.UStar + cStar
	switch {
	case xi >= head:
	case xi <= tail:
		out.Rho, out.Vx, out.P = s.RhoStarR, s.UStar, s.PStar
	default:
		k := 2/(gm+1) - (gm-1)/((gm+1)*s.cr)*(r.Vx-xi)
		out.Rho = r.Rho * math.Pow(k, 2/(gm-1))
		out.Vx = 2 / (gm + 1) * (-s.cr + (gm-1)/2*r.Vx + xi)
		out.P = r.P * math.Pow(k, 2*gm/(gm-1))
	}
	return out
}
