package audit

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"maps"
	"os"
	"path"
	"path/filepath"
	"reflect"
	"slices"
	"strings"

	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
)

// Manifest is the JSON file that makes a set of NumPy .npy arrays a dump
// of one feedback step: it names the arrays (paths relative to the
// manifest's folder) holding the gas before and after the step and each
// star's release, in the host's code units. Vectors are (n, 3) arrays, the
// rest (n,); float32 or float64, IDs int32, int64 or integral floats.
//
//	{
//	  "box": [L, L, L],                      optional periodic box, 0 = open
//	  "species_set": ["H", "He", "Fe"],      optional: the elements tracked
//	  "gas_before": {
//	    "position": "gas_before/position.npy",         (n, 3)
//	    "velocity": "gas_before/velocity.npy",         (n, 3)
//	    "mass": "gas_before/mass.npy",                 (n,)
//	    "internal_energy": "gas_before/internal_energy.npy",  (n,) specific
//	    "id": "gas_before/id.npy",                     (n,) unique IDs
//	    "mass_fractions": {"Z": "gas_before/mass_fraction_Z.npy", "Fe": ...}
//	  },
//	  "gas_after": { ...the same keys... },
//	  "stars": {
//	    "id": "stars/id.npy",                          (s,)
//	    "position": "stars/position.npy",              (s, 3)
//	    "velocity": "stars/velocity.npy",              (s, 3)
//	    "radius": "stars/coupling_radius.npy",         (s,) coupling radius
//	    "ejecta_mass": "stars/ejecta_mass.npy",        (s,) mass released
//	    "energy": "stars/energy.npy",                  (s,) energy released (star frame)
//	    "radiated": "stars/radiated.npy",              (s,) energy booked radiated, optional
//	    "ejecta_species": {"Z": "stars/ejecta_Z.npy", "Fe": ...}
//	  }
//	}
//
// The keys of mass_fractions and ejecta_species are "Z" (all metals) and
// chemical symbols of the elements of species_set (the user's choice of
// tracked species, any elements, as yields.ParseSpeciesSet reads them;
// without species_set, the default set H, He, C, N, O, Ne, Mg, Si, S, Ca,
// Fe). The gas before and after must list the same species; a species the
// gas tracks and the stars do not list counts as released zero.
//
// The file names are the host's choice; WriteDump (and the C ABI's dump
// calls) use the ones above, with the manifest in ManifestFile.
type Manifest struct {
	Box        [3]float64 `json:"box"`
	SpeciesSet []string   `json:"species_set,omitempty"`
	GasBefore  GasFiles   `json:"gas_before"`
	GasAfter   GasFiles   `json:"gas_after"`
	Stars      StarFiles  `json:"stars"`
}

// GasFiles names the arrays of the gas at one instant (see Manifest).
type GasFiles struct {
	Position       string            `json:"position"`
	Velocity       string            `json:"velocity"`
	Mass           string            `json:"mass"`
	InternalEnergy string            `json:"internal_energy"`
	ID             string            `json:"id"`
	MassFractions  map[string]string `json:"mass_fractions"`
}

// StarFiles names the arrays of the stars' releases (see Manifest).
type StarFiles struct {
	ID            string            `json:"id"`
	Position      string            `json:"position"`
	Velocity      string            `json:"velocity"`
	Radius        string            `json:"radius"`
	EjectaMass    string            `json:"ejecta_mass"`
	Energy        string            `json:"energy"`
	Radiated      string            `json:"radiated,omitempty"`
	EjectaSpecies map[string]string `json:"ejecta_species"`
}

// ManifestFile is the name WriteDump and WriteManifest give the manifest
// in the dump's folder.
const ManifestFile = "manifest.json"

// Folders of a dump written by WriteDump, inside the dump's folder.
const (
	GasBeforeFolder = "gas_before"
	GasAfterFolder  = "gas_after"
	StarsFolder     = "stars"
)

// Dump is one feedback step as the audit reads it: the box, the species
// set the species slots of the gas and the stars are laid out by, the gas
// before and after, and the stars with their releases.
type Dump struct {
	Box     neighbor.Box
	Species yields.SpeciesSet
	Before  *GasArrays
	After   *GasArrays
	Stars   []Star
}

// Options are the default options with the dump's box and species set.
func (d *Dump) Options() Options {
	o := DefaultOptions()
	o.Box, o.Species = d.Box, d.Species
	return o
}

// ReadDump reads the manifest at path and every array it names. Errors are
// in the manifest's terms: the key and file, the line and column of a JSON
// mistake, which arrays disagree in length.
func ReadDump(manifest string) (*Dump, error) {
	raw, err := os.ReadFile(manifest)
	if err != nil {
		return nil, fmt.Errorf("manifest: %w", err)
	}
	var m Manifest
	if err := decodeManifest(raw, &m); err != nil {
		return nil, fmt.Errorf("manifest %s: %w", manifest, err)
	}
	d := &Dump{Box: neighbor.Box{Size: m.Box}}
	if err := d.Box.Validate(); err != nil {
		return nil, fmt.Errorf("manifest %s: %w", manifest, err)
	}
	if len(m.SpeciesSet) > 0 {
		set, err := yields.ParseSpeciesSet(strings.Join(m.SpeciesSet, ","))
		if err != nil {
			return nil, fmt.Errorf("manifest %s: species_set: %w", manifest, err)
		}
		d.Species = set
	}
	dir := filepath.Dir(manifest)
	if d.Before, err = readGas(dir, "gas_before", m.GasBefore, d.Species); err != nil {
		return nil, err
	}
	if d.After, err = readGas(dir, "gas_after", m.GasAfter, d.Species); err != nil {
		return nil, err
	}
	if !slices.Equal(d.Before.Species, d.After.Species) {
		return nil, fmt.Errorf("manifest %s: gas_before lists the mass fractions %s and gas_after %s: they must be the same",
			manifest, symbols(d.Before.Species, d.Species), symbols(d.After.Species, d.Species))
	}
	if d.Stars, err = readStars(dir, m.Stars, d.Species); err != nil {
		return nil, err
	}
	return d, nil
}

func readGas(dir, key string, f GasFiles, set yields.SpeciesSet) (*GasArrays, error) {
	r := arrayReader{dir: dir}
	g := &GasArrays{}
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
	if g.ID, err = r.ids(key+".id", f.ID, &n); err != nil {
		return nil, err
	}
	species, err := sortedSpecies(key+".mass_fractions", f.MassFractions, set)
	if err != nil {
		return nil, err
	}
	for _, sp := range species {
		col, _, err := r.read(key+".mass_fractions."+sp.key, f.MassFractions[sp.key], 1, &n)
		if err != nil {
			return nil, err
		}
		g.Species = append(g.Species, sp.slot)
		g.Fractions = append(g.Fractions, col)
	}
	return g, nil
}

func readStars(dir string, f StarFiles, set yields.SpeciesSet) ([]Star, error) {
	r := arrayReader{dir: dir}
	ids, err := r.ids("stars.id", f.ID, nil)
	if err != nil {
		return nil, err
	}
	n := rowCount{n: len(ids), key: "stars.id", file: f.ID}
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
	species, err := sortedSpecies("stars.ejecta_species", f.EjectaSpecies, set)
	if err != nil {
		return nil, err
	}
	stars := make([]Star, n.n)
	for i := range stars {
		s := &stars[i]
		s.ID = ids[i]
		for k := 0; k < 3; k++ {
			s.Pos[k], s.Vel[k] = pos[3*i+k], vel[3*i+k]
		}
		s.Radius, s.Mass, s.Energy, s.Radiated = radius[i], mass[i], energy[i], radiated[i]
	}
	for _, sp := range species {
		col, _, err := r.read("stars.ejecta_species."+sp.key, f.EjectaSpecies[sp.key], 1, &n)
		if err != nil {
			return nil, err
		}
		for i := range stars {
			stars[i].Species[sp.slot] = col[i]
		}
	}
	return stars, nil
}

// keyedSpecies is a species key of the manifest and its slot in the set.
type keyedSpecies struct {
	key  string
	slot yields.Species
}

// sortedSpecies maps the species keys of a manifest block to slots of the
// set, in slot order: "Z" is the total metals, every other key the symbol
// of an element of the set (letter case ignored).
func sortedSpecies(block string, m map[string]string, set yields.SpeciesSet) ([]keyedSpecies, error) {
	var out []keyedSpecies
	for _, key := range slices.Sorted(maps.Keys(m)) { // the same message every time
		if strings.EqualFold(key, yields.Metals.Symbol()) {
			out = append(out, keyedSpecies{key, yields.Metals})
			continue
		}
		e, err := yields.ParseElement(key)
		if err != nil {
			return nil, fmt.Errorf("%s: key %q is neither %q (all metals) nor a chemical symbol", block, key, yields.Metals.Symbol())
		}
		slot, ok := set.Slot(e)
		if !ok {
			return nil, fmt.Errorf("%s: %s is not in the species set (%s): list it in the manifest's species_set", block, e.Symbol(), set)
		}
		out = append(out, keyedSpecies{key, slot})
	}
	slices.SortFunc(out, func(a, b keyedSpecies) int { return int(a.slot) - int(b.slot) })
	for i := 1; i < len(out); i++ {
		if out[i].slot == out[i-1].slot {
			return nil, fmt.Errorf("%s: keys %q and %q name the same species", block, out[i-1].key, out[i].key)
		}
	}
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

// path is where the file a manifest names lives.
func (r arrayReader) path(key, name string) (string, error) {
	if name == "" {
		return "", fmt.Errorf("manifest: %s names no file", key)
	}
	p := filepath.FromSlash(name)
	if !filepath.IsAbs(p) {
		p = filepath.Join(r.dir, p)
	}
	return p, nil
}

// read reads the array the manifest names under key, checking its shape:
// (n,) for ncol 1, (n, ncol) otherwise, with as many rows as like (unless
// like is nil).
func (r arrayReader) read(key, name string, ncol int, like *rowCount) ([]float64, rowCount, error) {
	p, err := r.path(key, name)
	if err != nil {
		return nil, rowCount{}, err
	}
	data, n, err := ReadArray(p, ncol)
	if err != nil {
		return nil, rowCount{}, fmt.Errorf("%s: %w", key, err)
	}
	if err := like.match(key, name, n); err != nil {
		return nil, rowCount{}, err
	}
	return data, rowCount{n: n, key: key, file: name}, nil
}

// ids reads the ID column the manifest names under key (see ReadIDs).
func (r arrayReader) ids(key, name string, like *rowCount) ([]int64, error) {
	p, err := r.path(key, name)
	if err != nil {
		return nil, err
	}
	ids, err := ReadIDs(p)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", key, err)
	}
	return ids, like.match(key, name, len(ids))
}

// match checks that an array of n rows read under key matches the row
// count c (none when c is nil).
func (c *rowCount) match(key, name string, n int) error {
	if c != nil && n != c.n {
		return fmt.Errorf("%s (%s) has %d rows, but %s (%s) has %d", key, name, n, c.key, c.file, c.n)
	}
	return nil
}

// decodeManifest reads the manifest's JSON, reporting mistakes in the
// manifest's own terms: the key and what it should hold, the line and
// column of a syntax error, unknown keys.
func decodeManifest(raw []byte, m *Manifest) error {
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
		want := manifestKind(typ.Type.Kind())
		if strings.HasPrefix(typ.Field, "species_set") {
			want = "an array of element symbols (strings)"
		}
		return fmt.Errorf("line %d, column %d: %s holds a JSON %s, want %s", line, col, typ.Field, typ.Value, want)
	}
	if msg, ok := strings.CutPrefix(err.Error(), "json: unknown field "); ok {
		return fmt.Errorf("unknown key %s (known: box, species_set, gas_before, gas_after, stars and the keys listed in the manifest format)", msg)
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
	case reflect.Slice:
		return "an array of element symbols"
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

// WriteDump writes d into the folder dir (created if missing) in the
// layout of Manifest: the gas before and after in GasBeforeFolder and
// GasAfterFolder, the stars in StarsFolder, and the manifest, written last,
// in ManifestFile. ReadDump(filepath.Join(dir, ManifestFile)) reads it
// back.
func WriteDump(dir string, d *Dump) error {
	if d == nil || d.Before == nil || d.After == nil {
		return errors.New("write dump: the gas before and after are both needed")
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("write dump: %w", err)
	}
	before, err := WriteGas(dir, GasBeforeFolder, d.Before, d.Species)
	if err != nil {
		return err
	}
	after, err := WriteGas(dir, GasAfterFolder, d.After, d.Species)
	if err != nil {
		return err
	}
	stars, err := WriteStars(dir, StarsFolder, d.Stars, d.Before.Species, d.Species)
	if err != nil {
		return err
	}
	return WriteManifest(dir, NewManifest(d.Box, d.Species, before, after, stars))
}

// NewManifest assembles a manifest from the files WriteGas and WriteStars
// wrote, with the box and the species set.
func NewManifest(box neighbor.Box, set yields.SpeciesSet, before, after GasFiles, stars StarFiles) *Manifest {
	return &Manifest{Box: box.Size, SpeciesSet: set.Symbols()[1:], GasBefore: before, GasAfter: after, Stars: stars}
}

// WriteGas writes the columns of g as .npy files into the folder sub of
// dir (created if missing), named as in Manifest, and returns their names
// relative to dir. Species slots are named by the set.
func WriteGas(dir, sub string, g *GasArrays, set yields.SpeciesSet) (GasFiles, error) {
	if err := g.check(sub); err != nil {
		return GasFiles{}, fmt.Errorf("write dump: %w", err)
	}
	if err := checkSlots(sub, g.Species, set); err != nil {
		return GasFiles{}, fmt.Errorf("write dump: %w", err)
	}
	w, err := newFolderWriter(dir, sub)
	if err != nil {
		return GasFiles{}, err
	}
	n := g.Len()
	f := GasFiles{MassFractions: map[string]string{}}
	f.Position = w.floats("position.npy", interleave(g.Pos, n), 3)
	f.Velocity = w.floats("velocity.npy", interleave(g.Vel, n), 3)
	f.Mass = w.floats("mass.npy", g.Mass, 1)
	f.InternalEnergy = w.floats("internal_energy.npy", g.Energy, 1)
	f.ID = w.ids("id.npy", g.ID)
	for c, sp := range g.Species {
		sym := set.Symbol(sp)
		f.MassFractions[sym] = w.floats("mass_fraction_"+sym+".npy", g.Fractions[c], 1)
	}
	return f, w.err
}

// WriteStars writes the stars' releases as .npy files into the folder sub
// of dir (created if missing), named as in Manifest, with one ejecta
// column per species slot listed, and returns their names relative to
// dir.
func WriteStars(dir, sub string, stars []Star, species []yields.Species, set yields.SpeciesSet) (StarFiles, error) {
	if err := checkSlots(sub, species, set); err != nil {
		return StarFiles{}, fmt.Errorf("write dump: %w", err)
	}
	w, err := newFolderWriter(dir, sub)
	if err != nil {
		return StarFiles{}, err
	}
	n := len(stars)
	ids := make([]int64, n)
	var pos, vel [3][]float64
	for k := range pos {
		pos[k], vel[k] = make([]float64, n), make([]float64, n)
	}
	radius, mass, energy, radiated := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	for i, s := range stars {
		ids[i] = s.ID
		for k := 0; k < 3; k++ {
			pos[k][i], vel[k][i] = s.Pos[k], s.Vel[k]
		}
		radius[i], mass[i], energy[i], radiated[i] = s.Radius, s.Mass, s.Energy, s.Radiated
	}
	f := StarFiles{EjectaSpecies: map[string]string{}}
	f.ID = w.ids("id.npy", ids)
	f.Position = w.floats("position.npy", interleave(pos, n), 3)
	f.Velocity = w.floats("velocity.npy", interleave(vel, n), 3)
	f.Radius = w.floats("coupling_radius.npy", radius, 1)
	f.EjectaMass = w.floats("ejecta_mass.npy", mass, 1)
	f.Energy = w.floats("energy.npy", energy, 1)
	f.Radiated = w.floats("radiated.npy", radiated, 1)
	col := make([]float64, n)
	for _, sp := range species {
		for i := range stars {
			col[i] = stars[i].Species[sp]
		}
		sym := set.Symbol(sp)
		f.EjectaSpecies[sym] = w.floats("ejecta_"+sym+".npy", col, 1)
	}
	return f, w.err
}

// WriteManifest writes m as indented JSON to ManifestFile in dir, through
// a temporary file renamed into place, so a reader never sees half a
// manifest.
func WriteManifest(dir string, m *Manifest) error {
	raw, err := json.MarshalIndent(m, "", "  ")
	if err != nil {
		return fmt.Errorf("write dump manifest: %w", err)
	}
	final := filepath.Join(dir, ManifestFile)
	tmp := final + ".partial"
	if err := os.WriteFile(tmp, append(raw, '\n'), 0o644); err != nil {
		return fmt.Errorf("write dump manifest: %w", err)
	}
	if err := os.Rename(tmp, final); err != nil {
		os.Remove(tmp)
		return fmt.Errorf("write dump manifest: %w", err)
	}
	return nil
}

// checkSlots refuses species slots the set does not use.
func checkSlots(what string, species []yields.Species, set yields.SpeciesSet) error {
	for _, sp := range species {
		if sp < 0 || int(sp) >= set.Slots() {
			return fmt.Errorf("%s: species slot %d is not in the species set %s (slots 0..%d)", what, sp, set, set.Slots()-1)
		}
	}
	return nil
}

// folderWriter writes the arrays of one folder of a dump, keeping the
// first error.
type folderWriter struct {
	dir, sub string
	err      error
}

func newFolderWriter(dir, sub string) (*folderWriter, error) {
	if err := os.MkdirAll(filepath.Join(dir, filepath.FromSlash(sub)), 0o755); err != nil {
		return nil, fmt.Errorf("write dump: %w", err)
	}
	return &folderWriter{dir: dir, sub: sub}, nil
}

// floats writes data (ncol columns) as name and returns its path relative
// to the dump's folder.
func (w *folderWriter) floats(name string, data []float64, ncol int) string {
	rel := path.Join(w.sub, name)
	if w.err == nil {
		w.err = WriteArray(filepath.Join(w.dir, filepath.FromSlash(rel)), data, ncol)
	}
	return rel
}

// ids writes IDs as name and returns its path relative to the dump's
// folder.
func (w *folderWriter) ids(name string, ids []int64) string {
	rel := path.Join(w.sub, name)
	if w.err == nil {
		w.err = WriteIDs(filepath.Join(w.dir, filepath.FromSlash(rel)), ids)
	}
	return rel
}

// interleave packs three columns into row-major (n, 3).
func interleave(cols [3][]float64, n int) []float64 {
	out := make([]float64, 0, 3*n)
	for i := 0; i < n; i++ {
		out = append(out, cols[0][i], cols[1][i], cols[2][i])
	}
	return out
}
