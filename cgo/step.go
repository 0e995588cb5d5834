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

// Neighbor modes of a step (EJECTA_NEIGHBORS_*).
const (
	modeOwnFinder int32 = 0
	modeHostRows  int32 = 1
)

// starABI mirrors ejecta_star.
type starABI struct {
	ID             int64
	Position       [3]float64
	Velocity       [3]float64
	Mass           float64
	Metallicity    float64
	Age            float64
	Channel        int32
	Reserved       int32
	EjectedMass    float64
	SpeciesMass    [numSpecies]float64
	Energy         float64
	Events         float64
	Photons        float64
	Duration       float64
	NewStellarMass float64
	Dispersion     float64
}

// batch is the scratch in which both kinds of step prepare their stars:
// the release sources of ejecta_step, the star IDs of either kind, and
// the host's neighbor rows.
type batch struct {
	sources []feedback.Source
	starIDs []int64
	offsets []int
	indices []int
	rows    neighbor.HostLists
}

// batchArgs are the arguments both kinds of step share.
type batchArgs struct {
	n       int64
	step    int64
	mode    int32
	offsets *int64
	indices *int64
}

// check refuses arguments out of range; starsNil says the star array is
// NULL.
func (a *batchArgs) check(starsNil bool) error {
	if starsNil {
		return fail(codeNullPointer, "stars is NULL")
	}
	if a.n <= 0 || a.n > math.MaxInt32 {
		return fail(codeInvalidArgument, "n_stars %d must be positive", a.n)
	}
	if a.step < 0 {
		return fail(codeInvalidArgument, "step_index %d must be >= 0", a.step)
	}
	if a.mode != modeOwnFinder && a.mode != modeHostRows {
		return fail(codeInvalidArgument, "neighbor_mode %d: want %d (own finder) or %d (host rows)", a.mode, modeOwnFinder, modeHostRows)
	}
	return nil
}

// convertStars converts and checks the n C stars into dst (reset first)
// and records their IDs in the batch; convert returns a star's Go form and
// its ID.
func convertStars[C, G any](b *batch, stars *C, n int64, dst []G, convert func(*C) (G, int64, error)) ([]G, error) {
	dst = dst[:0]
	b.starIDs = b.starIDs[:0]
	for i, c := range unsafe.Slice(stars, n) {
		g, id, err := convert(&c)
		if err != nil {
			return dst, fmt.Errorf("stars[%d] (of %d): %w", i, n, err)
		}
		dst = append(dst, g)
		b.starIDs = append(b.starIDs, id)
	}
	return dst, nil
}

// runBatch is the path both kinds of step share after their stars are
// converted: it checks that the star IDs are unique, prepares the finder
// of the neighbor mode, runs couple, and keeps its results (records,
// ledger, problems in s.out) as the context's, or drops them when coupling
// failed (an error of couple gets its code from its kind: a panic
// recovered in a worker is EJECTA_ERR_INTERNAL).
func (s *session) runBatch(kind stepKind, a *batchArgs, couple func(neighbor.Finder) error) error {
	slices.Sort(s.batch.starIDs)
	for i := 1; i < len(s.batch.starIDs); i++ {
		if s.batch.starIDs[i] == s.batch.starIDs[i-1] {
			return fail(codeInvalidArgument, "star ID %d appears twice in the batch", s.batch.starIDs[i])
		}
	}
	finder, err := s.finder(a)
	if err != nil {
		return err
	}
	s.dropResults()
	if err := couple(finder); err != nil {
		s.dropResults()
		return failWith(codeInvalidArgument, err, "step")
	}
	s.phase, s.kind = phaseStepped, kind
	if err := s.out.Err(); err != nil {
		return failWith(codeUndeposited, err, "step")
	}
	return nil
}

// finder returns the finder of the step's neighbor mode, refusing up front
// (nothing done) a neighborhood that cannot hold neighbor_count elements.
func (s *session) finder(a *batchArgs) (neighbor.Finder, error) {
	k := s.cfg.Neighbors
	if s.cfg.Radius > 0 {
		k = 0 // radius mode: whatever lies within the radius
	}
	if a.mode == modeOwnFinder {
		if s.gas.gas.N < k {
			return nil, fail(codeNeighbors, "the bound gas has %d elements, fewer than neighbor_count %d", s.gas.gas.N, k)
		}
		return s.gas.ownTree(s.cfg.Box)
	}
	return s.rowFinder(int(a.n), k, a.offsets, a.indices)
}

// rowFinder wraps the host's compressed rows, each of which must hold at
// least k candidates.
func (s *session) rowFinder(n, k int, offsets, indices *int64) (neighbor.Finder, error) {
	if offsets == nil {
		return nil, fail(codeNullPointer, "row_offsets is NULL in host-rows mode")
	}
	gas, b := &s.gas, &s.batch
	offs := unsafe.Slice(offsets, n+1)
	total := offs[n]
	if offs[0] != 0 || total < 0 || total > math.MaxInt32*64 {
		return nil, fail(codeNeighbors, "row_offsets[0] = %d and row_offsets[%d] = %d: want 0 and a non-negative total", offs[0], n, total)
	}
	if total > 0 && indices == nil {
		return nil, fail(codeNullPointer, "row_indices is NULL with %d entries", total)
	}
	b.offsets = b.offsets[:0]
	for _, o := range offs {
		b.offsets = append(b.offsets, int(o))
	}
	b.indices = b.indices[:0]
	if total > 0 {
		for _, i := range unsafe.Slice(indices, total) {
			if i < 0 || i >= int64(gas.gas.N) {
				return nil, fail(codeNeighbors, "row_indices names gas index %d, want [0, %d)", i, gas.gas.N)
			}
			b.indices = append(b.indices, int(i))
		}
	}
	gas.packed = gas.gas.PackedPositions(gas.packed)
	gas.ids = gas.gas.IDs(gas.ids)
	// The host's rows are handed over every step: reuse the lists' scratch.
	if err := b.rows.Reset(gas.packed, gas.ids, s.cfg.Box, b.offsets, b.indices); err != nil {
		return nil, failWith(codeNeighbors, err, "host rows")
	}
	for i := 0; i < n; i++ {
		if m := b.offsets[i+1] - b.offsets[i]; m < k {
			return nil, fail(codeNeighbors, "host row of star %d (of %d) has %d candidates, fewer than neighbor_count %d", i, n, m, k)
		}
	}
	return &b.rows, nil
}

// starSource converts one C star into a source, checking it; errors name
// species by set, the context's.
func starSource(st *starABI, set yields.SpeciesSet) (feedback.Source, error) {
	src := feedback.Source{
		Star: feedback.Star{ID: st.ID, Pos: st.Position, Vel: st.Velocity, Mass: st.Mass,
			Metallicity: st.Metallicity, Age: st.Age},
		Channel: yields.Channel(st.Channel), Mass: st.EjectedMass, Species: st.SpeciesMass,
		Energy: st.Energy, Events: st.Events, Photons: st.Photons, Duration: st.Duration,
		NewStellarMass: st.NewStellarMass, Dispersion: st.Dispersion,
	}
	if st.Channel < 0 || yields.Channel(st.Channel) >= yields.NumChannels {
		return src, fail(codeInvalidArgument, "star %d: channel %d is not a channel code", st.ID, st.Channel)
	}
	if err := src.ValidateIn(set); err != nil {
		// ValidateIn's message names the star by its ID already.
		return src, &abiError{code: codeForFailure(err, codeBadValue), err: err}
	}
	return src, nil
}

// step is behind ejecta_step.
func (s *session) step(stars *starABI, a batchArgs) error {
	if err := a.check(stars == nil); err != nil {
		return err
	}
	if err := s.requireGas(); err != nil {
		return err
	}
	var err error
	s.batch.sources, err = convertStars(&s.batch, stars, a.n, s.batch.sources, func(st *starABI) (feedback.Source, int64, error) {
		src, err := starSource(st, s.cfg.Species)
		src.Step = uint64(a.step)
		return src, st.ID, err
	})
	if err != nil {
		return err
	}
	return s.runBatch(releaseStep, &a, func(f neighbor.Finder) error {
		return s.coupler.Couple(&s.gas.gas, f, s.batch.sources, &s.out)
	})
}

// entryStep is behind ejecta_step.
func entryStep(h uint64, stars *starABI, n, step int64, mode int32, offsets, indices *int64) int32 {
	return withSession(h, func(s *session) error {
		return s.step(stars, batchArgs{n: n, step: step, mode: mode, offsets: offsets, indices: indices})
	})
}
