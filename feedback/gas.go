package feedback

import (
	"fmt"

	"github.com/ejecta-dev/ejecta/yields"
)

// Gas is a column-by-column view on the host's gas, in the host's code units
// (see Config.Units). Positions, densities, smoothing lengths and IDs are only
// read; velocities, masses, specific internal energies and species mass
// fractions are written by Apply.
//
// Species lists which species the host tracks, as slots of the species set
// the releases are laid out by (Config.Species; the user's choice of
// elements), and SpeciesFractions holds one mass-fraction column per entry,
// in the same order. A species the host does not track is still released
// and booked in the ledger, but no column receives it.
type Gas struct {
	// N is the number of gas elements.
	N int
	// Pos holds the x, y and z position columns.
	Pos [3]Column
	// Vel holds the x, y and z velocity columns.
	Vel [3]Column
	// Mass is the element mass column.
	Mass Column
	// Density is the mass density column.
	Density Column
	// InternalEnergy is the specific internal energy column (energy per mass).
	InternalEnergy Column
	// Smoothing is the smoothing length column; optional (unused by the
	// built-in weights, available to user schemes).
	Smoothing Column
	// ID is the unique element ID column (Int64 or Int32, or float holding
	// integers). IDs order the application of records.
	ID Column
	// Species names the tracked species, one per SpeciesFractions column.
	Species []yields.Species
	// SpeciesFractions are the species mass-fraction columns.
	SpeciesFractions []Column
}

// Validate checks lengths, types and strides of every column, and that no
// two columns written by Apply overlap in memory. It reads no values.
func (g *Gas) Validate() error {
	if g == nil {
		return errorf(ErrInvalidArgument, "gas: nil")
	}
	if g.N <= 0 {
		return errorf(ErrInvalidArgument, "gas: %d elements, need at least one", g.N)
	}
	type named struct {
		name     string
		c        Column
		writable bool
	}
	// A fixed array keeps validation allocation-free (it runs every call).
	var store [11 + int(yields.NumSpecies)]named
	cols := append(store[:0],
		named{"pos.x", g.Pos[0], false}, named{"pos.y", g.Pos[1], false}, named{"pos.z", g.Pos[2], false},
		named{"vel.x", g.Vel[0], true}, named{"vel.y", g.Vel[1], true}, named{"vel.z", g.Vel[2], true},
		named{"mass", g.Mass, true}, named{"density", g.Density, false},
		named{"internal energy", g.InternalEnergy, true}, named{"id", g.ID, false})
	if g.Smoothing.Bound() {
		cols = append(cols, named{"smoothing", g.Smoothing, false})
	}
	if len(g.Species) != len(g.SpeciesFractions) {
		return errorf(ErrInvalidArgument, "gas: %d species named but %d species columns", len(g.Species), len(g.SpeciesFractions))
	}
	var seen [yields.NumSpecies]bool
	for i, s := range g.Species {
		if s < 0 || s >= yields.NumSpecies {
			return errorf(ErrInvalidArgument, "gas: species %d is not a known species", int(s))
		}
		if seen[s] {
			return errorf(ErrInvalidArgument, "gas: species slot %d listed twice", s)
		}
		seen[s] = true
		cols = append(cols, named{"species fraction", g.SpeciesFractions[i], true})
	}
	for _, c := range cols {
		if err := c.c.check(c.name, g.N, c.writable); err != nil {
			return fmt.Errorf("gas: %w", err)
		}
	}
	for i := range cols {
		for j := i + 1; j < len(cols); j++ {
			if !cols[i].writable && !cols[j].writable {
				continue
			}
			if collides(cols[i].c, cols[j].c) {
				return errorf(ErrInvalidArgument, "gas: columns %s and %s overlap in memory", cols[i].name, cols[j].name)
			}
		}
	}
	return nil
}

// speciesColumn returns the column of a tracked species, or false.
func (g *Gas) speciesColumn(s yields.Species) (Column, bool) {
	for i, t := range g.Species {
		if t == s {
			return g.SpeciesFractions[i], true
		}
	}
	return Column{}, false
}

// position reads element i's position.
func (g *Gas) position(i int) [3]float64 {
	return [3]float64{g.Pos[0].At(i), g.Pos[1].At(i), g.Pos[2].At(i)}
}

// velocity reads element i's velocity.
func (g *Gas) velocity(i int) [3]float64 {
	return [3]float64{g.Vel[0].At(i), g.Vel[1].At(i), g.Vel[2].At(i)}
}

// PackedPositions writes the positions as a flat x0,y0,z0,x1,... slice (the
// layout package neighbor builds on), reusing dst's storage.
func (g *Gas) PackedPositions(dst []float64) []float64 {
	dst = dst[:0]
	for i := 0; i < g.N; i++ {
		dst = append(dst, g.Pos[0].At(i), g.Pos[1].At(i), g.Pos[2].At(i))
	}
	return dst
}

// IDs writes the element IDs into dst, reusing its storage.
func (g *Gas) IDs(dst []int64) []int64 {
	dst = dst[:0]
	for i := 0; i < g.N; i++ {
		dst = append(dst, g.ID.Int(i))
	}
	return dst
}

// checkGasSpecies refuses gas species columns naming slots the species set
// does not use.
func checkGasSpecies(g *Gas, set yields.SpeciesSet) error {
	for i, s := range g.Species {
		if int(s) >= set.Slots() {
			return errorf(ErrInvalidArgument, "gas: species column %d names slot %d, but the species set %s uses slots 0 (Z) to %d",
				i, s, set, set.Slots()-1)
		}
	}
	return nil
}
