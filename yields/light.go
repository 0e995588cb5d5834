package yields

import "math"

// powerSegment is coef·m^exp on [lo, hi).
type powerSegment struct{ lo, hi, coef, exp float64 }

// piecewisePower is a per-star quantity made of power-law segments; zero
// outside them.
type piecewisePower []powerSegment

func (p piecewisePower) at(m float64) float64 {
	for _, s := range p {
		if m >= s.lo && m < s.hi {
			return s.coef * math.Pow(m, s.exp)
		}
	}
	return 0
}

// integrate is ∫ q(m) dN over [m1, m2] for the IMF, in closed form.
func (p piecewisePower) integrate(f *IMF, m1, m2 float64) float64 {
	var s float64
	for _, g := range p {
		a, b := math.Max(m1, g.lo), math.Min(m2, g.hi)
		if a < b {
			s += g.coef * f.Moment(g.exp, a, b)
		}
	}
	return s
}

// massLuminosity is the main-sequence mass–luminosity relation in Lsun, the
// textbook piecewise power law (common practice; from memory, e.g. Duric
// 2004, Advanced Astrophysics): 0.23 m^2.3 below 0.43 Msun, m^4 to 2 Msun,
// 1.4 m^3.5 to 55 Msun and 32000 m above.
func massLuminosity() piecewisePower {
	return piecewisePower{
		{0, 0.43, 0.23, 2.3},
		{0.43, 2, 1, 4},
		{2, 55, 1.4, 3.5},
		{55, math.Inf(1), 32000, 1},
	}
}

// ionizingRatePerStar is the hydrogen-ionizing photon rate of a
// main-sequence star in photons/s: a simple power-law fit through
// log10 Q = 47.6 at 16 Msun, 48.6 at 26 Msun and 49.65 at 58 Msun (from
// memory, the dwarf O-star scale of Martins, Schaerer & Hillier 2005, A&A
// 436, 1049: O9.5V, O7V, O3V), continued as m^1.5 above 58 Msun, falling as
// m^8 from 16 down to 8 Msun, and zero below 8 Msun (B stars later than
// about B2 add little).
func ionizingRatePerStar() piecewisePower {
	q16, q26, q58 := math.Pow(10, 47.6), math.Pow(10, 48.6), math.Pow(10, 49.65)
	s1 := math.Log10(q26/q16) / math.Log10(26.0/16)
	s2 := math.Log10(q58/q26) / math.Log10(58.0/26)
	return piecewisePower{
		{8, 16, q16 / math.Pow(16, 8), 8},
		{16, 26, q16 / math.Pow(16, s1), s1},
		{26, 58, q26 / math.Pow(26, s2), s2},
		{58, math.Inf(1), q58 / math.Pow(58, 1.5), 1.5},
	}
}
