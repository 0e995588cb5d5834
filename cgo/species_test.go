package main

import (
	"math"
	"path/filepath"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/yields"
)

func speciesSymbols(t *testing.T, h uint64) []string {
	t.Helper()
	var n int32
	require.Equal(t, codeOK, entrySpeciesCount(h, &n), lastError(h))
	out := make([]string, n)
	buf := make([]byte, 8)
	for i := range out {
		require.Equal(t, codeOK, entrySpeciesSymbol(h, int32(i), &buf[0], int64(len(buf))), lastError(h))
		out[i] = string(buf[:indexByte(buf, 0)])
	}
	return out
}

func indexByte(b []byte, c byte) int {
	for i, x := range b {
		if x == c {
			return i
		}
	}
	return len(b)
}

// A host chooses its elements by symbol; the context names every code of
// the set, refuses bad lists with nothing changed, and refuses a choice
// after gas is bound.
func TestChooseSpecies(t *testing.T) {
	h := create(t, pcConfig())
	assert.Equal(t, []string{"Z", "H", "He", "C", "N", "O", "Ne", "Mg", "Si", "S", "Ca", "Fe"}, speciesSymbols(t, h),
		"the default set (Wiersma, Schaye & Smith 2009)")
	require.Equal(t, codeOK, entryChooseSpecies(h, cString("fe, O,Ni")), lastError(h))
	assert.Equal(t, []string{"Z", "Fe", "O", "Ni"}, speciesSymbols(t, h))

	for _, bad := range []string{"Fe,Xx", "Fe,,O", "O,o", "Z,O", "H,He,Li,Be,B,C,N,O,F,Ne,Na,Mg"} {
		assert.Equal(t, codeInvalidArgument, entryChooseSpecies(h, cString(bad)), bad)
		assert.Equal(t, []string{"Z", "Fe", "O", "Ni"}, speciesSymbols(t, h), "unchanged after %q", bad)
	}
	assert.Contains(t, func() string { entryChooseSpecies(h, cString("Fe,Xx")); return lastError(h) }(), `"Xx" is not a chemical symbol`)

	buf := make([]byte, 2)
	assert.Equal(t, codeInvalidArgument, entrySpeciesSymbol(h, 4, &buf[0], 2))
	assert.Equal(t, codeInvalidArgument, entrySpeciesSymbol(h, -1, &buf[0], 2))
	assert.Equal(t, codeBufferTooSmall, entrySpeciesSymbol(h, 1, &buf[0], 2))
	assert.Equal(t, codeNullPointer, entrySpeciesCount(h, nil))

	// A gas code past the set is refused at binding.
	g := newTestGas(4, 10, 1)
	g.species[0] = 4
	assert.Equal(t, codeInvalidArgument, entryBindGas(h, &g.desc))
	assert.Contains(t, lastError(h), "not a species code of the set Fe,O,Ni")
	g.species[0] = 3
	require.Equal(t, codeOK, entryBindGas(h, &g.desc), lastError(h))
	assert.Equal(t, codeInvalidArgument, entryChooseSpecies(h, nil))
	assert.Contains(t, lastError(h), "before ejecta_bind_gas")

	// NULL restores the default set on a fresh context.
	h2 := create(t, pcConfig())
	require.Equal(t, codeOK, entryChooseSpecies(h2, cString("O")))
	require.Equal(t, codeOK, entryChooseSpecies(h2, nil))
	assert.Len(t, speciesSymbols(t, h2), int(yields.NumSpecies))
}

// A population step with a chosen set deposits into the host's column for
// code 1 exactly the iron a default-set context deposits into its
// EJECTA_SPECIES_IRON column (same seed, star and step index: the same
// draws), and the ledger balances.
func TestPopulationWithChosenSpecies(t *testing.T) {
	const box, formed = 10.0, 1e4
	dt := 30 / myrPerCodeTime
	iron := func(list string, code yields.Species) (gained, released float64) {
		c := pcConfig()
		c.BoxSize = [3]float64{box, box, box}
		h := create(t, c)
		if list != "" {
			require.Equal(t, codeOK, entryChooseSpecies(h, cString(list)), lastError(h))
		}
		p := defaultPopulationConfig()
		require.Equal(t, codeOK, entryEnablePopulation(h, &p), lastError(h))
		g := denseGas(6, box, 3)
		for i := range g.elems {
			g.elems[i].Metals = 0 // the column receives iron
		}
		g.species[0] = int32(code)
		require.Equal(t, codeOK, entryBindGas(h, &g.desc), lastError(h))
		star := cluster(5, formed, box, 5)
		require.Equal(t, codeOK, entryStepPopulation(h, &star, 1, dt, 2, modeOwnFinder, nil, nil), lastError(h))
		var l ledgerABI
		require.Equal(t, codeOK, entryGetLedger(h, &l))
		require.Equal(t, codeOK, entryLedgerBalanced(&l, 1e-12, nil, 0))
		var rep applyReportABI
		require.Equal(t, codeOK, entryApplyStepRecords(h, &rep), lastError(h))
		for i := range g.elems {
			gained += g.elems[i].Metals * g.elems[i].Mass
		}
		return gained, l.Released.SpeciesMass[code]
	}
	defGained, defReleased := iron("", yields.Iron)
	gained, released := iron("Fe,O", 1)
	require.Positive(t, defReleased)
	assert.Equal(t, defReleased, released)
	assert.InEpsilon(t, released, gained, 1e-9)
	assert.InEpsilon(t, defGained, gained, 1e-12)

	// The built-in population has no yields for nickel; the example table
	// has no carbon column.
	c := pcConfig()
	h := create(t, c)
	require.Equal(t, codeOK, entryChooseSpecies(h, cString("Ni")))
	p := defaultPopulationConfig()
	assert.Equal(t, codeInvalidArgument, entryEnablePopulation(h, &p))
	assert.Contains(t, lastError(h), "no built-in yields for Ni")
	h = create(t, c)
	require.Equal(t, codeOK, entryChooseSpecies(h, cString("Fe,C")))
	p.YieldsTable = cString(exampleTable)
	assert.Equal(t, codeInvalidArgument, entryEnablePopulation(h, &p))
	assert.Contains(t, lastError(h), "no columns for C")
}

// The species calls work from C and from Fortran (through ejecta_mod), as
// declared in ejecta.h and the module.
func TestSpeciesFromCAndFortran(t *testing.T) {
	lib := libraryDir(t)
	gcc := requireTool(t, "gcc")
	dir := t.TempDir()
	bin := filepath.Join(dir, "species_c")
	args := append([]string{"-std=c11", "-Wall", "-Wextra", "-Werror", "-I.", "-o", bin, filepath.Join("testdata", "species", "species.c")},
		sharedLink(lib)...)
	compile(t, gcc, args...)
	kv := keyValues(runHost(t, bin))
	assert.Equal(t, "12", kv["default_count"])
	assert.Equal(t, "Fe", kv["default_iron"])
	assert.Equal(t, "4", kv["chosen_count"])
	assert.Equal(t, "Z,Fe,O,Ni", kv["chosen"])
	assert.Equal(t, strconv.Itoa(int(codeInvalidArgument)), kv["bad_code"], "EJECTA_ERR_INVALID_ARGUMENT")
	assert.Contains(t, kv["bad_error"], `"Xx" is not a chemical symbol`)

	gfortran := requireTool(t, "gfortran")
	fbin := filepath.Join(dir, "species_f")
	fargs := append([]string{"-std=f2008", "-Wall", "-Werror", "-J", dir, "-o", fbin,
		filepath.Join("fortran", "ejecta_mod.f90"), filepath.Join("testdata", "species", "species.f90")}, sharedLink(lib)...)
	compile(t, gfortran, fargs...)
	kv = keyValues(runHost(t, fbin))
	assert.Equal(t, "3", kv["chosen_count"])
	assert.Equal(t, "Z,Fe,O", kv["chosen"])
}

// A refused star names its species by the context's set, not by the
// default set, and names the release field that is not finite.
func TestStarErrorsNameTheContextsSpecies(t *testing.T) {
	h := create(t, pcConfig())
	require.Equal(t, codeOK, entryChooseSpecies(h, cString("Fe,O")), lastError(h))
	g := newTestGas(4, 10, 1)
	require.Equal(t, codeOK, entryBindGas(h, &g.desc), lastError(h))
	star := starABI{ID: 7, Position: [3]float64{5, 5, 5}, Mass: 10, Channel: int32(yields.CoreCollapse), EjectedMass: 1, Energy: 1}
	star.SpeciesMass[1] = 2
	assert.Equal(t, codeBadValue, entryStep(h, &star, 1, 0, modeOwnFinder, nil, nil))
	assert.Contains(t, lastError(h), "stars[0] (of 1): star 7: species Fe mass 2 exceeds the ejected mass 1")

	star.SpeciesMass[1] = 0
	star.Duration = math.Inf(1)
	assert.Equal(t, codeBadValue, entryStep(h, &star, 1, 0, modeOwnFinder, nil, nil))
	assert.Contains(t, lastError(h), "star 7: release duration +Inf is not finite")
}

// A release may not carry species mass at a code the context's set does
// not have: the step refuses it rather than book a species no gas column
// can hold.
func TestStarSpeciesPastTheSetAreRefused(t *testing.T) {
	h := create(t, pcConfig())
	require.Equal(t, codeOK, entryChooseSpecies(h, cString("Fe,O")), lastError(h))
	g := newTestGas(4, 10, 1)
	require.Equal(t, codeOK, entryBindGas(h, &g.desc), lastError(h))
	star := starABI{ID: 7, Position: [3]float64{5, 5, 5}, Mass: 10, Channel: int32(yields.CoreCollapse), EjectedMass: 1, Energy: 1}
	star.SpeciesMass[5] = 0.5
	assert.Equal(t, codeBadValue, entryStep(h, &star, 1, 0, modeOwnFinder, nil, nil))
	assert.Contains(t, lastError(h), "species mass 0.5 at code 5, past the codes 0..2 of the species set Fe,O")
	star.SpeciesMass[5], star.SpeciesMass[2] = 0, 0.5
	assert.Equal(t, codeOK, entryStep(h, &star, 1, 0, modeOwnFinder, nil, nil), lastError(h))
}
