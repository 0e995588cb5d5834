package main

import (
	"fmt"
	"os/exec"
	"path/filepath"
	"strconv"
	"testing"
	"unsafe"

	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// The benchmark set-up shared by BenchmarkStepFromGo and the C host
// examples/bench_host.c: benchGas elements uniformly random in a periodic
// box of about one element per pc^3, benchStars supernovae, each coupled to
// its benchNeighbors nearest elements, one worker.
const (
	benchGas       = 1_000_000
	benchStars     = 10_000
	benchNeighbors = 64
)

// benchElement is the C host's bench_element.
type benchElement struct {
	Pos, Vel                 [3]float64
	Mass, Density, U, Metals float64
	ID                       int64
}

// unitHash is the bench host's unit_hash (splitmix64 of (i, k)).
func unitHash(i, k uint64) float64 {
	z := i*0x9E3779B97F4A7C15 + k*0xBF58476D1CE4E5B9 + 0x94D049BB133111EB
	z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9
	z = (z ^ (z >> 27)) * 0x94D049BB133111EB
	z ^= z >> 31
	return float64(z>>11) / 9007199254740992.0
}

func benchBox(n int) float64 {
	box := 1.0
	for box*box*box < float64(n) {
		box++
	}
	return box
}

// BenchmarkStepFromGo is the step of examples/bench_host.c called from Go
// directly (Couple + Apply on the same array-of-structs layout): the
// baseline BenchmarkStepThroughABI is compared with.
func BenchmarkStepFromGo(b *testing.B) {
	box := benchBox(benchGas)
	elems := make([]benchElement, benchGas)
	for i := range elems {
		e := &elems[i]
		for a := 0; a < 3; a++ {
			e.Pos[a] = box * unitHash(uint64(i), uint64(a))
			e.Vel[a] = unitHash(uint64(i), 3+uint64(a)) - 0.5
		}
		e.Mass, e.Density, e.U, e.Metals, e.ID = 1, 1, 100, 0.01, int64(i+1)
	}
	stride := unsafe.Sizeof(benchElement{})
	col := func(p unsafe.Pointer, t feedback.ElemType) feedback.Column {
		return feedback.Strided(p, benchGas, stride, t)
	}
	e0 := &elems[0]
	gas := &feedback.Gas{N: benchGas, Mass: col(unsafe.Pointer(&e0.Mass), feedback.Float64),
		Density: col(unsafe.Pointer(&e0.Density), feedback.Float64), InternalEnergy: col(unsafe.Pointer(&e0.U), feedback.Float64),
		ID: col(unsafe.Pointer(&e0.ID), feedback.Int64), Species: []yields.Species{yields.Metals},
		SpeciesFractions: []feedback.Column{col(unsafe.Pointer(&e0.Metals), feedback.Float64)}}
	for a := 0; a < 3; a++ {
		gas.Pos[a] = col(unsafe.Pointer(&e0.Pos[a]), feedback.Float64)
		gas.Vel[a] = col(unsafe.Pointer(&e0.Vel[a]), feedback.Float64)
	}
	// The units of examples/host_common.h: pc, Msun, km/s.
	u := units.CodeUnits{LengthCm: 3.0856775814913673e18, MassG: 1.988409870698051e33, VelocityCmPS: 1e5}
	foe := 1e51 / (u.MassG * 1e10)
	srcs := make([]feedback.Source, benchStars)
	for s := range srcs {
		src := &srcs[s]
		src.Star = feedback.Star{ID: int64(s + 1), Mass: 100, Metallicity: 0.01, Age: 5}
		for a := 0; a < 3; a++ {
			src.Star.Pos[a] = box * unitHash(uint64(benchGas+s), uint64(a))
		}
		src.Mass, src.Energy, src.Events = 10, foe, 1
		src.Species[yields.Metals] = 2
	}
	cfg := feedback.Config{Units: u, Scheme: feedback.TerminalMomentum{Fit: feedback.KimOstriker2015},
		Neighbors: benchNeighbors, Workers: 1, Box: neighbor.Box{Size: [3]float64{box, box, box}}}
	c, err := feedback.NewCoupler(cfg)
	require.NoError(b, err)
	tree, err := neighbor.NewTree(gas.PackedPositions(nil), gas.IDs(nil), cfg.Box)
	require.NoError(b, err)
	out := &feedback.Output{}
	var touched []feedback.Touched
	var applier feedback.Applier // as the ABI's context keeps one
	step := func() {
		require.NoError(b, c.Couple(gas, tree, srcs, out))
		touched, _, err = applier.Apply(gas, out.Records, touched)
		require.NoError(b, err)
	}
	step()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		step()
	}
}

// BenchmarkStepThroughABI runs examples/bench_host.c (linked with the
// c-shared libejecta) for b.N steps and reports its own timing of the step
// loop as ns/op, so that it reads beside BenchmarkStepFromGo.
func BenchmarkStepThroughABI(b *testing.B) {
	lib := libraryDir(b)
	gcc := requireTool(b, "gcc")
	bin := filepath.Join(b.TempDir(), "bench_host")
	compile(b, gcc, "-std=c11", "-O2", "-I.", "-o", bin, filepath.Join("examples", "bench_host.c"), "-L"+lib, "-lejecta", "-Wl,-rpath,"+lib)
	b.ResetTimer()
	out, err := exec.Command(bin, strconv.Itoa(benchGas), strconv.Itoa(benchStars), strconv.Itoa(benchNeighbors), strconv.Itoa(b.N)).CombinedOutput()
	b.StopTimer()
	require.NoError(b, err, "%s", out)
	kv := keyValues(string(out))
	ns := number(b, kv, "ns_per_step")
	b.ReportMetric(ns, "ns/op")
	require.Equal(b, fmt.Sprint(benchStars), kv["stars"])
}
