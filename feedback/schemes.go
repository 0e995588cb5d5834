package feedback

import (
	"math"
)

// ThermalDump deposits all released energy as heat: each neighbor receives
// its share of the ejected mass, species and energy, and the ejecta's
// lab-frame momentum, but no radial kick. In dense gas at coarse resolution
// the heat is radiated by the host's cooling almost at once; this is the
// baseline the other schemes are compared with.
type ThermalDump struct{}

// Name is "thermal-dump".
func (ThermalDump) Name() string { return "thermal-dump" }

// Deposit implements Scheme.
func (ThermalDump) Deposit(nb *Neighborhood, out []Deposit) (float64, error) {
	for j := range nb.Momentum {
		nb.Momentum[j] = 0
		nb.HeatCap[j] = math.Inf(1)
	}
	return nb.CoupleRadial(out), nil
}

// Kinetic hands a fixed fraction of the released energy to the gas as
// radial kicks and the rest as heat. Neighbor j, of mass m_j, receiving
// ejecta dm_j and energy share e_j, gets the momentum whose kinetic energy
// in the star's frame is KineticFraction times its share,
// p_j = sqrt(2 (m_j + dm_j) f e_j).
type Kinetic struct {
	// KineticFraction in [0, 1]: zero gives no kicks (a thermal dump),
	// one gives all the energy as kicks. DefaultKinetic uses
	// SedovKineticFraction.
	KineticFraction float64
}

// DefaultKinetic is the kinetic scheme with the Sedov–Taylor kinetic
// fraction, SedovKineticFraction.
func DefaultKinetic() Kinetic { return Kinetic{KineticFraction: SedovKineticFraction} }

// Validate checks the kinetic fraction (in [0, 1]).
func (s Kinetic) Validate() error {
	if !(s.KineticFraction >= 0 && s.KineticFraction <= 1) {
		return errorf(ErrInvalidArgument, "kinetic scheme: kinetic fraction %g outside [0, 1]", s.KineticFraction)
	}
	return nil
}

// Name is "kinetic".
func (Kinetic) Name() string { return "kinetic" }

// Deposit implements Scheme.
func (s Kinetic) Deposit(nb *Neighborhood, out []Deposit) (float64, error) {
	if err := s.Validate(); err != nil {
		return 0, err
	}
	f := s.KineticFraction
	src := nb.Source
	for j := range nb.Momentum {
		w := nb.Weight[j]
		nb.Momentum[j] = math.Sqrt(2 * (nb.Mass[j] + w*src.Mass) * f * nb.EnergyWeight[j] * src.Energy)
		nb.HeatCap[j] = math.Inf(1)
	}
	return nb.CoupleRadial(out), nil
}

// TerminalMomentum couples the momentum a remnant really delivers whether
// or not the host resolves its cooling radius. It follows the
// vector-weighted coupling of Hopkins et al. 2018 (MNRAS 477, 1578, "How
// to model supernovae in simulations of star and galaxy formation"):
// mass, metals and energy are shared with weights whose unit directions
// balance (here the isotropy correction), and the momentum is that of
// energy-conserving sweep-up of the coupled mass while the host resolves
// the remnant's cooling, and the terminal momentum of a radiative remnant
// once the coupled mass exceeds the cooling mass.
//
// The momentum is computed for the star as a whole and then shared, so
// that it does not depend on the weighting: summing each neighbor's own
// sweep-up momentum sqrt(2 f (m_j + dm_j) e_j) gives the momentum of the
// coupled mass only when the energy shares e_j follow the masses (by
// Cauchy–Schwarz it falls short otherwise, by a third with kernel-volume
// weights). The star's N events (Source.Events; at least one) are N
// remnants of energy E/N and ejecta M/N, each sweeping an equal part
// M_c/N of the coupled mass M_c = sum_j m_j, and the total radial momentum
// is N p_1(M_c/N), with p_1 the chosen Fit's momentum law
// (Remnant.MomentumAt, evaluated with the fit's quantities averaged over
// the neighbors by weight, each at its own density and metallicity). In
// the energy-conserving phase this equals the momentum of one blast of
// the summed energy, sqrt(2 E (M + f M_c)); once radiative it is N times
// the single-event momentum, so that correlated supernovae each deliver
// nearly the single-supernova momentum (Kim & Ostriker 2015, ApJ 802,
// 99), and the momentum of a population does not depend on how many steps
// its supernovae are spread over wherever the coupled mass exceeds the
// cooling mass of each step's events (M_c > N M_s).
//
// The total is shared as p_j proportional to sqrt((m_j + dm_j) e_j), which
// gives every neighbor the same kinetic fraction of its energy share and
// reduces to mass-proportional momenta when the shares follow the masses;
// with unequal shares that fraction, and so the kinetic energy handed out,
// is larger than for equal shares (the price of delivering the full
// momentum), and the heat is the rest. Once radiative, each neighbor keeps
// at most the heat the law allows (the remnant's heat at the switch,
// falling as (R/R_s)^-6.5, Thornton et al. 1998) and the rest of its
// energy share is booked as radiated. Momentum and heat are continuous in
// the coupled mass across the switch.
type TerminalMomentum struct {
	// Fit is the remnant fit.
	Fit RemnantFit
	// Table, when set, replaces Fit: the remnant comes from a remnant table
	// (RemnantTable.Remnant), e.g. one calibrated for the host's own
	// cooling. A neighbor outside the table's grid (when it refuses them)
	// returns the star's release undeposited with ErrOutsideRemnantTable.
	Table *RemnantTable
}

// Name is "terminal-momentum".
func (TerminalMomentum) Name() string { return "terminal-momentum" }

// Deposit implements Scheme.
func (s TerminalMomentum) Deposit(nb *Neighborhood, out []Deposit) (float64, error) {
	if err := nb.remnantShares(s.Fit, s.Table, math.Max(nb.Source.Events, 1)); err != nil {
		return 0, err
	}
	rad := nb.CoupleRadial(out)
	if nb.capped {
		for j := range out {
			out[j].Flags |= FlagCapped
		}
	}
	return rad, nil
}

// remnantShares fills nb.Momentum and nb.HeatCap for the source's energy
// coupled as events remnants of the fit, or of the table when it is set
// (see TerminalMomentum), and marks the star capped when they are
// radiative.
func (nb *Neighborhood) remnantShares(fit RemnantFit, table *RemnantTable, events float64) error {
	src := nb.Source
	u := nb.Units
	for j := range nb.Momentum {
		nb.Momentum[j] = 0
		nb.HeatCap[j] = math.Inf(1)
	}
	if !(src.Energy > 0) || !(events > 0) {
		return nil
	}
	e1 := src.Energy / events * u.EnergyErg() // erg per event
	var avg Remnant
	var growth, wsum float64 // a table's growth exponents differ by neighbor: weighted mean
	mc := 0.0
	for j, w := range nb.Weight {
		mc += nb.Mass[j]
		if w == 0 {
			continue
		}
		var r Remnant
		if table != nil {
			var err error
			if r, err = table.Remnant(e1, hydrogenDensity(nb.Density[j], u), nb.Metallicity[j]); err != nil {
				return err
			}
		} else {
			r = fit.Remnant(e1, hydrogenDensity(nb.Density[j], u), nb.Metallicity[j])
		}
		avg.CoolingRadius += w * r.CoolingRadius
		avg.SwitchMass += w * r.SwitchMass
		avg.SwitchMomentum += w * r.SwitchMomentum
		avg.TerminalMomentum += w * r.TerminalMomentum
		avg.GrowthExponent = r.GrowthExponent
		growth += w * r.GrowthExponent
		wsum += w
	}
	if table != nil && wsum > 0 {
		avg.GrowthExponent = growth / wsum
	}
	p1, keep, radiative := avg.MomentumAt(e1, src.Mass/events*u.MassG, mc/events*u.MassG)
	p := events * p1 / u.MomentumGCmPS()
	nb.shareEnergyForMomentum(p)
	sum := 0.0
	for j := range nb.Momentum {
		sj := math.Sqrt((nb.Mass[j] + nb.Weight[j]*src.Mass) * nb.EnergyWeight[j])
		nb.Momentum[j] = sj
		sum += sj
	}
	if !(sum > 0) {
		return nil
	}
	for j := range nb.Momentum {
		nb.Momentum[j] *= p / sum
		if radiative {
			nb.HeatCap[j] = keep * nb.EnergyWeight[j] * src.Energy
		}
	}
	if radiative {
		nb.MarkCapped()
	}
	return nil
}

// maxKineticShare is the largest kinetic fraction of its energy share the
// remnant momentum may ask of a neighbor before the energy shares are
// moved toward the masses; the margin leaves room for the isotropy
// correction, which changes the momenta a little (our choice).
const maxKineticShare = 0.9

// shareEnergyForMomentum makes sure the energy shares can pay for the
// radial momentum p (code units) shared as p_j proportional to
// sqrt(mt_j e_j), mt_j = m_j + dm_j: that sharing asks every neighbor for
// the kinetic fraction c^2 = p^2 / (2 E (sum_j sqrt(mt_j e_j))^2) of its
// share e_j, which is smallest, p^2 / 2 E M_t, when the shares follow the
// loaded masses and grows as they depart from them. When c^2 would exceed
// maxKineticShare, the energy shares are moved toward the mass shares,
// e_j = (1 - l) w_j + l mt_j / M_t, by the least l that brings it back
// (bisection; the sum is concave in l, so the kinetic fraction falls
// monotonically), or all the way when even mass shares cannot.
func (nb *Neighborhood) shareEnergyForMomentum(p float64) {
	src := nb.Source
	mt := 0.0
	for j := range nb.Mass {
		mt += nb.Mass[j] + nb.Weight[j]*src.Mass
	}
	if !(p > 0) || !(mt > 0) || !(src.Energy > 0) {
		return
	}
	need := p * p / (2 * src.Energy * mt) // the kinetic fraction with mass shares
	eta2 := func(l float64) float64 {
		s := 0.0
		for j := range nb.Mass {
			m := nb.Mass[j] + nb.Weight[j]*src.Mass
			s += math.Sqrt(m * ((1-l)*nb.EnergyWeight[j] + l*m/mt))
		}
		return s * s / mt
	}
	if need <= maxKineticShare*eta2(0) {
		return
	}
	lo, hi := 0.0, 1.0
	if need < maxKineticShare {
		for it := 0; it < 40; it++ {
			mid := 0.5 * (lo + hi)
			if need > maxKineticShare*eta2(mid) {
				lo = mid
			} else {
				hi = mid
			}
		}
	}
	for j := range nb.EnergyWeight {
		m := nb.Mass[j] + nb.Weight[j]*src.Mass
		nb.EnergyWeight[j] = (1-hi)*nb.EnergyWeight[j] + hi*m/mt
	}
}
