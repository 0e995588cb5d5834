package testbed

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// sedovConstant is ξ in R = ξ (E t^2 / ρ)^(1/5) for γ = 5/3, from the
// similarity solution of Sedov 1959 (Similarity and Dimensional Methods in
// Mechanics): the constant 1.1517 follows from integrating the similarity
// equations for the energy (e.g. Kamm & Timmes 2007, LA-UR-07-2849; from
// memory).
const sedovConstant = 1.1517

// blastGrid sets a grid of n^3 cells in a box of side l (pc) to gas of
// hydrogen density nH (cm^-3) at 100 K with energy e (erg) as heat in the
// cells within r0 (pc) of the box centre.
func blastGrid(t *testing.T, n int, l, nH, e, r0 float64, workers int) *Grid {
	cfg := DefaultGridConfig(n, l)
	cfg.Workers = workers
	g, err := NewGrid(cfg)
	require.NoError(t, err)
	t.Cleanup(g.Close)
	u := cfg.Units
	rho := cfg.Thermo.MassDensity(nH) / u.DensityGCm3()
	eAmb := cfg.Thermo.SpecificEnergy(100) / u.SpecificEnergy()
	g.Fill(rho, eAmb, 0.0134)
	c := [3]float64{l / 2, l / 2, l / 2}
	var inside []int
	mass := 0.0
	for i := 0; i < g.Len(); i++ {
		p := g.Position(i)
		d := math.Sqrt((p[0]-c[0])*(p[0]-c[0]) + (p[1]-c[1])*(p[1]-c[1]) + (p[2]-c[2])*(p[2]-c[2]))
		if d < r0 {
			inside = append(inside, i)
			mass += g.mass[i]
		}
	}
	require.NotEmpty(t, inside)
	de := e / u.EnergyErg() / mass
	for _, i := range inside {
		g.eint[i] += de
	}
	return g
}

// shockRadius is the radius of the peak of the shell-averaged density
// profile (bins of half a cell), refined by a parabola through the peak bin
// and its neighbors.
func shockRadius(g *Grid, rho0 float64) float64 {
	l := g.cfg.Size
	c := [3]float64{l / 2, l / 2, l / 2}
	bw := g.dx / 2
	nb := int(l/2/bw) + 1
	sum := make([]float64, nb)
	cnt := make([]float64, nb)
	for i := 0; i < g.Len(); i++ {
		p := g.Position(i)
		d := math.Sqrt((p[0]-c[0])*(p[0]-c[0]) + (p[1]-c[1])*(p[1]-c[1]) + (p[2]-c[2])*(p[2]-c[2]))
		b := int(d / bw)
		if b < nb {
			sum[b] += g.dens[i]
			cnt[b]++
		}
	}
	best, peak := -1, 0.0
	for b := range sum {
		if cnt[b] > 0 && sum[b]/cnt[b] > peak {
			best, peak = b, sum[b]/cnt[b]
		}
	}
	if best < 1 || best >= nb-1 || cnt[best-1] == 0 || cnt[best+1] == 0 {
		return (float64(best) + 0.5) * bw
	}
	a, m, z := sum[best-1]/cnt[best-1], peak, sum[best+1]/cnt[best+1]
	off := 0.5 * (a - z) / (a - 2*m + z)
	return (float64(best) + 0.5 + off) * bw
}

func TestSedovTaylorRadius(t *testing.T) {
	if testing.Short() {
		t.Skip("a 32^3 blast wave")
	}
	// 1e51 erg as heat in the cells within two cell widths of the centre,
	// in gas of n_H = 1 cm^-3 at 100 K without cooling, followed until the
	// analytic shock reaches 0.38 of the box (about 12 cells).
	const n, l = 32, 64.0
	g := blastGrid(t, n, l, 1, 1e51, 2.01*l/n, 2)
	u := g.cfg.Units
	rho := g.dens[0]
	e := 1e51 / u.EnergyErg()
	before := g.Totals()
	want := 0.38 * l
	end := math.Sqrt(math.Pow(want/sedovConstant, 5) * rho / e)
	for g.Time() < end {
		require.NoError(t, g.Step(math.Min(g.StableStep(), end-g.Time())))
	}
	got := shockRadius(g, rho)
	after := g.Totals()
	t.Logf("shock radius %.3f pc, Sedov %.3f pc (ratio %.4f) after %d steps; kinetic share %.3f",
		got, want, got/want, g.Steps(), after.Kinetic/after.TotalEnergy)
	assert.InEpsilon(t, want, got, 0.03, "R = 1.1517 (E t^2 / rho)^(1/5) (Sedov 1959)")
	assert.InEpsilon(t, before.TotalEnergy, after.TotalEnergy, 1e-12, "energy without cooling")
	assert.Zero(t, g.Ledger().Floor)
}
