package bench

import "path/filepath"

// ReadArray reads one NumPy .npy file as float64s (float32, float64 and
// integer arrays, either byte order, C or Fortran order) with ncol columns
// (1: shape (n,) or (n, 1); otherwise (n, ncol)), row-major, and returns
// the row count. want >= 0 requires that many rows.
func ReadArray(path string, ncol, want int) ([]float64, int, error) {
	return readArray(filepath.Dir(path), filepath.Base(path), ncol, want, true)
}
