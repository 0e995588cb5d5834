package main

import (
	"math"
	"os"
	"path/filepath"
	"testing"
	"unsafe"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/yields"
)

// testRelease is one star of a dump test, as a host's array of structs.
type testRelease struct {
	ID                           int64
	Pos, Vel                     [3]float64
	Radius, Mass, Energy, Metals float64
	Radiated                     float64
}

func releaseField(p unsafe.Pointer, t int32) fieldABI {
	return fieldABI{Data: p, Stride: int64(unsafe.Sizeof(testRelease{})), Type: t}
}

// describeReleases is the ejecta_star_columns of the releases, with the
// metals (species code 0) as their one species.
func describeReleases(r []testRelease, species *[1]int32, masses *[1]fieldABI) starColumnsABI {
	e := &r[0]
	d := starColumnsABI{Count: int64(len(r)), ID: releaseField(unsafe.Pointer(&e.ID), elemInt64),
		CouplingRadius: releaseField(unsafe.Pointer(&e.Radius), elemFloat64), EjectaMass: releaseField(unsafe.Pointer(&e.Mass), elemFloat64),
		Energy: releaseField(unsafe.Pointer(&e.Energy), elemFloat64), Radiated: releaseField(unsafe.Pointer(&e.Radiated), elemFloat64)}
	for a := 0; a < 3; a++ {
		d.Position[a] = releaseField(unsafe.Pointer(&e.Pos[a]), elemFloat64)
		d.Velocity[a] = releaseField(unsafe.Pointer(&e.Vel[a]), elemFloat64)
	}
	species[0] = int32(yields.Metals)
	masses[0] = releaseField(unsafe.Pointer(&e.Metals), elemFloat64)
	d.NSpecies, d.Species, d.SpeciesMass = 1, &species[0], &masses[0]
	return d
}

// openDump opens a dump session into a new folder, closed at the end of
// the test.
func openDump(t *testing.T, species string) (uint64, string) {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "dump")
	var h uint64
	var msg [256]byte
	var list *byte
	if species != "" {
		list = cString(species)
	}
	require.Equal(t, codeOK, entryDumpOpen(cString(dir), list, nil, &h, &msg[0], int64(len(msg))), "%s", msg[:])
	t.Cleanup(func() { entryDumpClose(&h) })
	return h, dir
}

func dumpError(h uint64) string {
	var buf [512]byte
	var n int64
	entryDumpLastError(h, &buf[0], int64(len(buf)), &n)
	return string(buf[:min(n, int64(len(buf)-1))])
}

// A dump written through the entry points from a host's array of structs
// (float32 positions, int64 IDs) reads back as the values the host held,
// and the dump of a step in which a star's release went into one element
// passes the audit.
func TestDumpSessionWritesWhatTheHostHeld(t *testing.T) {
	h, dir := openDump(t, "")
	g := newTestGas(4, 8, 1)
	require.Equal(t, codeOK, entryDumpGasBefore(h, &g.desc), dumpError(h))
	before := g.clone()

	// The host's feedback: one star at rest puts 2 Msun of ejecta (0.5
	// Msun of metals) and 100 energy units of heat into element 5.
	// Its momentum is kept, so the kinetic energy it loses becomes heat
	// too.
	e := &g.elems[5]
	m0 := e.Mass
	e.Mass += 2
	e.Metals = (m0*e.Metals + 0.5) / e.Mass
	v2, w2 := 0.0, 0.0
	for a := 0; a < 3; a++ {
		v2 += e.Vel[a] * e.Vel[a]
		e.Vel[a] *= m0 / e.Mass
		w2 += e.Vel[a] * e.Vel[a]
	}
	e.U = (m0*e.U + 100 + 0.5*m0*v2 - 0.5*e.Mass*w2) / e.Mass
	require.Equal(t, codeOK, entryDumpGasAfter(h, &g.desc), dumpError(h))
	stars := []testRelease{{ID: 9, Pos: [3]float64{float64(e.Pos[0]), float64(e.Pos[1]), float64(e.Pos[2])}, Radius: 0.5, Mass: 2, Energy: 100, Metals: 0.5}}
	var sp [1]int32
	var masses [1]fieldABI
	d := describeReleases(stars, &sp, &masses)
	require.Equal(t, codeOK, entryDumpStars(h, &d), dumpError(h))
	require.Equal(t, codeOK, entryDumpFinish(h), dumpError(h))

	dump, err := audit.ReadDump(filepath.Join(dir, audit.ManifestFile))
	require.NoError(t, err)
	for i, el := range before.elems {
		assert.Equal(t, el.ID, dump.Before.ID[i])
		assert.Equal(t, float64(el.Pos[1]), dump.Before.Pos[1][i])
		assert.Equal(t, el.Mass, dump.Before.Mass[i])
		assert.Equal(t, el.Metals, dump.Before.Fractions[0][i])
	}
	assert.Equal(t, g.elems[5].Mass, dump.After.Mass[5])
	assert.Equal(t, []yields.Species{yields.Metals}, dump.After.Species)
	require.Len(t, dump.Stars, 1)
	assert.Equal(t, 0.5, dump.Stars[0].Species[yields.Metals])
	rep, err := audit.Step(dump.Before, dump.After, dump.Stars, dump.Options())
	require.NoError(t, err)
	assert.False(t, rep.Failed(), "%v", rep.Problems)
}

// Every mistake a host can make with a dump session gets its documented
// code, a message, and leaves the session usable.
func TestDumpSessionErrors(t *testing.T) {
	var sp [1]int32
	var masses [1]fieldABI
	cases := []struct {
		name string
		call func(h uint64, g *testGas, stars []testRelease) int32
		want int32
		text string
	}{
		{"after before before", func(h uint64, g *testGas, _ []testRelease) int32 { return entryDumpGasAfter(h, &g.desc) },
			codeInvalidArgument, "call ejecta_dump_gas_before"},
		{"NULL gas", func(h uint64, _ *testGas, _ []testRelease) int32 { return entryDumpGasBefore(h, nil) }, codeNullPointer, "NULL"},
		{"NULL column", func(h uint64, g *testGas, _ []testRelease) int32 {
			g.desc.Velocity[1].Data = nil
			return entryDumpGasBefore(h, &g.desc)
		}, codeNullPointer, "velocity.y: data is NULL"},
		{"stride below the element", func(h uint64, g *testGas, _ []testRelease) int32 {
			g.desc.Mass.Stride = 4
			return entryDumpGasBefore(h, &g.desc)
		}, codeInvalidArgument, "stride 4"},
		{"stride not a multiple", func(h uint64, g *testGas, _ []testRelease) int32 {
			g.desc.Mass.Stride = 12
			return entryDumpGasBefore(h, &g.desc)
		}, codeInvalidArgument, "stride 12"},
		{"unknown element type", func(h uint64, g *testGas, _ []testRelease) int32 {
			g.desc.ID.Type = 7
			return entryDumpGasBefore(h, &g.desc)
		}, codeInvalidArgument, "unknown element type 7"},
		{"zero count", func(h uint64, g *testGas, _ []testRelease) int32 {
			g.desc.Count = 0
			return entryDumpGasBefore(h, &g.desc)
		}, codeInvalidArgument, "count 0"},
		{"species code outside the set", func(h uint64, g *testGas, _ []testRelease) int32 {
			g.species[0] = 12
			return entryDumpGasBefore(h, &g.desc)
		}, codeInvalidArgument, "not a species code"},
		{"NULL species list", func(h uint64, g *testGas, _ []testRelease) int32 {
			g.desc.Species = nil
			return entryDumpGasBefore(h, &g.desc)
		}, codeNullPointer, "n_species 1"},
		{"shared ID", func(h uint64, g *testGas, _ []testRelease) int32 {
			g.elems[7].ID = g.elems[3].ID
			return entryDumpGasBefore(h, &g.desc)
		}, codeInvalidArgument, "elements 3 and 7 share ID"},
		{"NaN velocity", func(h uint64, g *testGas, _ []testRelease) int32 {
			g.elems[2].Vel[0] = math.NaN()
			return entryDumpGasBefore(h, &g.desc)
		}, codeBadValue, "velocity.x of element 2 (ID 106) is NaN"},
		{"infinite energy", func(h uint64, g *testGas, _ []testRelease) int32 {
			g.elems[1].U = math.Inf(1)
			return entryDumpGasBefore(h, &g.desc)
		}, codeBadValue, "internal_energy of element 1"},
		{"fractional ID in a float column", func(h uint64, g *testGas, _ []testRelease) int32 {
			g.desc.ID = g.desc.Mass
			return entryDumpGasBefore(h, &g.desc)
		}, codeBadValue, "not an integer ID"},
		{"before twice", func(h uint64, g *testGas, _ []testRelease) int32 {
			entryDumpGasBefore(h, &g.desc)
			return entryDumpGasBefore(h, &g.desc)
		}, codeInvalidArgument, "already written"},
		{"count changed", func(h uint64, g *testGas, _ []testRelease) int32 {
			entryDumpGasBefore(h, &g.desc)
			g.desc.Count--
			return entryDumpGasAfter(h, &g.desc)
		}, codeInvalidArgument, "63 elements, but the gas before had 64"},
		{"species changed", func(h uint64, g *testGas, _ []testRelease) int32 {
			entryDumpGasBefore(h, &g.desc)
			g.desc.NSpecies = 0
			return entryDumpGasAfter(h, &g.desc)
		}, codeInvalidArgument, "species [], but the gas before had [Z]"},
		{"element renamed", func(h uint64, g *testGas, _ []testRelease) int32 {
			entryDumpGasBefore(h, &g.desc)
			g.elems[0].ID = 1
			return entryDumpGasAfter(h, &g.desc)
		}, codeInvalidArgument, "ID 100 of the gas before is missing and ID 1 was not in the gas before"},
		{"NULL stars", func(h uint64, _ *testGas, _ []testRelease) int32 { return entryDumpStars(h, nil) }, codeNullPointer, "NULL"},
		{"negative star count", func(h uint64, _ *testGas, r []testRelease) int32 {
			d := describeReleases(r, &sp, &masses)
			d.Count = -1
			return entryDumpStars(h, &d)
		}, codeInvalidArgument, "count -1"},
		{"NULL star column", func(h uint64, _ *testGas, r []testRelease) int32 {
			d := describeReleases(r, &sp, &masses)
			d.CouplingRadius.Data = nil
			return entryDumpStars(h, &d)
		}, codeNullPointer, "stars coupling_radius: data is NULL"},
		{"negative release", func(h uint64, _ *testGas, r []testRelease) int32 {
			r[1].Mass = -1
			d := describeReleases(r, &sp, &masses)
			return entryDumpStars(h, &d)
		}, codeBadValue, "stars ejecta_mass of star 1 (ID 2) is -1"},
		{"negative species release", func(h uint64, _ *testGas, r []testRelease) int32 {
			r[0].Metals = -0.1
			d := describeReleases(r, &sp, &masses)
			return entryDumpStars(h, &d)
		}, codeBadValue, "stars species mass Z of star 0"},
		{"finish too early", func(h uint64, _ *testGas, _ []testRelease) int32 { return entryDumpFinish(h) },
			codeInvalidArgument, "ejecta_dump_gas_before and ejecta_dump_gas_after and ejecta_dump_stars"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			h, dir := openDump(t, "")
			g := newTestGas(4, 8, 1)
			stars := []testRelease{{ID: 1, Radius: 1, Mass: 1, Energy: 1, Metals: 0.1}, {ID: 2, Radius: 1, Mass: 1, Energy: 1}}
			assert.Equal(t, c.want, c.call(h, g, stars))
			assert.Contains(t, dumpError(h), c.text)
			_, err := os.Stat(filepath.Join(dir, audit.ManifestFile))
			assert.True(t, os.IsNotExist(err), "no manifest after a mistake")
		})
	}
}

func TestDumpOpenErrors(t *testing.T) {
	file := filepath.Join(t.TempDir(), "a-file")
	require.NoError(t, os.WriteFile(file, nil, 0o644))
	long := make([]byte, pathCapacity+1)
	for i := range long[:pathCapacity] {
		long[i] = 'a'
	}
	cases := []struct {
		name         string
		dir, species *byte
		box          *[3]float64
		want         int32
		text         string
	}{
		{"NULL directory", nil, nil, nil, codeNullPointer, "dump directory is NULL"},
		{"empty directory", cString(""), nil, nil, codeInvalidArgument, "empty"},
		{"unterminated directory", &long[0], nil, nil, codeInvalidArgument, "not NUL-terminated"},
		{"directory under a file", cString(filepath.Join(file, "dump")), nil, nil, codeDumpFile, "a-file"},
		{"unknown element", cString(t.TempDir()), cString("Fe,Qq"), nil, codeInvalidArgument, `"Qq" is not a chemical symbol`},
		{"metals listed", cString(t.TempDir()), cString("Z,Fe"), nil, codeInvalidArgument, "always tracked"},
		{"negative box", cString(t.TempDir()), nil, &[3]float64{1, -1, 1}, codeInvalidArgument, "box_size"},
		{"NaN box", cString(t.TempDir()), nil, &[3]float64{math.NaN(), 0, 0}, codeInvalidArgument, "box_size"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			h := uint64(7)
			var msg [512]byte
			assert.Equal(t, c.want, entryDumpOpen(c.dir, c.species, c.box, &h, &msg[0], int64(len(msg))))
			assert.Zero(t, h)
			assert.Contains(t, string(msg[:]), c.text)
		})
	}
	assert.Equal(t, codeNullPointer, entryDumpOpen(cString(t.TempDir()), nil, nil, nil, nil, 0))
}

// Handles that are not live dump sessions are refused, never followed: 0,
// a closed session, a context handle; a session in use by another call is
// busy.
func TestDumpHandles(t *testing.T) {
	g := newTestGas(3, 6, 1)
	assert.Equal(t, codeInvalidContext, entryDumpGasBefore(0, &g.desc))
	h, _ := openDump(t, "")
	stale := h
	require.Equal(t, codeOK, entryDumpClose(&h))
	assert.Zero(t, h)
	assert.Equal(t, codeOK, entryDumpClose(&h), "closing 0 is a no-op")
	assert.Equal(t, codeInvalidContext, entryDumpGasBefore(stale, &g.desc))
	assert.Equal(t, codeInvalidContext, entryDumpClose(&stale))
	assert.Equal(t, codeNullPointer, entryDumpClose(nil))

	ctx := create(t, pcConfig())
	assert.Equal(t, codeInvalidContext, entryDumpFinish(ctx), "a context is not a dump session")
	d, _ := openDump(t, "")
	assert.Equal(t, codeInvalidContext, entryBindGas(d, &g.desc), "a dump session is not a context")

	s, err := dumps().lookup(d)
	require.NoError(t, err)
	s.mu.Lock()
	assert.Equal(t, codeBusy, entryDumpGasBefore(d, &g.desc))
	var buf [128]byte
	assert.Equal(t, codeBusy, entryDumpLastError(d, &buf[0], int64(len(buf)), nil))
	s.mu.Unlock()
	assert.Equal(t, codeOK, entryDumpGasBefore(d, &g.desc))
	assert.Equal(t, codeNullPointer, entryDumpLastError(d, nil, 4, nil))
}

// A finished session accepts nothing more; an earlier dump's manifest is
// removed when a new session opens on its folder, so the folder is never
// taken for a finished dump it is not.
func TestDumpFinishAndReopen(t *testing.T) {
	h, dir := openDump(t, "Fe")
	g := newTestGas(3, 6, 1)
	g.species[0] = 1 // iron, code 1 of the set "Fe"
	require.Equal(t, codeOK, entryDumpGasBefore(h, &g.desc), dumpError(h))
	require.Equal(t, codeOK, entryDumpGasAfter(h, &g.desc), dumpError(h))
	none := starColumnsABI{}
	require.Equal(t, codeOK, entryDumpStars(h, &none), dumpError(h))
	require.Equal(t, codeOK, entryDumpFinish(h), dumpError(h))
	assert.Equal(t, codeInvalidArgument, entryDumpFinish(h))
	assert.Contains(t, dumpError(h), "already finished")
	manifest := filepath.Join(dir, audit.ManifestFile)
	d, err := audit.ReadDump(manifest)
	require.NoError(t, err)
	assert.Empty(t, d.Stars)
	assert.Equal(t, "Fe", d.Species.String())
	assert.Equal(t, []yields.Species{1}, d.Before.Species)
	rep, err := audit.Step(d.Before, d.After, d.Stars, d.Options())
	require.NoError(t, err)
	assert.False(t, rep.Failed(), "%v", rep.Problems)

	var again uint64
	require.Equal(t, codeOK, entryDumpOpen(cString(dir), nil, nil, &again, nil, 0))
	defer entryDumpClose(&again)
	_, err = os.Stat(manifest)
	assert.True(t, os.IsNotExist(err), "the earlier manifest is gone")
}

// Stars given in several calls are one list; a species only some calls
// list counts as zero for the others.
func TestDumpStarsInSeveralCalls(t *testing.T) {
	h, dir := openDump(t, "")
	g := newTestGas(3, 6, 1)
	require.Equal(t, codeOK, entryDumpGasBefore(h, &g.desc))
	require.Equal(t, codeOK, entryDumpGasAfter(h, &g.desc))
	var sp [1]int32
	var masses [1]fieldABI
	first := []testRelease{{ID: 1, Radius: 1, Mass: 1, Energy: 1, Metals: 0.25}}
	d := describeReleases(first, &sp, &masses)
	require.Equal(t, codeOK, entryDumpStars(h, &d))
	second := []testRelease{{ID: 2, Radius: 2, Mass: 3, Energy: 4}}
	d = describeReleases(second, &sp, &masses)
	d.NSpecies, d.Radiated = 0, fieldABI{}
	require.Equal(t, codeOK, entryDumpStars(h, &d))
	require.Equal(t, codeOK, entryDumpFinish(h), dumpError(h))
	dump, err := audit.ReadDump(filepath.Join(dir, audit.ManifestFile))
	require.NoError(t, err)
	require.Len(t, dump.Stars, 2)
	assert.Equal(t, 0.25, dump.Stars[0].Species[yields.Metals])
	assert.Equal(t, 0.0, dump.Stars[1].Species[yields.Metals])
	assert.Equal(t, 3.0, dump.Stars[1].Mass)
	assert.Equal(t, 0.0, dump.Stars[1].Radiated)
}
