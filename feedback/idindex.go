package feedback

import "fmt"

// IDIndex maps gas IDs to positions in a Gas. A rank that receives records
// for its own elements from another rank (where they were ghosts) uses it
// to point the records at its local indices before Apply.
type IDIndex struct {
	index map[int64]int
}

// NewIDIndex indexes the gas's IDs; duplicate IDs are an error.
func NewIDIndex(g *Gas) (*IDIndex, error) {
	if err := g.Validate(); err != nil {
		return nil, fmt.Errorf("id index: %w", err)
	}
	x := &IDIndex{index: make(map[int64]int, g.N)}
	for i := 0; i < g.N; i++ {
		id := g.ID.Int(i)
		if j, dup := x.index[id]; dup {
			return nil, errorf(ErrInvalidArgument, "id index: gas ID %d at both %d and %d", id, j, i)
		}
		x.index[id] = i
	}
	return x, nil
}

// Lookup returns the index of a gas ID.
func (x *IDIndex) Lookup(id int64) (int, bool) {
	i, ok := x.index[id]
	return i, ok
}

// Resolve sets each record's GasIndex from its GasID. An unknown ID fails
// the call before any record is changed.
func (x *IDIndex) Resolve(recs []Record) error {
	for k := range recs {
		if _, ok := x.index[recs[k].GasID]; !ok {
			return errorf(ErrUnknownGas, "id index: record %d names gas ID %d, not held here", k, recs[k].GasID)
		}
	}
	for k := range recs {
		recs[k].GasIndex = x.index[recs[k].GasID]
	}
	return nil
}
