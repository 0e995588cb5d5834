package yields

import (
	"bytes"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Chemical symbols by atomic number (IUPAC periodic table; common
// knowledge): a few anchors, and every symbol reads back as its element.
func TestElements(t *testing.T) {
	for sym, z := range map[string]Element{"H": 1, "He": 2, "C": 6, "O": 8, "Ne": 10, "Na": 11, "Ar": 18,
		"Ca": 20, "Fe": 26, "Ni": 28, "Sr": 38, "Ba": 56, "Eu": 63, "Pb": 82, "U": 92, "Og": 118} {
		e, err := ParseElement(sym)
		require.NoError(t, err, sym)
		assert.Equal(t, z, e, sym)
		assert.Equal(t, sym, e.Symbol())
	}
	for z := Element(1); int(z) <= NumElements; z++ {
		for _, form := range []string{z.Symbol(), strings.ToLower(z.Symbol()), strings.ToUpper(z.Symbol())} {
			e, err := ParseElement(form)
			require.NoError(t, err, form)
			assert.Equal(t, z, e, form)
		}
	}
	for _, bad := range []string{"", "Z", "Xx", "Fe2", "iron", "Uue"} {
		_, err := ParseElement(bad)
		assert.ErrorIs(t, err, ErrSpecies, bad)
	}
	assert.Equal(t, "?", Element(0).Symbol())
	assert.Equal(t, "?", Element(119).Symbol())
	assert.False(t, Element(0).Valid())
}

// The default set is the elements Wiersma, Schaye & Smith (2009, MNRAS
// 393, 99; from memory) followed for cooling, in the slots of the named
// constants; the zero value is the default set.
func TestDefaultSpeciesSet(t *testing.T) {
	d := DefaultSpeciesSet()
	assert.Equal(t, "H,He,C,N,O,Ne,Mg,Si,S,Ca,Fe", d.String())
	assert.Equal(t, d, SpeciesSet{}.resolved())
	assert.True(t, SpeciesSet{}.IsDefault())
	assert.Equal(t, 11, d.Len())
	assert.Equal(t, int(NumSpecies), d.Slots())
	for s := Species(0); s < NumSpecies; s++ {
		assert.Equal(t, s.Symbol(), d.Symbol(s))
		assert.Equal(t, s.Symbol(), SpeciesSet{}.Symbol(s))
	}
	for _, c := range []struct {
		slot Species
		e    Element
	}{{Hydrogen, ElementHydrogen}, {Helium, ElementHelium}, {Oxygen, ElementOxygen}, {Iron, ElementIron}, {Calcium, ElementCalcium}} {
		got, ok := d.Slot(c.e)
		assert.True(t, ok)
		assert.Equal(t, c.slot, got)
	}
	// Naming the default elements in their order gives the default set,
	// equal as a value to the zero value.
	same, err := ParseSpeciesSet("H,He,C,N,O,Ne,Mg,Si,S,Ca,Fe")
	require.NoError(t, err)
	assert.Equal(t, SpeciesSet{}, same)
}

func TestSpeciesSetChoice(t *testing.T) {
	s, err := ParseSpeciesSet(" fe, O ,Ni,h")
	require.NoError(t, err)
	assert.Equal(t, "Fe,O,Ni,H", s.String())
	assert.Equal(t, []string{"Z", "Fe", "O", "Ni", "H"}, s.Symbols())
	assert.Equal(t, 4, s.Len())
	assert.Equal(t, 5, s.Slots())
	sp, ok := s.Slot(28)
	assert.True(t, ok)
	assert.Equal(t, Species(3), sp)
	_, ok = s.Slot(ElementHelium)
	assert.False(t, ok)
	e, ok := s.Element(1)
	assert.True(t, ok)
	assert.Equal(t, ElementIron, e)
	for _, slot := range []Species{Metals, 5, -1, NumSpecies} {
		_, ok := s.Element(slot)
		assert.False(t, ok, "slot %d", slot)
	}
	assert.Equal(t, "?", s.Symbol(5))
	assert.False(t, s.IsDefault())

	tests := []struct {
		list, want string
	}{
		{"", "no elements"},
		{"  ", "no elements"},
		{"O,,Fe", "empty entry"},
		{"O,Fe,", "empty entry"},
		{"O,Xx", `"Xx" is not a chemical symbol`},
		{"O,Fe,o", "O named twice"},
		{"Z,O", "total metals (Z) are always tracked"},
		{"H,He,Li,Be,B,C,N,O,F,Ne,Na,Mg", "12 elements, at most 11"},
	}
	for _, tc := range tests {
		_, err := ParseSpeciesSet(tc.list)
		require.ErrorIs(t, err, ErrSpecies, tc.list)
		assert.Contains(t, err.Error(), tc.want, tc.list)
	}
	_, err = NewSpeciesSet(ElementOxygen, 0)
	assert.ErrorIs(t, err, ErrSpecies)
	_, err = NewSpeciesSet(119)
	assert.ErrorIs(t, err, ErrSpecies)
}

func TestRestate(t *testing.T) {
	var a Abundances
	for s := range a {
		a[s] = float64(10 + s) // Z = 10, H = 11, ..., Fe = 21
	}
	to := mustSpecies("Fe,H,O")
	got, _, ok := Restate(&a, DefaultSpeciesSet(), to)
	require.True(t, ok)
	assert.Equal(t, Abundances{10, 21, 11, 15}, got)
	back, missing, ok := Restate(&got, to, DefaultSpeciesSet())
	assert.False(t, ok)
	assert.Equal(t, ElementHelium, missing)
	assert.Equal(t, Abundances{}, back)
}

// Looking species up and restating amounts allocate nothing: they run
// per star in the hot loops.
func TestSpeciesSetDoesNotAllocate(t *testing.T) {
	s := mustSpecies("Fe,O,Ni")
	var a Abundances
	allocs := testing.AllocsPerRun(100, func() {
		sp, _ := s.Slot(ElementOxygen)
		e, _ := s.Element(sp)
		_ = s.Symbol(sp) + e.Symbol()
		a, _, _ = Restate(&a, s, s)
		_ = s.IsDefault()
	})
	assert.Zero(t, allocs)

	cfg := DefaultConfig()
	cfg.Species = s.withoutNickel(t)
	p, err := NewPopulation(cfg)
	require.NoError(t, err)
	allocs = testing.AllocsPerRun(100, func() {
		_, _ = p.Release(1, 30, 0.01)
	})
	assert.Zero(t, allocs)
}

func (s SpeciesSet) withoutNickel(t *testing.T) SpeciesSet {
	t.Helper()
	var keep []Element
	for _, e := range s.Elements() {
		if e.Symbol() != "Ni" {
			keep = append(keep, e)
		}
	}
	out, err := NewSpeciesSet(keep...)
	require.NoError(t, err)
	return out
}

// A table may carry any element: one with nickel columns reads, lays its
// releases out by what it carries, and can be narrowed to a chosen set.
func TestTableCarriesAnyElement(t *testing.T) {
	p := newTestPopulation(t, Kroupa)
	layout := exampleLayout()
	layout.Ages = layout.Ages[:6]
	layout.Metallicities = []float64{0.0134}
	var buf bytes.Buffer
	require.NoError(t, WriteTable(&buf, p, layout))
	// Give the core-collapse ejecta a nickel column: a tenth of the iron.
	lines := strings.Split(strings.TrimSpace(buf.String()), "\n")
	head := strings.Split(lines[0], ",")
	fe := -1
	for i, h := range head {
		if h == "ccsn_fe[Msun/Msun]" {
			fe = i
		}
	}
	require.Positive(t, fe)
	var out []string
	for i, l := range lines {
		f := strings.Split(l, ",")
		extra := "ccsn_ni[Msun/Msun]"
		if i > 0 {
			extra = "0"
		}
		out = append(out, strings.Join(append(f, extra), ","))
	}
	tab, err := ReadTable(strings.NewReader(strings.Join(out, "\n") + "\n"))
	require.NoError(t, err)
	assert.Equal(t, "H,He,O,Fe,Ni", tab.Carried().String())
	assert.Equal(t, tab.Carried(), tab.Species(), "a table carrying a non-default element is laid out by what it carries")
	r, err := tab.Release(0, 1, 0.0134)
	require.NoError(t, err)
	assert.Positive(t, r.Channels[MassiveWinds].Species[3], "oxygen in slot 3")

	narrow, err := tab.WithSpecies(mustSpecies("Ni,O"))
	require.NoError(t, err)
	n, err := narrow.Release(0, 1, 0.0134)
	require.NoError(t, err)
	assert.Equal(t, r.Channels[MassiveWinds].Species[3], n.Channels[MassiveWinds].Species[2])
	assert.Equal(t, r.Channels[MassiveWinds].Species[Metals], n.Channels[MassiveWinds].Species[Metals])
	_, err = tab.WithSpecies(mustSpecies("O,C"))
	require.ErrorIs(t, err, ErrSpecies)
	assert.Contains(t, err.Error(), "no columns for C")

	// The example table carries default elements only: laid out by the
	// default set, the elements it lacks released as zero.
	ex, err := ReadTableFile(exampleTablePath)
	require.NoError(t, err)
	assert.True(t, ex.Species().IsDefault())
	assert.Equal(t, "H,He,O,Fe", ex.Carried().String())
}
