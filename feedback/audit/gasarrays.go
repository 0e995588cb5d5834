package audit

import (
	"fmt"
	"maps"
	"slices"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
)

// GasArrays is gas held in plain Go slices (struct of arrays), in code
// units: the form an audit reads a dump into, and the form package bench
// builds its set-ups in. Fractions holds one mass-fraction column per entry
// of Species.
type GasArrays struct {
	Pos, Vel      [3][]float64
	Mass, Density []float64
	Energy        []float64
	ID            []int64
	Fractions     [][]float64 // one per tracked species
	Species       []yields.Species
}

// Len is the number of elements.
func (g *GasArrays) Len() int { return len(g.Mass) }

// View binds a feedback.Gas to the arrays.
func (g *GasArrays) View() *feedback.Gas {
	v := &feedback.Gas{N: g.Len(), Mass: feedback.Float64s(g.Mass), Density: feedback.Float64s(g.Density),
		InternalEnergy: feedback.Float64s(g.Energy), ID: feedback.Int64s(g.ID), Species: g.Species}
	for a := 0; a < 3; a++ {
		v.Pos[a] = feedback.Float64s(g.Pos[a])
		v.Vel[a] = feedback.Float64s(g.Vel[a])
	}
	for _, f := range g.Fractions {
		v.SpeciesFractions = append(v.SpeciesFractions, feedback.Float64s(f))
	}
	return v
}

// Clone deep-copies the arrays.
func (g *GasArrays) Clone() *GasArrays {
	c := &GasArrays{Mass: clone(g.Mass), Density: clone(g.Density), Energy: clone(g.Energy),
		ID: append([]int64(nil), g.ID...), Species: g.Species}
	for a := 0; a < 3; a++ {
		c.Pos[a] = clone(g.Pos[a])
		c.Vel[a] = clone(g.Vel[a])
	}
	for _, f := range g.Fractions {
		c.Fractions = append(c.Fractions, clone(f))
	}
	return c
}

func clone(s []float64) []float64 { return append([]float64(nil), s...) }

// Packed is the interleaved position array package neighbor builds on.
func (g *GasArrays) Packed() []float64 {
	p := make([]float64, 0, 3*g.Len())
	for i := range g.Mass {
		p = append(p, g.Pos[0][i], g.Pos[1][i], g.Pos[2][i])
	}
	return p
}

// Element is what element i holds of every conserved quantity: mass,
// species mass, momentum and total energy (kinetic plus thermal).
func (g *GasArrays) Element(i int) feedback.Quantities {
	m := g.Mass[i]
	q := feedback.Quantities{Mass: m}
	v2 := 0.0
	for a := 0; a < 3; a++ {
		q.Momentum[a] = m * g.Vel[a][i]
		v2 += g.Vel[a][i] * g.Vel[a][i]
	}
	q.Energy = 0.5*m*v2 + m*g.Energy[i]
	for c, s := range g.Species {
		q.Species[s] = m * g.Fractions[c][i]
	}
	return q
}

// Totals sums every conserved quantity over the gas (see Element).
func (g *GasArrays) Totals() feedback.Quantities {
	var q feedback.Quantities
	for i := range g.Mass {
		e := g.Element(i)
		q.Add(&e)
	}
	return q
}

// check reports columns whose lengths differ from the mass column's, and
// species listed twice.
func (g *GasArrays) check(name string) error {
	n := g.Len()
	lengths := map[string]int{"internal energy": len(g.Energy), "ID": len(g.ID)}
	if len(g.Density) > 0 { // density is not audited and may be left out
		lengths["density"] = len(g.Density)
	}
	for a, axis := range []string{"x", "y", "z"} {
		lengths["position "+axis], lengths["velocity "+axis] = len(g.Pos[a]), len(g.Vel[a])
	}
	for _, what := range slices.Sorted(maps.Keys(lengths)) {
		if lengths[what] != n {
			return fmt.Errorf("gas %s: %d values of %s for %d masses", name, lengths[what], what, n)
		}
	}
	if len(g.Fractions) != len(g.Species) {
		return fmt.Errorf("gas %s: %d mass-fraction columns for %d species", name, len(g.Fractions), len(g.Species))
	}
	for c, sp := range g.Species {
		if len(g.Fractions[c]) != n {
			return fmt.Errorf("gas %s: %d mass fractions of %s for %d masses", name, len(g.Fractions[c]), sp.Symbol(), n)
		}
		if g.column(sp) != c {
			return fmt.Errorf("gas %s: species %s listed twice", name, sp.Symbol())
		}
	}
	return nil
}

// column is the index of species sp in g.Species, or -1.
func (g *GasArrays) column(sp yields.Species) int {
	for c, s := range g.Species {
		if s == sp {
			return c
		}
	}
	return -1
}
