package csvtable

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/iotest"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

var errTest = errors.New("malformed test table")

var testFormat = Format{Name: "test: table", Err: errTest}

// testColumns: two required columns in any order and an optional one.
var testColumns = []Column{
	{Name: "x", Unit: "cm", Required: true, Min: Positive},
	{Name: "y", Unit: "g", Required: true, Min: NonNegative},
	{Name: "note", Unit: "1"},
}

// readAll reads a table bound to cols (in order or not) and returns its rows
// and lines.
func readAll(src io.Reader, f Format, cols []Column, inOrder bool) (rows [][]float64, lines []int, r *Reader, err error) {
	r = NewReader(src, f)
	if _, err := r.ReadHeader(); err != nil {
		return nil, nil, r, err
	}
	bind := r.Bind
	if inOrder {
		bind = r.BindInOrder
	}
	if err := bind(cols); err != nil {
		return nil, nil, r, err
	}
	for line, v := range r.Rows() {
		rows = append(rows, append([]float64(nil), v...))
		lines = append(lines, line)
	}
	if err := r.Err(); err != nil {
		return nil, nil, r, err
	}
	return rows, lines, r, nil
}

// A table whose header lists the columns in another order, with comment
// lines and spaces, reads into the format's column order; an absent
// optional column reads as zero and Has says it is absent.
func TestReaderReadsAnyColumnOrder(t *testing.T) {
	text := "# a comment\n# another\ny[g], x[cm]\n2, 1.5\n# between rows\n0,3e2\n"
	rows, lines, r, err := readAll(strings.NewReader(text), testFormat, testColumns, false)
	require.NoError(t, err)
	assert.Equal(t, [][]float64{{1.5, 2, 0}, {300, 0, 0}}, rows)
	assert.Equal(t, []int{4, 6}, lines)
	assert.Equal(t, 3, r.HeaderLine())
	assert.True(t, r.Has(0))
	assert.True(t, r.Has(1))
	assert.False(t, r.Has(2))

	rows, _, r, err = readAll(strings.NewReader("note[1],x[cm],y[g]\n-4,1,1\n"), testFormat, testColumns, false)
	require.NoError(t, err)
	assert.Equal(t, [][]float64{{1, 1, -4}}, rows, "an AnyFinite column takes negative values")
	assert.True(t, r.Has(2))
}

// Every defect is an error that names the line (and the column where there
// is one) and wraps the format's sentinel.
func TestReaderErrors(t *testing.T) {
	const h = "x[cm],y[g]\n"
	hinted := Format{Name: "test: table", Err: errTest, Header: "x[cm],y[g],note[1]"}
	cases := []struct {
		name, text string
		format     Format
		want       string
	}{
		{"empty", "", testFormat, "test: table: empty, no header row"},
		{"comments only", "# nothing here\n", testFormat, "empty, no header row"},
		{"no unit", "# c\nx,y[g]\n", testFormat, `test: table line 2: column 1 "x": want name[unit]`},
		{"unclosed unit", "x[cm,y[g]\n", testFormat, `line 1: column 1 "x[cm": want name[unit]`},
		{"unknown column", "x[cm],y[g],z[s]\n", testFormat, `line 1: column 3: unknown quantity "z"`},
		{"unknown column with hint", "x[cm],y[g],z[s]\n", hinted, `unknown quantity "z" (want x[cm],y[g],note[1])`},
		{"wrong unit", "x[m],y[g]\n", testFormat, `line 1: column "x": unit "m", want "cm"`},
		{"twice", "x[cm],y[g],x[cm]\n", testFormat, `line 1: column "x" appears twice`},
		{"missing required", "x[cm]\n1\n", testFormat, "line 1: missing column y[g]"},
		{"no rows", "# c\n" + h + "# c\n", testFormat, "line 2: no data rows"},
		{"not a number", h + "1,2\n1,lots\n", testFormat, `line 3: column "y": "lots" is not a number`},
		{"NaN", h + "NaN,1\n", testFormat, `line 2: column "x": "NaN" is not a finite number`},
		{"infinite", h + "1,-Inf\n", testFormat, `line 2: column "y": "-Inf" is not a finite number`},
		{"overflow", h + "1e400,1\n", testFormat, `line 2: column "x": "1e400" is not a finite number`},
		{"zero where positive", h + "0,1\n", testFormat, `line 2: column "x": 0, want a finite value > 0`},
		{"negative where non-negative", h + "1,-1\n", testFormat, `line 2: column "y": -1, want a finite value >= 0`},
		{"short row", h + "1,2\n1\n", testFormat, "line 3: wrong number of fields"},
		{"long row", h + "1,2,3\n", testFormat, "line 2: wrong number of fields"},
		{"bad quote", h + "1,\"2\n", testFormat, "line 2:"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, _, _, err := readAll(strings.NewReader(tc.text), tc.format, testColumns, false)
			require.Error(t, err)
			assert.ErrorIs(t, err, errTest)
			assert.Contains(t, err.Error(), tc.want)
		})
	}
}

// A format with one fixed header accepts exactly its columns in their
// order, and names columns as name[unit] in errors; Required is implied.
func TestReaderBindInOrder(t *testing.T) {
	cols := []Column{{Name: "a", Unit: "cm", Min: Positive}, {Name: "b", Unit: "s"}}
	rows, _, r, err := readAll(strings.NewReader("a[cm],b[s]\n1,-2\n"), testFormat, cols, true)
	require.NoError(t, err)
	assert.Equal(t, [][]float64{{1, -2}}, rows)
	assert.True(t, r.Has(1))
	cases := []struct{ name, text, want string }{
		{"too few", "a[cm]\n", "line 1: 1 columns, want 2: a[cm],b[s]"},
		{"other order", "b[s],a[cm]\n", `line 1: column 1 is "b[s]", want "a[cm]"`},
		{"other unit", "a[cm],b[ms]\n", `line 1: column 2 is "b[ms]", want "b[s]"`},
		{"bad value", "a[cm],b[s]\n0,1\n", `line 2: column "a[cm]": 0, want a finite value > 0`},
		{"not a number", "a[cm],b[s]\n1,x\n", `line 2: column "b[s]": "x" is not a number`},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, _, _, err := readAll(strings.NewReader(tc.text), testFormat, cols, true)
			require.Error(t, err)
			assert.ErrorIs(t, err, errTest)
			assert.Contains(t, err.Error(), tc.want)
		})
	}
}

// An error of the underlying reader is not a malformed table: it names the
// table and wraps the reader's error, not the sentinel.
func TestReaderIOError(t *testing.T) {
	errIO := errors.New("disk on fire")
	r := NewReader(iotest.ErrReader(errIO), testFormat)
	_, err := r.ReadHeader()
	require.Error(t, err)
	assert.ErrorIs(t, err, errIO)
	assert.NotErrorIs(t, err, errTest)
	assert.Contains(t, err.Error(), "test: table: disk on fire")

	r = NewReader(io.MultiReader(strings.NewReader("x[cm],y[g]\n1,2\n"), iotest.ErrReader(errIO)), testFormat)
	_, err = r.ReadHeader()
	require.NoError(t, err)
	require.NoError(t, r.Bind(testColumns))
	n := 0
	for range r.Rows() {
		n++
	}
	assert.Equal(t, 1, n, "the row before the failure is read")
	assert.ErrorIs(t, r.Err(), errIO)
	assert.NotErrorIs(t, r.Err(), errTest)
}

// Rows may be left early; the defect of a later row stops it for good.
func TestReaderRowsStops(t *testing.T) {
	r := NewReader(strings.NewReader("x[cm],y[g]\n1,1\n2,2\n3,-3\n4,4\n"), testFormat)
	_, err := r.ReadHeader()
	require.NoError(t, err)
	require.NoError(t, r.Bind(testColumns))
	for line := range r.Rows() {
		assert.Equal(t, 2, line)
		break
	}
	require.NoError(t, r.Err())
	var lines []int
	for line := range r.Rows() {
		lines = append(lines, line)
	}
	assert.Equal(t, []int{3}, lines, "the next range goes on from the row after")
	assert.ErrorContains(t, r.Err(), "line 4:")
	for range r.Rows() {
		t.Fatal("no rows after a defect")
	}
}

// Errorf gives a format's own checks the shared form.
func TestReaderErrorf(t *testing.T) {
	r := NewReader(strings.NewReader(""), testFormat)
	err := r.Errorf(7, "age %v does not rise", 3.5)
	assert.ErrorIs(t, err, errTest)
	assert.EqualError(t, err, "test: table line 7: age 3.5 does not rise: malformed test table")
}

// gridRows is a table of (outer, inner) pairs on consecutive lines from 2.
type gridRows [][2]float64

func (g gridRows) row(i int) (float64, float64, int) { return g[i][0], g[i][1], i + 2 }

func TestGrid(t *testing.T) {
	z := Axis{Name: "metallicity", Plural: "metallicities"}
	age := Axis{Name: "age", Plural: "ages", Unit: "Myr"}
	r := NewReader(strings.NewReader(""), testFormat)

	good := gridRows{{0.01, 1}, {0.01, 10}, {0.01, 100}, {0.02, 1}, {0.02, 10}, {0.02, 100}}
	outer, inner, err := r.Grid(len(good), z, age, good.row)
	require.NoError(t, err)
	assert.Equal(t, []float64{0.01, 0.02}, outer)
	assert.Equal(t, []float64{1, 10, 100}, inner)
	outer, inner, err = r.Grid(1, z, age, good.row)
	require.NoError(t, err, "one row is a 1 x 1 grid")
	assert.Equal(t, []float64{0.01}, outer)
	assert.Equal(t, []float64{1}, inner)

	cases := []struct {
		name string
		rows gridRows
		want string
	}{
		{"no rows", gridRows{}, "no data rows"},
		{"falling outer", gridRows{{0.02, 1}, {0.02, 10}, {0.01, 1}, {0.01, 10}}, "line 4: metallicity 0.01 after 0.02: blocks must rise in metallicity"},
		{"ragged", gridRows{{0.01, 1}, {0.01, 10}, {0.02, 1}}, "line 4: 3 rows do not split into 2 metallicity blocks of equal size"},
		{"split block", gridRows{{0.01, 1}, {0.02, 1}, {0.02, 10}, {0.03, 1}, {0.03, 10}, {0.03, 100}}, "line 3: metallicity 0.02: block 1 of 2 ages should be at 0.01"},
		{"inner not rising", gridRows{{0.01, 1}, {0.01, 1}}, "line 3: age 1 Myr does not rise after 1"},
		{"other inner grid", gridRows{{0.01, 1}, {0.01, 10}, {0.02, 1}, {0.02, 11}}, "line 5: age 11 Myr: metallicity 0.02 has a different age grid (want 10)"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, _, err := r.Grid(len(tc.rows), z, age, tc.rows.row)
			require.Error(t, err)
			assert.ErrorIs(t, err, errTest)
			assert.Contains(t, err.Error(), tc.want)
		})
	}
}

func TestReadFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "t.csv")
	require.NoError(t, os.WriteFile(path, []byte("x[cm],y[g]\n1,2\n"), 0o644))
	readRows := func(r io.Reader) ([][]float64, error) {
		rows, _, _, err := readAll(r, testFormat, testColumns, false)
		return rows, err
	}
	rows, err := ReadFile(path, "test: table", readRows)
	require.NoError(t, err)
	assert.Equal(t, [][]float64{{1, 2, 0}}, rows)

	bad := filepath.Join(dir, "bad.csv")
	require.NoError(t, os.WriteFile(bad, []byte("x[cm],y[g]\n1,-2\n"), 0o644))
	_, err = ReadFile(bad, "test: table", readRows)
	require.Error(t, err)
	assert.ErrorIs(t, err, errTest)
	assert.Contains(t, err.Error(), bad+": test: table line 2:")

	_, err = ReadFile(filepath.Join(dir, "absent.csv"), "test: table", readRows)
	require.Error(t, err)
	assert.ErrorIs(t, err, os.ErrNotExist)
	assert.Contains(t, err.Error(), "test: table: open ")
}
