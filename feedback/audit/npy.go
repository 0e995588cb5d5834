package audit

import (
	"bufio"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strings"

	"codeberg.org/sbinet/npyio"
)

// ReadArray reads one NumPy .npy file as float64s (float32, float64, int32
// and int64 arrays, either byte order, C or Fortran order) with ncol
// columns (1: shape (n,) or (n, 1); otherwise (n, ncol)), row-major, and
// returns the row count. Non-finite values are refused. Errors name the file; a file
// shorter than its header promises says how many bytes it holds and how
// many the header's shape needs.
func ReadArray(path string, ncol int) ([]float64, int, error) {
	data, rows, _, err := readArray(path, ncol)
	return data, rows, err
}

// ReadIDs reads a column of integer IDs from a NumPy .npy file of shape
// (n,) or (n, 1): int64 and int32 arrays exactly, float arrays when every
// value is an integer of magnitude at most 2^53 (beyond which a float no
// longer tells neighboring integers apart).
func ReadIDs(path string) ([]int64, error) {
	data, _, ints, err := readArray(path, 1)
	if err != nil {
		return nil, err
	}
	if ints != nil {
		return ints, nil
	}
	ids := make([]int64, len(data))
	for i, x := range data {
		if x != math.Trunc(x) || math.Abs(x) > 1<<53 {
			return nil, fmt.Errorf("%s: value %d is %g, not an integer ID", path, i, x)
		}
		ids[i] = int64(x)
	}
	return ids, nil
}

// readArray is ReadArray that also returns the values of an integer array
// unconverted (nil for a float array).
func readArray(path string, ncol int) ([]float64, int, []int64, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, 0, nil, err
	}
	defer f.Close()
	info, err := f.Stat()
	if err != nil {
		return nil, 0, nil, err
	}
	if err := checkPreamble(f, info.Size()); err != nil {
		return nil, 0, nil, fmt.Errorf("%s: %w", path, err)
	}
	r, err := npyio.NewReader(f)
	if err != nil {
		return nil, 0, nil, fmt.Errorf("%s: %w", path, err)
	}
	shape := r.Header.Descr.Shape
	var rows int
	switch {
	case ncol == 1 && len(shape) == 1:
		rows = shape[0]
	case len(shape) == 2 && shape[1] == ncol:
		rows = shape[0]
	default:
		want := fmt.Sprintf("(n, %d)", ncol)
		if ncol == 1 {
			want = "(n,)"
		}
		return nil, 0, nil, fmt.Errorf("%s: shape %v, want %s", path, shape, want)
	}
	// The byte order is npyio's business; the kind and size are ours.
	kind := strings.Trim(r.Header.Descr.Type, "'\" ")
	kind = strings.TrimLeft(kind, "<>=|")
	size := map[string]int64{"f8": 8, "f4": 4, "i8": 8, "i4": 4}[kind]
	if size == 0 {
		return nil, 0, nil, fmt.Errorf("%s: element type %q not supported (float32, float64, int32, int64)", path, r.Header.Descr.Type)
	}
	header, err := f.Seek(0, io.SeekCurrent)
	if err != nil {
		return nil, 0, nil, fmt.Errorf("%s: %w", path, err)
	}
	if need := header + int64(rows)*int64(ncol)*size; info.Size() < need {
		return nil, 0, nil, fmt.Errorf("%s: truncated: %d bytes, but a header of %d bytes and shape %v of %d-byte values need %d",
			path, info.Size(), header, shape, size, need)
	}
	var data []float64
	var ints []int64
	switch kind {
	case "f8":
		err = r.Read(&data)
	case "f4":
		data, err = readConverted[float32](r)
	case "i8":
		err = r.Read(&ints)
		data = converted(ints)
	case "i4":
		var i32 []int32
		err = r.Read(&i32)
		data = converted(i32)
		ints = make([]int64, len(i32))
		for i, x := range i32 {
			ints[i] = int64(x)
		}
	}
	if err != nil {
		return nil, 0, nil, fmt.Errorf("%s: %w", path, err)
	}
	if len(data) != rows*ncol {
		return nil, 0, nil, fmt.Errorf("%s: %d values for %d rows of %d", path, len(data), rows, ncol)
	}
	if r.Header.Descr.Fortran && ncol > 1 {
		// Column-major on disk: transpose to row-major.
		t := make([]float64, len(data))
		for i := 0; i < rows; i++ {
			for a := 0; a < ncol; a++ {
				t[ncol*i+a] = data[a*rows+i]
			}
		}
		data = t
	}
	for i, v := range data {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, 0, nil, fmt.Errorf("%s: value %d (row %d) is %g", path, i, i/ncol, v)
		}
	}
	return data, rows, ints, nil
}

// checkPreamble checks that the file holds the whole .npy header its
// preamble announces, ending in a newline (a short or malformed header
// would otherwise surface as a bare EOF or worse), and rewinds the file.
func checkPreamble(f io.ReadSeeker, size int64) error {
	var pre [12]byte
	n, err := io.ReadFull(f, pre[:])
	if err != nil && !errors.Is(err, io.ErrUnexpectedEOF) && !errors.Is(err, io.EOF) {
		return err
	}
	if n < 6 || string(pre[:6]) != "\x93NUMPY" {
		return fmt.Errorf("not a NumPy .npy file (%d bytes, no .npy magic string)", size)
	}
	var end int64
	switch {
	case n >= 10 && pre[6] == 1:
		end = 10 + int64(binary.LittleEndian.Uint16(pre[8:10]))
	case n >= 12 && (pre[6] == 2 || pre[6] == 3):
		end = 12 + int64(binary.LittleEndian.Uint32(pre[8:12]))
	case n < 12:
		return fmt.Errorf("truncated: %d bytes end inside the .npy preamble", size)
	default:
		return fmt.Errorf(".npy format version %d.%d not supported", pre[6], pre[7])
	}
	if size < end {
		return fmt.Errorf("truncated: %d bytes end inside the .npy header, which needs %d", size, end)
	}
	last := make([]byte, 1)
	if _, err := f.Seek(end-1, io.SeekStart); err != nil {
		return err
	}
	if _, err := io.ReadFull(f, last); err != nil {
		return err
	}
	if last[0] != '\n' {
		return errors.New("malformed .npy header: it does not end in a newline")
	}
	_, err = f.Seek(0, io.SeekStart)
	return err
}

// readConverted reads the array as T and converts it to float64.
func readConverted[T float32 | int32 | int64](r *npyio.Reader) ([]float64, error) {
	var v []T
	if err := r.Read(&v); err != nil {
		return nil, err
	}
	return converted(v), nil
}

// converted converts values to float64.
func converted[T float32 | int32 | int64](v []T) []float64 {
	data := make([]float64, len(v))
	for i, x := range v {
		data[i] = float64(x)
	}
	return data
}

// WriteArray writes data, row-major with ncol columns, as a little-endian
// float64 NumPy .npy file of shape (n,) for ncol 1 and (n, ncol)
// otherwise; ReadArray reads it back.
func WriteArray(path string, data []float64, ncol int) error {
	if ncol < 1 || len(data)%ncol != 0 {
		return fmt.Errorf("write %s: %d values do not make rows of %d", path, len(data), ncol)
	}
	rows := len(data) / ncol
	if rows == 0 {
		return writeEmpty(path, "<f8", ncol)
	}
	var v any = data
	if ncol > 1 {
		table := make([][]float64, rows)
		for i := range table {
			table[i] = data[ncol*i : ncol*i+ncol]
		}
		v = table
	}
	return writeNpy(path, func(w io.Writer) error { return npyio.Write(w, v) })
}

// WriteIDs writes integer IDs as a little-endian int64 NumPy .npy file of
// shape (n,); ReadIDs reads them back exactly.
func WriteIDs(path string, ids []int64) error {
	if len(ids) == 0 {
		return writeEmpty(path, "<i8", 1)
	}
	return writeNpy(path, func(w io.Writer) error { return npyio.Write(w, ids) })
}

// writeEmpty writes an array of no rows. npyio infers the shape from the
// values, so an empty slice would lose its width and its rank; this header
// states them (NumPy's format version 1.0: magic, version, header length,
// then the header dictionary padded with spaces to a multiple of 64 bytes
// and ended by a newline).
func writeEmpty(path, descr string, ncol int) error {
	shape := "(0,)"
	if ncol > 1 {
		shape = fmt.Sprintf("(0, %d)", ncol)
	}
	dict := fmt.Sprintf("{'descr': '%s', 'fortran_order': False, 'shape': %s, }", descr, shape)
	const preamble = 10 // magic (6), version (2), header length (2)
	total := (preamble + len(dict) + 1 + 63) / 64 * 64
	header := dict + strings.Repeat(" ", total-preamble-len(dict)-1) + "\n"
	return writeNpy(path, func(w io.Writer) error {
		var pre [preamble]byte
		copy(pre[:], "\x93NUMPY\x01\x00")
		binary.LittleEndian.PutUint16(pre[8:], uint16(len(header)))
		if _, err := w.Write(pre[:]); err != nil {
			return err
		}
		_, err := io.WriteString(w, header)
		return err
	})
}

// writeNpy creates the file at path and fills it with write.
func writeNpy(path string, write func(w io.Writer) error) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := bufio.NewWriter(f)
	if err := write(w); err != nil {
		f.Close()
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err := w.Flush(); err != nil {
		f.Close()
		return fmt.Errorf("write %s: %w", path, err)
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	return nil
}
