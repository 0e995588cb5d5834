package feedback_test

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// benchWorld is the standard coupling benchmark: 10000 stars at random
// places in a 1e6-element random gas set, each with its 64 nearest
// neighbors precomputed as host-supplied lists, so the benchmarks measure
// coupling, not searching.
type benchWorld struct {
	gas   *audit.GasArrays
	lists *neighbor.HostLists
	srcs  []feedback.Source
}

func newBenchWorld(b *testing.B, nGas, nStars, k int) *benchWorld {
	b.Helper()
	u := units.ParsecSolarMassKms()
	g := uniformGas(42, nGas, 100, 1, u)
	pos := g.Packed()
	tree, err := neighbor.NewTree(pos, g.ID, neighbor.Box{})
	if err != nil {
		b.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(42, 42))
	w := &benchWorld{gas: g}
	offsets := []int{0}
	var indices []int
	var buf []neighbor.Neighbor
	for s := 0; s < nStars; s++ {
		i := rng.IntN(nGas)
		src := supernova(int64(s+1), u)
		src.Star.Pos = [3]float64{g.Pos[0][i] + 0.3*rng.NormFloat64(), g.Pos[1][i] + 0.3*rng.NormFloat64(), g.Pos[2][i]}
		src.Star.Vel = [3]float64{5 * rng.NormFloat64(), 5 * rng.NormFloat64(), 5 * rng.NormFloat64()}
		w.srcs = append(w.srcs, src)
		buf, err = tree.Nearest(neighbor.Query{Pos: src.Star.Pos}, k, buf)
		if err != nil {
			b.Fatal(err)
		}
		for _, nb := range buf {
			indices = append(indices, nb.Index)
		}
		offsets = append(offsets, len(indices))
	}
	w.lists, err = neighbor.NewHostLists(pos, g.ID, neighbor.Box{}, offsets, indices)
	if err != nil {
		b.Fatal(err)
	}
	return w
}

// touch is the memory floor: it finds each star's neighbors the same way,
// reads every gas field the coupler reads and writes one record per
// neighbor, with no physics.
func touch(gas *feedback.Gas, f neighbor.Finder, k int, srcs []feedback.Source, buf []neighbor.Neighbor, out []feedback.Record) ([]neighbor.Neighbor, []feedback.Record, float64) {
	out = out[:0]
	sink := 0.0
	for s := range srcs {
		var err error
		buf, err = f.Nearest(neighbor.Query{Pos: srcs[s].Star.Pos, Star: s}, k, buf)
		if err != nil {
			panic(err)
		}
		for _, nb := range buf {
			i := nb.Index
			r := feedback.Record{GasIndex: i, GasID: gas.ID.Int(i), StarID: srcs[s].Star.ID}
			r.Mass = gas.Mass.At(i) + gas.Density.At(i) + gas.InternalEnergy.At(i) + gas.SpeciesFractions[0].At(i)
			for a := 0; a < 3; a++ {
				r.Momentum[a] = gas.Pos[a].At(i) + gas.Vel[a].At(i)
			}
			r.Energy = nb.Dist2
			sink += r.Mass
			out = append(out, r)
		}
	}
	return buf, out, sink
}

func BenchmarkCouple(b *testing.B) {
	const k = 64
	w := newBenchWorld(b, 1<<20, 10000, k)
	view := w.gas.View()
	u := units.ParsecSolarMassKms()
	// Each channel with the release it is meant for.
	wind := func(src feedback.Source) feedback.Source {
		return feedback.Source{Star: src.Star, Channel: yields.MassiveWinds, Mass: 1e-3, Energy: 0.5 * 1e-3 * 2000 * 2000}
	}
	light := func(src feedback.Source) feedback.Source {
		return feedback.Source{Star: src.Star, Channel: yields.RadiationPressure, Energy: 1e6 * units.SolarLuminosity * units.Megayear / u.EnergyErg()}
	}
	photons := func(src feedback.Source) feedback.Source {
		n := 1e49 * units.Megayear
		return feedback.Source{Star: src.Star, Channel: yields.Photoionization, Photons: n,
			Duration: units.Megayear / u.TimeS(), Energy: n * 3 * 1.602e-12 / u.EnergyErg()}
	}
	cases := []struct {
		scheme  feedback.Scheme
		release func(feedback.Source) feedback.Source
	}{
		{feedback.ThermalDump{}, nil},
		{feedback.DefaultKinetic(), nil},
		{feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}, nil},
		{feedback.DefaultStochasticHeating(1), nil},
		{feedback.DefaultWinds(feedback.KimOstriker2015), wind},
		{feedback.DefaultRadiationPressure(), light},
		{feedback.Photoionization{}, photons},
	}
	b.Run(fmt.Sprintf("touch/k=%d", k), func(b *testing.B) {
		var buf []neighbor.Neighbor
		var recs []feedback.Record
		buf, recs, _ = touch(view, w.lists, k, w.srcs, buf, recs) // warm the buffers
		b.ReportAllocs()
		for b.Loop() {
			buf, recs, _ = touch(view, w.lists, k, w.srcs, buf, recs)
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(w.srcs)), "ns/star")
	})
	for _, cs := range cases {
		srcs := w.srcs
		if cs.release != nil {
			srcs = make([]feedback.Source, len(w.srcs))
			for i := range srcs {
				srcs[i] = cs.release(w.srcs[i])
			}
		}
		b.Run(fmt.Sprintf("%s/k=%d", cs.scheme.Name(), k), func(b *testing.B) {
			c, err := feedback.NewCoupler(feedback.Config{Units: u, Scheme: cs.scheme, Neighbors: k})
			if err != nil {
				b.Fatal(err)
			}
			var out feedback.Output
			if err := c.Couple(view, w.lists, srcs, &out); err != nil { // warm the scratch
				b.Fatal(err)
			}
			b.ReportAllocs()
			for b.Loop() {
				if err := c.Couple(view, w.lists, srcs, &out); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(srcs)), "ns/star")
		})
	}
}

// BenchmarkCoupleWorkers measures the parallel driver's scaling.
func BenchmarkCoupleWorkers(b *testing.B) {
	w := newBenchWorld(b, 1<<20, 10000, 64)
	view := w.gas.View()
	for _, workers := range []int{1, 2} {
		b.Run(fmt.Sprintf("terminal-momentum/workers=%d", workers), func(b *testing.B) {
			c, err := feedback.NewCoupler(feedback.Config{Units: units.ParsecSolarMassKms(), Neighbors: 64, Workers: workers})
			if err != nil {
				b.Fatal(err)
			}
			var out feedback.Output
			if err := c.Couple(view, w.lists, w.srcs, &out); err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			for b.Loop() {
				if err := c.Couple(view, w.lists, w.srcs, &out); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(len(w.srcs))*float64(b.N)/b.Elapsed().Seconds(), "stars/s")
		})
	}
}
