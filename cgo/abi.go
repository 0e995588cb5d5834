package main

import (
	"errors"
	"fmt"
	"math"
	"runtime/cgo"
	"runtime/debug"
	"slices"
	"sync"
	"unsafe"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Error codes, the EJECTA_ERR_* values of ejecta.h (checked against the
// header by abiMismatches).
const (
	codeOK              int32 = 0
	codeNullPointer     int32 = 1
	codeInvalidArgument int32 = 2
	codeUnknownName     int32 = 3
	codeInvalidContext  int32 = 4
	codeNoGas           int32 = 5
	codeBadValue        int32 = 6
	codeNeighbors       int32 = 7
	codeBufferTooSmall  int32 = 8
	codeUnknownGas      int32 = 9
	codeBusy            int32 = 10
	codeUndeposited     int32 = 11
	codeImbalance       int32 = 12
	codeAlreadyApplied  int32 = 13
	codeInternal        int32 = 99
)

// Enumerations of ejecta.h.
const (
	abiVersion       int32 = 1
	nameCapacity           = 48
	numSpecies             = int(yields.NumSpecies)
	modeOwnFinder    int32 = 0
	modeHostRows     int32 = 1
	locateByIndex    int32 = 0
	locateByID       int32 = 1
	maxWorkers             = 4096
	defaultNeighbors       = feedback.DefaultNeighbors
)

// The Go mirrors of the structs of ejecta.h, field for field. The exports
// convert C pointers to pointers to these; abiMismatches checks size and
// every offset against the C definitions.

type configABI struct {
	LengthCm           float64
	MassG              float64
	VelocityCmPerS     float64
	KineticFraction    float64
	CouplingRadius     float64
	BoxSize            [3]float64
	Seed               uint64
	NeighborCount      int32
	WorkerThreads      int32
	IsotropyCorrection int32
	Reserved           int32
	Scheme             [nameCapacity]byte
	RemnantFit         [nameCapacity]byte
	Weighting          [nameCapacity]byte
}

type fieldABI struct {
	Data     unsafe.Pointer
	Stride   int64
	Type     int32
	Reserved int32
}

type gasABI struct {
	Count           int64
	Position        [3]fieldABI
	Velocity        [3]fieldABI
	Mass            fieldABI
	Density         fieldABI
	InternalEnergy  fieldABI
	SmoothingLength fieldABI
	ID              fieldABI
	NSpecies        int32
	Reserved        int32
	Species         *int32
	SpeciesFraction *fieldABI
}

type starABI struct {
	ID          int64
	Position    [3]float64
	Velocity    [3]float64
	Mass        float64
	Metallicity float64
	Age         float64
	Channel     int32
	Reserved    int32
	EjectedMass float64
	SpeciesMass [numSpecies]float64
	Energy      float64
	Events      float64
	Photons     float64
	Duration    float64
}

type recordABI struct {
	GasIndex         int64
	GasID            int64
	StarID           int64
	Channel          int32
	Flags            uint32
	Mass             float64
	SpeciesMass      [numSpecies]float64
	Momentum         [3]float64
	Energy           float64
	Heat             float64
	Radiated         float64
	HoldCoolingUntil float64
	Kick             float64
	Heating          float64
}

type quantitiesABI struct {
	Mass        float64
	SpeciesMass [numSpecies]float64
	Momentum    [3]float64
	Energy      float64
}

type ledgerABI struct {
	Released            quantitiesABI
	Deposited           quantitiesABI
	Undeposited         quantitiesABI
	Radiated            float64
	Stars               int64
	Skipped             int64
	Capped              int64
	Limited             int64
	MaxIsotropyResidual float64
	SumIsotropyResidual float64
	RadialMomentum      float64
	MomentumScale       float64
	EnergyScale         float64
}

type applyReportABI struct {
	Records           int64
	Elements          int64
	Deposited         quantitiesABI
	Reclaimed         float64
	Shortfall         float64
	ShortfallElements int64
}

type touchedABI struct {
	GasIndex         int64
	GasID            int64
	MaxKick          float64
	MaxHeating       float64
	HoldCoolingUntil float64
	Flags            uint32
	Reserved         int32
}

// abiError is an error with the code the C caller receives.
type abiError struct {
	code int32
	err  error
}

func (e *abiError) Error() string { return e.err.Error() }
func (e *abiError) Unwrap() error { return e.err }

func fail(code int32, format string, args ...any) error {
	return &abiError{code: code, err: fmt.Errorf(format, args...)}
}

// codeOf is the C code of an error: its abiError's code, else internal.
func codeOf(err error) int32 {
	if err == nil {
		return codeOK
	}
	var ae *abiError
	if errors.As(err, &ae) {
		return ae.code
	}
	return codeInternal
}

// guard runs fn, turning a panic into an internal error, with faults on
// bad addresses turned into panics for the duration of the call.
func guard(fn func() error) (err error) {
	old := debug.SetPanicOnFault(true)
	defer debug.SetPanicOnFault(old)
	defer func() {
		if r := recover(); r != nil {
			err = fail(codeInternal, "internal failure: %v", r)
		}
	}()
	return fn()
}

// putText writes msg into the C buffer buf of capacity bytes, truncated and
// NUL-terminated. It reports whether all of msg fitted.
func putText(buf *byte, capacity int64, msg string) bool {
	if buf == nil || capacity <= 0 {
		return len(msg) == 0
	}
	dst := unsafe.Slice(buf, capacity)
	n := copy(dst[:capacity-1], msg)
	dst[n] = 0
	return n == len(msg)
}

// session is the state behind one context handle. Every field is reached
// through the handle; nothing is shared between sessions.
type session struct {
	mu        sync.Mutex
	destroyed bool
	lastErr   string

	cfg     feedback.Config
	seed    uint64
	coupler *feedback.Coupler
	// steps counts ejecta_step calls that ran; it is each step's index,
	// which keys stochastic draws with the seed and star ID.
	steps uint64

	bound     bool
	gas       feedback.Gas
	species   []yields.Species
	fractions []feedback.Column

	tree      *neighbor.Tree
	treeFresh bool
	rows      neighbor.HostLists
	applier   feedback.Applier
	packed    []float64
	ids       []int64
	index     *feedback.IDIndex

	sources  []feedback.Source
	starIDs  []int64
	offsets  []int
	indices  []int
	out      feedback.Output
	stepped  bool
	applied  bool
	incoming []feedback.Record
	touched  []feedback.Touched

	// pop is the population of ejecta_step_population (nil until
	// ejecta_enable_population).
	pop *population
}

// lookup turns a handle into its session, refusing 0, destroyed handles
// and handles of other values without crashing.
func lookup(h uint64) (s *session, err error) {
	if h == 0 {
		return nil, fail(codeInvalidContext, "context 0 is not a context (never created, or destroyed)")
	}
	defer func() {
		if r := recover(); r != nil {
			s, err = nil, fail(codeInvalidContext, "context %#x is not a live ejecta context (destroyed or never created)", h)
		}
	}()
	v, ok := cgo.Handle(uintptr(h)).Value().(*session)
	if !ok {
		return nil, fail(codeInvalidContext, "context %#x is not an ejecta context", h)
	}
	return v, nil
}

// withSession runs fn on the session of h, one call at a time, recording
// the outcome (a recovered panic included) as the session's last error.
func withSession(h uint64, fn func(s *session) error) int32 {
	return codeOf(guard(func() error {
		s, err := lookup(h)
		if err != nil {
			return err
		}
		if !s.mu.TryLock() {
			return fail(codeBusy, "context %#x is in use by another call", h)
		}
		defer s.mu.Unlock()
		if s.destroyed {
			return fail(codeInvalidContext, "context %#x was destroyed", h)
		}
		err = guard(func() error { return fn(s) })
		if err != nil {
			s.lastErr = err.Error()
		} else {
			s.lastErr = ""
		}
		return err
	}))
}

// cName reads a NUL-terminated name from a fixed array.
func cName(field string, b *[nameCapacity]byte) (string, error) {
	for i, c := range b {
		if c == 0 {
			return string(b[:i]), nil
		}
	}
	return "", fail(codeUnknownName, "config %s: not NUL-terminated within %d bytes", field, nameCapacity)
}

// parseConfig turns the C config into a coupler configuration.
func parseConfig(c *configABI) (feedback.Config, error) {
	var cfg feedback.Config
	if c == nil {
		return cfg, fail(codeNullPointer, "config is NULL")
	}
	cfg.Units = units.CodeUnits{LengthCm: c.LengthCm, MassG: c.MassG, VelocityCmPS: c.VelocityCmPerS}
	if err := cfg.Units.Validate(); err != nil {
		return cfg, fail(codeInvalidArgument, "config units: %w", err)
	}
	scheme, err := cName("scheme", &c.Scheme)
	if err != nil {
		return cfg, err
	}
	fitName, err := cName("remnant_fit", &c.RemnantFit)
	if err != nil {
		return cfg, err
	}
	weighting, err := cName("weighting", &c.Weighting)
	if err != nil {
		return cfg, err
	}
	fit := feedback.KimOstriker2015
	if fitName != "" {
		if fit, err = feedback.ParseRemnantFit(fitName); err != nil {
			return cfg, fail(codeUnknownName, "config remnant_fit: %w", err)
		}
	}
	if !(c.KineticFraction >= 0 && c.KineticFraction <= 1) {
		return cfg, fail(codeInvalidArgument, "config kinetic_fraction %g outside [0, 1]", c.KineticFraction)
	}
	sch, err := feedback.SchemeByName(scheme, feedback.SchemeOptions{Fit: fit, KineticFraction: c.KineticFraction, Seed: c.Seed})
	if err != nil {
		return cfg, fail(codeUnknownName, "config: %w", err)
	}
	cfg.Scheme = sch
	switch weighting {
	case "", feedback.KernelVolume.String():
		cfg.Weighting = feedback.KernelVolume
	case feedback.SolidAngle.String():
		cfg.Weighting = feedback.SolidAngle
	default:
		return cfg, fail(codeUnknownName, "config weighting %q: want kernel-volume or solid-angle", weighting)
	}
	switch c.IsotropyCorrection {
	case 0:
		cfg.SkipIsotropyCorrection = true
	case 1:
	default:
		return cfg, fail(codeInvalidArgument, "config isotropy_correction %d: want 0 or 1", c.IsotropyCorrection)
	}
	if c.NeighborCount < 0 {
		return cfg, fail(codeInvalidArgument, "config neighbor_count %d must be >= 0", c.NeighborCount)
	}
	cfg.Neighbors = int(c.NeighborCount)
	if !(c.CouplingRadius >= 0) || math.IsInf(c.CouplingRadius, 0) {
		return cfg, fail(codeInvalidArgument, "config coupling_radius %g must be finite and >= 0", c.CouplingRadius)
	}
	cfg.Radius = c.CouplingRadius
	if c.WorkerThreads < 0 || c.WorkerThreads > maxWorkers {
		return cfg, fail(codeInvalidArgument, "config worker_threads %d outside 0..%d", c.WorkerThreads, maxWorkers)
	}
	cfg.Workers = int(c.WorkerThreads)
	cfg.Box.Size = c.BoxSize
	if err := cfg.Box.Validate(); err != nil {
		return cfg, fail(codeInvalidArgument, "config box_size: %w", err)
	}
	return cfg, nil
}

// defaultConfig is what ejecta_config_defaults writes.
func defaultConfig() configABI {
	c := configABI{
		LengthCm: 1, MassG: 1, VelocityCmPerS: 1,
		NeighborCount: defaultNeighbors, WorkerThreads: 1, IsotropyCorrection: 1,
	}
	copy(c.Scheme[:], feedback.TerminalMomentum{}.Name())
	copy(c.RemnantFit[:], feedback.KimOstriker2015.String())
	copy(c.Weighting[:], feedback.KernelVolume.String())
	return c
}

// entryConfigDefaults is behind ejecta_config_defaults.
func entryConfigDefaults(c *configABI) int32 {
	return codeOf(guard(func() error {
		if c == nil {
			return fail(codeNullPointer, "config is NULL")
		}
		*c = defaultConfig()
		return nil
	}))
}

// entryVersion is behind ejecta_version.
func entryVersion(buf *byte, capacity int64, abi *int32) int32 {
	return codeOf(guard(func() error {
		if buf == nil {
			return fail(codeNullPointer, "version buffer is NULL")
		}
		if abi != nil {
			*abi = abiVersion
		}
		if !putText(buf, capacity, feedback.Version) {
			return fail(codeBufferTooSmall, "version needs %d bytes", len(feedback.Version)+1)
		}
		return nil
	}))
}

// entryCreate is behind ejecta_create.
func entryCreate(c *configABI, out *uint64, errText *byte, capacity int64) int32 {
	err := guard(func() error {
		if out == nil {
			return fail(codeNullPointer, "context pointer is NULL")
		}
		*out = 0
		cfg, err := parseConfig(c)
		if err != nil {
			return err
		}
		coupler, err := feedback.NewCoupler(cfg)
		if err != nil {
			return fail(codeInvalidArgument, "config: %w", err)
		}
		s := &session{cfg: coupler.Config(), seed: c.Seed, coupler: coupler}
		*out = uint64(cgo.NewHandle(s))
		return nil
	})
	if err != nil {
		putText(errText, capacity, "ejecta_create: "+err.Error())
	} else {
		putText(errText, capacity, "")
	}
	return codeOf(err)
}

// entryDestroy is behind ejecta_destroy.
func entryDestroy(ctx *uint64) int32 {
	return codeOf(guard(func() error {
		if ctx == nil {
			return fail(codeNullPointer, "context pointer is NULL")
		}
		if *ctx == 0 {
			return nil
		}
		s, err := lookup(*ctx)
		if err != nil {
			return err
		}
		if !s.mu.TryLock() {
			return fail(codeBusy, "context %#x is in use by another call", *ctx)
		}
		defer s.mu.Unlock()
		if s.destroyed {
			return fail(codeInvalidContext, "context %#x was destroyed", *ctx)
		}
		s.destroyed = true
		cgo.Handle(uintptr(*ctx)).Delete()
		*ctx = 0
		return nil
	}))
}

// entryLastError is behind ejecta_last_error.
func entryLastError(h uint64, buf *byte, capacity int64, length *int64) int32 {
	return codeOf(guard(func() error {
		if buf == nil && capacity > 0 {
			return fail(codeNullPointer, "buffer is NULL with capacity %d", capacity)
		}
		s, err := lookup(h)
		var msg string
		switch {
		case err != nil:
			msg = err.Error()
		case !s.mu.TryLock():
			msg = "context is in use by another call"
			err = fail(codeBusy, "%s", msg)
		default:
			msg = s.lastErr
			if s.destroyed {
				msg = "context was destroyed"
				err = fail(codeInvalidContext, "%s", msg)
			}
			s.mu.Unlock()
		}
		if length != nil {
			*length = int64(len(msg))
		}
		fits := putText(buf, capacity, msg)
		if err != nil {
			return err
		}
		if !fits {
			return fail(codeBufferTooSmall, "message of %d bytes truncated", len(msg))
		}
		return nil
	}))
}

// column turns a field descriptor into a column of n elements.
func column(name string, f *fieldABI, n int, required bool) (feedback.Column, error) {
	if f.Data == nil {
		if required {
			return feedback.Column{}, fail(codeNullPointer, "gas %s: data is NULL", name)
		}
		return feedback.Column{}, nil
	}
	t := feedback.ElemType(0)
	switch f.Type {
	case 1:
		t = feedback.Float64
	case 2:
		t = feedback.Float32
	case 3:
		t = feedback.Int64
	case 4:
		t = feedback.Int32
	default:
		return feedback.Column{}, fail(codeInvalidArgument, "gas %s: unknown element type %d", name, f.Type)
	}
	if f.Stride < int64(t.Size()) {
		return feedback.Column{}, fail(codeInvalidArgument, "gas %s: stride %d bytes is smaller than its %v elements (%d bytes)", name, f.Stride, t, t.Size())
	}
	if f.Stride > math.MaxInt64/int64(n) {
		return feedback.Column{}, fail(codeInvalidArgument, "gas %s: stride %d bytes times %d elements overflows", name, f.Stride, n)
	}
	return feedback.Strided(f.Data, n, uintptr(f.Stride), t), nil
}

// bind is behind ejecta_bind_gas.
func (s *session) bind(g *gasABI) error {
	s.bound, s.treeFresh, s.index, s.stepped = false, false, nil, false
	s.out.Records = s.out.Records[:0]
	s.invalidatePopulation()
	if g == nil {
		return fail(codeNullPointer, "gas descriptor is NULL")
	}
	if g.Count <= 0 || g.Count > math.MaxInt32*64 {
		return fail(codeInvalidArgument, "gas count %d must be positive", g.Count)
	}
	n := int(g.Count)
	var gas feedback.Gas
	gas.N = n
	var err error
	axes := [3]string{"x", "y", "z"}
	for a := 0; a < 3; a++ {
		if gas.Pos[a], err = column("position."+axes[a], &g.Position[a], n, true); err != nil {
			return err
		}
		if gas.Vel[a], err = column("velocity."+axes[a], &g.Velocity[a], n, true); err != nil {
			return err
		}
	}
	if gas.Mass, err = column("mass", &g.Mass, n, true); err != nil {
		return err
	}
	if gas.Density, err = column("density", &g.Density, n, true); err != nil {
		return err
	}
	if gas.InternalEnergy, err = column("internal_energy", &g.InternalEnergy, n, true); err != nil {
		return err
	}
	if gas.Smoothing, err = column("smoothing_length", &g.SmoothingLength, n, false); err != nil {
		return err
	}
	if gas.ID, err = column("id", &g.ID, n, true); err != nil {
		return err
	}
	if g.NSpecies < 0 || int(g.NSpecies) > numSpecies {
		return fail(codeInvalidArgument, "gas n_species %d outside 0..%d", g.NSpecies, numSpecies)
	}
	k := int(g.NSpecies)
	s.species, s.fractions = s.species[:0], s.fractions[:0]
	if k > 0 {
		if g.Species == nil || g.SpeciesFraction == nil {
			return fail(codeNullPointer, "gas species or species_fraction is NULL with n_species %d", k)
		}
		codes := unsafe.Slice(g.Species, k)
		fields := unsafe.Slice(g.SpeciesFraction, k)
		for i := 0; i < k; i++ {
			sp := yields.Species(codes[i])
			if sp < 0 || sp >= yields.NumSpecies {
				return fail(codeInvalidArgument, "gas species[%d] = %d is not a species code", i, codes[i])
			}
			c, err := column("species_fraction["+sp.Symbol()+"]", &fields[i], n, true)
			if err != nil {
				return err
			}
			s.species = append(s.species, sp)
			s.fractions = append(s.fractions, c)
		}
	}
	gas.Species, gas.SpeciesFractions = s.species, s.fractions
	if err := gas.Validate(); err != nil {
		return fail(codeInvalidArgument, "%w", err)
	}
	s.gas, s.bound = gas, true
	return nil
}

// finder returns ejecta's own tree on the bound gas, built at first use
// after binding.
func (s *session) ownFinder() (neighbor.Finder, error) {
	if s.treeFresh {
		return s.tree, nil
	}
	s.packed = s.gas.PackedPositions(s.packed)
	s.ids = s.gas.IDs(s.ids)
	var err error
	if s.tree != nil {
		err = s.tree.Rebuild(s.packed, s.ids)
	} else {
		s.tree, err = neighbor.NewTree(s.packed, s.ids, s.cfg.Box)
	}
	if err != nil {
		return nil, fail(codeNeighbors, "building the neighbor tree on the bound gas: %w", err)
	}
	s.treeFresh = true
	return s.tree, nil
}

// batchFinder checks that the batch's star IDs (in s.starIDs) are unique
// and returns the finder of the step's neighbor mode.
func (s *session) batchFinder(n int, mode int32, offsets, indices *int64) (neighbor.Finder, error) {
	slices.Sort(s.starIDs)
	for i := 1; i < len(s.starIDs); i++ {
		if s.starIDs[i] == s.starIDs[i-1] {
			return nil, fail(codeInvalidArgument, "star ID %d appears twice in the batch", s.starIDs[i])
		}
	}
	if mode == modeOwnFinder {
		return s.ownFinder()
	}
	return s.rowFinder(n, offsets, indices)
}

// rowFinder wraps the host's compressed rows.
func (s *session) rowFinder(n int, offsets, indices *int64) (neighbor.Finder, error) {
	if offsets == nil {
		return nil, fail(codeNullPointer, "row_offsets is NULL in host-rows mode")
	}
	offs := unsafe.Slice(offsets, n+1)
	total := offs[n]
	if offs[0] != 0 || total < 0 || total > math.MaxInt32*64 {
		return nil, fail(codeNeighbors, "row_offsets[0] = %d and row_offsets[%d] = %d: want 0 and a non-negative total", offs[0], n, total)
	}
	if total > 0 && indices == nil {
		return nil, fail(codeNullPointer, "row_indices is NULL with %d entries", total)
	}
	s.offsets = s.offsets[:0]
	for _, o := range offs {
		s.offsets = append(s.offsets, int(o))
	}
	s.indices = s.indices[:0]
	if total > 0 {
		for _, i := range unsafe.Slice(indices, total) {
			if i < 0 || i >= int64(s.gas.N) {
				return nil, fail(codeNeighbors, "row_indices names gas index %d, want [0, %d)", i, s.gas.N)
			}
			s.indices = append(s.indices, int(i))
		}
	}
	s.packed = s.gas.PackedPositions(s.packed)
	s.ids = s.gas.IDs(s.ids)
	// The host's rows are handed over every step: reuse the lists' scratch.
	if err := s.rows.Reset(s.packed, s.ids, s.cfg.Box, s.offsets, s.indices); err != nil {
		return nil, fail(codeNeighbors, "host rows: %w", err)
	}
	return &s.rows, nil
}

// starSource converts one C star into a source, checking it.
func starSource(st *starABI) (feedback.Source, error) {
	src := feedback.Source{
		Star: feedback.Star{ID: st.ID, Pos: st.Position, Vel: st.Velocity, Mass: st.Mass,
			Metallicity: st.Metallicity, Age: st.Age},
		Channel: yields.Channel(st.Channel), Mass: st.EjectedMass, Species: st.SpeciesMass,
		Energy: st.Energy, Events: st.Events, Photons: st.Photons, Duration: st.Duration,
	}
	if st.Channel < 0 || yields.Channel(st.Channel) >= yields.NumChannels {
		return src, fail(codeInvalidArgument, "star %d: channel %d is not a channel code", st.ID, st.Channel)
	}
	if err := src.Validate(); err != nil {
		return src, fail(codeBadValue, "%w", err)
	}
	if !(st.Mass >= 0) || !(st.Age >= 0) || !(st.Metallicity >= 0) {
		return src, fail(codeBadValue, "star %d: mass %g, age %g and metallicity %g must be >= 0", st.ID, st.Mass, st.Age, st.Metallicity)
	}
	return src, nil
}

// step is behind ejecta_step.
func (s *session) step(stars *starABI, n int64, mode int32, offsets, indices *int64) error {
	if stars == nil {
		return fail(codeNullPointer, "stars is NULL")
	}
	if n <= 0 || n > math.MaxInt32 {
		return fail(codeInvalidArgument, "n_stars %d must be positive", n)
	}
	if mode != modeOwnFinder && mode != modeHostRows {
		return fail(codeInvalidArgument, "neighbor_mode %d: want %d (own finder) or %d (host rows)", mode, modeOwnFinder, modeHostRows)
	}
	if !s.bound {
		return fail(codeNoGas, "no gas bound: call ejecta_bind_gas first")
	}
	cs := unsafe.Slice(stars, n)
	s.sources = s.sources[:0]
	s.starIDs = s.starIDs[:0]
	for i := range cs {
		src, err := starSource(&cs[i])
		if err != nil {
			return fmt.Errorf("star %d of %d: %w", i, n, err)
		}
		src.Step = s.steps
		s.sources = append(s.sources, src)
		s.starIDs = append(s.starIDs, src.Star.ID)
	}
	finder, err := s.batchFinder(int(n), mode, offsets, indices)
	if err != nil {
		return err
	}
	s.stepped, s.applied = false, false
	s.invalidatePopulation()
	if err := s.coupler.Couple(&s.gas, finder, s.sources, &s.out); err != nil {
		return fail(codeInvalidArgument, "step: %w", err)
	}
	s.stepped = true
	s.steps++
	if p := s.out.Problems; len(p) > 0 {
		return fail(codeUndeposited, "%d of %d stars returned undeposited; first: star %d (index %d): %v",
			len(p), n, p[0].StarID, p[0].Index, p[0].Err)
	}
	return nil
}

// checkLocated verifies that every record's index holds its ID.
func (s *session) checkLocated(recs []feedback.Record) error {
	for k := range recs {
		r := &recs[k]
		if r.GasIndex < 0 || r.GasIndex >= s.gas.N {
			return fail(codeUnknownGas, "record %d: gas index %d outside the bound gas (%d elements)", k, r.GasIndex, s.gas.N)
		}
		if id := s.gas.ID.Int(r.GasIndex); id != r.GasID {
			return fail(codeUnknownGas, "record %d: gas ID %d is not the ID %d at index %d", k, r.GasID, id, r.GasIndex)
		}
	}
	return nil
}

func (s *session) apply(recs []feedback.Record, report *applyReportABI) error {
	touched, rep, err := s.applier.Apply(&s.gas, recs, s.touched)
	s.touched = touched
	if err != nil {
		return fail(codeBadValue, "%w", err)
	}
	if report != nil {
		*report = applyReportABI{
			Records: int64(rep.Records), Elements: int64(rep.Elements),
			Deposited: quantitiesToABI(&rep.Deposited),
			Reclaimed: rep.Reclaimed, Shortfall: rep.Shortfall, ShortfallElements: int64(rep.ShortfallElements),
		}
	}
	return nil
}

// applyStep is behind ejecta_apply_step_records.
func (s *session) applyStep(report *applyReportABI) error {
	if !s.bound {
		return fail(codeNoGas, "no gas bound")
	}
	if !s.stepped {
		return fail(codeInvalidArgument, "no step has run on the bound gas")
	}
	if s.applied {
		return fail(codeAlreadyApplied, "the records of the last step were already applied")
	}
	if err := s.checkLocated(s.out.Records); err != nil {
		return err
	}
	if err := s.apply(s.out.Records, report); err != nil {
		return err
	}
	s.applied = true
	return nil
}

// applyRecords is behind ejecta_apply_records.
func (s *session) applyRecords(recs *recordABI, n int64, locate int32, report *applyReportABI) error {
	if n < 0 || n > math.MaxInt32*64 {
		return fail(codeInvalidArgument, "n_records %d must be >= 0", n)
	}
	if recs == nil && n > 0 {
		return fail(codeNullPointer, "records is NULL with n_records %d", n)
	}
	if locate != locateByIndex && locate != locateByID {
		return fail(codeInvalidArgument, "locate %d: want %d (by index) or %d (by ID)", locate, locateByIndex, locateByID)
	}
	if !s.bound {
		return fail(codeNoGas, "no gas bound")
	}
	s.incoming = s.incoming[:0]
	if n > 0 {
		for _, r := range unsafe.Slice(recs, n) {
			s.incoming = append(s.incoming, recordFromABI(&r))
		}
	}
	if locate == locateByID {
		if s.index == nil {
			x, err := feedback.NewIDIndex(&s.gas)
			if err != nil {
				return fail(codeInvalidArgument, "indexing the bound gas by ID: %w", err)
			}
			s.index = x
		}
		if err := s.index.Resolve(s.incoming); err != nil {
			return fail(codeUnknownGas, "%w", err)
		}
	} else if err := s.checkLocated(s.incoming); err != nil {
		return err
	}
	return s.apply(s.incoming, report)
}

func quantitiesToABI(q *feedback.Quantities) quantitiesABI {
	return quantitiesABI{Mass: q.Mass, SpeciesMass: q.Species, Momentum: q.Momentum, Energy: q.Energy}
}

func quantitiesFromABI(q *quantitiesABI) feedback.Quantities {
	return feedback.Quantities{Mass: q.Mass, Species: q.SpeciesMass, Momentum: q.Momentum, Energy: q.Energy}
}

func ledgerToABI(l *feedback.Ledger) ledgerABI {
	return ledgerABI{
		Released: quantitiesToABI(&l.In), Deposited: quantitiesToABI(&l.Deposited),
		Undeposited: quantitiesToABI(&l.Undeposited), Radiated: l.Radiated,
		Stars: int64(l.Stars), Skipped: int64(l.Skipped), Capped: int64(l.Capped), Limited: int64(l.Limited),
		MaxIsotropyResidual: l.MaxIsotropyResidual, SumIsotropyResidual: l.SumIsotropyResidual,
		RadialMomentum: l.RadialMomentum, MomentumScale: l.MomentumScale, EnergyScale: l.EnergyScale,
	}
}

func ledgerFromABI(l *ledgerABI) feedback.Ledger {
	return feedback.Ledger{
		In: quantitiesFromABI(&l.Released), Deposited: quantitiesFromABI(&l.Deposited),
		Undeposited: quantitiesFromABI(&l.Undeposited), Radiated: l.Radiated,
		Stars: int(l.Stars), Skipped: int(l.Skipped), Capped: int(l.Capped), Limited: int(l.Limited),
		MaxIsotropyResidual: l.MaxIsotropyResidual, SumIsotropyResidual: l.SumIsotropyResidual,
		RadialMomentum: l.RadialMomentum, MomentumScale: l.MomentumScale, EnergyScale: l.EnergyScale,
	}
}

func recordToABI(r *feedback.Record, d *recordABI) {
	*d = recordABI{
		GasIndex: int64(r.GasIndex), GasID: r.GasID, StarID: r.StarID,
		Channel: int32(r.Channel), Flags: uint32(r.Flags),
		Mass: r.Mass, SpeciesMass: r.Species, Momentum: r.Momentum, Energy: r.Energy, Heat: r.Heat,
		Radiated: r.Radiated, HoldCoolingUntil: r.HoldCoolingUntil, Kick: r.Kick, Heating: r.Heating,
	}
}

func recordFromABI(d *recordABI) feedback.Record {
	return feedback.Record{
		GasIndex: int(d.GasIndex), GasID: d.GasID, StarID: d.StarID, Channel: yields.Channel(d.Channel),
		Deposit: feedback.Deposit{
			Mass: d.Mass, Species: d.SpeciesMass, Momentum: d.Momentum, Energy: d.Energy, Heat: d.Heat,
			Radiated: d.Radiated, Flags: feedback.Flags(d.Flags), HoldCoolingUntil: d.HoldCoolingUntil,
		},
		Kick: d.Kick, Heating: d.Heating,
	}
}

// entryBindGas ... entryLedgerBalanced are behind the exports of the same
// names; each runs on the session of its handle.

func entryBindGas(h uint64, g *gasABI) int32 {
	return withSession(h, func(s *session) error { return s.bind(g) })
}

func entryStep(h uint64, stars *starABI, n int64, mode int32, offsets, indices *int64) int32 {
	return withSession(h, func(s *session) error { return s.step(stars, n, mode, offsets, indices) })
}

func entryRecordCount(h uint64, count *int64) int32 {
	return withSession(h, func(s *session) error {
		if count == nil {
			return fail(codeNullPointer, "count is NULL")
		}
		*count = int64(len(s.out.Records))
		return nil
	})
}

func entryCopyUndeposited(h uint64, ids *int64, channels *int32, capacity int64, written *int64) int32 {
	return withSession(h, func(s *session) error {
		probs := s.out.Problems
		var chans []int32
		if channels != nil && capacity > 0 {
			chans = unsafe.Slice(channels, min(int64(len(probs)), capacity))
		}
		return copyOut(ids, capacity, written, "star_ids", "undeposited releases", len(probs), false, func(k int, d *int64) {
			*d = probs[k].StarID
			if chans != nil {
				chans[k] = int32(probs[k].Channel)
			}
		})
	})
}

func entryCopyRecords(h uint64, dst *recordABI, capacity int64, written *int64) int32 {
	return withSession(h, func(s *session) error {
		return copyOut(dst, capacity, written, "records", "records", len(s.out.Records), false, func(k int, d *recordABI) {
			recordToABI(&s.out.Records[k], d)
		})
	})
}

// copyOut checks a caller's output buffer (dst with room for capacity
// entries; written receives the count) and fills the first
// min(n, capacity) entries with fill. A short buffer gets what fits and the
// call fails with codeBufferTooSmall; *written is then the number copied,
// or n when totalOnShort (the calls whose header says so).
func copyOut[T any](dst *T, capacity int64, written *int64, name, what string, n int, totalOnShort bool, fill func(k int, d *T)) error {
	if written == nil {
		return fail(codeNullPointer, "written is NULL")
	}
	*written = 0
	if capacity < 0 {
		return fail(codeInvalidArgument, "capacity %d must be >= 0", capacity)
	}
	if dst == nil && capacity > 0 {
		return fail(codeNullPointer, "%s is NULL with capacity %d", name, capacity)
	}
	k := min(int64(n), capacity)
	if k > 0 {
		d := unsafe.Slice(dst, k)
		for i := range d {
			fill(i, &d[i])
		}
	}
	*written = k
	if k < int64(n) {
		if totalOnShort {
			*written = int64(n)
		}
		return fail(codeBufferTooSmall, "%d %s, buffer holds %d", n, what, capacity)
	}
	return nil
}

func entryGetLedger(h uint64, dst *ledgerABI) int32 {
	return withSession(h, func(s *session) error {
		if dst == nil {
			return fail(codeNullPointer, "ledger is NULL")
		}
		*dst = ledgerToABI(&s.out.Ledger)
		return nil
	})
}

func entryApplyStepRecords(h uint64, report *applyReportABI) int32 {
	return withSession(h, func(s *session) error { return s.applyStep(report) })
}

func entryApplyRecords(h uint64, recs *recordABI, n int64, locate int32, report *applyReportABI) int32 {
	return withSession(h, func(s *session) error { return s.applyRecords(recs, n, locate, report) })
}

func entryCopyTouched(h uint64, dst *touchedABI, capacity int64, written *int64) int32 {
	return withSession(h, func(s *session) error {
		return copyOut(dst, capacity, written, "touched", "touched elements", len(s.touched), true, func(k int, d *touchedABI) {
			t := &s.touched[k]
			*d = touchedABI{GasIndex: int64(t.Index), GasID: t.ID, MaxKick: t.MaxKick, MaxHeating: t.MaxHeating,
				HoldCoolingUntil: t.HoldCoolingUntil, Flags: uint32(t.Flags)}
		})
	})
}

func entryLedgerBalanced(l *ledgerABI, rel float64, msg *byte, capacity int64) int32 {
	err := guard(func() error {
		if l == nil {
			return fail(codeNullPointer, "ledger is NULL")
		}
		if !(rel >= 0) || math.IsInf(rel, 0) {
			return fail(codeInvalidArgument, "relative tolerance %g must be finite and >= 0", rel)
		}
		g := ledgerFromABI(l)
		if err := g.Balanced(rel); err != nil {
			return fail(codeImbalance, "%w", err)
		}
		return nil
	})
	if err != nil {
		putText(msg, capacity, err.Error())
	} else {
		putText(msg, capacity, "")
	}
	return codeOf(err)
}
