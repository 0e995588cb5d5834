package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"sort"
	"strings"

	"github.com/ejecta-dev/ejecta/bench"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
)

// auditManifest is the audit's input: a JSON file naming NumPy .npy arrays
// (paths relative to the manifest's folder) that hold one feedback step of
// a host code, in the host's code units. Vectors are (n, 3) arrays, the
// rest (n,); float32 or float64, IDs int32, int64 or integral floats.
//
//	{
//	  "box": [L, L, L],                      optional periodic box, 0 = open
//	  "gas_before": {
//	    "position": "before/pos.npy",        (n, 3)
//	    "velocity": "before/vel.npy",        (n, 3)
//	    "mass": "before/mass.npy",           (n,)
//	    "internal_energy": "before/u.npy",   (n,) specific internal energy
//	    "id": "before/id.npy",               (n,) unique IDs
//	    "mass_fractions": {"Z": "before/z.npy", "Fe": "before/fe.npy"}
//	  },
//	  "gas_after": { ...the same keys... },
//	  "stars": {
//	    "id": "stars/id.npy",                (s,)
//	    "position": "stars/pos.npy",         (s, 3)
//	    "velocity": "stars/vel.npy",         (s, 3)
//	    "radius": "stars/radius.npy",        (s,) coupling radius
//	    "ejecta_mass": "stars/mass.npy",     (s,) mass released
//	    "energy": "stars/energy.npy",        (s,) energy released (star frame)
//	    "radiated": "stars/radiated.npy",    (s,) energy booked radiated, optional
//	    "ejecta_species": {"Z": "stars/z.npy", "Fe": "stars/fe.npy"}
//	  }
//	}
//
// Species keys are the symbols of package yields ("Z" for all metals, "H",
// "He", "C", "N", "O", "Ne", "Mg", "Si", "S", "Ca", "Fe").
type auditManifest struct {
	Box       [3]float64      `json:"box"`
	GasBefore auditGasFiles   `json:"gas_before"`
	GasAfter  auditGasFiles   `json:"gas_after"`
	Stars     auditStarsFiles `json:"stars"`
}

type auditGasFiles struct {
	Position       string            `json:"position"`
	Velocity       string            `json:"velocity"`
	Mass           string            `json:"mass"`
	InternalEnergy string            `json:"internal_energy"`
	ID             string            `json:"id"`
	MassFractions  map[string]string `json:"mass_fractions"`
}

type auditStarsFiles struct {
	ID            string            `json:"id"`
	Position      string            `json:"position"`
	Velocity      string            `json:"velocity"`
	Radius        string            `json:"radius"`
	EjectaMass    string            `json:"ejecta_mass"`
	Energy        string            `json:"energy"`
	Radiated      string            `json:"radiated"`
	EjectaSpecies map[string]string `json:"ejecta_species"`
}

var auditCommand = subcommand{
	name:     "audit",
	synopsis: "-manifest FILE [flags]",
	description: "Checks one feedback step of any code, ejecta's or your own, from its before/after dump: " +
		"the gas columns before and after and each star's release, as NumPy .npy arrays named by a JSON manifest " +
		"(format in \"go doc ./bench/cmd/ejecta\"). It checks that mass, every species, momentum and energy " +
		"balance, that each star's momentum nets to zero in its own frame, and that no element gained " +
		"out of range or went negative; the exit status is 1 when a check fails.",
}

func runAudit(args []string, stdout, stderr io.Writer) int {
	fs := auditCommand.newFlagSet()
	manifest := fs.String("manifest", "", "JSON manifest naming the .npy arrays of the step (required)")
	tol := fs.Float64("tol", audit.DefaultTolerance, "largest relative imbalance accepted for each conserved quantity (finite, non-negative)")
	isoTol := fs.Float64("isotropy-tol", audit.DefaultIsotropyTolerance, "largest net star-frame momentum accepted, as a fraction of the momentum handed out (finite, non-negative)")
	asJSON := fs.Bool("json", false, "print the report as JSON")
	if code, ok := auditCommand.parseFlags(fs, args, stdout, stderr); !ok {
		return code
	}
	if *manifest == "" {
		fmt.Fprintln(stderr, "ejecta audit: -manifest is required; run \"ejecta audit -h\" for the flags")
		return 2
	}
	opts := audit.Options{Tolerance: *tol, IsotropyTolerance: *isoTol}
	if err := opts.Validate(); err != nil {
		fmt.Fprintf(stderr, "ejecta audit: %v (-tol and -isotropy-tol)\n", err)
		return 2
	}
	before, after, stars, box, err := loadAudit(*manifest)
	if err != nil {
		fmt.Fprintf(stderr, "ejecta audit: %v\n", err)
		return 2
	}
	opts.Box = box
	rep, err := audit.Step(before, after, stars, opts)
	if err != nil {
		fmt.Fprintf(stderr, "ejecta audit: %v\n", err)
		return 2
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		doc := auditJSON{GasElements: before.Len(), Stars: len(stars), Passed: !rep.Failed(), Report: rep}
		if err := enc.Encode(doc); err != nil {
			fmt.Fprintf(stderr, "ejecta audit: %v\n", err)
			return 2
		}
	} else {
		printAudit(stdout, rep, before.Len(), len(stars))
	}
	if rep.Failed() {
		return 1
	}
	return 0
}

// auditJSON is the -json output: the counts, the verdict and the report,
// in snake_case keys like the rest of the command, lists never null.
type auditJSON struct {
	GasElements int  `json:"gas_elements"`
	Stars       int  `json:"stars"`
	Passed      bool `json:"passed"`
	*audit.Report
}

func printAudit(w io.Writer, rep *audit.Report, nGas, nStars int) {
	fmt.Fprintf(w, "audit of %d gas elements and %d stars\n\n", nGas, nStars)
	fmt.Fprintf(w, "%-12s %15s %15s %13s %11s  %s\n", "quantity", "gas gained", "released", "imbalance", "relative", "")
	for _, im := range rep.Imbalances {
		mark := "ok"
		if im.Failed {
			mark = "FAIL"
		}
		fmt.Fprintf(w, "%-12s %15.6g %15.6g %13.4g %11.3g  %s\n", im.Quantity, im.Gained, im.Expected, im.Absolute, im.Relative, mark)
	}
	worst := 0.0
	for _, iso := range rep.Isotropy {
		worst = max(worst, iso.Relative)
	}
	fmt.Fprintf(w, "\nstar-frame net momentum: worst %.3g of what was handed out, over %d stars or groups sharing gas\n", worst, len(rep.Isotropy))
	fmt.Fprintf(w, "elements with non-positive mass: %d, negative internal energy: %d, changed with no star in range: %d\n",
		len(rep.NegativeMass), len(rep.NegativeEnergy), len(rep.Unexplained))
	if rep.Failed() {
		fmt.Fprintln(w, "\nFAILED:")
		for _, p := range rep.Problems {
			fmt.Fprintln(w, "  "+p)
		}
		return
	}
	fmt.Fprintln(w, "\npassed")
}

// loadAudit reads the manifest and every array it names.
func loadAudit(path string) (before, after *audit.GasArrays, stars []audit.Star, box neighbor.Box, err error) {
	raw, err := os.ReadFile(path)
	if err != nil {
		return nil, nil, nil, box, fmt.Errorf("manifest: %w", err)
	}
	var m auditManifest
	if err := decodeManifest(raw, &m); err != nil {
		return nil, nil, nil, box, fmt.Errorf("manifest %s: %w", path, err)
	}
	dir := filepath.Dir(path)
	box = neighbor.Box{Size: m.Box}
	if err := box.Validate(); err != nil {
		return nil, nil, nil, box, fmt.Errorf("manifest %s: %w", path, err)
	}
	if before, err = loadAuditGas(dir, "gas_before", m.GasBefore); err != nil {
		return nil, nil, nil, box, err
	}
	if after, err = loadAuditGas(dir, "gas_after", m.GasAfter); err != nil {
		return nil, nil, nil, box, err
	}
	if !sameKeys(m.GasBefore.MassFractions, m.GasAfter.MassFractions) {
		return nil, nil, nil, box, fmt.Errorf("manifest %s: gas_before and gas_after must list the same mass fractions", path)
	}
	stars, err = loadAuditStars(dir, m.Stars)
	return before, after, stars, box, err
}

func loadAuditGas(dir, key string, f auditGasFiles) (*audit.GasArrays, error) {
	r := arrayReader{dir: dir}
	g := &audit.GasArrays{}
	pos, n, err := r.read(key+".position", f.Position, 3, nil)
	if err != nil {
		return nil, err
	}
	vel, _, err := r.read(key+".velocity", f.Velocity, 3, &n)
	if err != nil {
		return nil, err
	}
	for k := 0; k < 3; k++ {
		g.Pos[k], g.Vel[k] = make([]float64, n.n), make([]float64, n.n)
		for i := 0; i < n.n; i++ {
			g.Pos[k][i], g.Vel[k][i] = pos[3*i+k], vel[3*i+k]
		}
	}
	if g.Mass, _, err = r.read(key+".mass", f.Mass, 1, &n); err != nil {
		return nil, err
	}
	if g.Energy, _, err = r.read(key+".internal_energy", f.InternalEnergy, 1, &n); err != nil {
		return nil, err
	}
	ids, _, err := r.read(key+".id", f.ID, 1, &n)
	if err != nil {
		return nil, err
	}
	if g.ID, err = integers(key+".id", f.ID, ids); err != nil {
		return nil, err
	}
	species, err := sortedSpecies(key+".mass_fractions", f.MassFractions)
	if err != nil {
		return nil, err
	}
	for _, sp := range species {
		col, _, err := r.read(key+".mass_fractions."+sp.Symbol(), f.MassFractions[sp.Symbol()], 1, &n)
		if err != nil {
			return nil, err
		}
		g.Species = append(g.Species, sp)
		g.Fractions = append(g.Fractions, col)
	}
	return g, nil
}

func loadAuditStars(dir string, f auditStarsFiles) ([]audit.Star, error) {
	r := arrayReader{dir: dir}
	ids, n, err := r.read("stars.id", f.ID, 1, nil)
	if err != nil {
		return nil, err
	}
	starIDs, err := integers("stars.id", f.ID, ids)
	if err != nil {
		return nil, err
	}
	pos, _, err := r.read("stars.position", f.Position, 3, &n)
	if err != nil {
		return nil, err
	}
	vel, _, err := r.read("stars.velocity", f.Velocity, 3, &n)
	if err != nil {
		return nil, err
	}
	radius, _, err := r.read("stars.radius", f.Radius, 1, &n)
	if err != nil {
		return nil, err
	}
	mass, _, err := r.read("stars.ejecta_mass", f.EjectaMass, 1, &n)
	if err != nil {
		return nil, err
	}
	energy, _, err := r.read("stars.energy", f.Energy, 1, &n)
	if err != nil {
		return nil, err
	}
	radiated := make([]float64, n.n)
	if f.Radiated != "" {
		if radiated, _, err = r.read("stars.radiated", f.Radiated, 1, &n); err != nil {
			return nil, err
		}
	}
	species, err := sortedSpecies("stars.ejecta_species", f.EjectaSpecies)
	if err != nil {
		return nil, err
	}
	stars := make([]audit.Star, n.n)
	for i := range stars {
		s := &stars[i]
		s.ID = starIDs[i]
		for k := 0; k < 3; k++ {
			s.Pos[k], s.Vel[k] = pos[3*i+k], vel[3*i+k]
		}
		s.Radius, s.Mass, s.Energy, s.Radiated = radius[i], mass[i], energy[i], radiated[i]
	}
	for _, sp := range species {
		col, _, err := r.read("stars.ejecta_species."+sp.Symbol(), f.EjectaSpecies[sp.Symbol()], 1, &n)
		if err != nil {
			return nil, err
		}
		for i := range stars {
			stars[i].Species[sp] = col[i]
		}
	}
	return stars, nil
}

// integers converts an ID column read as floats, refusing non-integers.
func integers(key, file string, v []float64) ([]int64, error) {
	out := make([]int64, len(v))
	for i, x := range v {
		if x != math.Trunc(x) || math.Abs(x) > 1<<53 {
			return nil, fmt.Errorf("%s (%s): element %d holds %g, not an integer ID", key, file, i, x)
		}
		out[i] = int64(x)
	}
	return out, nil
}

// sortedSpecies parses species symbols, in species order.
func sortedSpecies(key string, m map[string]string) ([]yields.Species, error) {
	var out []yields.Species
	for sym := range m {
		found := false
		for sp := yields.Species(0); sp < yields.NumSpecies; sp++ {
			if sp.Symbol() == sym {
				out = append(out, sp)
				found = true
			}
		}
		if !found {
			return nil, fmt.Errorf("%s: unknown species %q", key, sym)
		}
	}
	sort.Slice(out, func(i, j int) bool { return out[i] < out[j] })
	return out, nil
}

// arrayReader reads the arrays a manifest names, paths relative to the
// manifest's folder.
type arrayReader struct{ dir string }

// rowCount is the row count of an array already read, which the other
// arrays of its block must match, with where it was read from.
type rowCount struct {
	n         int
	key, file string
}

// read reads the array the manifest names under key, checking its shape:
// (n,) for ncol 1, (n, ncol) otherwise, with as many rows as like (unless
// like is nil).
func (r arrayReader) read(key, name string, ncol int, like *rowCount) ([]float64, rowCount, error) {
	if name == "" {
		return nil, rowCount{}, fmt.Errorf("manifest: %s names no file", key)
	}
	path := name
	if !filepath.IsAbs(path) {
		path = filepath.Join(r.dir, name)
	}
	data, n, err := bench.ReadArray(path, ncol)
	if err != nil {
		return nil, rowCount{}, fmt.Errorf("%s: %w", key, err)
	}
	if like != nil && n != like.n {
		return nil, rowCount{}, fmt.Errorf("%s (%s) has %d rows, but %s (%s) has %d", key, name, n, like.key, like.file, like.n)
	}
	return data, rowCount{n: n, key: key, file: name}, nil
}

// sameKeys reports whether two maps have the same keys.
func sameKeys(a, b map[string]string) bool {
	if len(a) != len(b) {
		return false
	}
	for k := range a {
		if _, ok := b[k]; !ok {
			return false
		}
	}
	return true
}

// decodeManifest reads the manifest's JSON, reporting mistakes in the
// manifest's own terms: the key and what it should hold, the line and
// column of a syntax error, unknown keys.
func decodeManifest(raw []byte, m *auditManifest) error {
	dec := json.NewDecoder(bytes.NewReader(raw))
	dec.DisallowUnknownFields()
	err := dec.Decode(m)
	if err == nil && dec.More() {
		return errors.New("text after the closing brace of the manifest")
	}
	var syntax *json.SyntaxError
	var typ *json.UnmarshalTypeError
	switch {
	case err == nil:
		return nil
	case errors.As(err, &syntax):
		line, col := position(raw, syntax.Offset)
		return fmt.Errorf("line %d, column %d: %s", line, col, strings.TrimPrefix(syntax.Error(), "json: "))
	case errors.Is(err, io.EOF), errors.Is(err, io.ErrUnexpectedEOF):
		return errors.New("the JSON ends before the manifest's closing brace")
	case errors.As(err, &typ):
		line, col := position(raw, typ.Offset)
		return fmt.Errorf("line %d, column %d: %s holds a JSON %s, want %s", line, col, typ.Field, typ.Value, manifestKind(typ.Type.Kind()))
	}
	if msg, ok := strings.CutPrefix(err.Error(), "json: unknown field "); ok {
		return fmt.Errorf("unknown key %s (known: box, gas_before, gas_after, stars and the keys listed in the manifest format)", msg)
	}
	return errors.New(strings.TrimPrefix(err.Error(), "json: "))
}

// manifestKind says in JSON terms what a manifest value of kind k is.
func manifestKind(k reflect.Kind) string {
	switch k {
	case reflect.String:
		return "a string (a file name)"
	case reflect.Map:
		return "an object of species symbol to file name"
	case reflect.Array:
		return "an array of three numbers"
	case reflect.Float64:
		return "a number"
	case reflect.Struct:
		return "an object"
	}
	return "another kind of value"
}

// position turns a byte offset into a 1-based line and column.
func position(raw []byte, offset int64) (line, col int) {
	offset = min(max(offset, 0), int64(len(raw)))
	before := raw[:offset]
	line = 1 + bytes.Count(before, []byte("\n"))
	col = int(offset) - (bytes.LastIndexByte(before, '\n') + 1) + 1
	return line, col
}
