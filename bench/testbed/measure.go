package testbed

import (
	"math"

	"github.com/ejecta-dev/ejecta/yields"
)

const metalsSpecies = yields.Metals

// probe is what a measurement pass measures around.
type probe struct {
	center   [3]float64
	eAmbient float64
	eHot     float64
}

// Measurement is what the grid holds around a point at one time, in code
// units: the radial momentum about the point (through the nearest periodic
// image of each cell), the kinetic energy, the thermal energy above the
// ambient medium's, and the mass of hot gas.
type Measurement struct {
	Time           float64
	RadialMomentum float64
	Kinetic        float64
	ThermalExcess  float64
	HotMass        float64
}

// Measure sums, plane by plane in a fixed order, the radial momentum about
// center, the kinetic energy, the thermal energy in excess of eAmbient
// (specific, code) per unit mass, and the mass of cells hotter than hotK
// (K).
func (g *Grid) Measure(center [3]float64, eAmbient, hotK float64) Measurement {
	g.probe = probe{center: center, eAmbient: eAmbient, eHot: g.cfg.Thermo.SpecificEnergy(hotK) / g.eCGS}
	g.run(taskMeasure, g.n)
	m := Measurement{Time: g.time}
	for p := range g.planes {
		s := &g.planes[p]
		m.RadialMomentum += s.radial
		m.Kinetic += s.kinetic
		m.ThermalExcess += s.excess
		m.HotMass += s.hot
	}
	return m
}

// measurePlane sums plane k's share of a measurement.
func (g *Grid) measurePlane(k int) {
	n := g.n
	s := &g.planes[k]
	s.radial, s.kinetic, s.excess, s.hot = 0, 0, 0, 0
	box := g.Box()
	pr := &g.probe
	for c := k * n * n; c < (k+1)*n*n; c++ {
		d := box.MinImage([3]float64{g.pos[0][c] - pr.center[0], g.pos[1][c] - pr.center[1], g.pos[2][c] - pr.center[2]})
		r := math.Sqrt(d[0]*d[0] + d[1]*d[1] + d[2]*d[2])
		m := g.mass[c]
		vx, vy, vz := g.vel[0][c], g.vel[1][c], g.vel[2][c]
		if r > 0 {
			s.radial += m * (vx*d[0] + vy*d[1] + vz*d[2]) / r
		}
		s.kinetic += 0.5 * m * (vx*vx + vy*vy + vz*vz)
		e := g.eint[c]
		s.excess += m * (e - pr.eAmbient)
		if e > pr.eHot {
			s.hot += m
		}
	}
}
