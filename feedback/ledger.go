package feedback

import (
	"math"

	"github.com/ejecta-dev/ejecta/yields"
)

// Quantities is an amount of every conserved quantity, in code units:
// mass, the mass of each species, lab-frame momentum, and total energy
// (thermal plus lab-frame kinetic).
type Quantities struct {
	Mass     float64
	Species  yields.Abundances
	Momentum [3]float64
	Energy   float64
}

// Add adds o to q.
func (q *Quantities) Add(o *Quantities) {
	q.Mass += o.Mass
	for i := range q.Species {
		q.Species[i] += o.Species[i]
	}
	for a := 0; a < 3; a++ {
		q.Momentum[a] += o.Momentum[a]
	}
	q.Energy += o.Energy
}

// Sub subtracts o from q.
func (q *Quantities) Sub(o *Quantities) {
	q.Mass -= o.Mass
	for i := range q.Species {
		q.Species[i] -= o.Species[i]
	}
	for a := 0; a < 3; a++ {
		q.Momentum[a] -= o.Momentum[a]
	}
	q.Energy -= o.Energy
}

// Ledger accounts for one call: everything that went in is either
// deposited in the gas, radiated (energy an unresolved remnant loses,
// booked explicitly), or undeposited (returned to the caller, e.g. a star
// with no gas around it). In = Deposited + Radiated + Undeposited to
// round-off; Imbalance returns the difference. All amounts in code units.
type Ledger struct {
	In          Quantities
	Deposited   Quantities
	Undeposited Quantities
	// Radiated is the energy booked as lost to cooling.
	Radiated float64
	// Stars is the number of sources handled; Skipped those whose release
	// was returned undeposited (no neighbors, bad input).
	Stars, Skipped int
	// Capped counts sources whose remnant was radiative: the coupled mass
	// was past the remnant fit's switch (cooling radius unresolved).
	Capped int
	// Limited counts sources whose kicks were scaled down so that no
	// element's heat would be negative.
	Limited int
	// MaxIsotropyResidual is the largest, over sources, of |sum p_j| /
	// sum |p_j| for the radial momenta before the net was removed: zero for a
	// perfectly balanced neighborhood, one for all gas on one side.
	// SumIsotropyResidual sums it, for means.
	MaxIsotropyResidual, SumIsotropyResidual float64
	// RadialMomentum is the radial momentum handed out, summed over
	// neighbors: sum_j dp_j . n_j in each star's frame, with n_j the unit
	// vector from the star to neighbor j. It is what a remnant's momentum
	// is compared with.
	RadialMomentum float64
	// MomentumScale is sum_j |dp_j| over neighbors (star frame), the
	// scale against which momentum round-off is judged.
	MomentumScale float64
	// EnergyScale is the lab-frame kinetic energy of the touched gas before
	// the call plus what went in: the scale against which energy round-off
	// is judged.
	EnergyScale float64
	// KickEnergy and Heat split the deposited energy as the schemes did,
	// summed over sources: KickEnergy is the kinetic energy the deposits
	// gave the gas in each star's frame (what the kicks used of the
	// release), Heat the thermal energy. When every star's kicks sum to zero
	// in its frame (as in every conserving scheme), Deposited.Energy is
	// their sum plus the ejecta's lab-frame kinetic energy; what a release
	// did not use is in Radiated or Undeposited.
	KickEnergy, Heat float64
	// Photons counts the hydrogen-ionizing photons of the sources coupled;
	// EscapedPhotons those the gas the photoionization scheme reached did
	// not absorb (its search bound was hit or the gas ran out). Their
	// photoheating energy is in Radiated.
	Photons, EscapedPhotons float64
}

// Add accumulates another ledger into l.
func (l *Ledger) Add(o *Ledger) {
	l.In.Add(&o.In)
	l.Deposited.Add(&o.Deposited)
	l.Undeposited.Add(&o.Undeposited)
	l.Radiated += o.Radiated
	l.Stars += o.Stars
	l.Skipped += o.Skipped
	l.Capped += o.Capped
	l.Limited += o.Limited
	l.MaxIsotropyResidual = math.Max(l.MaxIsotropyResidual, o.MaxIsotropyResidual)
	l.SumIsotropyResidual += o.SumIsotropyResidual
	l.RadialMomentum += o.RadialMomentum
	l.MomentumScale += o.MomentumScale
	l.EnergyScale += o.EnergyScale
	l.KickEnergy += o.KickEnergy
	l.Heat += o.Heat
	l.Photons += o.Photons
	l.EscapedPhotons += o.EscapedPhotons
}

// Imbalance is In - Deposited - Radiated - Undeposited: zero to round-off
// for a conserving scheme.
func (l *Ledger) Imbalance() Quantities {
	q := l.In
	q.Sub(&l.Deposited)
	q.Sub(&l.Undeposited)
	q.Energy -= l.Radiated
	return q
}

// Balanced reports whether every component of the imbalance is within
// rel times the scale of that quantity (the larger of what went in and
// what was deposited, plus the lab-frame momentum and kinetic energy
// scales), the test a conserving scheme passes with rel ~ 1e-12.
func (l *Ledger) Balanced(rel float64) error {
	imb := l.Imbalance()
	scale := func(a, b float64) float64 { return math.Max(math.Abs(a), math.Abs(b)) }
	if s := scale(l.In.Mass, l.Deposited.Mass); math.Abs(imb.Mass) > rel*s || math.IsNaN(imb.Mass) {
		return errorf(ErrImbalance, "ledger: mass imbalance %g of %g", imb.Mass, s)
	}
	for i := range imb.Species {
		if s := scale(l.In.Species[i], l.Deposited.Species[i]); math.Abs(imb.Species[i]) > rel*s || math.IsNaN(imb.Species[i]) {
			return errorf(ErrImbalance, "ledger: species slot %d imbalance %g of %g", i, imb.Species[i], s)
		}
	}
	pscale := 0.0
	for a := 0; a < 3; a++ {
		pscale = math.Max(pscale, scale(l.In.Momentum[a], l.Deposited.Momentum[a]))
	}
	// Momentum is handed out in radial kicks far larger than the net; the
	// round-off scale is the momentum magnitude handed out.
	pscale = math.Max(pscale, l.MomentumScale)
	for a := 0; a < 3; a++ {
		if math.Abs(imb.Momentum[a]) > rel*pscale || math.IsNaN(imb.Momentum[a]) {
			return errorf(ErrImbalance, "ledger: momentum imbalance %g (axis %d) of %g", imb.Momentum[a], a, pscale)
		}
	}
	escale := math.Max(scale(l.In.Energy, l.Deposited.Energy), l.EnergyScale)
	if math.Abs(imb.Energy) > rel*escale || math.IsNaN(imb.Energy) {
		return errorf(ErrImbalance, "ledger: energy imbalance %g of %g", imb.Energy, escale)
	}
	return nil
}
