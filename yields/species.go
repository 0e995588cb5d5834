package yields

import (
	"errors"
	"fmt"
	"strings"
)

// ErrSpecies marks an invalid choice of tracked species: an unknown
// element symbol, an element named twice, an empty set, more elements than
// a release has room for, or an element a model has no yields for.
var ErrSpecies = errors.New("invalid species set")

// Element is a chemical element, by atomic number (1 for hydrogen to 118
// for oganesson). The zero Element is not an element.
type Element uint8

// elementSymbols are the IUPAC symbols of the elements by atomic number
// (IUPAC periodic table of the elements, 2016 names of elements 113, 115,
// 117 and 118; common knowledge).
var elementSymbols = [...]string{"",
	"H", "He", "Li", "Be", "B", "C", "N", "O", "F", "Ne",
	"Na", "Mg", "Al", "Si", "P", "S", "Cl", "Ar", "K", "Ca",
	"Sc", "Ti", "V", "Cr", "Mn", "Fe", "Co", "Ni", "Cu", "Zn",
	"Ga", "Ge", "As", "Se", "Br", "Kr", "Rb", "Sr", "Y", "Zr",
	"Nb", "Mo", "Tc", "Ru", "Rh", "Pd", "Ag", "Cd", "In", "Sn",
	"Sb", "Te", "I", "Xe", "Cs", "Ba", "La", "Ce", "Pr", "Nd",
	"Pm", "Sm", "Eu", "Gd", "Tb", "Dy", "Ho", "Er", "Tm", "Yb",
	"Lu", "Hf", "Ta", "W", "Re", "Os", "Ir", "Pt", "Au", "Hg",
	"Tl", "Pb", "Bi", "Po", "At", "Rn", "Fr", "Ra", "Ac", "Th",
	"Pa", "U", "Np", "Pu", "Am", "Cm", "Bk", "Cf", "Es", "Fm",
	"Md", "No", "Lr", "Rf", "Db", "Sg", "Bh", "Hs", "Mt", "Ds",
	"Rg", "Cn", "Nh", "Fl", "Mc", "Lv", "Ts", "Og",
}

// NumElements is the number of known elements (the highest atomic number).
const NumElements = 118

// Symbol is the element's chemical symbol ("Fe"), or "?" for a number
// that is not an element.
func (e Element) Symbol() string {
	if e == 0 || int(e) > NumElements {
		return "?"
	}
	return elementSymbols[e]
}

// Valid reports whether e is an element (atomic number 1 to 118).
func (e Element) Valid() bool { return e >= 1 && int(e) <= NumElements }

// ParseElement reads a chemical symbol. Letter case is ignored ("fe", "FE"
// and "Fe" are iron: no two symbols differ only in case). An unknown
// symbol is an error wrapping ErrSpecies.
func ParseElement(symbol string) (Element, error) {
	s := strings.TrimSpace(symbol)
	for z := 1; z <= NumElements; z++ {
		if strings.EqualFold(elementSymbols[z], s) {
			return Element(z), nil
		}
	}
	return 0, fmt.Errorf("yields: %q is not a chemical symbol: %w", symbol, ErrSpecies)
}

// Elements of the default species set, by atomic number.
const (
	ElementHydrogen  Element = 1
	ElementHelium    Element = 2
	ElementCarbon    Element = 6
	ElementNitrogen  Element = 7
	ElementOxygen    Element = 8
	ElementNeon      Element = 10
	ElementMagnesium Element = 12
	ElementSilicon   Element = 14
	ElementSulfur    Element = 16
	ElementCalcium   Element = 20
	ElementIron      Element = 26
)

// MaxElements is the most elements a species set holds: every release has
// room for the total metals plus this many single elements, so that
// releases and deposits are fixed-size values that hot loops copy without
// allocating.
const MaxElements = int(NumSpecies) - 1

// SpeciesSet is the user's choice of tracked species: total metals
// (always, in slot Metals) and up to MaxElements single elements, in the
// user's order, in slots 1, 2, .... Every release, deposit and gas
// species column of a simulation is laid out by one set: slot s of an
// Abundances holds the species set.Element(s).
//
// The zero value is DefaultSpeciesSet. A SpeciesSet is a small comparable
// value; its methods allocate nothing except Symbols and String.
type SpeciesSet struct {
	n     uint8
	elems [MaxElements]Element
}

// defaultElements are the elements of DefaultSpeciesSet, in its order.
var defaultElements = [MaxElements]Element{
	ElementHydrogen, ElementHelium, ElementCarbon, ElementNitrogen, ElementOxygen, ElementNeon,
	ElementMagnesium, ElementSilicon, ElementSulfur, ElementCalcium, ElementIron,
}

// DefaultSpeciesSet is H, He, C, N, O, Ne, Mg, Si, S, Ca and Fe: the
// elements that dominate the radiative cooling of gas with solar-like
// abundances, the set Wiersma, Schaye & Smith (2009, MNRAS 393, 99; from
// memory) chose for element-by-element cooling. Its slots are the
// constants Hydrogen ... Iron.
func DefaultSpeciesSet() SpeciesSet { return SpeciesSet{n: uint8(MaxElements), elems: defaultElements} }

// NewSpeciesSet makes a set of the given elements, in order. It is an
// error wrapping ErrSpecies to give none, more than MaxElements, an
// invalid element, or one twice.
func NewSpeciesSet(elements ...Element) (SpeciesSet, error) {
	var s SpeciesSet
	if len(elements) == 0 {
		return s, fmt.Errorf("yields: species set: no elements: %w", ErrSpecies)
	}
	if len(elements) > MaxElements {
		return s, fmt.Errorf("yields: species set: %d elements, at most %d fit beside the total metals: %w",
			len(elements), MaxElements, ErrSpecies)
	}
	for i, e := range elements {
		if !e.Valid() {
			return SpeciesSet{}, fmt.Errorf("yields: species set: atomic number %d is not an element: %w", e, ErrSpecies)
		}
		for _, f := range elements[:i] {
			if f == e {
				return SpeciesSet{}, fmt.Errorf("yields: species set: %s named twice: %w", e.Symbol(), ErrSpecies)
			}
		}
		s.elems[i] = e
	}
	s.n = uint8(len(elements))
	if s == DefaultSpeciesSet() {
		return SpeciesSet{}, nil // one representation of the default
	}
	return s, nil
}

// ParseSpeciesSet reads a comma-separated list of chemical symbols
// ("H, He, O, Fe"; case ignored) into a set, in the order given. Total
// metals are always tracked and not listed ("Z" is refused). Errors wrap
// ErrSpecies and name the offending entry.
func ParseSpeciesSet(list string) (SpeciesSet, error) {
	var elems []Element
	for _, f := range strings.Split(list, ",") {
		f = strings.TrimSpace(f)
		if f == "" {
			if strings.TrimSpace(list) == "" {
				break
			}
			return SpeciesSet{}, fmt.Errorf("yields: species list %q has an empty entry: %w", list, ErrSpecies)
		}
		if strings.EqualFold(f, Metals.Symbol()) {
			return SpeciesSet{}, fmt.Errorf("yields: species list %q: the total metals (%s) are always tracked; list elements only: %w",
				list, Metals.Symbol(), ErrSpecies)
		}
		e, err := ParseElement(f)
		if err != nil {
			return SpeciesSet{}, fmt.Errorf("yields: species list %q: %q is not a chemical symbol: %w", list, f, ErrSpecies)
		}
		elems = append(elems, e)
	}
	return NewSpeciesSet(elems...)
}

// resolved maps the zero value to the default set.
func (s SpeciesSet) resolved() SpeciesSet {
	if s.n == 0 {
		return DefaultSpeciesSet()
	}
	return s
}

// Len is the number of single elements in the set.
func (s SpeciesSet) Len() int { return int(s.resolved().n) }

// Slots is the number of slots the set uses: the total metals plus its
// elements. Slots at and past Slots() of an Abundances are unused (zero).
func (s SpeciesSet) Slots() int { return 1 + s.Len() }

// Element returns the element in slot sp, false for the metals slot or a
// slot the set does not use.
func (s SpeciesSet) Element(sp Species) (Element, bool) {
	r := s.resolved()
	if sp < 1 || int(sp) > int(r.n) {
		return 0, false
	}
	return r.elems[sp-1], true
}

// Slot returns the slot of element e, false if the set does not track it.
func (s SpeciesSet) Slot(e Element) (Species, bool) {
	r := s.resolved()
	for i := 0; i < int(r.n); i++ {
		if r.elems[i] == e {
			return Species(i + 1), true
		}
	}
	return 0, false
}

// Has reports whether the set tracks element e.
func (s SpeciesSet) Has(e Element) bool {
	_, ok := s.Slot(e)
	return ok
}

// Symbol names slot sp: "Z" for the total metals, the element's symbol
// for an element slot, "?" for an unused slot.
func (s SpeciesSet) Symbol(sp Species) string {
	if sp == Metals {
		return Metals.Symbol()
	}
	if e, ok := s.Element(sp); ok {
		return e.Symbol()
	}
	return "?"
}

// Elements lists the set's elements in slot order.
func (s SpeciesSet) Elements() []Element {
	r := s.resolved()
	return append([]Element(nil), r.elems[:r.n]...)
}

// Symbols lists the symbols of every slot in use, "Z" first.
func (s SpeciesSet) Symbols() []string {
	out := make([]string, s.Slots())
	for i := range out {
		out[i] = s.Symbol(Species(i))
	}
	return out
}

// String is the comma-separated element list ParseSpeciesSet reads.
func (s SpeciesSet) String() string {
	return strings.Join(s.Symbols()[1:], ",")
}

// IsDefault reports whether s is DefaultSpeciesSet.
func (s SpeciesSet) IsDefault() bool { return s.resolved() == DefaultSpeciesSet() }

// Restate copies the amounts a, laid out by set from, into the layout of
// set to: each element of to takes its amount from from's slot for the
// same element, the total metals carry over, and slots to does not use are
// zero. An element of to that from lacks is reported, with false.
func Restate(a *Abundances, from, to SpeciesSet) (out Abundances, missing Element, ok bool) {
	out[Metals] = a[Metals]
	t := to.resolved()
	for i := 0; i < int(t.n); i++ {
		sp, found := from.Slot(t.elems[i])
		if !found {
			return Abundances{}, t.elems[i], false
		}
		out[i+1] = a[sp]
	}
	return out, 0, true
}

// restateFill is Restate with elements from lacks set to zero.
func restateFill(a *Abundances, from, to SpeciesSet) (out Abundances) {
	out[Metals] = a[Metals]
	t := to.resolved()
	for i := 0; i < int(t.n); i++ {
		if sp, found := from.Slot(t.elems[i]); found {
			out[i+1] = a[sp]
		}
	}
	return out
}
