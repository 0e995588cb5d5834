package feedback

import (
	"math"

	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// WindScaling chooses how KickedWinds sets the mass loading eta and the
// wind speed v_w.
type WindScaling uint8

const (
	// ConstantWind uses KickedWinds.Loading and KickedWinds.Speed as they
	// are (the decoupled winds of Springel & Hernquist 2003, MNRAS 339, 289).
	ConstantWind WindScaling = iota
	// MomentumDrivenWind scales both with the velocity dispersion sigma of
	// the star's galaxy as momentum-driven winds do (Oppenheimer & Davé
	// 2006, MNRAS 373, 1265; from memory): v_w = 3 sigma sqrt(f_L - 1) and
	// eta = sigma_0 / sigma, with f_L the luminosity in units of the
	// Eddington-like limit (KickedWinds.LuminosityFactor) and sigma_0 the
	// normalization (KickedWinds.ReferenceDispersion). sigma is the
	// host's Source.Dispersion when positive; otherwise the scheme measures
	// it as the one-dimensional, mass-weighted velocity dispersion of the
	// star's neighbors about their mean motion. Either is floored at
	// KickedWinds.DispersionFloor.
	MomentumDrivenWind
)

// KickDirection chooses the direction of a kicked element's velocity
// change.
type KickDirection uint8

const (
	// KickRadial kicks each element away from the star, along the unit
	// vector from the star to it; an element at the star's position gets
	// an isotropically drawn direction (from the same counter-based draws).
	KickRadial KickDirection = iota
	// KickAlongRotationAxis kicks along the local rotation axis, the
	// direction of the neighbors' angular momentum about their center of
	// mass in the frame of their mean motion, with the sign that points
	// away from the star's side of the plane through the star (plus when
	// the element lies in the plane). Gas without angular momentum falls
	// back to radial kicks.
	KickAlongRotationAxis
	// KickAlongAxis kicks along KickedWinds.Axis (a host's disc axis, say),
	// with the same sign rule.
	KickAlongAxis
)

// WindMassBasis chooses the stellar mass m_* the wind loading multiplies.
type WindMassBasis uint8

const (
	// LoadPerSupernovaEnergy loads the stellar mass whose supernovae
	// released the source's energy, m_* = Energy /
	// KickedWinds.SupernovaEnergyPerMass: the wind a population launches
	// follows its supernovae in time, and the kinetic energy per step is a
	// fixed fraction of the supernova energy, 1/2 eta v_w^2 /
	// SupernovaEnergyPerMass. This is the basis a Stepper needs, where the
	// supernova energy arrives over tens of Myr after the stars formed.
	LoadPerSupernovaEnergy WindMassBasis = iota
	// LoadPerFormedMass loads the host's newly formed stellar mass,
	// m_* = Source.NewStellarMass (a Stepper takes it from
	// StarParticle.NewStellarMass), as the original decoupled-wind scheme
	// ties the wind to the star formation rate; the kinetic energy still
	// comes from the source's energy.
	LoadPerFormedMass
)

// LeftoverEnergy says what KickedWinds does with the part of the supernova
// energy the kicks did not use.
type LeftoverEnergy uint8

const (
	// LeftoverHeats shares it as heat over the neighbors that were not
	// kicked, by weight (over all neighbors when every one was kicked).
	LeftoverHeats LeftoverEnergy = iota
	// LeftoverReturned returns it to the caller undeposited
	// (Ledger.Undeposited), for hosts whose own subgrid model of the
	// interstellar medium takes it. A Stepper carries returned supernova
	// energy into the star's next step, where this scheme would load more
	// wind with it: use LeftoverHeats with a Stepper.
	LeftoverReturned
)

// KickedWinds is the decoupled kicked-wind scheme galaxy-scale simulations
// use in place of explicit feedback (Springel & Hernquist 2003, MNRAS 339,
// 289), for comparison with the explicit schemes through the same
// interface.
//
// Selection. With the mass loading eta, the stellar mass m_* of the Basis
// and the neighbors' total mass M_nb, each neighbor is kicked with the same
// probability p = min(eta m_* / M_nb, 1), so the expected kicked mass is
// eta m_* (all of M_nb when that is less). The draws use the counter-based
// generator keyed by (Seed, star ID, step), neighbor by neighbor in order of
// distance, so they do not depend on worker, rank or call order.
//
// Kicks. A kicked neighbor j, of mass m_j receiving ejecta dm_j, gets the
// star-frame momentum (m_j + dm_j) v_w e_j with e_j the unit vector of
// Direction: its velocity changes by exactly v_w e_j relative to the
// mass-weighted velocity of the element and the ejecta it takes in.
//
// Momentum. The kicks' vector sum is taken back from the neighbors that
// were not kicked, in proportion to their weights (the surrounding gas
// takes the recoil), so momentum is conserved exactly and the kicked
// elements keep exactly v_w. When every neighbor was kicked the sum is
// taken back from all of them by weight, which changes their speeds (a
// single neighbor is not moved at all).
//
// Energy. The kinetic energy the kicks and the recoil give the gas comes
// from the source's Energy, the step's supernova energy budget: if it does
// not suffice, every kick is scaled down by the same factor until it does
// (FlagLimited; Ledger.Limited counts the stars). Ledger.KickEnergy shows
// what was used; the rest is heat (Ledger.Heat) or undeposited as Leftover
// says. Nothing is radiated.
//
// Decoupling. Kicked elements carry FlagHydroDecoupled and
// HydroDecoupledUntil, the time they take to travel DecouplingLength at
// their kick speed: the host should leave them out of hydrodynamic forces
// until then (or until they reach low density, if the host has such a
// rule). Ejected mass and species are shared by weight over all neighbors.
type KickedWinds struct {
	// Scaling chooses constant or momentum-driven loading and speed.
	Scaling WindScaling
	// Loading (eta) and Speed (v_w, km/s) of ConstantWind.
	Loading, Speed float64
	// ReferenceDispersion (sigma_0, km/s), LuminosityFactor (f_L >= 1) and
	// DispersionFloor (km/s, positive) of MomentumDrivenWind.
	ReferenceDispersion, LuminosityFactor, DispersionFloor float64
	// Direction of the kicks, and Axis for KickAlongAxis (any length).
	Direction KickDirection
	Axis      [3]float64
	// Basis chooses the stellar mass the loading multiplies;
	// SupernovaEnergyPerMass (erg per Msun formed) converts supernova
	// energy to stellar mass for LoadPerSupernovaEnergy.
	Basis                  WindMassBasis
	SupernovaEnergyPerMass float64
	// Leftover says where the energy the kicks do not use goes.
	Leftover LeftoverEnergy
	// DecouplingLength (kpc) sets how long kicked elements stay out of
	// hydrodynamic forces: the time to cross it at the kick speed. Zero
	// sets no decoupling.
	DecouplingLength float64
	// Seed keys the draws.
	Seed uint64
}

// Defaults of KickedWinds.
const (
	// DefaultWindLoading and DefaultWindSpeed (km/s) are the fiducial
	// constant wind of Springel & Hernquist 2003 (MNRAS 339, 289; from
	// memory: eta = 2, v_w = 484 km/s).
	DefaultWindLoading = 2
	DefaultWindSpeed   = 484
	// DefaultReferenceDispersion (km/s) and DefaultLuminosityFactor are
	// sigma_0 = 300 km/s and f_L = 2 of Oppenheimer & Davé 2006 (MNRAS
	// 373, 1265; from memory; they let f_L vary from 1.05 to 2 with
	// metallicity).
	DefaultReferenceDispersion = 300
	DefaultLuminosityFactor    = 2
	// DefaultDispersionFloor (km/s) is about the sound speed of warm
	// (1e4 K) gas, below which a measured dispersion says more about the
	// resolution than about the galaxy (our choice).
	DefaultDispersionFloor = 10
	// DefaultSupernovaEnergyPerMass is 1e49 erg per Msun formed: 1e51 erg
	// per core-collapse supernova and about one supernova per 100 Msun
	// formed (common practice).
	DefaultSupernovaEnergyPerMass = 1e49
	// DefaultDecouplingLength (kpc) is the longest decoupled flight of
	// the momentum-driven wind runs of Oppenheimer & Davé 2006 (from
	// memory: 20 kpc / v_w, or until the density falls below a tenth of
	// the star-formation threshold).
	DefaultDecouplingLength = 20
)

// DefaultKickedWinds is the constant wind with the defaults above, kicked
// radially, loaded per supernova energy, leftover energy heating the gas.
func DefaultKickedWinds() KickedWinds {
	return KickedWinds{
		Scaling: ConstantWind, Loading: DefaultWindLoading, Speed: DefaultWindSpeed,
		ReferenceDispersion: DefaultReferenceDispersion, LuminosityFactor: DefaultLuminosityFactor,
		DispersionFloor: DefaultDispersionFloor, Direction: KickRadial, Basis: LoadPerSupernovaEnergy,
		SupernovaEnergyPerMass: DefaultSupernovaEnergyPerMass, Leftover: LeftoverHeats,
		DecouplingLength: DefaultDecouplingLength,
	}
}

// DefaultMomentumDrivenWinds is DefaultKickedWinds with MomentumDrivenWind
// scaling.
func DefaultMomentumDrivenWinds() KickedWinds {
	s := DefaultKickedWinds()
	s.Scaling = MomentumDrivenWind
	return s
}

// Name is "kicked-winds", with "-momentum-driven" for MomentumDrivenWind
// scaling and "-formed-mass" for LoadPerFormedMass appended.
func (s KickedWinds) Name() string {
	name := "kicked-winds"
	if s.Scaling == MomentumDrivenWind {
		name += "-momentum-driven"
	}
	if s.Basis == LoadPerFormedMass {
		name += "-formed-mass"
	}
	return name
}

// streamKickedWinds separates the kicked-wind draws from the other draws
// made with the same key (supernova counts use the channel numbers,
// stochastic heating streamStochastic).
const streamKickedWinds = 4

// Validate checks the settings.
func (s KickedWinds) Validate() error {
	bad := func(v float64) bool { return !(v >= 0) || math.IsInf(v, 0) }
	switch s.Scaling {
	case ConstantWind:
		if bad(s.Loading) || bad(s.Speed) {
			return errorf(ErrInvalidArgument, "kicked winds: loading %g and speed %g km/s must be finite and non-negative", s.Loading, s.Speed)
		}
	case MomentumDrivenWind:
		if bad(s.ReferenceDispersion) || !(s.LuminosityFactor >= 1) || math.IsInf(s.LuminosityFactor, 0) ||
			!(s.DispersionFloor > 0) || math.IsInf(s.DispersionFloor, 0) {
			return errorf(ErrInvalidArgument, "kicked winds: reference dispersion %g km/s must be non-negative, luminosity factor %g at least 1, dispersion floor %g km/s positive (all finite)",
				s.ReferenceDispersion, s.LuminosityFactor, s.DispersionFloor)
		}
	default:
		return errorf(ErrInvalidArgument, "kicked winds: unknown scaling %d", s.Scaling)
	}
	switch s.Direction {
	case KickRadial, KickAlongRotationAxis:
	case KickAlongAxis:
		if a := dot(s.Axis, s.Axis); !(a > 0) || math.IsInf(a, 0) {
			return errorf(ErrInvalidArgument, "kicked winds: axis %v must be finite and non-zero", s.Axis)
		}
	default:
		return errorf(ErrInvalidArgument, "kicked winds: unknown kick direction %d", s.Direction)
	}
	switch s.Basis {
	case LoadPerSupernovaEnergy:
		if !(s.SupernovaEnergyPerMass > 0) || math.IsInf(s.SupernovaEnergyPerMass, 0) {
			return errorf(ErrInvalidArgument, "kicked winds: supernova energy per mass %g erg/Msun must be finite and positive", s.SupernovaEnergyPerMass)
		}
	case LoadPerFormedMass:
	default:
		return errorf(ErrInvalidArgument, "kicked winds: unknown wind mass basis %d", s.Basis)
	}
	if s.Leftover != LeftoverHeats && s.Leftover != LeftoverReturned {
		return errorf(ErrInvalidArgument, "kicked winds: unknown leftover rule %d", s.Leftover)
	}
	if bad(s.DecouplingLength) {
		return errorf(ErrInvalidArgument, "kicked winds: decoupling length %g kpc must be finite and non-negative", s.DecouplingLength)
	}
	return nil
}

// LoadingAndSpeed is the mass loading and the wind speed (km/s) for a
// galaxy velocity dispersion sigma (km/s, used by MomentumDrivenWind only,
// floored at DispersionFloor).
func (s KickedWinds) LoadingAndSpeed(sigma float64) (eta, speed float64) {
	if s.Scaling != MomentumDrivenWind {
		return s.Loading, s.Speed
	}
	sigma = math.Max(sigma, s.DispersionFloor)
	return s.ReferenceDispersion / sigma, 3 * sigma * math.Sqrt(s.LuminosityFactor-1)
}

// dispersion is the one-dimensional mass-weighted velocity dispersion of
// the neighbors about their mass-weighted mean velocity (code velocity).
func (nb *Neighborhood) dispersion() float64 {
	var mean [3]float64
	total := 0.0
	for j, m := range nb.Mass {
		total += m
		for a := 0; a < 3; a++ {
			mean[a] += m * nb.RelVel[j][a]
		}
	}
	for a := 0; a < 3; a++ {
		mean[a] /= total
	}
	s2 := 0.0
	for j, m := range nb.Mass {
		var d [3]float64
		for a := 0; a < 3; a++ {
			d[a] = nb.RelVel[j][a] - mean[a]
		}
		s2 += m * dot(d, d)
	}
	return math.Sqrt(s2 / (3 * total))
}

// rotationAxis is the unit vector of the neighbors' angular momentum about
// their center of mass in the frame of their mean motion, or false when
// they have none.
func (nb *Neighborhood) rotationAxis() ([3]float64, bool) {
	var cm, vm [3]float64
	total := 0.0
	for j, m := range nb.Mass {
		total += m
		for a := 0; a < 3; a++ {
			cm[a] += m * nb.Dist[j] * nb.Dir[j][a]
			vm[a] += m * nb.RelVel[j][a]
		}
	}
	for a := 0; a < 3; a++ {
		cm[a] /= total
		vm[a] /= total
	}
	var l [3]float64
	for j, m := range nb.Mass {
		var x, v [3]float64
		for a := 0; a < 3; a++ {
			x[a] = nb.Dist[j]*nb.Dir[j][a] - cm[a]
			v[a] = nb.RelVel[j][a] - vm[a]
		}
		c := cross(x, v)
		for a := 0; a < 3; a++ {
			l[a] += m * c[a]
		}
	}
	n := norm(l)
	if !(n > 0) || math.IsInf(n, 0) {
		return [3]float64{}, false
	}
	return [3]float64{l[0] / n, l[1] / n, l[2] / n}, true
}

func cross(a, b [3]float64) [3]float64 {
	return [3]float64{a[1]*b[2] - a[2]*b[1], a[2]*b[0] - a[0]*b[2], a[0]*b[1] - a[1]*b[0]}
}

// isotropicDirection draws a unit vector uniformly on the sphere.
func isotropicDirection(rng *yields.CounterRNG) [3]float64 {
	mu := 2*rng.Float64() - 1
	phi := 2 * math.Pi * rng.Float64()
	s := math.Sqrt(math.Max(1-mu*mu, 0))
	return [3]float64{s * math.Cos(phi), s * math.Sin(phi), mu}
}

// Deposit implements Scheme.
func (s KickedWinds) Deposit(nb *Neighborhood, out []Deposit) (float64, error) {
	if err := s.Validate(); err != nil {
		return 0, err
	}
	src := nb.Source
	u := nb.Units
	k := nb.Len()
	kmps := units.Kilometer / u.VelocityCmPS // code velocity per km/s

	sigma := src.Dispersion
	if s.Scaling == MomentumDrivenWind && sigma == 0 {
		sigma = nb.dispersion()
	}
	eta, speed := s.LoadingAndSpeed(sigma / kmps)
	vw := speed * kmps
	var mstar float64
	if s.Basis == LoadPerSupernovaEnergy {
		mstar = src.Energy * u.EnergyErg() / s.SupernovaEnergyPerMass * units.SolarMass / u.MassG
	} else {
		mstar = src.NewStellarMass
	}
	total := 0.0
	for _, m := range nb.Mass {
		total += m
	}
	p := math.Min(eta*mstar/total, 1)

	// Draw the kicked neighbors, nearest first; nb.scratch marks them.
	rng := yields.NewCounterRNG(s.Seed, uint64(src.Star.ID), src.Step, streamKickedWinds)
	kicked := nb.scratch
	nk := 0
	for j := range kicked {
		kicked[j] = 0
		if p > 0 && vw > 0 && rng.Float64() < p {
			kicked[j] = 1
			nk++
		}
	}

	dir := s.Direction
	var axis [3]float64
	switch dir {
	case KickAlongAxis:
		n := norm(s.Axis)
		axis = [3]float64{s.Axis[0] / n, s.Axis[1] / n, s.Axis[2] / n}
	case KickAlongRotationAxis:
		var ok bool
		if axis, ok = nb.rotationAxis(); !ok {
			dir = KickRadial
		}
	}

	// Star-frame kicks before energy limiting, held in out[j].Momentum
	// until the deposits are written.
	var net [3]float64
	handed := 0.0
	for j := 0; j < k; j++ {
		var kick [3]float64
		if kicked[j] == 1 {
			var e [3]float64
			switch {
			case dir == KickRadial && dot(nb.Dir[j], nb.Dir[j]) > 0:
				e = nb.Dir[j]
			case dir == KickRadial:
				e = isotropicDirection(&rng)
			case dot(nb.Dir[j], axis) < 0:
				e = [3]float64{-axis[0], -axis[1], -axis[2]}
			default:
				e = axis
			}
			pm := (nb.Mass[j] + nb.Weight[j]*src.Mass) * vw
			kick = [3]float64{pm * e[0], pm * e[1], pm * e[2]}
			handed += pm
			for a := 0; a < 3; a++ {
				net[a] += kick[a]
			}
		}
		out[j].Momentum = kick
	}
	// The recoil goes to the neighbors not kicked, by weight (to all when
	// every one was kicked).
	recoilWeight := 0.0
	for j := 0; j < k; j++ {
		if kicked[j] == 0 || nk == k {
			recoilWeight += nb.Weight[j]
		}
	}
	if nk > 0 {
		// The isotropy residual the ledger reports: the kicks' net vector
		// before the recoil, as a fraction of what they hand out.
		nb.residual = norm(net) / handed
		for j := 0; j < k; j++ {
			if kicked[j] == 0 || nk == k {
				f := nb.Weight[j] / recoilWeight
				for a := 0; a < 3; a++ {
					out[j].Momentum[a] -= f * net[a]
				}
			}
		}
	}

	// Scale every kick by the largest factor whose kinetic energy the
	// budget pays for. The energy the kicks need, the sum over neighbors of
	// max(dKE_j(f), 0), is convex in the factor f and zero at f = 0, so the
	// affordable factors form an interval [0, f*]: Newton's method from
	// f = 1 approaches f* from above, and a last check (bisection if it
	// fails) makes sure the budget covers the factor taken.
	E := src.Energy
	scale := 1.0
	if nk > 0 && s.kineticNeed(nb, out, 1) > E {
		scale = s.affordable(nb, out, E)
		nb.limited = true
	}
	used := s.kineticNeed(nb, out, scale)
	left := E - used

	// Where the leftover goes.
	heatWeight := 0.0
	if s.Leftover == LeftoverHeats {
		heatWeight = recoilWeight
	} else {
		nb.ReturnEnergy(left)
	}
	var until float64
	if vw*scale > 0 && s.DecouplingLength > 0 {
		until = s.DecouplingLength * 1e3 * units.Parsec / u.LengthCm / (vw * scale)
	}
	vs := src.Star.Vel
	for j := 0; j < k; j++ {
		m, wj := nb.Mass[j], nb.Weight[j]
		dm := wj * src.Mass
		mt := m + dm
		kick := out[j].Momentum
		for a := 0; a < 3; a++ {
			kick[a] *= scale
		}
		w := nb.RelVel[j]
		dkeStar := (2*m*dot(w, kick) + dot(kick, kick) - m*dm*dot(w, w)) / (2 * mt)
		heat := math.Max(dkeStar, 0) - dkeStar
		if heatWeight > 0 && (kicked[j] == 0 || nk == k) {
			heat += left * wj / heatWeight
		}
		d := &out[j]
		*d = Deposit{Mass: dm}
		for sp := range d.Species {
			d.Species[sp] = wj * src.Species[sp]
		}
		var dp [3]float64
		for a := 0; a < 3; a++ {
			dp[a] = dm*vs[a] + kick[a]
		}
		v := nb.Vel[j]
		d.Momentum = dp
		d.Heat = heat
		d.Energy = heat + (2*m*dot(v, dp)+dot(dp, dp)-m*dm*dot(v, v))/(2*mt)
		if nb.limited {
			d.Flags |= FlagLimited
		}
		if kicked[j] == 1 && until > 0 {
			d.Flags |= FlagHydroDecoupled
			d.HydroDecoupledUntil = until
		}
		nb.radial += dot(kick, nb.Dir[j])
		nb.pscale += norm(kick)
	}
	return 0, nil
}

// affordable is the largest factor f in [0, 1] with kineticNeed(f) <= e,
// given kineticNeed(1) > e.
func (s KickedWinds) affordable(nb *Neighborhood, out []Deposit, e float64) float64 {
	if !(e > 0) {
		return 0
	}
	// dKE_j(f) = a_j f^2 + b_j f + c_j, in scratch the scheme does not use.
	a, b, c := nb.Momentum, nb.HeatCap, nb.EnergyWeight
	src := nb.Source
	for j := range out {
		m := nb.Mass[j]
		dm := nb.Weight[j] * src.Mass
		mt := m + dm
		k, w := out[j].Momentum, nb.RelVel[j]
		a[j] = dot(k, k) / (2 * mt)
		b[j] = m * dot(w, k) / mt
		c[j] = -m * dm * dot(w, w) / (2 * mt)
	}
	f := 1.0
	for it := 0; it < 200; it++ {
		g, slope := -e, 0.0
		for j := range a {
			if q := (a[j]*f+b[j])*f + c[j]; q > 0 {
				g += q
				slope += 2*a[j]*f + b[j]
			}
		}
		if g <= 0 || !(slope > 0) {
			break
		}
		next := math.Max(f-g/slope, 0)
		if !(next < f) {
			break
		}
		f = next
	}
	for _, try := range [...]float64{f, f * (1 - 1e-12)} {
		if s.kineticNeed(nb, out, try) <= e {
			return try
		}
	}
	lo, hi := 0.0, f
	for it := 0; it < 200; it++ {
		mid := 0.5 * (lo + hi)
		if mid == lo || mid == hi {
			break
		}
		if s.kineticNeed(nb, out, mid) <= e {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

// kineticNeed is the energy the star-frame kicks held in out[j].Momentum,
// scaled by f, take from the budget: the sum over neighbors of their gain of
// kinetic energy in the star's frame, counting a loss as zero (it becomes
// that neighbor's heat).
func (s KickedWinds) kineticNeed(nb *Neighborhood, out []Deposit, f float64) float64 {
	src := nb.Source
	need := 0.0
	for j := range out {
		m := nb.Mass[j]
		dm := nb.Weight[j] * src.Mass
		kick := out[j].Momentum
		for a := 0; a < 3; a++ {
			kick[a] *= f
		}
		w := nb.RelVel[j]
		need += math.Max((2*m*dot(w, kick)+dot(kick, kick)-m*dm*dot(w, w))/(2*(m+dm)), 0)
	}
	return need
}
