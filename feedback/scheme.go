package feedback

import (
	"math"

	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Flags mark what happened to a gas element in a deposit.
type Flags uint32

const (
	// FlagCapped: the element's momentum was capped at its share of the
	// terminal momentum (cooling radius unresolved).
	FlagCapped Flags = 1 << iota
	// FlagLimited: the star's kicks were scaled down so that no element's
	// heat would be negative.
	FlagLimited
	// FlagIonized: the element is photoionized; the host should not cool it
	// below the ionized floor temperature this step.
	FlagIonized
	// FlagHoldCooling: the host should hold cooling for the element
	// until the time given in the record.
	FlagHoldCooling
	// FlagStochastic: the element was chosen by stochastic heating.
	FlagStochastic
	// FlagHydroDecoupled: the element was launched into a kicked wind; the
	// host should leave it out of hydrodynamic forces (pressure and
	// viscosity, both ways) until the time given in the record.
	FlagHydroDecoupled
)

// Deposit is what one star gives one neighbor, in code units: mass, the
// mass of each species, lab-frame momentum, and the change of the element's
// total (thermal plus lab-frame kinetic) energy. Heat is the thermal part,
// the rest being the change of kinetic energy; Apply recomputes the heat
// from Energy so that energy balances exactly however many stars touch an
// element.
type Deposit struct {
	Mass     float64
	Species  yields.Abundances
	Momentum [3]float64
	Energy   float64
	Heat     float64
	// Radiated is the energy booked as radiated on this element's behalf.
	// Apply may take some of it back when several stars' kicks on one
	// element add up to more kinetic energy than the heat can pay for
	// (see ApplyReport.Reclaimed).
	Radiated float64
	Flags    Flags
	// HoldCoolingUntil is, with FlagHoldCooling, how long (code time from the
	// step start) the host should hold the element's cooling.
	HoldCoolingUntil float64
	// HydroDecoupledUntil is, with FlagHydroDecoupled, how long (code time
	// from the step start) the host should keep the element out of
	// hydrodynamic forces.
	HydroDecoupledUntil float64
	// FUVField is the far-ultraviolet field (6-13.6 eV) this star's light
	// makes at the element, in Habing units G0 (PhotoelectricHeating; zero
	// for other schemes). Fields of several stars add.
	FUVField float64
}

// Scheme decides how one star's release is split over its neighbors:
// how much of it goes into radial momentum and how much stays as heat or is
// radiated. Built-in schemes are ThermalDump, Kinetic and TerminalMomentum;
// users may write their own and check them with package feedbacktest.
//
// Deposit is called once per star with the neighborhood filled in, and
// writes one Deposit per neighbor into out (len(out) == nb.Len()). It
// returns the energy booked as radiated. Deposit must not retain nb or out,
// and is called concurrently from several goroutines: a scheme must keep no
// mutable state (use nb.Momentum and nb.HeatCap as scratch).
type Scheme interface {
	Name() string
	Deposit(nb *Neighborhood, out []Deposit) (radiated float64, err error)
}

// Neighborhood is one star's release and the gas around it, read from the
// host's columns, in code units. Slices have one entry per neighbor,
// nearest first. It is reused from star to star: schemes must not keep it.
type Neighborhood struct {
	// Source is the star and its release.
	Source *Source
	// Units are the host's code units.
	Units units.CodeUnits
	// Index and ID locate each neighbor in the host's gas.
	Index []int
	ID    []int64
	// Mass, Density, InternalEnergy (specific) and Metallicity (metal mass
	// fraction; the star's metallicity when the host tracks no metals) of
	// each neighbor.
	Mass, Density, InternalEnergy, Metallicity []float64
	// Dist is the distance from the star; Dir the unit vector from the star
	// to the neighbor (zero for a neighbor at the star's position).
	Dist []float64
	Dir  [][3]float64
	// Vel is each neighbor's lab-frame velocity, RelVel the same in the
	// star's frame.
	Vel, RelVel [][3]float64
	// Weight holds each neighbor's share of mass, species and energy:
	// positive, summing to one, isotropy-corrected unless the coupler was
	// configured without the correction.
	Weight []float64
	// EnergyWeight is each neighbor's share of the energy used by
	// CoupleRadial; the coupler fills it with Weight, and a scheme that
	// concentrates energy (stochastic heating) overwrites it. Its sum must
	// be one, or zero when the scheme returns the whole energy.
	EnergyWeight []float64
	// Momentum and HeatCap are scratch for schemes that use CoupleRadial:
	// the radial momentum to give each neighbor (star frame, before the
	// isotropy correction) and the most heat each may keep (the excess is
	// radiated); +Inf keeps all.
	Momentum, HeatCap []float64

	returned float64 // energy handed back undeposited
	escaped  float64 // ionizing photons the gas reached did not absorb
	correct  bool
	residual float64 // isotropy residual of the radial momenta
	radial   float64 // sum_j dp_j . n_j
	pscale   float64 // sum_j |dp_j|
	limited  bool
	capped   bool
	scratch  []float64
}

// Len is the number of neighbors.
func (nb *Neighborhood) Len() int { return len(nb.Index) }

// resize sets the number of neighbors, growing storage only when needed.
func (nb *Neighborhood) resize(k int) {
	if cap(nb.Index) < k {
		nb.Index = make([]int, k)
		nb.ID = make([]int64, k)
		nb.Mass = make([]float64, k)
		nb.Density = make([]float64, k)
		nb.InternalEnergy = make([]float64, k)
		nb.Metallicity = make([]float64, k)
		nb.Dist = make([]float64, k)
		nb.Dir = make([][3]float64, k)
		nb.Vel = make([][3]float64, k)
		nb.RelVel = make([][3]float64, k)
		nb.Weight = make([]float64, k)
		nb.EnergyWeight = make([]float64, k)
		nb.Momentum = make([]float64, k)
		nb.HeatCap = make([]float64, k)
		nb.scratch = make([]float64, k)
	}
	nb.Index = nb.Index[:k]
	nb.ID = nb.ID[:k]
	nb.Mass = nb.Mass[:k]
	nb.Density = nb.Density[:k]
	nb.InternalEnergy = nb.InternalEnergy[:k]
	nb.Metallicity = nb.Metallicity[:k]
	nb.Dist = nb.Dist[:k]
	nb.Dir = nb.Dir[:k]
	nb.Vel = nb.Vel[:k]
	nb.RelVel = nb.RelVel[:k]
	nb.Weight = nb.Weight[:k]
	nb.EnergyWeight = nb.EnergyWeight[:k]
	nb.Momentum = nb.Momentum[:k]
	nb.HeatCap = nb.HeatCap[:k]
	nb.scratch = nb.scratch[:k]
	nb.residual, nb.radial, nb.pscale, nb.returned, nb.escaped = 0, 0, 0, 0, 0
	nb.limited, nb.capped = false, false
}

// ReturnEnergy books energy the scheme did not deposit as returned to the
// caller (Ledger.Undeposited); the scheme must then give the neighbors only
// the rest (by setting EnergyWeight to sum to the deposited fraction).
func (nb *Neighborhood) ReturnEnergy(e float64) { nb.returned += e }

// MarkCapped records that the scheme capped at least one neighbor at the
// terminal momentum; the coupler counts such stars in the ledger.
func (nb *Neighborhood) MarkCapped() { nb.capped = true }

// CoupleRadial completes the deposits of a scheme that has filled
// nb.Momentum and nb.HeatCap. Each neighbor receives its share of the
// ejected mass and species (nb.Weight), its share of the energy
// (nb.EnergyWeight, times the energy not returned), the ejecta's lab-frame momentum,
// and a radial kick: the momenta are isotropy-corrected, any remaining net
// vector is removed in proportion to the shares so that the kicks sum to
// zero in the star's frame, and the kicks are scaled down together if any
// neighbor's heat would otherwise be negative. The heat of neighbor j is
// its energy share minus its gain of kinetic energy in the star's frame,
// capped at nb.HeatCap[j]; what the cap removes is returned as radiated.
// Because the star-frame kicks sum to zero, the lab-frame energy deposited
// equals the released energy plus the ejecta's kinetic energy, less the
// radiated part, to round-off, for a moving star and moving gas alike.
func (nb *Neighborhood) CoupleRadial(out []Deposit) (radiated float64) {
	src := nb.Source
	k := nb.Len()
	M, E := src.Mass, src.Energy-nb.returned
	vs := src.Star.Vel
	var kick [3]float64

	any := false
	for j := 0; j < k; j++ {
		if nb.Momentum[j] > 0 {
			any = true
			break
		}
	}
	var net [3]float64
	if any {
		if nb.correct {
			nb.residual = tilt(nb.Momentum, nb.Dir, nb.scratch)
		} else {
			nb.residual = netVector(nb.Momentum, nb.Dir)
		}
		for j := 0; j < k; j++ {
			for a := 0; a < 3; a++ {
				net[a] += nb.Momentum[j] * nb.Dir[j][a]
			}
		}
	}
	// Scale factor keeping every neighbor's heat non-negative.
	s := 1.0
	if any {
		for j := 0; j < k; j++ {
			dp := nb.kick(j, net)
			m, dm := nb.Mass[j], nb.Weight[j]*M
			mt := m + dm
			w := nb.RelVel[j]
			a := dot(dp, dp) / (2 * mt)
			b := m * dot(w, dp) / mt
			c := -m*dm*dot(w, w)/(2*mt) - nb.EnergyWeight[j]*E
			if a <= 0 {
				continue
			}
			// a s^2 + b s + c <= 0 up to the positive root (c <= 0).
			root := (-b + math.Sqrt(math.Max(b*b-4*a*c, 0))) / (2 * a)
			if root < s {
				s = math.Max(root, 0)
			}
		}
		if s < 1 {
			nb.limited = true
		}
	}
	for j := 0; j < k; j++ {
		m, wj := nb.Mass[j], nb.Weight[j]
		dm := wj * M
		mt := m + dm
		d := &out[j]
		*d = Deposit{Mass: dm}
		for sp := range d.Species {
			d.Species[sp] = wj * src.Species[sp]
		}
		if any {
			kick = nb.kick(j, net)
			for a := 0; a < 3; a++ {
				kick[a] *= s
			}
		} else {
			kick = [3]float64{}
		}
		w := nb.RelVel[j]
		dkeStar := (2*m*dot(w, kick) + dot(kick, kick) - m*dm*dot(w, w)) / (2 * mt)
		heat := nb.EnergyWeight[j]*E - dkeStar
		if heat > nb.HeatCap[j] {
			d.Radiated = heat - nb.HeatCap[j]
			radiated += d.Radiated
			heat = nb.HeatCap[j]
		}
		var dp [3]float64
		for a := 0; a < 3; a++ {
			dp[a] = dm*vs[a] + kick[a]
		}
		v := nb.Vel[j]
		dkeLab := (2*m*dot(v, dp) + dot(dp, dp) - m*dm*dot(v, v)) / (2 * mt)
		d.Momentum = dp
		d.Heat = heat
		d.Energy = heat + dkeLab
		if s < 1 {
			d.Flags |= FlagLimited
		}
		nb.radial += dot(kick, nb.Dir[j])
		nb.pscale += norm(kick)
	}
	return radiated
}

// kick is neighbor j's star-frame kick before energy limiting: its
// corrected radial momentum minus its share of the net vector.
func (nb *Neighborhood) kick(j int, net [3]float64) [3]float64 {
	p, w, n := nb.Momentum[j], nb.Weight[j], nb.Dir[j]
	return [3]float64{p*n[0] - w*net[0], p*n[1] - w*net[1], p*n[2] - w*net[2]}
}

func dot(a, b [3]float64) float64 { return a[0]*b[0] + a[1]*b[1] + a[2]*b[2] }

// norm is |a|, without underflow for tiny vectors.
func norm(a [3]float64) float64 {
	if d := dot(a, a); d > 1e-290 || d == 0 {
		return math.Sqrt(d)
	}
	return math.Hypot(math.Hypot(a[0], a[1]), a[2])
}
