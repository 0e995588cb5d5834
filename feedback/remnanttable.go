package feedback

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/csvtable"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// ErrRemnantTable marks a malformed remnant table; the message names the
// line.
var ErrRemnantTable = errors.New("malformed remnant table")

// ErrOutsideRemnantTable marks a density or metallicity outside a remnant
// table's grid when the table refuses to extrapolate.
var ErrOutsideRemnantTable = errors.New("outside the remnant table")

// RemnantTableHeader is the header row of the remnant table format: one
// row per (metallicity, density) grid point, blocks of rising metallicity,
// each with the same rising densities (at least one of each; two or more
// to interpolate along an axis). Every row has the same energy. Units are
// part of the column names and must be written exactly so.
const RemnantTableHeader = "density[cm^-3],metallicity[solar],energy[erg]," +
	"shell_time[kyr],shell_radius[pc],shell_mass[Msun],shell_momentum[Msun km/s]," +
	"late_time[kyr],late_mass[Msun],late_momentum[Msun km/s]"

// RemnantTableRow is one grid point of a remnant table: a remnant of
// Energy (erg) in gas of hydrogen density Density (cm^-3) and metallicity
// Metallicity (solar units), its shell formation (time in kyr, radius in
// pc, mass in Msun, radial momentum in Msun km/s) and its late state (time,
// mass inside the shock, radial momentum).
type RemnantTableRow struct {
	Density, Metallicity, Energy                     float64
	ShellTime, ShellRadius, ShellMass, ShellMomentum float64
	LateTime, LateMass, LateMomentum                 float64
}

// lateColumns is the index of the first late column: late values may be
// zero (a run that never got there).
const lateColumns = 7

func (r *RemnantTableRow) fields() []*float64 {
	return []*float64{&r.Density, &r.Metallicity, &r.Energy, &r.ShellTime, &r.ShellRadius,
		&r.ShellMass, &r.ShellMomentum, &r.LateTime, &r.LateMass, &r.LateMomentum}
}

// OutsideGrid says what a RemnantTable does with a density or metallicity
// outside its grid.
type OutsideGrid uint8

const (
	// RefuseOutsideGrid returns an ErrOutsideRemnantTable error.
	RefuseOutsideGrid OutsideGrid = iota
	// ClampToGrid uses the nearest edge of the grid along that axis.
	ClampToGrid
)

// RemnantTable is a remnant fit read from a table, typically calibrated
// with the 1D remnant solver (bench/remnant) for the cooling function a
// simulation runs, and used by TerminalMomentum and Winds in place of a
// published fit (their Table field). Logarithms of the table's values are
// interpolated bilinearly in log density and log metallicity. A remnant of
// energy E other than the table's E_t is scaled with the energy exponents
// of Kim & Ostriker 2015 (ApJ 802, 99; from memory): momenta × (E/E_t)^0.93,
// radius × (E/E_t)^0.29, masses × (E/E_t)^0.87. An axis with a single grid
// value serves other inputs along that axis only under ClampToGrid. A
// RemnantTable is immutable and safe for concurrent use.
type RemnantTable struct {
	densities, logDensities []float64
	zs, logZs               []float64
	energy                  float64
	// ln of shell momentum (g cm/s), radius (cm), mass (g), late momentum
	// and late mass, [iz*len(densities)+in].
	logP, logR, logM   []float64
	logLateP, logLateM []float64
	hasLate            bool // every row has late values
	rows               []RemnantTableRow
	outside            OutsideGrid
}

// WithOutsideGrid returns a copy of the table that treats inputs outside
// the grid by policy o.
func (t *RemnantTable) WithOutsideGrid(o OutsideGrid) *RemnantTable {
	c := *t
	c.outside = o
	return &c
}

// Rows returns a copy of the table's rows.
func (t *RemnantTable) Rows() []RemnantTableRow { return append([]RemnantTableRow(nil), t.rows...) }

// Energy is the table's explosion energy in erg.
func (t *RemnantTable) Energy() float64 { return t.energy }

// locate returns the bracketing indices and weight of v on grid g (log
// values lg), or an error outside the grid under RefuseOutsideGrid.
func (t *RemnantTable) locate(what string, v float64, g, lg []float64) (int, int, float64, error) {
	n := len(g)
	if !(v >= 0) || math.IsInf(v, 0) || (v == 0 && what == "density") {
		return 0, 0, 0, errorf(ErrBadValue, "remnant table: %s %v: want finite and positive", what, v)
	}
	if v < g[0] || v > g[n-1] {
		if t.outside == RefuseOutsideGrid {
			return 0, 0, 0, errorf(ErrOutsideRemnantTable, "remnant table: %s %v outside the grid [%v, %v]", what, v, g[0], g[n-1])
		}
		if v < g[0] {
			return 0, 0, 0, nil
		}
		return n - 1, n - 1, 0, nil
	}
	if n == 1 {
		return 0, 0, 0, nil
	}
	j := 1
	for j < n-1 && g[j] < v {
		j++
	}
	w := (math.Log(v) - lg[j-1]) / (lg[j] - lg[j-1])
	return j - 1, j, w, nil
}

// Remnant evaluates the table for energy e in erg, hydrogen density n in
// cm^-3 and metal mass fraction z (divided by yields.SolarMetals to look up
// the table's metallicity in solar units), as RemnantFit.Remnant does for
// a published fit: the cooling radius, switch mass and switch momentum are
// the table's shell-formation radius, mass and momentum; the terminal
// momentum is the larger of the shell-formation and late momenta, reached
// by growing as the swept mass to the power ln(p_late/p_sf) /
// ln(M_late/M_sf) (zero when the table has no later growth).
func (t *RemnantTable) Remnant(e, n, z float64) (Remnant, error) {
	if !(e > 0) || math.IsInf(e, 0) {
		return Remnant{}, errorf(ErrBadValue, "remnant table: energy %v erg: want finite > 0", e)
	}
	n0, n1, wn, err := t.locate("density", n, t.densities, t.logDensities)
	if err != nil {
		return Remnant{}, err
	}
	z0, z1, wz, err := t.locate("metallicity", z/yields.SolarMetals, t.zs, t.logZs)
	if err != nil {
		return Remnant{}, err
	}
	nd := len(t.densities)
	bilinear := func(v []float64) float64 {
		a := (1-wn)*v[z0*nd+n0] + wn*v[z0*nd+n1]
		b := (1-wn)*v[z1*nd+n0] + wn*v[z1*nd+n1]
		return (1-wz)*a + wz*b
	}
	le := math.Log(e / t.energy)
	lp, lm := bilinear(t.logP)+0.93*le, bilinear(t.logM)+0.87*le
	r := Remnant{
		CoolingRadius:    math.Exp(bilinear(t.logR) + 0.29*le),
		SwitchMass:       math.Exp(lm),
		SwitchMomentum:   math.Exp(lp),
		TerminalMomentum: math.Exp(lp),
	}
	if t.hasLate {
		lpl, lml := bilinear(t.logLateP)+0.93*le, bilinear(t.logLateM)+0.87*le
		if lpl > lp && lml > lm {
			r.TerminalMomentum = math.Exp(lpl)
			r.GrowthExponent = (lpl - lp) / (lml - lm)
		}
	}
	return r, nil
}

// ReadRemnantTableFile reads a remnant table from a file; errors name the
// file and the line.
func ReadRemnantTableFile(path string) (*RemnantTable, error) {
	return csvtable.ReadFile(path, "remnant table", ReadRemnantTable)
}

// remnantTableColumns are the columns of RemnantTableHeader, in its order:
// late values may be zero (a run that never got there), the others must be
// positive.
func remnantTableColumns() []csvtable.Column {
	var cols []csvtable.Column
	for i, h := range strings.Split(RemnantTableHeader, ",") {
		name, unit, _ := strings.Cut(strings.TrimSuffix(h, "]"), "[")
		least := csvtable.Positive
		if i >= lateColumns {
			least = csvtable.NonNegative
		}
		cols = append(cols, csvtable.Column{Name: name, Unit: unit, Required: true, Min: least})
	}
	return cols
}

// ReadRemnantTable reads a remnant table in the format of
// RemnantTableHeader ('#' lines are comments). Any defect — a wrong
// header, a field that is not a finite positive number (late values may be
// zero when a run never got there), energies that differ, a grid that is
// not a rectangle of rising densities within rising metallicities — is an
// ErrRemnantTable error naming the line. The table refuses inputs outside
// its grid (see WithOutsideGrid).
func ReadRemnantTable(r io.Reader) (*RemnantTable, error) {
	cr := csvtable.NewReader(r, csvtable.Format{Name: "remnant table", Err: ErrRemnantTable})
	if _, err := cr.ReadHeader(); err != nil {
		return nil, err
	}
	if err := cr.BindInOrder(remnantTableColumns()); err != nil {
		return nil, err
	}
	var rows []RemnantTableRow
	var lines []int
	for line, vals := range cr.Rows() {
		var row RemnantTableRow
		for i, p := range row.fields() {
			*p = vals[i]
		}
		if len(rows) > 0 && row.Energy != rows[0].Energy {
			return nil, cr.Errorf(line, "energy %v erg differs from %v on the first row: one energy per table", row.Energy, rows[0].Energy)
		}
		rows = append(rows, row)
		lines = append(lines, line)
	}
	if err := cr.Err(); err != nil {
		return nil, err
	}
	t := &RemnantTable{energy: rows[0].Energy, rows: rows}
	var err error
	t.zs, t.densities, err = cr.Grid(len(rows),
		csvtable.Axis{Name: "metallicity", Plural: "metallicities"},
		csvtable.Axis{Name: "density", Plural: "densities"},
		func(i int) (float64, float64, int) { return rows[i].Metallicity, rows[i].Density, lines[i] })
	if err != nil {
		return nil, err
	}
	for _, row := range rows {
		t.logP = append(t.logP, math.Log(row.ShellMomentum*units.MsunKms))
		t.logR = append(t.logR, math.Log(row.ShellRadius*units.Parsec))
		t.logM = append(t.logM, math.Log(row.ShellMass*units.SolarMass))
		t.logLateP = append(t.logLateP, math.Log(row.LateMomentum*units.MsunKms))
		t.logLateM = append(t.logLateM, math.Log(row.LateMass*units.SolarMass))
	}
	t.hasLate = true
	for _, row := range rows {
		t.hasLate = t.hasLate && row.LateMomentum > 0 && row.LateMass > 0
	}
	for _, d := range t.densities {
		t.logDensities = append(t.logDensities, math.Log(d))
	}
	for _, z := range t.zs {
		t.logZs = append(t.logZs, math.Log(z))
	}
	return t, nil
}

// WriteRemnantTable writes rows in the remnant table format, with the
// comment lines given (each prefixed by "# ").
func WriteRemnantTable(w io.Writer, comments []string, rows []RemnantTableRow) error {
	for _, c := range comments {
		for _, l := range strings.Split(c, "\n") {
			if _, err := fmt.Fprintf(w, "# %s\n", l); err != nil {
				return fmt.Errorf("remnant table: %w", err)
			}
		}
	}
	if _, err := fmt.Fprintln(w, RemnantTableHeader); err != nil {
		return fmt.Errorf("remnant table: %w", err)
	}
	for _, r := range rows {
		var sb strings.Builder
		for i, p := range r.fields() {
			if i > 0 {
				sb.WriteByte(',')
			}
			sb.WriteString(strconv.FormatFloat(*p, 'g', -1, 64))
		}
		if _, err := fmt.Fprintln(w, sb.String()); err != nil {
			return fmt.Errorf("remnant table: %w", err)
		}
	}
	return nil
}
