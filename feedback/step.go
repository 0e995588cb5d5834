package feedback

import (
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// StarParticle is a star particle with the state a step needs: its star
// (age in code time at the step's start), the stellar mass it formed with
// (code mass; releases scale with it), energy carried over from earlier
// steps (returned undeposited, e.g. by stochastic heating when no neighbor
// was heated), which is added to this step's supernova energy, and the
// stellar mass it formed during this step.
type StarParticle struct {
	Star
	FormedMass    float64
	CarriedEnergy float64
	// NewStellarMass is the stellar mass (code mass) the particle formed
	// during this step: the mass kicked winds loaded per formed mass
	// (KickedWinds with LoadPerFormedMass) load their wind on, as the
	// decoupled winds of Springel & Hernquist 2003 tie the wind to the star
	// formation rate. The stepper gives it to the star's core-collapse
	// source, whose energy (this step's supernovae plus CarriedEnergy) pays
	// the wind's kinetic energy: a particle that forms stars over many
	// steps passes what each step formed, and its older stars' supernovae
	// launch the wind; a particle that forms all its stars at birth has no
	// supernova energy in that step, so its wind is slowed to what the
	// energy pays (FlagLimited, Ledger.Limited), and LoadPerSupernovaEnergy
	// suits it better. Other schemes ignore it. Zero by default.
	NewStellarMass float64
}

// StepConfig sets up a Stepper.
type StepConfig struct {
	// Coupling is shared by every channel (units, weights, neighbors,
	// workers, box). Its Scheme couples supernovae (core-collapse and Ia);
	// nil means TerminalMomentum with Kim & Ostriker 2015.
	Coupling Config
	// Model says what the stars release; required.
	Model yields.Model
	// Seed keys the supernova draws.
	Seed uint64
	// Winds couples stellar winds; nil means DefaultWinds with the supernova
	// scheme's fit (Kim & Ostriker 2015 if none).
	Winds Scheme
	// Radiation couples radiation pressure; nil means
	// DefaultRadiationPressure().
	Radiation Scheme
	// Photoionization heats ionized gas; nil means Photoionization{}.
	Photoionization Scheme
	// Photoelectric heats gas with the far-ultraviolet light; nil means
	// DefaultPhotoelectricHeating(). The heat is paid out of the light:
	// radiation pressure couples the light less the photoionization and
	// photoelectric heat, and the photoelectric channel's ledger takes in
	// only the heat it deposited.
	Photoelectric Scheme
	// SkipWinds, SkipRadiation, SkipPhotoionization and SkipPhotoelectric
	// turn channels off.
	SkipWinds, SkipRadiation, SkipPhotoionization, SkipPhotoelectric bool
	// DelayedCooling flags the gas touched by supernovae to have its
	// cooling switched off for the blast-wave time of CoolingHoldTime.
	DelayedCooling bool
	// MaxSupernovaePerStep: a step in which some star expects more
	// supernovae than this suggests a smaller step; positive (+Inf never
	// suggests one).
	MaxSupernovaePerStep float64
	// PhotoheatingPerPhoton is the heat one ionizing photon can deposit,
	// in erg, paid out of the star's radiant energy (radiation pressure
	// couples the rest of the light); finite and non-negative.
	PhotoheatingPerPhoton float64
}

// Defaults of StepConfig.
const (
	// DefaultMaxSupernovaePerStep is the expected supernova count of one
	// star in one step above which a smaller step is suggested: 10, our
	// choice (a step should resolve the explosions of a star particle
	// into several steps' worth).
	DefaultMaxSupernovaePerStep = 10.0
	// DefaultPhotoheatingPerPhoton is 3 eV in erg (from memory: the mean
	// photoelectron energy of a young cluster's spectrum, Osterbrock &
	// Ferland 2006 order of magnitude).
	DefaultPhotoheatingPerPhoton = 3 * electronVolt
)

// DefaultStepConfig is the step configuration with the given coupling and
// model, seed 0, every channel on, DefaultMaxSupernovaePerStep and
// DefaultPhotoheatingPerPhoton; the schemes of winds, radiation and
// photoionization are their defaults (nil).
func DefaultStepConfig(coupling Config, model yields.Model) StepConfig {
	return StepConfig{Coupling: coupling, Model: model,
		MaxSupernovaePerStep: DefaultMaxSupernovaePerStep, PhotoheatingPerPhoton: DefaultPhotoheatingPerPhoton}
}

// eV in erg (CODATA 2018: 1.602176634e-19 J, exact in the 2019 SI).
const electronVolt = 1.602176634e-12

// StepOutput receives what a step did. Its slices are reused.
type StepOutput struct {
	// Records of every channel, ready to apply or route.
	Records []Record
	// Ledger sums every channel; Channels holds each channel's own.
	Ledger   Ledger
	Channels [yields.NumAllChannels]Ledger
	// Supernovae counts the events drawn per channel (core-collapse, Ia);
	// StarSupernovae holds each star's own counts.
	Supernovae     [2]int
	StarSupernovae [][2]int
	// MassLoss is each star's mass released this step (code mass): the host
	// takes it off the star particle.
	MassLoss []float64
	// Carry is each star's energy returned undeposited this step (code
	// energy), to be passed back as StarParticle.CarriedEnergy next step.
	Carry []float64
	// SuggestedStep is a smaller step (code time) when some star expected
	// more supernovae than MaxSupernovaePerStep; zero otherwise.
	SuggestedStep float64
	// Problems lists stars whose release was returned undeposited.
	Problems []Problem
}

// Err is nil when every release of the step was deposited; otherwise an
// error wrapping ErrUndeposited and the first problem's reason (see
// Output.Err).
func (o *StepOutput) Err() error { return problemsErr(o.Problems) }

// Stepper drives every channel for a batch of stars over one step: it asks
// the model what each star releases over [age, age + dt], draws the
// supernovae with the counter-based generator keyed by (seed, star ID,
// step), and couples each channel through its scheme with the shared
// weights, records and ledger. Supernova ejecta mass and metals are
// released as their expectation every step, so mass and metal budgets are
// exact; the energy comes in whole events. Winds and radiation are
// continuous.
type Stepper struct {
	cfg      StepConfig
	couplers [yields.NumAllChannels]*Coupler
	search   sharedSearch
	sources  [yields.NumAllChannels][]Source
	outs     [yields.NumAllChannels]Output
}

// NewStepper checks the configuration and prepares the couplers.
func NewStepper(cfg StepConfig) (*Stepper, error) {
	if cfg.Model == nil {
		return nil, errorf(ErrInvalidArgument, "stepper: no yields model")
	}
	// Releases, records and gas species columns are laid out by the
	// model's species set.
	ms := yields.ModelSpecies(cfg.Model)
	switch {
	case cfg.Coupling.Species.IsDefault():
		cfg.Coupling.Species = ms
	case cfg.Coupling.Species != ms:
		return nil, errorf(ErrInvalidArgument, "stepper: coupling species set %s differs from the yields model's %s",
			cfg.Coupling.Species, ms)
	}
	if !(cfg.MaxSupernovaePerStep > 0) {
		return nil, errorf(ErrInvalidArgument, "stepper: max supernovae per step %g must be positive (DefaultStepConfig gives %g)", cfg.MaxSupernovaePerStep, DefaultMaxSupernovaePerStep)
	}
	if !(cfg.PhotoheatingPerPhoton >= 0) || math.IsInf(cfg.PhotoheatingPerPhoton, 0) {
		return nil, errorf(ErrInvalidArgument, "stepper: photoheating per photon %g erg must be finite and non-negative", cfg.PhotoheatingPerPhoton)
	}
	fit := KimOstriker2015
	var table *RemnantTable
	if tm, ok := cfg.Coupling.Scheme.(TerminalMomentum); ok {
		fit, table = tm.Fit, tm.Table
	}
	if cfg.Winds == nil {
		w := DefaultWinds(fit)
		w.Table = table
		cfg.Winds = w
	}
	if cfg.Radiation == nil {
		cfg.Radiation = DefaultRadiationPressure()
	}
	if cfg.Photoionization == nil {
		cfg.Photoionization = Photoionization{}
	}
	if cfg.Photoelectric == nil {
		cfg.Photoelectric = DefaultPhotoelectricHeating()
	}
	s := &Stepper{cfg: cfg}
	schemes := [yields.NumAllChannels]Scheme{
		yields.CoreCollapse: cfg.Coupling.Scheme, yields.TypeIa: cfg.Coupling.Scheme,
		yields.MassiveWinds: cfg.Winds, yields.AGBWinds: cfg.Winds,
		yields.RadiationPressure: cfg.Radiation, yields.Photoionization: cfg.Photoionization,
		yields.PhotoelectricHeating: cfg.Photoelectric,
	}
	for c, sch := range schemes {
		cc := cfg.Coupling
		cc.Scheme = sch
		co, err := NewCoupler(cc)
		if err != nil {
			return nil, fmt.Errorf("stepper: channel %s: %w", yields.Channel(c).String(), err)
		}
		s.couplers[c] = co
	}
	return s, nil
}

// Step releases and couples one step of length dt (code time) for every
// star. step is the host's step index (it keys the draws). Records are not
// applied: call Apply (after routing ghost records to their owners).
func (s *Stepper) Step(gas *Gas, finder neighbor.Finder, stars []StarParticle, step uint64, dt float64, out *StepOutput) error {
	if out == nil {
		return errorf(ErrInvalidArgument, "step: nil output")
	}
	if !(dt >= 0) || math.IsInf(dt, 0) {
		return errorf(ErrInvalidArgument, "step: step length %g must be finite and non-negative", dt)
	}
	u := s.cfg.Coupling.Units
	out.Records = out.Records[:0]
	out.Problems = out.Problems[:0]
	out.Ledger = Ledger{}
	out.Channels = [yields.NumAllChannels]Ledger{}
	out.Supernovae = [2]int{}
	out.SuggestedStep = 0
	out.MassLoss = resizeFloats(out.MassLoss, len(stars))
	out.Carry = resizeFloats(out.Carry, len(stars))
	if cap(out.StarSupernovae) < len(stars) {
		out.StarSupernovae = make([][2]int, len(stars))
	}
	out.StarSupernovae = out.StarSupernovae[:len(stars)]
	clear(out.StarSupernovae)
	for c := range s.sources {
		s.sources[c] = s.sources[c][:0]
	}
	myr := u.TimeS() / units.Megayear
	msun := u.MassG / units.SolarMass // Msun per code mass
	erg := 1 / u.EnergyErg()          // code energy per erg
	mass := 1 / msun                  // code mass per Msun
	maxExpected := 0.0
	for i := range stars {
		st := &stars[i]
		if err := st.Validate(); err != nil {
			return fmt.Errorf("step: %w", err)
		}
		age0 := st.Age * myr
		rel, err := s.cfg.Model.Release(age0, age0+dt*myr, st.Metallicity)
		if err != nil {
			return errorf(ErrBadValue, "step: star %d: %w", st.ID, err)
		}
		if !releaseFinite(&rel) {
			return errorf(ErrBadValue, "step: star %d: the yields model's release between %g and %g Myr is not finite", st.ID, age0, age0+dt*myr)
		}
		clampRoundOff(&rel)
		formed := st.FormedMass * msun // Msun formed
		base := Source{Star: st.Star, Step: step, Duration: dt}
		expected := 0.0
		for c := yields.Channel(0); c < yields.NumChannels; c++ {
			ej := rel.Channels[c]
			src := base
			src.Channel = c
			src.Mass = ej.Mass * formed * mass
			for sp := range src.Species {
				src.Species[sp] = ej.Species[sp] * formed * mass
			}
			if c.Discrete() {
				mean := ej.Events * formed
				expected += mean
				rng := yields.NewCounterRNG(s.cfg.Seed, uint64(st.ID), step, uint64(c))
				n := yields.Poisson(&rng, mean)
				src.Events = float64(n)
				if n > 0 && ej.Events > 0 {
					src.Energy = float64(n) * ej.Energy / ej.Events * erg
				}
				out.Supernovae[c] += n
				out.StarSupernovae[i][c] = n
			} else {
				src.Energy = ej.Energy * formed * erg
			}
			if c == yields.CoreCollapse {
				src.Energy += st.CarriedEnergy
				src.NewStellarMass = st.NewStellarMass
			}
			if !c.Discrete() && s.cfg.SkipWinds {
				src = base
				src.Channel = c
			}
			s.sources[c] = append(s.sources[c], src)
		}
		maxExpected = math.Max(maxExpected, expected)

		// The photoheating is part of the emitted light: it is paid out of
		// the radiant energy, and radiation pressure gets the rest.
		light := rel.RadiantEnergy * formed * erg
		ion := base
		ion.Channel = yields.Photoionization
		if !s.cfg.SkipPhotoionization {
			ion.Photons = rel.IonizingPhotons * formed
			ion.Energy = math.Min(ion.Photons*s.cfg.PhotoheatingPerPhoton*erg, light)
		}
		rad := base
		rad.Channel = yields.RadiationPressure
		if !s.cfg.SkipRadiation {
			rad.Energy = math.Max(light-ion.Energy, 0)
		}
		// The photoelectric channel sees the far-ultraviolet light; its
		// heat is taken off the radiation-pressure light once known.
		pe := base
		pe.Channel = yields.PhotoelectricHeating
		if !s.cfg.SkipPhotoelectric {
			pe.Energy = math.Min(rel.FarUltravioletEnergy*formed*erg, math.Max(light-ion.Energy, 0))
		}
		s.sources[yields.RadiationPressure] = append(s.sources[yields.RadiationPressure], rad)
		s.sources[yields.Photoionization] = append(s.sources[yields.Photoionization], ion)
		s.sources[yields.PhotoelectricHeating] = append(s.sources[yields.PhotoelectricHeating], pe)
	}
	if maxExpected > s.cfg.MaxSupernovaePerStep {
		out.SuggestedStep = dt * s.cfg.MaxSupernovaePerStep / maxExpected
	}
	// One neighbor search per star serves every channel.
	if finder == nil {
		return errorf(ErrInvalidArgument, "step: nil neighbor finder")
	}
	defer s.search.release()
	if err := s.search.fill(finder, stars, s.couplers[0].Config()); err != nil {
		return fmt.Errorf("step: neighbor search: %w", err)
	}
	for _, c := range couplingOrder() {
		o := &s.outs[c]
		if err := s.couplers[c].Couple(gas, &s.search, s.sources[c], o); err != nil {
			// Nothing of a failed step is deposited, not even the
			// channels already coupled.
			out.Records, out.Problems = out.Records[:0], out.Problems[:0]
			out.Ledger, out.Channels = Ledger{}, [yields.NumAllChannels]Ledger{}
			return fmt.Errorf("step: channel %s: %w", yields.Channel(c).String(), err)
		}
		if s.cfg.DelayedCooling && c.Discrete() {
			s.delayCooling(gas, int(c), o.Records)
		}
		if c == yields.PhotoelectricHeating && !s.cfg.SkipRadiation {
			s.passLightOn(o)
		}
		out.Records = append(out.Records, o.Records...)
		out.Channels[c] = o.Ledger
		out.Ledger.Add(&o.Ledger)
		out.Problems = append(out.Problems, o.Problems...)
	}
	// What a star's couplers returned undeposited stays with the star: its
	// mass is not lost, and supernova energy is carried to the next step
	// in the star's rest frame (the undeposited ejecta's kinetic energy
	// 1/2 M v^2 stays with the star's own motion, not with the explosion).
	clear(out.MassLoss)
	for c := range s.couplers {
		for i := range stars {
			back := &s.outs[c].Undeposited[i]
			out.MassLoss[i] += s.sources[c][i].Mass - back.Mass
			if yields.Channel(c).Discrete() {
				v := stars[i].Vel
				out.Carry[i] += math.Max(back.Energy-0.5*back.Mass*dot(v, v), 0)
			}
		}
	}
	return nil
}

// couplingOrder is the order the stepper couples its channels in:
// radiation pressure last, so it can take the light the heating channels
// left.
func couplingOrder() [yields.NumAllChannels]yields.Channel {
	return [...]yields.Channel{yields.CoreCollapse, yields.TypeIa, yields.MassiveWinds, yields.AGBWinds,
		yields.Photoionization, yields.PhotoelectricHeating, yields.RadiationPressure}
}

// passLightOn hands the far-ultraviolet light photoelectric heating did not
// turn into heat on to radiation pressure: each star's radiation-pressure
// light is reduced by the heat its photoelectric records deposited, and the
// photoelectric output keeps in its books only that heat (what it booked as
// radiated or returned is the light radiation pressure now couples).
func (s *Stepper) passLightOn(o *Output) {
	srcs := s.sources[yields.PhotoelectricHeating]
	rad := s.sources[yields.RadiationPressure]
	j := 0
	for k := range o.Records {
		r := &o.Records[k]
		// Records come grouped by source, in the sources' order.
		for srcs[j].Star.ID != r.StarID {
			j++
		}
		rad[j].Energy = math.Max(rad[j].Energy-r.Energy, 0)
	}
	// The sources carry no mass or momentum: what went in is the heat.
	l := &o.Ledger
	l.In.Energy = l.Deposited.Energy
	l.Radiated, l.Undeposited.Energy = 0, 0
	for i := range o.Undeposited {
		o.Undeposited[i].Energy = 0
	}
}

// delayCooling flags supernova records with the blast-wave cooling-hold
// time of each element.
func (s *Stepper) delayCooling(gas *Gas, c int, recs []Record) {
	u := s.cfg.Coupling.Units
	srcs := s.sources[c]
	j := 0
	for k := range recs {
		r := &recs[k]
		// Records come grouped by source, in the sources' order.
		for srcs[j].Star.ID != r.StarID {
			j++
		}
		e := srcs[j].Energy
		if e <= 0 {
			continue
		}
		r.Flags |= FlagHoldCooling
		r.HoldCoolingUntil = holdCoolingTime(e, gas.Density.At(r.GasIndex), gas.InternalEnergy.At(r.GasIndex), u)
	}
}

// Validate checks a star particle before a step uses it: the star
// (Star.Validate) and finite non-negative formed mass, carried energy and
// new stellar mass.
func (st *StarParticle) Validate() error {
	if err := st.Star.Validate(); err != nil {
		return err
	}
	for _, f := range [...]struct {
		name string
		v    float64
	}{{"formed mass", st.FormedMass}, {"carried energy", st.CarriedEnergy}, {"new stellar mass", st.NewStellarMass}} {
		if !(f.v >= 0) || math.IsInf(f.v, 0) {
			return errorf(ErrBadValue, "star %d: %s %g must be finite and non-negative", st.ID, f.name, f.v)
		}
	}
	return nil
}

// releaseFinite reports whether every amount of a release is finite.
func releaseFinite(r *yields.Release) bool {
	sum := r.RadiantEnergy + r.IonizingPhotons + r.FarUltravioletEnergy
	for c := range r.Channels {
		e := &r.Channels[c]
		sum += e.Events + e.Mass + e.Energy
		for _, m := range e.Species {
			sum += m
		}
	}
	if finite(sum) {
		return true
	}
	// A sum of finite amounts can overflow: look at them one by one.
	vals := []float64{r.RadiantEnergy, r.IonizingPhotons, r.FarUltravioletEnergy}
	for c := range r.Channels {
		e := &r.Channels[c]
		vals = append(vals, e.Events, e.Mass, e.Energy)
		vals = append(vals, e.Species[:]...)
	}
	for _, v := range vals {
		if !finite(v) {
			return false
		}
	}
	return true
}

// clampRoundOff sets to zero the tiny negative amounts a difference of
// cumulative releases can show where nothing is released.
func clampRoundOff(r *yields.Release) {
	for c := range r.Channels {
		e := &r.Channels[c]
		e.Events, e.Mass, e.Energy = math.Max(e.Events, 0), math.Max(e.Mass, 0), math.Max(e.Energy, 0)
		for sp := range e.Species {
			e.Species[sp] = math.Max(e.Species[sp], 0)
		}
	}
	r.RadiantEnergy = math.Max(r.RadiantEnergy, 0)
	r.IonizingPhotons = math.Max(r.IonizingPhotons, 0)
	r.FarUltravioletEnergy = math.Max(r.FarUltravioletEnergy, 0)
}

func resizeFloats(s []float64, n int) []float64 {
	if cap(s) < n {
		return make([]float64, n)
	}
	s = s[:n]
	clear(s)
	return s
}
