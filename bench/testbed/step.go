package testbed

import (
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/feedback"
)

// StableStep is the largest time step (code) the Courant condition allows
// for the present state: Courant × dx / max over cells of (max_a |v_a| + c),
// and, with CoolingCourant > 0, no more than CoolingCourant times the
// shortest cooling time of a hot cell whose cooling is not held, unless that
// is below a tenth of the Courant step. It is +Inf for gas at rest at zero
// temperature without cooling.
func (g *Grid) StableStep() float64 {
	g.run(taskSignal, g.n)
	s, tc := 0.0, math.Inf(1)
	for p := range g.planes {
		s = math.Max(s, g.planes[p].maxSpeed)
		tc = math.Min(tc, g.planes[p].minCooling)
	}
	dt := math.Inf(1)
	if s > 0 {
		dt = g.cfg.Courant * g.dx / s
	}
	if c := g.cfg.CoolingCourant * tc; c < dt {
		dt = math.Max(c, dt/10)
	}
	return dt
}

// signalPlane finds the largest signal speed in plane k and, when the
// step follows cooling, the shortest cooling time (code).
func (g *Grid) signalPlane(k int) {
	n := g.n
	gg := g.gas.Gamma * (g.gas.Gamma - 1)
	s := 0.0
	for c := k * n * n; c < (k+1)*n*n; c++ {
		v := math.Max(math.Abs(g.vel[0][c]), math.Max(math.Abs(g.vel[1][c]), math.Abs(g.vel[2][c])))
		s = math.Max(s, v+math.Sqrt(gg*g.eint[c]))
	}
	g.planes[k].maxSpeed = s
	tc := math.Inf(1)
	if g.cooler != nil && g.cfg.CoolingCourant > 0 {
		eHot := g.cfg.Thermo.SpecificEnergy(CoolingStepTemperature) / g.eCGS
		for c := k * n * n; c < (k+1)*n*n; c++ {
			if g.eint[c] <= eHot || g.holdUntil[c] > g.time {
				continue
			}
			tc = math.Min(tc, g.cooler.CoolingTime(g.dens[c]*g.rhoCGS, g.eint[c]*g.eCGS))
		}
		tc /= g.tCGS
	}
	g.planes[k].minCooling = tc
}

// Step advances the grid by dt (code time): the three sweeps of the split
// hydrodynamics, in the order x, y, z on even steps and z, y, x on odd
// ones, then the cooling of every cell whose cooling is not held. dt should
// not exceed StableStep. A cell left without mass fails the step with
// ErrState.
func (g *Grid) Step(dt float64) error {
	if !(dt > 0) || math.IsInf(dt, 0) {
		return fmt.Errorf("testbed: step %v, want finite > 0: %w", dt, ErrConfig)
	}
	axes := [3]int{0, 1, 2}
	if g.steps%2 == 1 {
		axes = [3]int{2, 1, 0}
	}
	dtdx := dt / g.dx
	for _, a := range axes {
		if err := g.sweep(a, dtdx); err != nil {
			return err
		}
	}
	if g.cfg.Cooling != nil {
		g.coolDt = dt
		g.run(taskCool, g.n)
		for p := range g.planes {
			g.ledger.Radiated += g.planes[p].radiated
		}
	}
	g.time += dt
	g.steps++
	return nil
}

// coolPlane integrates the cooling of plane k over the step (Cooler.Evolve,
// exact for the piecewise power law), skipping cells whose cooling is held,
// and sums the energy radiated.
func (g *Grid) coolPlane(k int) {
	n := g.n
	ps := &g.planes[k]
	ps.radiated = 0
	dt := g.coolDt * g.tCGS
	for c := k * n * n; c < (k+1)*n*n; c++ {
		if g.holdUntil[c] > g.time {
			continue
		}
		e := g.eint[c]
		ecgs := e * g.eCGS
		e1cgs := g.cooler.Evolve(g.dens[c]*g.rhoCGS, ecgs, dt, math.NaN())
		if e1cgs == ecgs {
			continue
		}
		e1 := e1cgs / g.eCGS
		ps.radiated += g.mass[c] * (e - e1)
		g.eint[c] = e1
	}
}

// AfterApply brings the solver up to date after feedback records were
// applied to Gas: each touched cell's density follows its new mass, a cell
// flagged feedback.FlagHoldCooling has its cooling held until the present
// time plus the record's HoldCoolingUntil, and the ledger books what the
// report says the gas received.
func (g *Grid) AfterApply(rep feedback.ApplyReport, touched []feedback.Touched) {
	for i := range touched {
		t := &touched[i]
		c := t.Index
		g.dens[c] = g.mass[c] / g.volume
		if t.Flags&feedback.FlagHoldCooling != 0 {
			g.holdUntil[c] = math.Max(g.holdUntil[c], g.time+t.HoldCoolingUntil)
		}
	}
	g.ledger.Injected += rep.Deposited.Energy
	g.ledger.InjectedMass += rep.Deposited.Mass
	g.ledger.InjectedMetals += rep.Deposited.Species[metalsSpecies]
	for a := 0; a < 3; a++ {
		g.ledger.InjectedMomentum[a] += rep.Deposited.Momentum[a]
	}
}

// HeldCells counts the cells whose cooling is held at the present time.
func (g *Grid) HeldCells() int {
	n := 0
	for _, h := range g.holdUntil {
		if h > g.time {
			n++
		}
	}
	return n
}
