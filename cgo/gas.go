package main

import (
	"math"
	"unsafe"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
)

// Element type codes of ejecta_field.type (EJECTA_FLOAT64 ...; checked
// against the header by abiMismatches).
const (
	elemFloat64 int32 = 1
	elemFloat32 int32 = 2
	elemInt64   int32 = 3
	elemInt32   int32 = 4
)

// elemType is the column type of an element type code, or false.
func elemType(code int32) (feedback.ElemType, bool) {
	switch code {
	case elemFloat64:
		return feedback.Float64, true
	case elemFloat32:
		return feedback.Float32, true
	case elemInt64:
		return feedback.Int64, true
	case elemInt32:
		return feedback.Int32, true
	}
	return 0, false
}

// numSpecies is EJECTA_NUM_SPECIES.
const numSpecies = int(yields.NumSpecies)

// fieldABI mirrors ejecta_field.
type fieldABI struct {
	Data     unsafe.Pointer
	Stride   int64
	Type     int32
	Reserved int32
}

// gasABI mirrors ejecta_gas.
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

// binding is the gas of ejecta_bind_gas and what ejecta derives from it
// (the neighbor tree and the ID index, built at first use). Everything
// derived is dropped when the gas is bound again.
type binding struct {
	gas       feedback.Gas
	species   []yields.Species
	fractions []feedback.Column

	// tree is ejecta's own finder; treeReady says it was built on this
	// binding. packed and ids are its input, reused.
	tree      *neighbor.Tree
	treeReady bool
	packed    []float64
	ids       []int64
	// index locates records by gas ID (nil until first needed).
	index *feedback.IDIndex
}

// column turns a field descriptor into a column of n elements.
func column(name string, f *fieldABI, n int, required bool) (feedback.Column, error) {
	if f.Data == nil {
		if required {
			return feedback.Column{}, fail(codeNullPointer, "gas %s: data is NULL", name)
		}
		return feedback.Column{}, nil
	}
	t, ok := elemType(f.Type)
	if !ok {
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

// bind is behind ejecta_bind_gas. Whatever the outcome, the previous
// binding and the results of the last step are dropped.
func (s *session) bind(g *gasABI) error {
	s.dropResults()
	s.phase = phaseUnbound
	b := &s.gas
	b.treeReady, b.index = false, nil
	if g == nil {
		return fail(codeNullPointer, "gas descriptor is NULL")
	}
	if g.Count <= 0 || g.Count > math.MaxInt32*64 {
		return fail(codeInvalidArgument, "gas count %d must be positive", g.Count)
	}
	n := int(g.Count)
	gas := feedback.Gas{N: n}
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
	b.species, b.fractions = b.species[:0], b.fractions[:0]
	if k > 0 {
		if g.Species == nil || g.SpeciesFraction == nil {
			return fail(codeNullPointer, "gas species or species_fraction is NULL with n_species %d", k)
		}
		codes := unsafe.Slice(g.Species, k)
		fields := unsafe.Slice(g.SpeciesFraction, k)
		for i := 0; i < k; i++ {
			sp := yields.Species(codes[i])
			if sp < 0 || int(sp) >= s.cfg.Species.Slots() {
				return fail(codeInvalidArgument, "gas species[%d] = %d is not a species code of the set %s (0..%d)",
					i, codes[i], s.cfg.Species, s.cfg.Species.Slots()-1)
			}
			c, err := column("species_fraction["+s.cfg.Species.Symbol(sp)+"]", &fields[i], n, true)
			if err != nil {
				return err
			}
			b.species = append(b.species, sp)
			b.fractions = append(b.fractions, c)
		}
	}
	gas.Species, gas.SpeciesFractions = b.species, b.fractions
	if err := gas.Validate(); err != nil {
		return failWith(codeInvalidArgument, err, "gas")
	}
	b.gas = gas
	s.phase = phaseBound
	return nil
}

// requireGas refuses a call that needs bound gas when there is none.
func (s *session) requireGas() error {
	if s.phase == phaseUnbound {
		return fail(codeNoGas, "no gas bound: call ejecta_bind_gas first")
	}
	return nil
}

// ownTree returns ejecta's own tree on the bound gas, built at first use
// after binding.
func (b *binding) ownTree(box neighbor.Box) (neighbor.Finder, error) {
	if b.treeReady {
		return b.tree, nil
	}
	b.packed = b.gas.PackedPositions(b.packed)
	b.ids = b.gas.IDs(b.ids)
	var err error
	if b.tree != nil {
		err = b.tree.Rebuild(b.packed, b.ids)
	} else {
		b.tree, err = neighbor.NewTree(b.packed, b.ids, box)
	}
	if err != nil {
		return nil, failWith(codeNeighbors, err, "building the neighbor tree on the bound gas")
	}
	b.treeReady = true
	return b.tree, nil
}

// idIndex returns the index of the bound gas by ID, built at first use
// after binding.
func (b *binding) idIndex() (*feedback.IDIndex, error) {
	if b.index == nil {
		x, err := feedback.NewIDIndex(&b.gas)
		if err != nil {
			return nil, failWith(codeInvalidArgument, err, "indexing the bound gas by ID")
		}
		b.index = x
	}
	return b.index, nil
}

// checkLocated verifies that every record's index holds its ID.
func (b *binding) checkLocated(recs []feedback.Record) error {
	for k := range recs {
		r := &recs[k]
		if r.GasIndex < 0 || r.GasIndex >= b.gas.N {
			return fail(codeUnknownGas, "record %d: gas index %d outside the bound gas (%d elements)", k, r.GasIndex, b.gas.N)
		}
		if id := b.gas.ID.Int(r.GasIndex); id != r.GasID {
			return fail(codeUnknownGas, "record %d: gas ID %d is not the ID %d at index %d", k, r.GasID, id, r.GasIndex)
		}
	}
	return nil
}

// entryBindGas is behind ejecta_bind_gas.
func entryBindGas(h uint64, g *gasABI) int32 {
	return withSession(h, func(s *session) error { return s.bind(g) })
}
