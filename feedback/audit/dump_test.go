package audit_test

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/feedback/feedbacktest"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
)

// A dump written by WriteDump reads back bit for bit, and its audit is the
// audit of the arrays it was written from.
func TestWriteDumpReadsBack(t *testing.T) {
	before, after, stars := makeDump(t)
	dir := filepath.Join(t.TempDir(), "new", "folder") // created
	box := neighbor.Box{Size: [3]float64{0, 0, 0}}
	require.NoError(t, audit.WriteDump(dir, &audit.Dump{Box: box, Before: before, After: after, Stars: stars}))
	d, err := audit.ReadDump(filepath.Join(dir, audit.ManifestFile))
	require.NoError(t, err)
	before.Density, after.Density = nil, nil // not part of a dump
	assert.Equal(t, before, d.Before)
	assert.Equal(t, after, d.After)
	assert.Equal(t, stars, d.Stars)
	assert.True(t, d.Species.IsDefault())
	rep, err := audit.Step(d.Before, d.After, d.Stars, d.Options())
	require.NoError(t, err)
	assert.False(t, rep.Failed(), "%v", rep.Problems)
	// No temporary manifest is left behind.
	_, err = os.Stat(filepath.Join(dir, audit.ManifestFile+".partial"))
	assert.True(t, os.IsNotExist(err))
}

// IDs are written as int64 and read back exactly, also above 2^53 where a
// float64 would round them; a step without stars reads back as none.
func TestDumpKeepsLargeIDsAndNoStars(t *testing.T) {
	before, _, _ := makeDump(t)
	for i := range before.ID {
		before.ID[i] = 1<<60 + int64(i) // neighbors differ below float64 resolution
	}
	dir := t.TempDir()
	require.NoError(t, audit.WriteDump(dir, &audit.Dump{Before: before, After: before.Clone()}))
	d, err := audit.ReadDump(filepath.Join(dir, audit.ManifestFile))
	require.NoError(t, err)
	assert.Equal(t, before.ID, d.Before.ID)
	assert.Empty(t, d.Stars)
	rep, err := audit.Step(d.Before, d.After, d.Stars, d.Options())
	require.NoError(t, err)
	assert.False(t, rep.Failed(), "%v", rep.Problems)
}

func TestWriteDumpRefusesAnUnwritableFolder(t *testing.T) {
	before, after, stars := makeDump(t)
	file := filepath.Join(t.TempDir(), "a-file")
	require.NoError(t, os.WriteFile(file, nil, 0o644))
	err := audit.WriteDump(filepath.Join(file, "dump"), &audit.Dump{Before: before, After: after, Stars: stars})
	require.Error(t, err)
	assert.Contains(t, err.Error(), "a-file")
}

// restate lays a default-set dump out by the set "Ni,Fe": iron moves to
// slot 2, and nickel (slot 1) is given half the iron of every element and
// every release, which is exactly as conserved as the iron is.
func restate(t *testing.T, before, after *audit.GasArrays, stars []audit.Star) yields.SpeciesSet {
	t.Helper()
	set, err := yields.ParseSpeciesSet("Ni,Fe")
	require.NoError(t, err)
	ni, ok := set.Slot(yields.Element(28))
	require.True(t, ok)
	fe, ok := set.Slot(yields.ElementIron)
	require.True(t, ok)
	for _, g := range []*audit.GasArrays{before, after} {
		iron := g.Fractions[column(g, yields.Iron)]
		half := make([]float64, len(iron))
		for i, x := range iron {
			half[i] = 0.5 * x
		}
		g.Species = []yields.Species{yields.Metals, ni, fe}
		g.Fractions = [][]float64{g.Fractions[column(g, yields.Metals)], half, iron}
	}
	for i := range stars {
		var a yields.Abundances
		a[yields.Metals], a[ni], a[fe] = stars[i].Species[yields.Metals], 0.5*stars[i].Species[yields.Iron], stars[i].Species[yields.Iron]
		stars[i].Species = a
	}
	return set
}

func column(g *audit.GasArrays, sp yields.Species) int {
	for c, s := range g.Species {
		if s == sp {
			return c
		}
	}
	panic("species not tracked")
}

// The species keys of a manifest are the symbols of its species_set, the
// user's choice of elements: a dump tracking nickel is read, audited and
// reported in its own symbols, and a nickel loss is named as such with
// the element that lost it.
func TestDumpWithAChosenSpeciesSet(t *testing.T) {
	before, after, stars := makeDump(t)
	set := restate(t, before, after, stars)
	dir := t.TempDir()
	require.NoError(t, audit.WriteDump(dir, &audit.Dump{Species: set, Before: before, After: after, Stars: stars}))
	raw, err := os.ReadFile(filepath.Join(dir, audit.ManifestFile))
	require.NoError(t, err)
	var m audit.Manifest
	require.NoError(t, json.Unmarshal(raw, &m))
	assert.Equal(t, []string{"Ni", "Fe"}, m.SpeciesSet)
	assert.Contains(t, m.GasBefore.MassFractions, "Ni")
	assert.Contains(t, m.Stars.EjectaSpecies, "Ni")

	d, err := audit.ReadDump(filepath.Join(dir, audit.ManifestFile))
	require.NoError(t, err)
	assert.Equal(t, set, d.Species)
	rep, err := audit.Step(d.Before, d.After, d.Stars, d.Options())
	require.NoError(t, err)
	assert.False(t, rep.Failed(), "%v", rep.Problems)
	var names []string
	for _, im := range rep.Imbalances {
		names = append(names, im.Quantity)
	}
	assert.Contains(t, names, "species Ni")
	assert.Contains(t, names, "species Fe")
	assert.NotContains(t, names, "species H", "slot 1 is nickel in this set, not hydrogen")

	// The element nearest the first star loses half the nickel it had.
	i := feedbacktest.Nearest(d.After, d.Stars[0].Pos)
	d.After.Fractions[1][i] = 0.5 * d.Before.Fractions[1][i] * d.Before.Mass[i] / d.After.Mass[i]
	rep, err = audit.Step(d.Before, d.After, d.Stars, d.Options())
	require.NoError(t, err)
	require.True(t, rep.Failed())
	for _, im := range rep.Imbalances {
		if im.Quantity == "species Ni" {
			assert.True(t, im.Failed)
			require.NotEmpty(t, im.Elements)
			assert.Equal(t, d.After.ID[i], im.Elements[0], "%v", rep.Problems)
		} else if strings.HasPrefix(im.Quantity, "species") {
			assert.False(t, im.Failed, im.Quantity)
		}
	}
	assert.Contains(t, strings.Join(rep.Problems, "\n"), "species Ni imbalance")
}

// Species keys are checked against the manifest's species set, and the
// set itself is checked.
func TestDumpSpeciesKeys(t *testing.T) {
	before, after, stars := makeDump(t)
	cases := []struct {
		name string
		edit func(m map[string]any)
		want string
	}{
		{"element outside the default set", func(m map[string]any) {
			gasKeys(m, "gas_before")["Ni"] = gasKeys(m, "gas_before")["Fe"]
		}, "Ni is not in the species set (H,He,C,N,O,Ne,Mg,Si,S,Ca,Fe): list it in the manifest's species_set"},
		{"element outside a chosen set", func(m map[string]any) {
			m["species_set"] = []string{"O", "Fe"}
		}, "gas_before.mass_fractions: H is not in the species set (O,Fe)"},
		{"not a symbol", func(m map[string]any) {
			gasKeys(m, "gas_after")["Xy"] = gasKeys(m, "gas_after")["Fe"]
		}, `gas_after.mass_fractions: key "Xy" is neither "Z" (all metals) nor a chemical symbol`},
		{"a set naming an element twice", func(m map[string]any) {
			m["species_set"] = []string{"H", "He", "O", "Fe", "O"}
		}, "species_set: yields: species set: O named twice"},
		{"metals in the set", func(m map[string]any) {
			m["species_set"] = []string{"Z", "Fe"}
		}, "always tracked"},
		{"a set that is not a list", func(m map[string]any) {
			m["species_set"] = "H,He"
		}, "species_set holds a JSON string, want an array of element symbols"},
		{"the same species twice", func(m map[string]any) {
			gasKeys(m, "gas_before")["fe"] = gasKeys(m, "gas_before")["Fe"]
		}, `name the same species`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			require.NoError(t, audit.WriteDump(dir, &audit.Dump{Before: before, After: after, Stars: stars}))
			path := filepath.Join(dir, audit.ManifestFile)
			raw, err := os.ReadFile(path)
			require.NoError(t, err)
			var m map[string]any
			require.NoError(t, json.Unmarshal(raw, &m))
			c.edit(m)
			raw, err = json.Marshal(m)
			require.NoError(t, err)
			require.NoError(t, os.WriteFile(path, raw, 0o644))
			_, err = audit.ReadDump(path)
			require.Error(t, err)
			assert.Contains(t, err.Error(), c.want)
		})
	}
}

func gasKeys(m map[string]any, block string) map[string]any {
	return m[block].(map[string]any)["mass_fractions"].(map[string]any)
}

// Step refuses species slots its set does not have.
func TestStepRefusesSlotsOutsideTheSet(t *testing.T) {
	before, after, stars := makeDump(t)
	set, err := yields.ParseSpeciesSet("O")
	require.NoError(t, err)
	opts := audit.DefaultOptions()
	opts.Species = set
	_, err = audit.Step(before, after, stars, opts)
	require.Error(t, err)
	assert.Contains(t, err.Error(), "not in the species set O")
}

// The arrays of a dump: float columns of any width, empty ones, and IDs.
func TestArraysReadBack(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "a.npy")
	data := []float64{1, 2, 3, 4, 5, 6}
	require.NoError(t, audit.WriteArray(p, data, 3))
	got, rows, err := audit.ReadArray(p, 3)
	require.NoError(t, err)
	assert.Equal(t, 2, rows)
	assert.Equal(t, data, got)
	_, _, err = audit.ReadArray(p, 1)
	assert.ErrorContains(t, err, "want (n,)")

	require.NoError(t, audit.WriteArray(p, nil, 3))
	got, rows, err = audit.ReadArray(p, 3)
	require.NoError(t, err)
	assert.Zero(t, rows)
	assert.Empty(t, got)

	assert.Error(t, audit.WriteArray(p, data[:5], 3), "5 values are not rows of 3")

	require.NoError(t, audit.WriteArray(p, []float64{1, 2.5}, 1))
	_, err = audit.ReadIDs(p)
	assert.ErrorContains(t, err, "2.5, not an integer ID")
	require.NoError(t, audit.WriteArray(p, []float64{1, math.NaN()}, 1))
	_, _, err = audit.ReadArray(p, 1)
	assert.ErrorContains(t, err, "NaN")
}

// A dump of ejecta's own step on a periodic box keeps the box.
func TestDumpKeepsTheBox(t *testing.T) {
	for _, sc := range feedbacktest.Scenarios(1) {
		if sc.Box == (neighbor.Box{}) {
			continue
		}
		before, after, stars, err := feedbacktest.Dump(feedback.ThermalDump{}, sc.Name, 1)
		require.NoError(t, err)
		dir := t.TempDir()
		require.NoError(t, audit.WriteDump(dir, &audit.Dump{Box: sc.Box, Before: before, After: after, Stars: stars}))
		d, err := audit.ReadDump(filepath.Join(dir, audit.ManifestFile))
		require.NoError(t, err)
		assert.Equal(t, sc.Box, d.Box)
		rep, err := audit.Step(d.Before, d.After, d.Stars, d.Options())
		require.NoError(t, err)
		assert.False(t, rep.Failed(), "%v", rep.Problems)
		return
	}
	t.Fatal("no periodic scenario")
}
