package feedback

import (
	"fmt"
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
	// KineticFraction in [0, 1]; the zero value means SedovKineticFraction.
	KineticFraction float64
}

// Name is "kinetic".
func (Kinetic) Name() string { return "kinetic" }

func (s Kinetic) fraction() float64 {
	if s.KineticFraction == 0 {
		return SedovKineticFraction
	}
	return s.KineticFraction
}

// Deposit implements Scheme.
func (s Kinetic) Deposit(nb *Neighborhood, out []Deposit) (float64, error) {
	f := s.fraction()
	if !(f >= 0 && f <= 1) {
		return 0, fmt.Errorf("kinetic scheme: kinetic fraction %g outside [0, 1]", f)
	}
	src := nb.Source
	for j := range nb.Momentum {
		w := nb.Weight[j]
		nb.Momentum[j] = math.Sqrt(2 * (nb.Mass[j] + w*src.Mass) * f * nb.EnergyWeight[j] * src.Energy)
		nb.HeatCap[j] = math.Inf(1)
	}
	return nb.CoupleRadial(out), nil
}

// TerminalMomentum couples the momentum a remnant really delivers whether
// or not the host resolves its cooling radius.
//
// Neighbor j, of mass m_j, receives ejecta dm_j = w_j M and energy share
// e_j = w_j E (w_j its isotropy-corrected weight). While the cooling radius
// is resolved, it gets the momentum of energy-conserving sweep-up,
//
//	p_j = sqrt(2 (m_j + dm_j) f_K e_j),  f_K = (dm_j + 0.28 m_j) / (dm_j + m_j),
//
// which grows as the square root of the mass loaded: f_K interpolates (our
// own choice) between free expansion, where the ejecta carry all the energy
// as kinetic energy and p_j = w_j sqrt(2 M E), and the Sedov–Taylor phase,
// where 28% of the energy is kinetic (Chevalier 1974). Once the loaded
// mass passes the cooling mass, p_j exceeds the neighbor's share of the
// terminal momentum, w_j p_t(E, n_j, Z_j), from the chosen Fit at the
// neighbor's own hydrogen density and metallicity, and is capped there.
// A capped neighbor keeps only the heat of a cooled remnant: the
// Sedov–Taylor thermal share 0.72 e_j scaled by (R_j / R_cool)^-6.5 (Thornton
// et al. 1998), with R_j the radius of a sphere of the neighbor's density
// holding (m_j + dm_j) / w_j, the mass the whole remnant would have swept at
// this neighbor's loading. The rest of its energy share is booked as
// radiated. Several simultaneous supernovae from one star are treated as one
// remnant of their summed energy (common practice).
type TerminalMomentum struct {
	// Fit is the terminal momentum and cooling radius fit.
	Fit RemnantFit
}

// Name is "terminal-momentum".
func (TerminalMomentum) Name() string { return "terminal-momentum" }

// sweepUp is neighbor j's energy-conserving momentum (the loaded mass
// m_j + dm_j taking the kinetic share f_K of its energy share), the remnant
// of the release's energy eErg (erg) in the neighbor's gas, and whether
// that momentum exceeds the neighbor's share of the terminal momentum.
func (nb *Neighborhood) sweepUp(j int, fit RemnantFit, eErg float64) (float64, Remnant, bool) {
	src := nb.Source
	w := nb.Weight[j]
	m, dm := nb.Mass[j], w*src.Mass
	mt := m + dm
	fk := (dm + SedovKineticFraction*m) / mt
	pec := math.Sqrt(2 * mt * fk * nb.EnergyWeight[j] * src.Energy)
	if eErg <= 0 || w <= 0 {
		return pec, Remnant{}, false
	}
	rem := fit.Remnant(eErg, hydrogenDensity(nb.Density[j], nb.Units), nb.Metallicity[j]/SolarMetallicity)
	return pec, rem, pec > w*rem.TerminalMomentum/nb.Units.MomentumGCmPS()
}

// Deposit implements Scheme.
func (s TerminalMomentum) Deposit(nb *Neighborhood, out []Deposit) (float64, error) {
	src := nb.Source
	u := nb.Units
	eErg := src.Energy * u.EnergyErg()
	rhoUnit := u.DensityGCm3()
	pUnit := u.MomentumGCmPS()
	mUnit := u.MassG
	for j := range nb.Momentum {
		w := nb.Weight[j]
		e := nb.EnergyWeight[j] * src.Energy
		pec, rem, capped := nb.sweepUp(j, s.Fit, eErg)
		nb.HeatCap[j] = math.Inf(1)
		nb.Momentum[j] = pec
		if !capped {
			continue
		}
		nb.Momentum[j] = w * rem.TerminalMomentum / pUnit
		nb.MarkCapped()
		// (R_j / R_cool)^-6.5 with R_j^3 / R_cool^3 = swept / cooling mass.
		swept := (nb.Mass[j] + w*src.Mass) / w * mUnit
		ratio := swept / rem.CoolingMass(nb.Density[j]*rhoUnit)
		keep := SedovThermalFraction
		if ratio > 1 {
			keep *= math.Exp(PostCoolingThermalExponent / 3 * math.Log(ratio))
		}
		nb.HeatCap[j] = keep * e
	}
	rad := nb.CoupleRadial(out)
	for j := range out {
		if nb.HeatCap[j] < math.Inf(1) {
			out[j].Flags |= FlagCapped
		}
	}
	return rad, nil
}
