package bench

import (
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
)

// Output file names written by WriteResults, besides the plots.
const (
	ResultsFile     = "results.json"
	ConvergenceFile = "convergence.csv"
	IsotropyFile    = "isotropy.csv"
	EnergyFile      = "energy.csv"
	SpeedFile       = "speed.csv"
	// SpeedFigureFile is the speed plot, written when speed was measured.
	SpeedFigureFile = "speed.png"
	// OutcomeTableFile and OutcomeHistoryTableFile hold the evolved
	// outcome's rows and momentum histories, written when it was run.
	OutcomeTableFile        = "outcome.csv"
	OutcomeHistoryTableFile = "outcome_history.csv"
)

// figurePrefixes are the beginnings of the names of every figure
// WriteResults writes; a figure of these names that a run did not make is
// removed from the folder.
var figurePrefixes = []string{"momentum_", "energy", "isotropy", "speed", "outcome_"}

// csvDigits is the number of significant digits of the CSV tables: enough
// for any comparison the tables serve, without float64 round-off noise
// (1.0000000000000004). results.json carries the full values.
const csvDigits = 6

// WriteResults writes results.json, one CSV per table and the plots into
// dir (created if missing) and returns the paths written, in order. A table
// with no rows (the speed table when the measurement was skipped) is not
// written, and neither is its plot; a file of that name left by an earlier
// run in dir is removed, so the folder never mixes two runs.
func WriteResults(dir string, res *Result) ([]string, error) {
	if res == nil {
		return nil, fmt.Errorf("write results: nil result")
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, fmt.Errorf("write results: %w", err)
	}
	var written []string
	js, err := json.MarshalIndent(res, "", "  ")
	if err != nil {
		return nil, fmt.Errorf("write results: encode JSON: %w", err)
	}
	p := filepath.Join(dir, ResultsFile)
	if err := os.WriteFile(p, append(js, '\n'), 0o644); err != nil {
		return nil, fmt.Errorf("write results: %w", err)
	}
	written = append(written, p)
	tables := []struct {
		name string
		rows any
	}{
		{ConvergenceFile, res.Convergence}, {IsotropyFile, res.Isotropy},
		{EnergyFile, res.Energy}, {SpeedFile, res.Speed},
		{OutcomeTableFile, res.Outcome}, {OutcomeHistoryTableFile, res.OutcomeHistory},
	}
	for _, t := range tables {
		p := filepath.Join(dir, t.name)
		if reflect.ValueOf(t.rows).Len() == 0 {
			if err := removeStale(p); err != nil {
				return written, fmt.Errorf("write results: %w", err)
			}
			continue
		}
		if err := writeCSV(p, t.rows); err != nil {
			return written, fmt.Errorf("write results: %w", err)
		}
		written = append(written, p)
	}
	figs, err := Figures(res)
	if err != nil {
		return written, fmt.Errorf("write results: %w", err)
	}
	made := map[string]bool{}
	for _, f := range figs {
		made[f.File] = true
	}
	for _, prefix := range figurePrefixes {
		old, err := filepath.Glob(filepath.Join(dir, prefix+"*.png"))
		if err != nil {
			return written, fmt.Errorf("write results: %w", err)
		}
		for _, o := range old {
			if !made[filepath.Base(o)] {
				if err := removeStale(o); err != nil {
					return written, fmt.Errorf("write results: %w", err)
				}
			}
		}
	}
	for _, f := range figs {
		p := filepath.Join(dir, f.File)
		if err := f.SavePNG(p); err != nil {
			return written, fmt.Errorf("write results: %w", err)
		}
		written = append(written, p)
	}
	return written, nil
}

// removeStale removes a file an earlier run left, if any.
func removeStale(path string) error {
	if err := os.Remove(path); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return fmt.Errorf("remove stale %s: %w", path, err)
	}
	return nil
}

// writeCSV writes a slice of flat structs as CSV, one column per field,
// headed by the fields' JSON names.
func writeCSV(path string, rows any) error {
	v := reflect.ValueOf(rows)
	t := v.Type().Elem()
	header := make([]string, t.NumField())
	for i := range header {
		header[i] = jsonName(t.Field(i))
	}
	f, err := os.Create(path)
	if err != nil {
		return fmt.Errorf("csv: %w", err)
	}
	w := csv.NewWriter(f)
	if err := w.Write(header); err != nil {
		f.Close()
		return fmt.Errorf("csv %s: %w", path, err)
	}
	rec := make([]string, len(header))
	for r := 0; r < v.Len(); r++ {
		row := v.Index(r)
		for i := range rec {
			rec[i] = formatCell(row.Field(i))
		}
		if err := w.Write(rec); err != nil {
			f.Close()
			return fmt.Errorf("csv %s: %w", path, err)
		}
	}
	w.Flush()
	if err := w.Error(); err != nil {
		f.Close()
		return fmt.Errorf("csv %s: %w", path, err)
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("csv %s: %w", path, err)
	}
	return nil
}

func jsonName(f reflect.StructField) string {
	tag := f.Tag.Get("json")
	for i := 0; i < len(tag); i++ {
		if tag[i] == ',' {
			tag = tag[:i]
			break
		}
	}
	if tag == "" {
		return f.Name
	}
	return tag
}

func formatCell(v reflect.Value) string {
	switch v.Kind() {
	case reflect.Float64:
		x := v.Float()
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return ""
		}
		return strconv.FormatFloat(x, 'g', csvDigits, 64)
	case reflect.Int, reflect.Int64:
		return strconv.FormatInt(v.Int(), 10)
	case reflect.String:
		return v.String()
	}
	return fmt.Sprint(v.Interface())
}
