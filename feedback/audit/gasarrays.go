package audit

import (
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

// Totals sums every conserved quantity over the gas: mass, species mass,
// momentum and total energy (kinetic plus thermal).
func (g *GasArrays) Totals() feedback.Quantities {
	var q feedback.Quantities
	for i, m := range g.Mass {
		q.Mass += m
		v2 := 0.0
		for a := 0; a < 3; a++ {
			q.Momentum[a] += m * g.Vel[a][i]
			v2 += g.Vel[a][i] * g.Vel[a][i]
		}
		q.Energy += 0.5*m*v2 + m*g.Energy[i]
		for c, s := range g.Species {
			q.Species[s] += m * g.Fractions[c][i]
		}
	}
	return q
}
