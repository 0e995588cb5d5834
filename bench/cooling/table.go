package cooling

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"

	"github.com/ejecta-dev/ejecta/yields/csvtable"
)

// ErrTable marks a malformed cooling table; the error text names the line.
var ErrTable = errors.New("malformed cooling table")

// ErrOutsideTable marks a metallicity outside a table's range.
var ErrOutsideTable = errors.New("metallicity outside the cooling table")

// Table column names and units (see the package documentation).
const (
	colTemperature = "log10_temperature"
	unitTemp       = "K"
	colMetallicity = "metallicity"
	unitZ          = "solar"
	colCooling     = "cooling"
	unitCooling    = "erg cm^3 s^-1"
	colHeating     = "heating"
	unitHeating    = "erg s^-1"
)

// TableHeader is the header row of the table format, heating included.
const TableHeader = colTemperature + "[" + unitTemp + "]," + colMetallicity + "[" + unitZ + "]," +
	colCooling + "[" + unitCooling + "]," + colHeating + "[" + unitHeating + "]"

// Table is a user's cooling function read from the CSV format: Λ on a grid
// of temperatures for each of a rising set of metallicities, with a heating
// rate per metallicity. It is immutable and safe for concurrent use.
type Table struct {
	temp    []float64   // K
	zs      []float64   // solar units, rising
	lambda  [][]float64 // [iz][it]
	heating []float64   // [iz]
}

// Metallicities is the table's metallicity grid in solar units (a copy).
func (t *Table) Metallicities() []float64 { return append([]float64(nil), t.zs...) }

// Temperatures is the table's temperature grid in K (a copy).
func (t *Table) Temperatures() []float64 { return append([]float64(nil), t.temp...) }

// Curve is the table's cooling function at metallicity zeta (solar units):
// log Λ and Γ linear in log zeta between blocks, exactly a block's values on
// it. A zeta outside [first, last] metallicity is an ErrOutsideTable error.
func (t *Table) Curve(zeta float64) (*Curve, error) {
	n := len(t.zs)
	if !(zeta >= t.zs[0] && zeta <= t.zs[n-1]) {
		return nil, fmt.Errorf("cooling: table covers metallicity %v to %v solar, not %v: %w", t.zs[0], t.zs[n-1], zeta, ErrOutsideTable)
	}
	i := 0
	for i < n-1 && t.zs[i+1] < zeta {
		i++
	}
	if t.zs[i] == zeta || i == n-1 {
		return NewCurve(t.temp, t.lambda[i], t.heating[i])
	}
	if t.zs[i+1] == zeta {
		return NewCurve(t.temp, t.lambda[i+1], t.heating[i+1])
	}
	w := math.Log(zeta/t.zs[i]) / math.Log(t.zs[i+1]/t.zs[i])
	lam := make([]float64, len(t.temp))
	for k := range lam {
		lam[k] = math.Exp((1-w)*math.Log(t.lambda[i][k]) + w*math.Log(t.lambda[i+1][k]))
	}
	return NewCurve(t.temp, lam, (1-w)*t.heating[i]+w*t.heating[i+1])
}

// ReadTableFile reads a table from a file; errors name the file and line.
func ReadTableFile(path string) (*Table, error) {
	return csvtable.ReadFile(path, "cooling: table", ReadTable)
}

// tableColumns are the columns of the table format, in the order of
// TableHeader.
var tableColumns = []csvtable.Column{
	{Name: colTemperature, Unit: unitTemp, Required: true},
	{Name: colMetallicity, Unit: unitZ, Required: true},
	{Name: colCooling, Unit: unitCooling, Required: true},
	{Name: colHeating, Unit: unitHeating},
}

// ReadTable reads a table in the documented CSV format. Every defect — an
// unknown, repeated or missing column, a wrong unit, a field that is not a
// finite number, a non-positive metallicity or cooling value, a negative
// heating rate, heating that changes within a metallicity, metallicities
// that do not rise block by block, temperature grids that do not rise or
// differ between blocks, fewer than two temperatures — is an ErrTable error
// naming the line.
func ReadTable(r io.Reader) (*Table, error) {
	cr := csvtable.NewReader(r, csvtable.Format{Name: "cooling: table", Err: ErrTable, Header: TableHeader})
	if _, err := cr.ReadHeader(); err != nil {
		return nil, err
	}
	if err := cr.Bind(tableColumns); err != nil {
		return nil, err
	}

	type row struct {
		line                  int
		logT, z, lam, heating float64
	}
	var rows []row
	for line, v := range cr.Rows() {
		rw := row{line: line, logT: v[0], z: v[1], lam: v[2], heating: v[3]}
		switch {
		case !(rw.z > 0):
			return nil, cr.Errorf(line, "metallicity %v: want > 0 (the grid is in log metallicity)", rw.z)
		case !(rw.lam > 0):
			return nil, cr.Errorf(line, "cooling %v: want > 0 (segments are power laws)", rw.lam)
		case rw.heating < 0:
			return nil, cr.Errorf(line, "heating %v: want >= 0", rw.heating)
		case math.Abs(rw.logT) > 300:
			return nil, cr.Errorf(line, "log10 temperature %v is out of range", rw.logT)
		}
		rows = append(rows, rw)
	}
	if err := cr.Err(); err != nil {
		return nil, err
	}
	t := &Table{}
	var block []row
	flush := func() error {
		if len(block) < 2 {
			return cr.Errorf(block[0].line, "metallicity %v has %d temperature, want at least two", block[0].z, len(block))
		}
		lam := make([]float64, len(block))
		first := len(t.zs) == 0
		for i, rw := range block {
			tk := math.Pow(10, rw.logT)
			if first {
				if i > 0 && !(tk > t.temp[i-1]) {
					return cr.Errorf(rw.line, "log10 temperature %v does not rise", rw.logT)
				}
				t.temp = append(t.temp, tk)
			} else if i >= len(t.temp) || tk != t.temp[i] {
				return cr.Errorf(rw.line, "metallicity %v: temperature grid differs from metallicity %v's", rw.z, t.zs[0])
			}
			if rw.heating != block[0].heating {
				return cr.Errorf(rw.line, "heating %v differs from %v earlier in metallicity %v: heating is one value per metallicity", rw.heating, block[0].heating, rw.z)
			}
			lam[i] = rw.lam
		}
		if !first && len(block) != len(t.temp) {
			return cr.Errorf(block[len(block)-1].line, "metallicity %v has %d temperatures, want %d", block[0].z, len(block), len(t.temp))
		}
		t.zs = append(t.zs, block[0].z)
		t.lambda = append(t.lambda, lam)
		t.heating = append(t.heating, block[0].heating)
		return nil
	}
	for _, rw := range rows {
		if len(block) > 0 && rw.z != block[0].z {
			if rw.z < block[0].z {
				return nil, cr.Errorf(rw.line, "metallicity %v after %v: blocks must rise in metallicity", rw.z, block[0].z)
			}
			if err := flush(); err != nil {
				return nil, err
			}
			block = block[:0]
		}
		block = append(block, rw)
	}
	if err := flush(); err != nil {
		return nil, err
	}
	return t, nil
}

// WriteTable writes curves in the table format, one block per metallicity
// (zs rising, each with its curve; all curves on the same temperatures).
func WriteTable(w io.Writer, zs []float64, curves []*Curve) error {
	if len(zs) == 0 || len(zs) != len(curves) {
		return fmt.Errorf("cooling: write table: %d metallicities and %d curves: %w", len(zs), len(curves), ErrInput)
	}
	if _, err := fmt.Fprintln(w, TableHeader); err != nil {
		return fmt.Errorf("cooling: write table: %w", err)
	}
	for i, c := range curves {
		if i > 0 && !(zs[i] > zs[i-1]) {
			return fmt.Errorf("cooling: write table: metallicities must rise: %w", ErrInput)
		}
		if len(c.law.x) != len(curves[0].law.x) {
			return fmt.Errorf("cooling: write table: curves on different temperature grids: %w", ErrInput)
		}
		for k := range c.law.x {
			if _, err := fmt.Fprintf(w, "%s,%s,%s,%s\n", fmtFloat(math.Log10(c.law.x[k])), fmtFloat(zs[i]), fmtFloat(c.law.f[k]), fmtFloat(c.heating)); err != nil {
				return fmt.Errorf("cooling: write table: %w", err)
			}
		}
	}
	return nil
}

func fmtFloat(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
