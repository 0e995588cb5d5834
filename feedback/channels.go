package feedback

import (
	"math"

	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Constants of the radiation and heating channels.
const (
	// CaseBRecombination is the case B recombination coefficient of
	// hydrogen at 1e4 K, 2.6e-13 cm^3 s^-1 (Osterbrock & Ferland 2006,
	// table 2.1; from memory).
	CaseBRecombination = 2.6e-13
	// IonizedMeanMolecularWeight is the mean mass per particle of fully
	// ionized gas of the library's solar composition, in proton masses:
	// 1 / (2 X + 3 Y / 4 + Z / 2), each hydrogen nucleus bringing one
	// electron, each helium nucleus two and heavy elements about one
	// particle per two nucleons (textbook stellar-structure formula; from
	// memory), with the mass fractions X, Y, Z of package yields (Asplund
	// et al. 2009): about 0.599. (The often quoted 0.59 belongs to a
	// hydrogen-richer mix, X = 0.75.) It is the temperature scale of gas
	// hot enough to have lost every electron: stochastic heating's jump of
	// 10^7.5 K.
	IonizedMeanMolecularWeight = 1 / (2*yields.SolarHydrogen + 0.75*yields.SolarHelium + 0.5*yields.SolarMetals)
	// IonizedTemperature is the temperature photoionized gas is heated to,
	// 1e4 K (common practice for H II regions).
	IonizedTemperature = 1e4
	// ElectronsPerHydrogen is n_e / n_H in an H II region, hydrogen fully
	// and helium singly ionized: 1 + n_He / n_H, with n_He / n_H =
	// (Y / X) (m_H / m_He) for the solar mass fractions of package yields
	// (Asplund et al. 2009, from memory) and the standard atomic weights of
	// hydrogen and helium, 1.008 and 4.0026 (IUPAC): about 1.085. Singly
	// ionized helium is the H II region of a young cluster: its stars emit
	// few photons above helium's second ionization edge, 54.4 eV
	// (Osterbrock & Ferland 2006, ch. 2; from memory).
	ElectronsPerHydrogen = 1 + heliumPerHydrogen
	// PhotoionizedMeanMolecularWeight is the mean mass per particle of
	// photoionized gas, in proton masses, for the same composition as
	// ElectronsPerHydrogen: per hydrogen nucleus the mass MassPerHydrogen
	// and the particles 1 + n_He / n_H nuclei plus ElectronsPerHydrogen
	// electrons (heavy elements add their mass, but at about one atom per
	// thousand hydrogen atoms no particles worth counting): about 0.624.
	// Photoionization's floor of IonizedTemperature uses it, so that the
	// gas it heats has the electrons its recombinations count.
	PhotoionizedMeanMolecularWeight = MassPerHydrogen / (1 + heliumPerHydrogen + ElectronsPerHydrogen)
	// heliumPerHydrogen is n_He / n_H for the solar mass fractions behind
	// MassPerHydrogen: (Y / X) (m_H / m_He) with the standard atomic
	// weights. Neutral atomic gas has 1 + n_He / n_H particles per
	// hydrogen atom, a mean molecular weight of MassPerHydrogen / (1 +
	// n_He / n_H), about 1.25.
	heliumPerHydrogen = yields.SolarHelium / yields.SolarHydrogen * hydrogenAtomicWeight / heliumAtomicWeight
)

// Standard atomic weights (IUPAC 2021 abridged values).
const (
	hydrogenAtomicWeight = 1.008
	heliumAtomicWeight   = 4.0026
)

// specificEnergyAt is the specific internal energy (erg/g) of a monatomic
// gas of mean molecular weight mu at temperature T: (3/2) k T / (mu m_p).
func specificEnergyAt(T, mu float64) float64 {
	return 1.5 * units.Boltzmann * T / (mu * units.ProtonMass)
}

// hydrogenDensity converts a code density to a hydrogen number density in
// cm^-3 with MassPerHydrogen.
func hydrogenDensity(rho float64, u units.CodeUnits) float64 {
	return rho * u.DensityGCm3() / (MassPerHydrogen * units.ProtonMass)
}

// Winds couples continuous stellar winds (massive stars and AGB stars).
// Neighbor j receives its share of the wind's mass and species, and the
// wind's energy is coupled like supernovae (see TerminalMomentum): as
// E / EventEnergy remnants of the chosen Fit, each of energy EventEnergy,
// so that the momentum grows in proportion to the wind energy and does not
// depend on how the wind is cut into steps. The wind's own momentum M v
// (v = sqrt(2 E / M), the wind speed the release states) is the least it
// delivers. While the coupled mass is below the cooling mass of those
// remnants the wind bubble conserves energy and the neighbors keep the
// heat the kicks leave; past it the heat falls as for a cooled remnant and
// the rest is booked as radiated.
type Winds struct {
	// Fit is the remnant fit the wind energy's remnants follow.
	Fit RemnantFit
	// Table, when set, replaces Fit (see TerminalMomentum.Table).
	Table *RemnantTable
	// EventEnergy is the energy, in erg, of one remnant the wind energy is
	// counted in, positive and finite. DefaultWinds uses one supernova's,
	// units.FOE (1e51 erg): a wind then delivers the radiative remnant
	// momentum per unit energy of a supernova.
	EventEnergy float64
}

// DefaultWinds is the wind scheme with remnant fit fit and one
// supernova's energy, units.FOE, per remnant.
func DefaultWinds(fit RemnantFit) Winds { return Winds{Fit: fit, EventEnergy: units.FOE} }

// Validate checks the event energy (positive and finite).
func (s Winds) Validate() error {
	if !(s.EventEnergy > 0) || math.IsInf(s.EventEnergy, 0) {
		return errorf(ErrInvalidArgument, "stellar winds: event energy %g erg must be positive and finite", s.EventEnergy)
	}
	return nil
}

// Name is "stellar-winds".
func (Winds) Name() string { return "stellar-winds" }

// Deposit implements Scheme.
func (s Winds) Deposit(nb *Neighborhood, out []Deposit) (float64, error) {
	if err := s.Validate(); err != nil {
		return 0, err
	}
	ev := s.EventEnergy
	if err := nb.remnantShares(s.Fit, s.Table, nb.Source.Energy*nb.Units.EnergyErg()/ev); err != nil {
		return 0, err
	}
	return nb.CoupleRadial(out), nil
}

// RadiationPressure couples the momentum of starlight absorbed by dust. A
// source's Energy is the light emitted over the step, L dt. With the dust
// column from the star to the edge of its neighborhood, Sigma = 3 M / (4 pi
// R^2) (M the neighbors' mass, R the farthest neighbor's distance: the
// mean column through a uniform sphere), the ultraviolet optical depth
// tau_UV = kappa_UV Sigma and the infrared one tau_IR = kappa_IR Sigma, both
// opacities scaled with the gas metallicity, the momentum handed out is
//
//	p = (L dt / c) (1 - exp(-tau_UV)) min(1 + tau_IR, B_max),
//
// single scattering limited to the light absorbed, boosted by infrared
// trapping (L/c (1 + tau_IR), common practice in the trade) up to the
// bound B_max (MaxInfraredBoost). The bound is there because the boost
// (1 + tau_IR) assumes the reprocessed light random-walks out through a
// smooth column; radiation-hydrodynamic simulations find instead that the
// radiation-driven gas turns unstable and the infrared light leaks through
// low-column channels, so that the momentum delivered is at most a few
// times L/c even where tau_IR is large (Krumholz & Thompson 2012, ApJ 760,
// 155; Skinner & Ostriker 2015, ApJ 809, 187; both from memory). The
// momentum is directed radially and isotropy-corrected; the light's energy
// beyond the kinetic energy of the kicks is booked as radiated (it escapes
// in the infrared).
type RadiationPressure struct {
	// UVOpacity and IROpacity are the dust opacities at solar metallicity
	// in cm^2 per gram of gas, non-negative (zero: no absorption in that
	// band).
	UVOpacity, IROpacity float64
	// MaxInfraredBoost bounds the infrared trapping factor (1 + tau_IR):
	// at least 1, +Inf leaving it unbounded (limited only by the light's
	// energy).
	MaxInfraredBoost float64
}

// Default dust opacities of RadiationPressure at solar metallicity, cm^2
// per gram of gas (from memory: Draine 2011 order of magnitude for the
// ultraviolet, Semenov et al. 2003 Rosseland means for the infrared;
// common practice).
const (
	DefaultUVOpacity = 1000.0
	DefaultIROpacity = 5.0
)

// DefaultRadiationPressure is radiation pressure with DefaultUVOpacity,
// DefaultIROpacity and DefaultMaxInfraredBoost.
func DefaultRadiationPressure() RadiationPressure {
	return RadiationPressure{UVOpacity: DefaultUVOpacity, IROpacity: DefaultIROpacity, MaxInfraredBoost: DefaultMaxInfraredBoost}
}

// DefaultMaxInfraredBoost is the default bound on the infrared trapping
// factor (1 + tau_IR) of RadiationPressure: 3, "a few" as found by
// radiation-hydrodynamic studies of radiation-driven gas (Krumholz &
// Thompson 2012, ApJ 760, 155; Skinner & Ostriker 2015, ApJ 809, 187;
// from memory). A later benchmark may revise it.
const DefaultMaxInfraredBoost = 3.0

// Validate checks the opacities (non-negative) and the boost bound (at
// least 1).
func (s RadiationPressure) Validate() error {
	if !(s.UVOpacity >= 0) || !(s.IROpacity >= 0) {
		return errorf(ErrInvalidArgument, "radiation pressure: opacities %g, %g must be non-negative", s.UVOpacity, s.IROpacity)
	}
	if !(s.MaxInfraredBoost >= 1) {
		return errorf(ErrInvalidArgument, "radiation pressure: infrared boost bound %g must be at least 1", s.MaxInfraredBoost)
	}
	return nil
}

// Name is "radiation-pressure".
func (RadiationPressure) Name() string { return "radiation-pressure" }

// Momentum is the momentum (code units) the scheme hands out for light
// energy e (code units) through a gas column sigma (g/cm^2) of
// metallicity zeta (solar units).
func (s RadiationPressure) Momentum(e, sigma, zeta float64, u units.CodeUnits) float64 {
	tauUV := s.UVOpacity * zeta * sigma
	tauIR := s.IROpacity * zeta * sigma
	c := units.SpeedOfLight / u.VelocityCmPS
	return e / c * -math.Expm1(-tauUV) * math.Min(1+tauIR, s.MaxInfraredBoost)
}

// Deposit implements Scheme.
func (s RadiationPressure) Deposit(nb *Neighborhood, out []Deposit) (float64, error) {
	if err := s.Validate(); err != nil {
		return 0, err
	}
	u := nb.Units
	mass, rmax, zsum := 0.0, 0.0, 0.0
	for j := range nb.Mass {
		mass += nb.Mass[j]
		rmax = math.Max(rmax, nb.Dist[j])
		zsum += nb.Weight[j] * nb.Metallicity[j]
	}
	sigma := 0.0
	if rmax > 0 {
		sigma = 3 * mass * u.MassG / (4 * math.Pi * rmax * rmax * u.LengthCm * u.LengthCm)
	}
	p := s.Momentum(nb.Source.Energy, sigma, zsum/yields.SolarMetals, u)
	for j := range nb.Momentum {
		nb.Momentum[j] = nb.Weight[j] * p
		nb.HeatCap[j] = 0
	}
	return nb.CoupleRadial(out), nil
}

// Photoionization heats the gas a star's ionizing photons can keep
// ionized. Neighbors are taken nearest first; neighbor j, of hydrogen
// density n_j and volume V_j = m_j / rho_j, needs alpha_B n_e n_j V_j
// recombinations per second to stay ionized (case B, with the electrons of
// singly ionized helium: n_e = ElectronsPerHydrogen n_j). While the
// photon rate Q = Photons / Duration covers the running sum, each
// neighbor is flagged FlagIonized and heated to IonizedTemperature (never
// cooled), at the mean particle mass PhotoionizedMeanMolecularWeight of
// the same composition. The first neighbor the budget cannot fully cover is ionized by
// the fraction f of its recombinations that remain: it receives f of its
// heating, and the flag only if f >= 1/2 (our choice: a deterministic
// rounding of the ionized fraction). The heat is paid from the source's
// Energy (the photoheating energy of the photons); if it is not enough,
// every heating is scaled down together. What the photons' energy does not
// heat is booked as radiated. Any ejected mass the source carries is shared
// by weight as in a thermal dump.
//
// Photons the neighbors cannot absorb are booked in
// Ledger.EscapedPhotons (their heat is radiated). With Reach set, the
// photons are not limited to the coupler's neighbors: while the nearest
// neighbors cannot absorb them all, the coupler searches further out
// (nearest first) until they can, up to Reach elements, so the ionized
// mass reaches the Strömgren mass however finely the gas is resolved;
// what the reached gas still cannot absorb (the bound is hit, the gas
// runs out, or a host's neighbor list ends) is booked as escaped. Growth
// is off by default because its result depends on which gas a process
// holds: a host that decomposes its gas over ranks must then hold ghost
// gas out to the Strömgren radius for results to be the same on any
// number of ranks.
type Photoionization struct {
	// Reach bounds the search for gas to ionize, in nearest elements;
	// zero means the coupler's own neighbors only (no growth).
	Reach int
}

// Name is "photoionization".
func (Photoionization) Name() string { return "photoionization" }

func (s Photoionization) reachLimit() int { return s.Reach }

// recombinations is the rate (per second) at which neighbor j recombines
// when fully ionized.
func (nb *Neighborhood) recombinations(j int) float64 {
	u := nb.Units
	n := hydrogenDensity(nb.Density[j], u)
	v := nb.Mass[j] / nb.Density[j] * u.LengthCm * u.LengthCm * u.LengthCm
	return CaseBRecombination * ElectronsPerHydrogen * n * n * v
}

// photonRate is the source's ionizing photon rate per second (zero for a
// source without photons or duration).
func (nb *Neighborhood) photonRate() float64 {
	src := nb.Source
	if !(src.Photons > 0) || !(src.Duration > 0) {
		return 0
	}
	return src.Photons / (src.Duration * nb.Units.TimeS())
}

// neighborsWanted asks for more neighbors while the ones found would all
// be ionized with photons to spare: as many more as their mean
// recombination rate says the spare photons need, with a margin.
func (s Photoionization) neighborsWanted(nb *Neighborhood) int {
	q := nb.photonRate()
	k := nb.Len()
	if q == 0 || k == 0 || k >= s.Reach {
		return 0
	}
	rec := 0.0
	for j := 0; j < k; j++ {
		rec += nb.recombinations(j)
	}
	if !(q > rec) || !(rec > 0) {
		return 0
	}
	more := math.Ceil(1.25*(q-rec)/(rec/float64(k))) + 8
	return int(math.Min(float64(k)+more, float64(s.Reach)))
}

// Validate checks the reach (non-negative).
func (s Photoionization) Validate() error {
	if s.Reach < 0 {
		return errorf(ErrInvalidArgument, "photoionization: reach %d must be non-negative", s.Reach)
	}
	return nil
}

// Deposit implements Scheme.
func (s Photoionization) Deposit(nb *Neighborhood, out []Deposit) (float64, error) {
	if err := s.Validate(); err != nil {
		return 0, err
	}
	src := nb.Source
	u := nb.Units
	heat := nb.scratch // free: no kicks, so CoupleRadial does not tilt
	for j := range heat {
		heat[j] = 0
	}
	// Neighbors come nearest first, so the ionized ones are a prefix.
	flagged := 0
	need := 0.0
	if q := nb.photonRate(); q > 0 {
		floor := specificEnergyAt(IonizedTemperature, PhotoionizedMeanMolecularWeight) / u.SpecificEnergy()
		for j := range heat {
			rec := nb.recombinations(j)
			f := 1.0
			if rec > q {
				f = q / rec
			}
			q -= f * rec
			heat[j] = f * nb.Mass[j] * math.Max(floor-nb.InternalEnergy[j], 0)
			need += heat[j]
			if f >= 0.5 {
				flagged = j + 1
			}
			if f < 1 {
				q = 0
				break
			}
		}
		nb.escaped = q * src.Duration * u.TimeS()
	}
	scale := 1.0
	if need > src.Energy {
		scale = src.Energy / need
		need = src.Energy
	}
	// Mass, species and the ejecta's momentum (if the source carries any)
	// go by weight; the photoheating goes to the ionized neighbors.
	for j := range heat {
		nb.Momentum[j] = 0
		nb.HeatCap[j] = math.Inf(1)
		nb.EnergyWeight[j] = 0
		if src.Energy > 0 {
			nb.EnergyWeight[j] = scale * heat[j] / src.Energy
		}
	}
	rad := nb.CoupleRadial(out)
	for j := 0; j < flagged; j++ {
		out[j].Flags |= FlagIonized
	}
	return rad + src.Energy - need, nil
}

// StochasticHeating is the stochastic thermal feedback of Dalla Vecchia &
// Schaye 2012 (MNRAS 426, 140): rather than spreading the energy thinly,
// it heats a few neighbors by a fixed temperature jump ΔT, so the heated
// gas cools slowly. The budget A is the source's energy, which for the
// stepper's supernova channels includes the energy the star carried from
// earlier steps.
//
// Every heated element gets exactly ΔT: its specific internal energy,
// after mixing in its share of the ejecta, rises by Δu (the specific
// energy of the jump), which costs c_j = (m_j + dm_j)(u_j + Δu) - m_j u_j
// (less the heat the mixing itself releases). The budget heats n =
// floor(A / max_j c_j) neighbors, the most it pays for whichever ones are
// chosen, and they are chosen uniformly at random: every set of n
// neighbors is equally likely (selection sampling, Knuth, The Art of
// Computer Programming vol. 2, Algorithm S, with the counter-based
// generator keyed by (seed, star ID, step)). So every neighbor is heated
// with the same probability n / k, whatever its mass or distance, as the
// equal probabilities of Dalla Vecchia & Schaye's equal-mass particles are;
// a rule that skipped drawn elements the budget could not pay and went on
// to cheaper ones would favor light elements. What the heated elements do
// not use is returned undeposited (Ledger.Undeposited), which the stepper
// carries to the star's next step (StepOutput.Carry), so no energy is lost
// and the energy deposited matches the energy released over many steps: a
// star whose budget does not pay the costliest neighbor heats nothing
// until it has carried enough. When the mass share of the budget, A m_j /
// sum_j m_j, heats every neighbor by at least ΔT (its cost above, ejecta
// included), all are heated and share the whole budget in proportion to
// their masses. Mass, species and the ejecta's momentum are shared by
// weight as in a thermal dump.
type StochasticHeating struct {
	// TemperatureJump in K, positive and finite; DefaultStochasticHeating
	// uses DefaultTemperatureJump.
	TemperatureJump float64
	// Seed keys the draws.
	Seed uint64
}

// DefaultTemperatureJump is 10^7.5 K, the temperature jump Dalla Vecchia &
// Schaye 2012 recommend (from memory).
const DefaultTemperatureJump = 31622776.601683792

// DefaultStochasticHeating is stochastic heating by DefaultTemperatureJump
// with draws keyed by seed.
func DefaultStochasticHeating(seed uint64) StochasticHeating {
	return StochasticHeating{TemperatureJump: DefaultTemperatureJump, Seed: seed}
}

// Validate checks the temperature jump (positive and finite).
func (s StochasticHeating) Validate() error {
	if !(s.TemperatureJump > 0) || math.IsInf(s.TemperatureJump, 0) {
		return errorf(ErrInvalidArgument, "stochastic heating: temperature jump %g K must be positive and finite", s.TemperatureJump)
	}
	return nil
}

// Name is "stochastic-heating".
func (StochasticHeating) Name() string { return "stochastic-heating" }

// Deposit implements Scheme.
func (s StochasticHeating) Deposit(nb *Neighborhood, out []Deposit) (float64, error) {
	if err := s.Validate(); err != nil {
		return 0, err
	}
	dT := s.TemperatureJump
	src := nb.Source
	du := specificEnergyAt(dT, IonizedMeanMolecularWeight) / nb.Units.SpecificEnergy()
	total := 0.0
	for j := range nb.EnergyWeight {
		nb.Momentum[j] = 0
		nb.HeatCap[j] = math.Inf(1)
		nb.EnergyWeight[j] = 0
		total += nb.Mass[j]
	}
	budget := src.Energy
	if !(budget > 0) {
		return nb.CoupleRadial(out), nil
	}
	// The heat that raises u_j by exactly du once dm_j is mixed in, less
	// what the inelastic mixing itself turns into heat (which CoupleRadial
	// adds back); and whether the mass shares of the budget pay every one.
	cost := nb.scratch // free: no kicks, so CoupleRadial does not tilt
	all := true
	for j := range cost {
		m, dm := nb.Mass[j], nb.Weight[j]*src.Mass
		mt := m + dm
		w := nb.RelVel[j]
		cost[j] = math.Max(mt*(nb.InternalEnergy[j]+du)-m*nb.InternalEnergy[j]-m*dm*dot(w, w)/(2*mt), 0)
		all = all && budget*(m/total) >= cost[j]
	}
	if all {
		// Enough to heat every neighbor by at least the jump: all share it all.
		for j := range nb.EnergyWeight {
			nb.EnergyWeight[j] = nb.Mass[j] / total
		}
	} else {
		// As many neighbors as the budget heats whichever are chosen.
		k := len(cost)
		cmax := 0.0
		for _, c := range cost {
			cmax = math.Max(cmax, c)
		}
		n := k
		if cmax > 0 {
			n = int(math.Min(math.Floor(budget/cmax), float64(k)))
			if float64(n)*cmax > budget { // round-off in the quotient
				n--
			}
		}
		// Selection sampling: neighbor j is chosen with probability
		// (n - chosen) / (k - j), which makes every set of n equally likely.
		rng := yields.NewCounterRNG(s.Seed, uint64(src.Star.ID), src.Step, streamStochastic)
		used := 0.0
		for j, chosen := 0, 0; j < k && chosen < n; j++ {
			if float64(k-j)*rng.Float64() >= float64(n-chosen) {
				continue
			}
			chosen++
			nb.EnergyWeight[j] = cost[j]
			used += cost[j]
		}
		if used > 0 {
			for j := range nb.EnergyWeight {
				nb.EnergyWeight[j] /= used
			}
		}
		nb.ReturnEnergy(budget - used)
	}
	rad := nb.CoupleRadial(out)
	for j := range out {
		if nb.EnergyWeight[j] > 0 {
			out[j].Flags |= FlagStochastic
		}
	}
	return rad, nil
}

// streamStochastic separates the stochastic-heating draws from the
// supernova counts drawn with the same key.
const streamStochastic = 3

// CoolingHoldTime is how long a supernova blast wave keeps its gas hot in
// the blast-wave estimate of McKee & Ostriker 1977 (ApJ 218, 148) as used
// for delayed cooling by Stinson et al. 2006 (MNRAS 373, 1074; from
// memory): t = 10^6.85 yr E51^0.32 n^0.34 (P / 1e4 K cm^-3 k)^-0.70, for
// energy e (erg), hydrogen density n (cm^-3) and thermal pressure p/k in
// K cm^-3. It returns seconds.
func CoolingHoldTime(e, n, pOverK float64) float64 {
	e51 := math.Max(e/units.FOE, 1e-10)
	n = math.Max(n, 1e-10)
	p04 := math.Max(pOverK/1e4, 1e-10)
	return math.Pow(10, 6.85) * units.JulianYear * math.Pow(e51, 0.32) * math.Pow(n, 0.34) * math.Pow(p04, -0.70)
}
