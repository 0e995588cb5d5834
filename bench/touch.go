package bench

import (
	"fmt"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
)

// TouchFloor is the touch-only kernel the schemes' speed is measured
// against: for each star it finds the same k nearest gas elements with the
// same finder, gathers the fields a coupler reads (position, velocity,
// mass, density, specific internal energy, metallicity) through the same
// strided columns, and scatters back the fields Apply writes (velocity,
// mass, internal energy, metallicity) unchanged, doing no physics. Its time
// is the floor set by the neighbor search and the memory traffic; a
// scheme's time over it is the price of its physics, its bookkeeping
// (records, ledger) and the ordered application of records.
//
// A TouchFloor keeps scratch from call to call and allocates nothing once
// it has grown. It must not be used by two goroutines at once.
type TouchFloor struct {
	found    []neighbor.Neighbor
	gathered [][10]float64
	index    []int
}

// Touch runs the floor kernel for every star on k neighbors and returns
// the number of gas elements touched (k per star). The gas keeps its
// values bit for bit.
func (t *TouchFloor) Touch(gas *feedback.Gas, finder neighbor.Finder, stars []feedback.Star, k int) (int, error) {
	if err := gas.Validate(); err != nil {
		return 0, fmt.Errorf("touch floor: %w", err)
	}
	if k <= 0 {
		return 0, fmt.Errorf("touch floor: neighbor count %d must be positive", k)
	}
	metals := feedback.Column{}
	for c, s := range gas.Species {
		if s == yields.Metals && c < len(gas.SpeciesFractions) {
			metals = gas.SpeciesFractions[c]
		}
	}
	touched := 0
	for s := range stars {
		var err error
		t.found, err = finder.Nearest(neighbor.Query{Pos: stars[s].Pos, Star: s}, k, t.found)
		if err != nil {
			return touched, fmt.Errorf("touch floor: star %d: %w", stars[s].ID, err)
		}
		n := len(t.found)
		if cap(t.gathered) < n {
			t.gathered = make([][10]float64, n)
			t.index = make([]int, n)
		}
		g := t.gathered[:n]
		for j, f := range t.found {
			i := f.Index
			t.index[j] = i
			g[j] = [10]float64{gas.Pos[0].At(i), gas.Pos[1].At(i), gas.Pos[2].At(i),
				gas.Vel[0].At(i), gas.Vel[1].At(i), gas.Vel[2].At(i),
				gas.Mass.At(i), gas.Density.At(i), gas.InternalEnergy.At(i)}
			if metals.Bound() {
				g[j][9] = metals.At(i)
			}
		}
		for j := range g {
			i := t.index[j]
			gas.Vel[0].Set(i, g[j][3])
			gas.Vel[1].Set(i, g[j][4])
			gas.Vel[2].Set(i, g[j][5])
			gas.Mass.Set(i, g[j][6])
			gas.InternalEnergy.Set(i, g[j][8])
			if metals.Bound() {
				metals.Set(i, g[j][9])
			}
		}
		touched += n
	}
	return touched, nil
}
