package testbed

import (
	"fmt"
	"math"
	"testing"

	"github.com/ejecta-dev/ejecta/bench/cooling"
)

// BenchmarkGridStep times one step of a 48^3 blast wave in gas of
// n_H = 1 cm^-3 (hydrodynamics and cooling) on 1 and 2 workers and reports
// cell-updates per second; the 2-worker speed-up is the ratio of the two in
// the same run.
func BenchmarkGridStep(b *testing.B) {
	for _, workers := range []int{1, 2} {
		b.Run(fmt.Sprintf("workers=%d", workers), func(b *testing.B) {
			g := blastGridB(b, 48, workers)
			dt := g.StableStep()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				if err := g.Step(dt); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.N)*float64(g.Len())/b.Elapsed().Seconds(), "cells/s")
		})
	}
}

func blastGridB(b *testing.B, n, workers int) *Grid {
	l := 64.0
	cfg := DefaultGridConfig(n, l)
	cfg.Workers = workers
	curve, err := cooling.Builtin(1)
	if err != nil {
		b.Fatal(err)
	}
	cfg.Cooling = curve
	g, err := NewGrid(cfg)
	if err != nil {
		b.Fatal(err)
	}
	b.Cleanup(g.Close)
	u := cfg.Units
	rho := cfg.Thermo.MassDensity(1)
	teq := curve.EquilibriumTemperature(cfg.Thermo.HydrogenDensity(rho))
	g.Fill(rho/u.DensityGCm3(), cfg.Thermo.SpecificEnergy(teq)/u.SpecificEnergy(), 0.0134)
	for i := 0; i < g.Len(); i++ {
		p := g.Position(i)
		d := math.Hypot(math.Hypot(p[0]-l/2, p[1]-l/2), p[2]-l/2)
		if d < 10 {
			g.eint[i] += 1e6
			g.vel[0][i] = 100 * (p[0] - l/2) / 10
		}
	}
	return g
}
