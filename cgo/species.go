package main

import (
	"unsafe"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
)

// speciesListCapacity bounds the element list ejecta_choose_species reads.
const speciesListCapacity = 1024

// cList reads a NUL-terminated list of at most speciesListCapacity-1
// bytes; nil reads as empty.
func cList(p *byte) (string, error) {
	if p == nil {
		return "", nil
	}
	for i := 0; i < speciesListCapacity; i++ {
		if *(*byte)(unsafe.Add(unsafe.Pointer(p), i)) == 0 {
			return string(unsafe.Slice(p, i)), nil
		}
	}
	return "", fail(codeInvalidArgument, "species list: not NUL-terminated within %d bytes", speciesListCapacity)
}

// chooseSpecies is behind ejecta_choose_species: the context's releases,
// records and gas species columns are laid out by the chosen set from now
// on. It must come before gas is bound and a population enabled, whose
// species codes and model it fixes.
func (s *session) chooseSpecies(list *byte) error {
	text, err := cList(list)
	if err != nil {
		return err
	}
	if s.phase != phaseUnbound || s.pop != nil {
		return fail(codeInvalidArgument, "choose the species before ejecta_bind_gas and ejecta_enable_population")
	}
	var set yields.SpeciesSet
	if text != "" {
		if set, err = yields.ParseSpeciesSet(text); err != nil {
			return fail(codeInvalidArgument, "%w", err)
		}
	}
	cfg := s.cfg
	cfg.Species = set
	coupler, err := feedback.NewCoupler(cfg)
	if err != nil {
		return failWith(codeInvalidArgument, err, "species")
	}
	s.cfg, s.coupler = coupler.Config(), coupler
	return nil
}

// layoutModel lays a population's yields model out by the context's
// species set.
func layoutModel(m yields.Model, set yields.SpeciesSet) (yields.Model, error) {
	if t, ok := m.(*yields.Table); ok {
		if set.IsDefault() {
			if !t.Species().IsDefault() {
				return nil, fail(codeInvalidArgument, "population yields_table carries elements outside the default set (%s): choose the species with ejecta_choose_species", t.Carried())
			}
			return t, nil
		}
		wt, err := t.WithSpecies(set)
		if err != nil {
			return nil, fail(codeInvalidArgument, "population yields_table: %w", err)
		}
		return wt, nil
	}
	return m, nil
}

// entryChooseSpecies is behind ejecta_choose_species.
func entryChooseSpecies(h uint64, list *byte) int32 {
	return withSession(h, func(s *session) error { return s.chooseSpecies(list) })
}

// entrySpeciesCount is behind ejecta_species_count.
func entrySpeciesCount(h uint64, count *int32) int32 {
	return withSession(h, func(s *session) error {
		if count == nil {
			return fail(codeNullPointer, "count is NULL")
		}
		*count = int32(s.cfg.Species.Slots())
		return nil
	})
}

// entrySpeciesSymbol is behind ejecta_species_symbol.
func entrySpeciesSymbol(h uint64, code int32, buf *byte, capacity int64) int32 {
	return withSession(h, func(s *session) error {
		if buf == nil && capacity > 0 {
			return fail(codeNullPointer, "buffer is NULL")
		}
		if capacity < 0 {
			return fail(codeInvalidArgument, "capacity %d is negative", capacity)
		}
		set := s.cfg.Species
		if code < 0 || int(code) >= set.Slots() {
			return fail(codeInvalidArgument, "species code %d outside 0..%d of the set %s", code, set.Slots()-1, set)
		}
		if !putText(buf, capacity, set.Symbol(yields.Species(code))) {
			return fail(codeBufferTooSmall, "species symbol needs %d bytes", len(set.Symbol(yields.Species(code)))+1)
		}
		return nil
	})
}
