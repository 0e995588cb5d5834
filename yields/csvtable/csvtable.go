// Package csvtable reads the CSV layout every table of ejecta shares (the
// yields tables of package yields, the cooling tables of bench/cooling, the
// remnant tables of package feedback): lines starting with '#' are comments;
// the first other line is the header, naming every column as name[unit];
// each following line is one row of numbers.
//
// A format states the columns it knows (Column: name, unit, whether it is
// required, the least value it accepts). A Reader reads the header
// (ReadHeader), checks it against those columns (Bind, or BindInOrder for a
// format with one fixed header) and parses each row into finite numbers
// (Rows). Every defect is an error that names the line, and the column where
// there is one, and wraps the format's sentinel error (Format.Err), so
// callers match it with errors.Is. Grid checks the rectangular grid of
// blocks most formats lay their rows out in, and Errorf gives the checks a
// format makes of its own (sums, ranges) the same form. The package imports
// nothing of the project, so every layer may use it.
package csvtable

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"iter"
	"math"
	"os"
	"strconv"
	"strings"
)

// Format names a table format in its errors.
type Format struct {
	// Name starts every error, e.g. "cooling: table" gives
	// "cooling: table line 3: ...".
	Name string
	// Err is the sentinel every defect of the table wraps. Errors of the
	// underlying reader (I/O) wrap that error instead.
	Err error
	// Header, when set, is the format's documented header row; an error
	// about an unknown column quotes it.
	Header string
}

// Bound is the least value a column accepts. Every value must be finite.
type Bound uint8

const (
	// AnyFinite accepts any finite number.
	AnyFinite Bound = iota
	// NonNegative accepts finite numbers >= 0.
	NonNegative
	// Positive accepts finite numbers > 0.
	Positive
)

// Column is one column a format knows.
type Column struct {
	// Name and Unit make up the heading name[unit]; the unit must be
	// written exactly so (a different unit is an error, not a conversion).
	Name, Unit string
	// Required columns must appear in the header; an optional column that
	// is absent reads as zero (Reader.Has tells which).
	Required bool
	// Min is the least value the column accepts.
	Min Bound
}

// Heading is the column's heading, name[unit].
func (c Column) Heading() string { return c.Name + "[" + c.Unit + "]" }

// Heading is one cell of a header row, split into name and unit.
type Heading struct {
	Name, Unit string
}

// String is the heading as the format writes it, name[unit].
func (h Heading) String() string { return h.Name + "[" + h.Unit + "]" }

// Reader reads one table. Use ReadHeader, then Bind or BindInOrder, then
// range over Rows and check Err.
type Reader struct {
	cr         *csv.Reader
	format     Format
	headerLine int
	header     []Heading
	cols       []Column
	fileCol    []int  // header column -> index in cols
	has        []bool // index in cols -> present in the header
	inOrder    bool   // columns are named as name[unit] in errors
	values     []float64
	rows       int
	err        error // the defect that stopped Rows
}

// NewReader returns a Reader of the table in r, in format f.
func NewReader(r io.Reader, f Format) *Reader {
	cr := csv.NewReader(r)
	cr.Comment = '#'
	cr.TrimLeadingSpace = true
	cr.ReuseRecord = true
	return &Reader{cr: cr, format: f}
}

// Errorf returns an error at a line of the table:
// "<Format.Name> line <line>: <message>", wrapping Format.Err.
func (r *Reader) Errorf(line int, format string, args ...any) error {
	return fmt.Errorf("%s line %d: %s: %w", r.format.Name, line, fmt.Sprintf(format, args...), r.format.Err)
}

// readError turns an error of the CSV reader into a line error (or an
// I/O error naming the table).
func (r *Reader) readError(err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return r.Errorf(pe.Line, "%v", pe.Err)
	}
	return fmt.Errorf("%s: %w", r.format.Name, err)
}

// HeaderLine is the line number of the header row (valid after
// ReadHeader).
func (r *Reader) HeaderLine() int { return r.headerLine }

// ReadHeader reads the header row, skipping comment lines, and splits each
// cell into name and unit. A table with no header row, or a cell not of the
// form name[unit], is an error.
func (r *Reader) ReadHeader() ([]Heading, error) {
	rec, err := r.cr.Read()
	if err != nil {
		if errors.Is(err, io.EOF) {
			return nil, fmt.Errorf("%s: empty, no header row: %w", r.format.Name, r.format.Err)
		}
		return nil, r.readError(err)
	}
	r.headerLine, _ = r.cr.FieldPos(0)
	r.header = make([]Heading, len(rec))
	for i, cell := range rec {
		cell = strings.TrimSpace(cell)
		open := strings.IndexByte(cell, '[')
		if open < 0 || !strings.HasSuffix(cell, "]") {
			return nil, r.Errorf(r.headerLine, "column %d %q: want name[unit]", i+1, cell)
		}
		r.header[i] = Heading{Name: cell[:open], Unit: cell[open+1 : len(cell)-1]}
	}
	r.cr.FieldsPerRecord = len(rec)
	return append([]Heading(nil), r.header...), nil
}

// Bind checks the header against the format's columns, which the header
// may list in any order: every heading must name a known column once, in its
// unit, and every required column must appear. Errors name columns by name.
func (r *Reader) Bind(cols []Column) error {
	r.bindColumns(cols, false)
	for i, h := range r.header {
		j := -1
		for k := range cols {
			if cols[k].Name == h.Name {
				j = k
				break
			}
		}
		if j < 0 {
			if r.format.Header != "" {
				return r.Errorf(r.headerLine, "column %d: unknown quantity %q (want %s)", i+1, h.Name, r.format.Header)
			}
			return r.Errorf(r.headerLine, "column %d: unknown quantity %q", i+1, h.Name)
		}
		if h.Unit != cols[j].Unit {
			return r.Errorf(r.headerLine, "column %q: unit %q, want %q", h.Name, h.Unit, cols[j].Unit)
		}
		if r.has[j] {
			return r.Errorf(r.headerLine, "column %q appears twice", h.Name)
		}
		r.has[j] = true
		r.fileCol[i] = j
	}
	for j, c := range cols {
		if c.Required && !r.has[j] {
			return r.Errorf(r.headerLine, "missing column %s", c.Heading())
		}
	}
	return nil
}

// BindInOrder checks that the header is exactly the format's columns, in
// their order and units (Required is then implied). Errors name columns as
// name[unit].
func (r *Reader) BindInOrder(cols []Column) error {
	r.bindColumns(cols, true)
	if len(r.header) != len(cols) {
		want := make([]string, len(cols))
		for j, c := range cols {
			want[j] = c.Heading()
		}
		return r.Errorf(r.headerLine, "%d columns, want %d: %s", len(r.header), len(cols), strings.Join(want, ","))
	}
	for i, h := range r.header {
		if h != (Heading{cols[i].Name, cols[i].Unit}) {
			return r.Errorf(r.headerLine, "column %d is %q, want %q", i+1, h.String(), cols[i].Heading())
		}
		r.has[i] = true
		r.fileCol[i] = i
	}
	return nil
}

func (r *Reader) bindColumns(cols []Column, inOrder bool) {
	r.cols = cols
	r.inOrder = inOrder
	r.fileCol = make([]int, len(r.header))
	r.has = make([]bool, len(cols))
	r.values = make([]float64, len(cols))
}

// Has reports whether column j (an index into the bound columns) is in the
// table.
func (r *Reader) Has(j int) bool { return r.has[j] }

// label names column j in an error.
func (r *Reader) label(j int) string {
	if r.inOrder {
		return strconv.Quote(r.cols[j].Heading())
	}
	return strconv.Quote(r.cols[j].Name)
}

// Rows iterates over the table's rows: each row's line number and values,
// indexed like the bound columns (absent optional columns are zero; the
// values slice is reused by the next row). It stops after the last row or at
// the first defect, which Err then returns: a row with the wrong number of
// fields, a field that is not a finite number, or a value below its
// column's Min, named by line and column. A table without any row is an
// error at the header line.
func (r *Reader) Rows() iter.Seq2[int, []float64] {
	return func(yield func(int, []float64) bool) {
		for r.err == nil {
			line, v, err := r.next()
			if err != nil {
				if !errors.Is(err, io.EOF) {
					r.err = err
				}
				return
			}
			if !yield(line, v) {
				return
			}
		}
	}
}

// Err is the defect that stopped Rows, or nil.
func (r *Reader) Err() error { return r.err }

// next reads one row; io.EOF after the last.
func (r *Reader) next() (line int, values []float64, err error) {
	rec, err := r.cr.Read()
	if errors.Is(err, io.EOF) {
		if r.rows == 0 {
			return 0, nil, r.Errorf(r.headerLine, "no data rows")
		}
		return 0, nil, io.EOF
	}
	if err != nil {
		return 0, nil, r.readError(err)
	}
	line, _ = r.cr.FieldPos(0)
	for i, field := range rec {
		j := r.fileCol[i]
		v, err := strconv.ParseFloat(strings.TrimSpace(field), 64)
		switch {
		case err != nil && !errors.Is(err, strconv.ErrRange):
			return line, nil, r.Errorf(line, "column %s: %q is not a number", r.label(j), field)
		case err != nil || math.IsNaN(v) || math.IsInf(v, 0):
			return line, nil, r.Errorf(line, "column %s: %q is not a finite number", r.label(j), field)
		case r.cols[j].Min == NonNegative && v < 0:
			return line, nil, r.Errorf(line, "column %s: %v, want a finite value >= 0", r.label(j), v)
		case r.cols[j].Min == Positive && !(v > 0):
			return line, nil, r.Errorf(line, "column %s: %v, want a finite value > 0", r.label(j), v)
		}
		r.values[j] = v
	}
	r.rows++
	return line, r.values, nil
}

// Axis names a grid axis in errors: its Name ("age"), the Plural
// ("ages") and the Unit its values are written with ("Myr"; may be empty).
type Axis struct {
	Name, Plural, Unit string
}

// value is v followed by the axis' unit, if any.
func (a Axis) value(v float64) string {
	if a.Unit == "" {
		return fmt.Sprint(v)
	}
	return fmt.Sprintf("%v %s", v, a.Unit)
}

// Grid checks that n rows form a rectangular grid in blocks: the rows of
// one outer value (e.g. metallicity) together, the blocks in rising order
// of the outer value, each block with the same strictly rising inner values
// (e.g. ages). row(i) gives row i's outer and inner values and its line.
// Grid returns the outer and inner axes; a defect is an error naming the
// first row that shows it.
func (r *Reader) Grid(n int, outerAxis, innerAxis Axis, row func(i int) (outer, inner float64, line int)) (outer, inner []float64, err error) {
	if n == 0 {
		return nil, nil, r.Errorf(r.headerLine, "no data rows")
	}
	var prev float64
	for i := range n {
		o, _, line := row(i)
		if i == 0 || o != prev {
			if i > 0 && o < prev {
				return nil, nil, r.Errorf(line, "%s %s after %s: blocks must rise in %s", outerAxis.Name, outerAxis.value(o), outerAxis.value(prev), outerAxis.Name)
			}
			outer = append(outer, o)
		}
		prev = o
	}
	ni := n / len(outer)
	if ni*len(outer) != n {
		_, _, line := row(n - 1)
		return nil, nil, r.Errorf(line, "%d rows do not split into %d %s blocks of equal size", n, len(outer), outerAxis.Name)
	}
	inner = make([]float64, 0, ni)
	for i := range n {
		o, in, line := row(i)
		ob, ib := i/ni, i%ni
		if o != outer[ob] {
			return nil, nil, r.Errorf(line, "%s %s: block %d of %d %s should be at %s", outerAxis.Name, outerAxis.value(o), ob+1, ni, innerAxis.Plural, outerAxis.value(outer[ob]))
		}
		switch {
		case ob == 0:
			if ib > 0 && !(in > inner[ib-1]) {
				return nil, nil, r.Errorf(line, "%s %s does not rise after %v", innerAxis.Name, innerAxis.value(in), inner[ib-1])
			}
			inner = append(inner, in)
		case in != inner[ib]:
			return nil, nil, r.Errorf(line, "%s %s: %s %s has a different %s grid (want %v)", innerAxis.Name, innerAxis.value(in), outerAxis.Name, outerAxis.value(o), innerAxis.Name, inner[ib])
		}
	}
	return outer, inner, nil
}

// ReadFile opens the file at path and reads it with read. An error opening
// the file starts with name; an error reading it starts with the path.
func ReadFile[T any](path, name string, read func(io.Reader) (T, error)) (T, error) {
	f, err := os.Open(path)
	if err != nil {
		var zero T
		return zero, fmt.Errorf("%s: %w", name, err)
	}
	defer f.Close()
	t, err := read(f)
	if err != nil {
		var zero T
		return zero, fmt.Errorf("%s: %w", path, err)
	}
	return t, nil
}
