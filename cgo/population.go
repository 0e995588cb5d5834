package main

import (
	"fmt"
	"math"
	"slices"
	"unsafe"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
)

// Sizes of the population calls of ejecta.h (checked against the header
// by abiMismatches).
const (
	// pathCapacity bounds the length of a yields table path, NUL included.
	pathCapacity    = 4096
	numStepChannels = int(yields.NumAllChannels)
)

// Go mirrors of the population structs of ejecta.h.

type populationConfigABI struct {
	IMF                  [nameCapacity]byte
	LightestStarMass     float64
	HeaviestStarMass     float64
	MaxSupernovaePerStep float64
	YieldsTable          *byte
	Winds                int32
	RadiationPressure    int32
	Photoionization      int32
	DelayedCooling       int32
	PhotoelectricHeating int32
	Reserved             int32
}

type starParticleABI struct {
	ID             int64
	Position       [3]float64
	Velocity       [3]float64
	Mass           float64
	FormedMass     float64
	Metallicity    float64
	Age            float64
	CarriedEnergy  float64
	NewStellarMass float64
}

type starResultABI struct {
	ID            int64
	MassLoss      float64
	CarriedEnergy float64
	SupernovaeCC  int64
	SupernovaeIa  int64
}

// population is the state of a context's population steps: the stepper
// built by ejecta_enable_population and the buffers and results of the
// last population step.
type population struct {
	stepper *feedback.Stepper
	model   yields.Model
	seed    uint64

	stars []feedback.StarParticle
	out   feedback.StepOutput
	// counts holds each star's supernovae of the last step (core collapse,
	// Ia).
	counts [][2]int64
}

// defaultPopulationConfig is what ejecta_population_defaults writes: the
// library's defaults, read from yields.DefaultConfig (IMF and its mass
// range) and feedback.DefaultStepConfig (supernovae per step, channel
// switches).
func defaultPopulationConfig() populationConfigABI {
	y := yields.DefaultConfig()
	st := feedback.DefaultStepConfig(feedback.Config{}, nil)
	c := populationConfigABI{
		LightestStarMass: y.LightestStarMass, HeaviestStarMass: y.HeaviestStarMass,
		MaxSupernovaePerStep: st.MaxSupernovaePerStep,
		Winds:                switchValue(!st.SkipWinds), RadiationPressure: switchValue(!st.SkipRadiation),
		Photoionization: switchValue(!st.SkipPhotoionization), DelayedCooling: switchValue(st.DelayedCooling),
		PhotoelectricHeating: switchValue(!st.SkipPhotoelectric),
	}
	copy(c.IMF[:], y.IMF.String())
	return c
}

// switchValue is the 0/1 switch of ejecta.h for on.
func switchValue(on bool) int32 {
	if on {
		return 1
	}
	return 0
}

// cPath reads a NUL-terminated path of at most pathCapacity-1 bytes for
// the named field; nil reads as empty.
func cPath(field string, p *byte) (string, error) {
	if p == nil {
		return "", nil
	}
	// Byte by byte: no byte past the NUL is touched.
	for i := 0; i < pathCapacity; i++ {
		if *(*byte)(unsafe.Add(unsafe.Pointer(p), i)) == 0 {
			return string(unsafe.Slice(p, i)), nil
		}
	}
	return "", fail(codeInvalidArgument, "%s: not NUL-terminated within %d bytes", field, pathCapacity)
}

// switchOn reads a 0/1 switch.
func switchOn(name string, v int32) (bool, error) {
	switch v {
	case 0:
		return false, nil
	case 1:
		return true, nil
	}
	return false, fail(codeInvalidArgument, "population %s %d: want 0 or 1", name, v)
}

// populationModel builds the yields model a population config names: the
// table at its path, else the built-in population with its IMF.
func populationModel(c *populationConfigABI, species yields.SpeciesSet) (yields.Model, error) {
	imfName, err := cName("imf", &c.IMF)
	if err != nil {
		return nil, fmt.Errorf("population: %w", err)
	}
	ycfg := yields.DefaultConfig()
	if ycfg.IMF, err = yields.ParseIMFForm(imfName); err != nil {
		return nil, fail(codeUnknownName, "population imf: %w", err)
	}
	lo, hi := c.LightestStarMass, c.HeaviestStarMass
	if !(lo > 0) || !(hi > lo) || math.IsInf(hi, 0) {
		return nil, fail(codeInvalidArgument, "population IMF mass range [%g, %g] Msun: want 0 < lightest_star_mass < heaviest_star_mass, finite", lo, hi)
	}
	ycfg.LightestStarMass, ycfg.HeaviestStarMass = lo, hi
	path, err := cPath("population yields_table", c.YieldsTable)
	if err != nil {
		return nil, err
	}
	if path != "" {
		t, err := yields.ReadTableFile(path)
		if err != nil {
			return nil, fail(codeYieldsTable, "population yields_table: %w", err)
		}
		return layoutModel(t, species)
	}
	ycfg.Species = species
	p, err := yields.NewPopulation(ycfg)
	if err != nil {
		return nil, fail(codeInvalidArgument, "population: %w", err)
	}
	return p, nil
}

// enablePopulation is behind ejecta_enable_population. The new population
// replaces the old one only when it is complete.
func (s *session) enablePopulation(c *populationConfigABI) error {
	if c == nil {
		return fail(codeNullPointer, "population config is NULL")
	}
	if m := c.MaxSupernovaePerStep; !(m > 0) {
		return fail(codeInvalidArgument, "population max_supernovae_per_step %g must be > 0 (INFINITY never suggests a smaller step)", m)
	}
	winds, err := switchOn("winds", c.Winds)
	if err != nil {
		return err
	}
	radiation, err := switchOn("radiation_pressure", c.RadiationPressure)
	if err != nil {
		return err
	}
	ionization, err := switchOn("photoionization", c.Photoionization)
	if err != nil {
		return err
	}
	cooling, err := switchOn("delayed_cooling", c.DelayedCooling)
	if err != nil {
		return err
	}
	photoelectric, err := switchOn("photoelectric_heating", c.PhotoelectricHeating)
	if err != nil {
		return err
	}
	model, err := populationModel(c, s.cfg.Species)
	if err != nil {
		return err
	}
	cfg := feedback.DefaultStepConfig(s.cfg, model)
	cfg.Seed = s.opts.Seed
	cfg.SkipWinds, cfg.SkipRadiation, cfg.SkipPhotoionization = !winds, !radiation, !ionization
	cfg.DelayedCooling = cooling
	cfg.SkipPhotoelectric = !photoelectric
	cfg.MaxSupernovaePerStep = c.MaxSupernovaePerStep
	// Winds, radiation pressure and photoionization take the context's
	// settings (remnant fit or table, wind event energy, infrared boost
	// bound, photon reach), as the schemes of those names do.
	for _, ch := range []struct {
		scheme *feedback.Scheme
		name   string
	}{
		{&cfg.Winds, feedback.Winds{}.Name()},
		{&cfg.Radiation, feedback.RadiationPressure{}.Name()},
		{&cfg.Photoionization, feedback.Photoionization{}.Name()},
	} {
		if *ch.scheme, err = feedback.SchemeByName(ch.name, s.opts); err != nil {
			return failWith(codeInvalidArgument, err, "population")
		}
	}
	st, err := feedback.NewStepper(cfg)
	if err != nil {
		return failWith(codeInvalidArgument, err, "population")
	}
	s.pop = &population{stepper: st, model: model, seed: s.opts.Seed}
	return nil
}

// starParticle converts and checks one C star particle.
func starParticle(p *starParticleABI) (feedback.StarParticle, error) {
	sp := feedback.StarParticle{
		Star: feedback.Star{ID: p.ID, Pos: p.Position, Vel: p.Velocity, Mass: p.Mass,
			Metallicity: p.Metallicity, Age: p.Age},
		FormedMass: p.FormedMass, CarriedEnergy: p.CarriedEnergy, NewStellarMass: p.NewStellarMass,
	}
	if err := sp.Validate(); err != nil {
		return sp, fail(codeBadValue, "%w", err)
	}
	return sp, nil
}

// stepPopulation is behind ejecta_step_population.
func (s *session) stepPopulation(stars *starParticleABI, dt float64, a batchArgs) error {
	if err := a.check(stars == nil); err != nil {
		return err
	}
	if !(dt >= 0) || math.IsInf(dt, 0) {
		return fail(codeBadValue, "dt %g must be finite and >= 0", dt)
	}
	p := s.pop
	if p == nil {
		return fail(codeNoPopulation, "no population: call ejecta_enable_population first")
	}
	if err := s.requireGas(); err != nil {
		return err
	}
	var err error
	p.stars, err = convertStars(&s.batch, stars, a.n, p.stars, func(c *starParticleABI) (feedback.StarParticle, int64, error) {
		sp, err := starParticle(c)
		return sp, c.ID, err
	})
	if err != nil {
		return err
	}
	return s.runBatch(populationStep, &a, func(f neighbor.Finder) error {
		if err := p.stepper.Step(&s.gas.gas, f, p.stars, uint64(a.step), dt, &p.out); err != nil {
			return fmt.Errorf("population: %w", err)
		}
		// The step's records and ledger become the context's, as after
		// ejecta_step; the buffers are swapped, not copied.
		s.out.Records, p.out.Records = p.out.Records, s.out.Records
		s.out.Problems, p.out.Problems = p.out.Problems, s.out.Problems
		s.out.Ledger = p.out.Ledger
		p.countSupernovae()
		return nil
	})
}

// countSupernovae copies each star's supernovae of the step from the
// stepper's output.
func (p *population) countSupernovae() {
	p.counts = slices.Grow(p.counts[:0], len(p.stars))[:len(p.stars)]
	for i, n := range p.out.StarSupernovae {
		p.counts[i][yields.CoreCollapse] = int64(n[yields.CoreCollapse])
		p.counts[i][yields.TypeIa] = int64(n[yields.TypeIa])
	}
}

// popResults returns the population of the context if the context holds
// the results of a population step.
func (s *session) popResults() *population {
	if s.pop == nil || !s.stepped() || s.kind != populationStep {
		return nil
	}
	return s.pop
}

// entryPopulationDefaults is behind ejecta_population_defaults.
func entryPopulationDefaults(c *populationConfigABI) int32 {
	return run(func() error {
		if c == nil {
			return fail(codeNullPointer, "population config is NULL")
		}
		*c = defaultPopulationConfig()
		return nil
	})
}

// entryEnablePopulation is behind ejecta_enable_population.
func entryEnablePopulation(h uint64, c *populationConfigABI) int32 {
	return withSession(h, func(s *session) error { return s.enablePopulation(c) })
}

// entryStepPopulation is behind ejecta_step_population.
func entryStepPopulation(h uint64, stars *starParticleABI, n int64, dt float64, step int64, mode int32, offsets, indices *int64) int32 {
	return withSession(h, func(s *session) error {
		return s.stepPopulation(stars, dt, batchArgs{n: n, step: step, mode: mode, offsets: offsets, indices: indices})
	})
}

// entryCopyStarResults is behind ejecta_copy_star_results.
func entryCopyStarResults(h uint64, dst *starResultABI, capacity int64, written *int64) int32 {
	return withSession(h, func(s *session) error {
		p := s.popResults()
		n := 0
		if p != nil {
			n = len(p.stars)
		}
		return copyOut(dst, capacity, written, "results", "star results", n, func(i int, d *starResultABI) {
			*d = starResultABI{
				ID: p.stars[i].ID, MassLoss: p.out.MassLoss[i], CarriedEnergy: p.out.Carry[i],
				SupernovaeCC: p.counts[i][yields.CoreCollapse], SupernovaeIa: p.counts[i][yields.TypeIa],
			}
		})
	})
}

// entrySuggestedStep is behind ejecta_suggested_step.
func entrySuggestedStep(h uint64, dt *float64) int32 {
	return withSession(h, func(s *session) error {
		if dt == nil {
			return fail(codeNullPointer, "dt is NULL")
		}
		*dt = 0
		if p := s.popResults(); p != nil {
			*dt = p.out.SuggestedStep
		}
		return nil
	})
}

// entryGetChannelLedger is behind ejecta_get_channel_ledger.
func entryGetChannelLedger(h uint64, channel int32, dst *ledgerABI) int32 {
	return withSession(h, func(s *session) error {
		if dst == nil {
			return fail(codeNullPointer, "ledger is NULL")
		}
		if channel < 0 || int(channel) >= numStepChannels {
			return fail(codeInvalidArgument, "channel %d outside 0..%d", channel, numStepChannels-1)
		}
		*dst = ledgerABI{}
		if p := s.popResults(); p != nil {
			*dst = ledgerToABI(&p.out.Channels[channel])
		}
		return nil
	})
}
