package yields

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"github.com/ejecta-dev/ejecta/yields/csvtable"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Table column layout. A column's header is "name[unit]"; the unit must be
// written exactly as here. See the package documentation for the format.
const (
	colLuminosity = iota
	colIonizingRate
	colRadiant
	colPhotons
	colFUVLuminosity
	colFUVEnergy
	colChannels // first channel column; each channel has colsPerChannel
)

// Offsets inside a channel's block.
const (
	chEvents = iota
	chMass
	chEnergy
	chSpecies      // NumSpecies species slots follow, laid out by the table's species set
	colsPerChannel = chSpecies + int(NumSpecies)
)

const numTableCols = colChannels + int(NumChannels)*colsPerChannel

// tablePrefixes are the channel prefixes of the table columns.
func tablePrefixes() [NumChannels]string {
	return [NumChannels]string{"ccsn", "snia", "massive_wind", "agb_wind"}
}

// tableColumn describes one known column.
type tableColumn struct {
	name, unit string
	index      int  // in the internal layout; -1 for age and metallicity
	cumulative bool // must not decrease with age
	required   bool
}

const (
	fuvLuminosityName = "fuv_luminosity"
	fuvEnergyName     = "fuv_energy"
	tableAgeName      = "age"
	tableAgeUnit      = "Myr"
	tableZName        = "metallicity"
	tableZUnit        = "mass_fraction"
)

// tableColumns lists every column of a table whose species set is set
// (hydrogen and helium in slots 1 and 2, see tableSpecies).
func tableColumns(set SpeciesSet) []tableColumn {
	cols := []tableColumn{
		{tableAgeName, tableAgeUnit, -1, false, true},
		{tableZName, tableZUnit, -2, false, true},
		{"luminosity", "Lsun/Msun", colLuminosity, false, true},
		{"ionizing_rate", "photons/s/Msun", colIonizingRate, false, true},
		{"radiant_energy", "erg/Msun", colRadiant, true, true},
		{"ionizing_photons", "photons/Msun", colPhotons, true, true},
		{fuvLuminosityName, "Lsun/Msun", colFUVLuminosity, false, false},
		{fuvEnergyName, "erg/Msun", colFUVEnergy, true, false},
	}
	for ch, pre := range tablePrefixes() {
		base := colChannels + ch*colsPerChannel
		cols = append(cols,
			tableColumn{pre + "_events", "1/Msun", base + chEvents, true, Channel(ch).Discrete()},
			tableColumn{pre + "_mass", "Msun/Msun", base + chMass, true, true},
			tableColumn{pre + "_energy", "erg/Msun", base + chEnergy, true, true},
		)
		for s := Species(0); int(s) < set.Slots(); s++ {
			cols = append(cols, tableColumn{
				pre + "_" + strings.ToLower(set.Symbol(s)), "Msun/Msun", base + chSpecies + int(s), true,
				s == Metals || s == Hydrogen || s == Helium,
			})
		}
	}
	return cols
}

// tableSpecies is the species set of a table carrying the given elements:
// hydrogen and helium (always carried) in slots 1 and 2, as in the default
// set, then the others in the order given.
func tableSpecies(elems []Element) (SpeciesSet, error) {
	all := []Element{ElementHydrogen, ElementHelium}
	for _, e := range elems {
		if !slices.Contains(all, e) {
			all = append(all, e)
		}
	}
	return NewSpeciesSet(all...)
}

// subsetOfDefault reports whether every element of set is in the default
// set.
func subsetOfDefault(set SpeciesSet) bool {
	for _, e := range set.Elements() {
		if !DefaultSpeciesSet().Has(e) {
			return false
		}
	}
	return true
}

// headerElements lists the elements named by per-channel species columns
// of a header ("ccsn_fe[Msun/Msun]"), in order of first appearance.
func headerElements(header []csvtable.Heading) []Element {
	var out []Element
	for _, h := range header {
		for _, pre := range tablePrefixes() {
			sym, ok := strings.CutPrefix(h.Name, pre+"_")
			if !ok {
				continue
			}
			if e, err := ParseElement(sym); err == nil && strings.ToLower(sym) == sym && !slices.Contains(out, e) {
				out = append(out, e)
			}
		}
	}
	return out
}

// Table is a Model read from a user's CSV table (see the package
// documentation for the format). It may carry any elements (up to
// MaxElements in all): Carried is hydrogen, helium and the elements it has
// columns for, in the order they first appear. Its releases are laid out by
// DefaultSpeciesSet when every element it carries is one of the default
// set's (the others are released as zero), by Carried otherwise;
// WithSpecies lays them out by any set of elements it carries. It holds
// cumulative releases and instantaneous
// light on a grid of ages and metallicities, interpolated linearly in log
// age and log Z. Releases are differences of the interpolated cumulative
// values, so they add up over consecutive intervals like Population's. Below
// the first age, cumulative values grow linearly from zero at age 0; past the
// last age they stay constant. Luminosity, photon rate and far-ultraviolet
// luminosity are held at the end values outside the grid, and metallicities
// outside the grid are clamped to it. The far-ultraviolet columns are
// optional: without them the far-ultraviolet light is zero. A Table is immutable and safe for concurrent use.
type Table struct {
	ages, logAges []float64
	zs, logZs     []float64
	data          []float64 // [iz][ia][numTableCols]
	present       [numTableCols]bool
	// own is the set the columns are laid out by; out the set releases
	// are laid out by; fill says out may hold elements own lacks (zero).
	own, out SpeciesSet
	fill     bool
}

// Species is the species set the table's releases are laid out by.
func (t *Table) Species() SpeciesSet { return t.out }

// Carried is the set of the elements the table has columns for: hydrogen,
// helium and the others in the order of the header.
func (t *Table) Carried() SpeciesSet { return t.own }

// WithSpecies returns the table with its releases laid out by set (the
// user's choice of tracked species). Every element of set must be one the
// table carries; otherwise the error wraps ErrSpecies and names it.
func (t *Table) WithSpecies(set SpeciesSet) (*Table, error) {
	for _, e := range set.Elements() {
		if !t.own.Has(e) {
			return nil, fmt.Errorf("yields: table has no columns for %s (it carries %s): %w", e.Symbol(), t.own, ErrSpecies)
		}
	}
	c := *t
	c.out, c.fill = set, false
	return &c, nil
}

// Ages is the table's age grid in Myr (a copy).
func (t *Table) Ages() []float64 { return append([]float64(nil), t.ages...) }

// Metallicities is the table's metallicity grid (a copy).
func (t *Table) Metallicities() []float64 { return append([]float64(nil), t.zs...) }

// ErrTable marks a malformed yields table; the error names the line.
var ErrTable = errors.New("malformed yields table")

// tableFormat names the yields table format in errors.
var tableFormat = csvtable.Format{Name: "yields: table", Err: ErrTable}

// ReadTableFile reads a table from a file; errors name the file and line.
func ReadTableFile(path string) (*Table, error) {
	return csvtable.ReadFile(path, "yields: table", ReadTable)
}

// ReadTable reads a table in the documented CSV format. Any defect — an
// unknown or missing column, a wrong unit, a value that is not a finite
// non-negative number, a grid that is not rectangular and increasing, a
// cumulative column that decreases with age (a negative rate), species that
// do not add up to the ejected mass — is an ErrTable error naming the line.
func ReadTable(r io.Reader) (*Table, error) {
	cr := csvtable.NewReader(r, tableFormat)
	header, err := cr.ReadHeader()
	if err != nil {
		return nil, err
	}
	own, err := tableSpecies(headerElements(header))
	if err != nil {
		return nil, cr.Errorf(cr.HeaderLine(), "species columns: %v", err)
	}
	columns := tableColumns(own)
	csvCols := make([]csvtable.Column, len(columns))
	for i, c := range columns {
		csvCols[i] = csvtable.Column{Name: c.name, Unit: c.unit, Required: c.required, Min: csvtable.NonNegative}
	}
	if err := cr.Bind(csvCols); err != nil {
		return nil, err
	}
	t := &Table{own: own, out: own}
	if subsetOfDefault(own) {
		t.out, t.fill = DefaultSpeciesSet(), true
	}
	for i, c := range columns {
		if c.index >= 0 && cr.Has(i) {
			t.present[c.index] = true
		}
	}
	if t.present[colFUVLuminosity] != t.present[colFUVEnergy] {
		return nil, cr.Errorf(cr.HeaderLine(), "columns %s and %s come together: give both or neither", fuvLuminosityName, fuvEnergyName)
	}

	type row struct {
		line   int
		age, z float64
		v      [numTableCols]float64
	}
	var rows []row
	for line, vals := range cr.Rows() {
		rw := row{line: line}
		for i, c := range columns {
			switch c.index {
			case -1:
				rw.age = vals[i]
			case -2:
				rw.z = vals[i]
			default:
				rw.v[c.index] = vals[i]
			}
		}
		if !(rw.age > 0) {
			return nil, cr.Errorf(line, "age %v Myr: want > 0 (the grid is in log age)", rw.age)
		}
		if !(rw.z > 0) || rw.z >= 1 {
			return nil, cr.Errorf(line, "metallicity %v: want in (0, 1) (the grid is in log Z)", rw.z)
		}
		if err := checkRowSpecies(cr, &rw.v, line); err != nil {
			return nil, err
		}
		rows = append(rows, rw)
	}
	if err := cr.Err(); err != nil {
		return nil, err
	}
	// Grid: blocks of rising metallicity, each with the same rising ages.
	t.zs, t.ages, err = cr.Grid(len(rows),
		csvtable.Axis{Name: "metallicity", Plural: "metallicities"},
		csvtable.Axis{Name: "age", Plural: "ages", Unit: "Myr"},
		func(i int) (float64, float64, int) { return rows[i].z, rows[i].age, rows[i].line })
	if err != nil {
		return nil, err
	}
	na := len(t.ages)
	if na < 2 {
		return nil, cr.Errorf(rows[0].line, "each metallicity needs at least two ages")
	}
	t.data = make([]float64, 0, len(rows)*numTableCols)
	for i, rw := range rows {
		if i%na > 0 {
			prev := &rows[i-1]
			for _, c := range columns {
				if c.cumulative && c.index >= 0 && rw.v[c.index] < prev.v[c.index] {
					return nil, cr.Errorf(rw.line, "column %q falls from %v to %v: cumulative values cannot decrease (negative rate)", c.name, prev.v[c.index], rw.v[c.index])
				}
			}
		}
		t.data = append(t.data, rw.v[:]...)
	}
	t.logAges = make([]float64, na)
	for i, a := range t.ages {
		t.logAges[i] = math.Log(a)
	}
	t.logZs = make([]float64, len(t.zs))
	for i, z := range t.zs {
		t.logZs[i] = math.Log(z)
	}
	return t, nil
}

// checkRowSpecies checks that each channel's H + He + metals matches its mass
// (to 1e-6 relative, for rounded tables), that no element exceeds the
// metals, and then sets the mass to the species sum so that releases keep
// H + He + metals = mass to round-off.
func checkRowSpecies(cr *csvtable.Reader, v *[numTableCols]float64, line int) error {
	for ch, pre := range tablePrefixes() {
		b := colChannels + ch*colsPerChannel
		mass := v[b+chMass]
		sp := v[b+chSpecies : b+colsPerChannel]
		sum := sp[Hydrogen] + sp[Helium] + sp[Metals]
		if math.Abs(sum-mass) > 1e-6*math.Max(mass, sum)+1e-300 {
			return cr.Errorf(line, "%s: H + He + metals = %v but mass = %v", pre, sum, mass)
		}
		var elems float64
		for s := Carbon; s < NumSpecies; s++ {
			elems += sp[s]
		}
		if elems > sp[Metals]*(1+1e-6)+1e-300 {
			return cr.Errorf(line, "%s: elements sum to %v, more than the metals %v", pre, elems, sp[Metals])
		}
		v[b+chMass] = sum
	}
	return nil
}

// ageWeights locates an age: the two grid indices and the weight of the
// second; below the first age it returns scale < 1 (values grow linearly
// from zero), past the last the last node.
func (t *Table) ageWeights(age float64) (i0, i1 int, w, scale float64) {
	n := len(t.ages)
	switch {
	case age <= t.ages[0]:
		return 0, 0, 0, age / t.ages[0]
	case age >= t.ages[n-1]:
		return n - 1, n - 1, 0, 1
	}
	j := sort.SearchFloat64s(t.ages, age) // ages[j-1] < age <= ages[j]
	w = (math.Log(age) - t.logAges[j-1]) / (t.logAges[j] - t.logAges[j-1])
	return j - 1, j, w, 1
}

func (t *Table) zWeights(z float64) (i0, i1 int, w float64) {
	n := len(t.zs)
	switch {
	case z <= t.zs[0]:
		return 0, 0, 0
	case z >= t.zs[n-1]:
		return n - 1, n - 1, 0
	}
	j := sort.SearchFloat64s(t.zs, z)
	w = (math.Log(z) - t.logZs[j-1]) / (t.logZs[j] - t.logZs[j-1])
	return j - 1, j, w
}

// at interpolates one column; rates are not scaled below the first age.
func (t *Table) at(col, a0, a1 int, wa, scale float64, z0, z1 int, wz float64) float64 {
	na := len(t.ages)
	get := func(iz, ia int) float64 { return t.data[(iz*na+ia)*numTableCols+col] }
	lo := get(z0, a0) + wa*(get(z0, a1)-get(z0, a0))
	hi := get(z1, a0) + wa*(get(z1, a1)-get(z1, a0))
	return scale * (lo + wz*(hi-lo))
}

// Release returns the difference of the interpolated cumulative columns
// between age0 and age1.
func (t *Table) Release(age0, age1, z float64) (Release, error) {
	if err := checkAges(age0, age1, z); err != nil {
		return Release{}, err
	}
	z0, z1, wz := t.zWeights(z)
	a00, a01, w0, s0 := t.ageWeights(age0)
	a10, a11, w1, s1 := t.ageWeights(age1)
	diff := func(col int) float64 {
		return t.at(col, a10, a11, w1, s1, z0, z1, wz) - t.at(col, a00, a01, w0, s0, z0, z1, wz)
	}
	r := Release{Age0: age0, Age1: age1, Metallicity: z}
	for ch := Channel(0); ch < NumChannels; ch++ {
		b := colChannels + int(ch)*colsPerChannel
		e := &r.Channels[ch]
		if ch.Discrete() {
			e.Events = diff(b + chEvents)
		}
		e.Energy = diff(b + chEnergy)
		for s := Species(0); s < NumSpecies; s++ {
			if t.present[b+chSpecies+int(s)] {
				e.Species[s] = diff(b + chSpecies + int(s))
			}
		}
		e.Mass = e.Species[Hydrogen] + e.Species[Helium] + e.Species[Metals]
		if t.out != t.own {
			e.Species = restateFill(&e.Species, t.own, t.out)
		}
		if !ch.Discrete() && e.Mass > 0 {
			e.WindSpeed = math.Sqrt(2*e.Energy/(e.Mass*units.SolarMass)) / units.Kilometer
		}
	}
	r.RadiantEnergy = diff(colRadiant)
	r.IonizingPhotons = diff(colPhotons)
	r.FarUltravioletEnergy = diff(colFUVEnergy) // zero when the columns are absent
	return r, nil
}

// Luminosity is the tabulated luminosity in Lsun per Msun formed,
// interpolated (held at the end values outside the grid).
func (t *Table) Luminosity(age, z float64) (float64, error) {
	return t.rate(colLuminosity, age, z)
}

// IonizingRate is the tabulated ionizing photon rate per Msun formed,
// interpolated as Luminosity.
func (t *Table) IonizingRate(age, z float64) (float64, error) {
	return t.rate(colIonizingRate, age, z)
}

// FarUltravioletLuminosity is the tabulated far-ultraviolet (6–13.6 eV)
// luminosity in Lsun per Msun formed, interpolated as Luminosity; zero for a
// table without the optional far-ultraviolet columns.
func (t *Table) FarUltravioletLuminosity(age, z float64) (float64, error) {
	return t.rate(colFUVLuminosity, age, z)
}

// HasFarUltraviolet reports whether the table has the optional
// far-ultraviolet columns.
func (t *Table) HasFarUltraviolet() bool { return t.present[colFUVLuminosity] }

func (t *Table) rate(col int, age, z float64) (float64, error) {
	if err := checkAge(age, z); err != nil {
		return 0, err
	}
	z0, z1, wz := t.zWeights(z)
	a0, a1, w, _ := t.ageWeights(age)
	return t.at(col, a0, a1, w, 1, z0, z1, wz), nil
}

// TableLayout says which grid and which optional columns WriteTable writes.
type TableLayout struct {
	// Ages in Myr (> 0, rising) and Metallicities (in (0, 1), rising).
	Ages, Metallicities []float64
	// Species selects the element columns written; the zero value writes
	// every element of the model's set. Hydrogen and helium are always
	// written (the format requires them), so the model must carry them.
	Species SpeciesSet
	// Digits is the number of significant digits; 0 writes the shortest
	// representation that reads back exactly.
	Digits int
}

// WriteTable writes a model in the table format: the cumulative release
// Release(0, age, z) and the light at every grid point. ReadTable reads it
// back; at the grid points the two models agree to the digits written.
func WriteTable(w io.Writer, m Model, layout TableLayout) error {
	if len(layout.Ages) < 2 || len(layout.Metallicities) < 1 {
		return errors.New("yields: write table: need at least two ages and one metallicity")
	}
	// A table without the optional far-ultraviolet columns is written without them.
	noFUV := false
	if t, ok := m.(*Table); ok && !t.HasFarUltraviolet() {
		noFUV = true
	}
	ms := ModelSpecies(m)
	chosen := layout.Species
	if chosen.IsDefault() {
		chosen = ms
	}
	wset, err := tableSpecies(chosen.Elements())
	if err != nil {
		return fmt.Errorf("yields: write table: %w", err)
	}
	for _, e := range wset.Elements() {
		if !ms.Has(e) {
			return fmt.Errorf("yields: write table: the model does not carry %s (it has %s): %w", e.Symbol(), ms, ErrSpecies)
		}
	}
	var cols []tableColumn
	for _, c := range tableColumns(wset) {
		if noFUV && (c.index == colFUVLuminosity || c.index == colFUVEnergy) {
			continue
		}
		if c.index >= colChannels {
			off := (c.index - colChannels) % colsPerChannel
			if off == chEvents && !Channel((c.index-colChannels)/colsPerChannel).Discrete() {
				continue
			}
		}
		cols = append(cols, c)
	}
	cw := csv.NewWriter(w)
	head := make([]string, len(cols))
	for i, c := range cols {
		head[i] = c.name + "[" + c.unit + "]"
	}
	if err := cw.Write(head); err != nil {
		return fmt.Errorf("yields: write table: %w", err)
	}
	format := func(v float64) string {
		if layout.Digits > 0 {
			return strconv.FormatFloat(v, 'g', layout.Digits, 64)
		}
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	rec := make([]string, len(cols))
	for _, z := range layout.Metallicities {
		for _, age := range layout.Ages {
			r, err := m.Release(0, age, z)
			if err != nil {
				return fmt.Errorf("yields: write table at %v Myr, Z %v: %w", age, z, err)
			}
			l, err := m.Luminosity(age, z)
			if err != nil {
				return fmt.Errorf("yields: write table at %v Myr, Z %v: %w", age, z, err)
			}
			q, err := m.IonizingRate(age, z)
			if err != nil {
				return fmt.Errorf("yields: write table at %v Myr, Z %v: %w", age, z, err)
			}
			f, err := m.FarUltravioletLuminosity(age, z)
			if err != nil {
				return fmt.Errorf("yields: write table at %v Myr, Z %v: %w", age, z, err)
			}
			var v [numTableCols]float64
			v[colLuminosity], v[colIonizingRate], v[colFUVLuminosity] = l, q, f
			v[colRadiant], v[colPhotons], v[colFUVEnergy] = r.RadiantEnergy, r.IonizingPhotons, r.FarUltravioletEnergy
			for ch, e := range r.Channels {
				b := colChannels + ch*colsPerChannel
				v[b+chEvents], v[b+chMass], v[b+chEnergy] = e.Events, e.Mass, e.Energy
				sp := restateFill(&e.Species, ms, wset)
				copy(v[b+chSpecies:b+colsPerChannel], sp[:])
			}
			for i, c := range cols {
				switch c.index {
				case -1:
					rec[i] = format(age)
				case -2:
					rec[i] = format(z)
				default:
					rec[i] = format(v[c.index])
				}
			}
			if err := cw.Write(rec); err != nil {
				return fmt.Errorf("yields: write table: %w", err)
			}
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("yields: write table: %w", err)
	}
	return nil
}
