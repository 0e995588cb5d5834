package main

import (
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"unsafe"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
)

// The dump session: a host that injects feedback with its own code writes
// its step for the audit (package feedback/audit, "ejecta audit") through
// the same column descriptors it binds gas with. The calls only read the
// host's memory and write files; nothing is coupled. Every snapshot is
// written when it is taken, so the host may change its gas right after the
// call; the manifest is written last, by ejecta_dump_finish.

// starColumnsABI mirrors ejecta_star_columns.
type starColumnsABI struct {
	Count          int64
	ID             fieldABI
	Position       [3]fieldABI
	Velocity       [3]fieldABI
	CouplingRadius fieldABI
	EjectaMass     fieldABI
	Energy         fieldABI
	Radiated       fieldABI
	NSpecies       int32
	Reserved       int32
	Species        *int32
	SpeciesMass    *fieldABI
}

// dumpPhase is how far a dump session got (ejecta_dump_close releases
// the handle in either phase: handleState.released).
type dumpPhase uint8

const (
	// dumpOpen: the session is open; snapshots and stars may be written.
	dumpOpen dumpPhase = iota
	// dumpFinished: the manifest was written; only close remains.
	dumpFinished
)

// dumpSession is the state behind one ejecta_dump handle.
type dumpSession struct {
	handleState
	phase dumpPhase

	dir string
	set yields.SpeciesSet
	box neighbor.Box

	// The gas snapshots written so far: their files, and what the second
	// must agree with (count, species, the sorted IDs of the first).
	before, after *audit.GasFiles
	count         int
	species       []yields.Species
	sortedIDs     []int64

	// stars holds every star given so far; starSpecies the union of the
	// species their releases listed, in slot order; starsGiven whether
	// ejecta_dump_stars was called.
	stars       []audit.Star
	starSpecies []yields.Species
	starsGiven  bool
}

// dumpPathField names the directory argument in messages.
const dumpPathField = "dump directory"

// entryDumpOpen is behind ejecta_dump_open.
func entryDumpOpen(dir, species *byte, box *[3]float64, out *uint64, errText *byte, capacity int64) int32 {
	return dumps().open("ejecta_dump_open", out, errText, capacity, func() (*dumpSession, error) {
		if dir == nil {
			return nil, fail(codeNullPointer, "%s is NULL", dumpPathField)
		}
		path, err := cPath(dumpPathField, dir)
		if err != nil {
			return nil, err
		}
		if path == "" {
			return nil, fail(codeInvalidArgument, "%s is empty", dumpPathField)
		}
		list, err := cList(species)
		if err != nil {
			return nil, err
		}
		s := &dumpSession{dir: path}
		if list != "" {
			if s.set, err = yields.ParseSpeciesSet(list); err != nil {
				return nil, fail(codeInvalidArgument, "species: %w", err)
			}
		}
		if box != nil {
			s.box = neighbor.Box{Size: *box}
			if err := s.box.Validate(); err != nil {
				return nil, fail(codeInvalidArgument, "box_size: %w", err)
			}
		}
		if err := s.prepareFolder(); err != nil {
			return nil, err
		}
		return s, nil
	})
}

// prepareFolder creates the dump's folders and removes the manifest of an
// earlier dump there, so the folder is not taken for a finished dump
// before this one is.
func (s *dumpSession) prepareFolder() error {
	for _, sub := range []string{audit.GasBeforeFolder, audit.GasAfterFolder, audit.StarsFolder} {
		if err := os.MkdirAll(filepath.Join(s.dir, sub), 0o755); err != nil {
			return fail(codeDumpFile, "creating the dump folders: %w", err)
		}
	}
	if err := os.Remove(filepath.Join(s.dir, audit.ManifestFile)); err != nil && !errors.Is(err, fs.ErrNotExist) {
		return fail(codeDumpFile, "removing the manifest of an earlier dump: %w", err)
	}
	return nil
}

// dumps is the table of dump session handles.
func dumps() handleTable[*dumpSession] {
	return handleTable[*dumpSession]{words: handleWords{
		zero:        "dump handle 0 is not a dump session (never opened, or closed)",
		dead:        "dump handle %#x is not a live dump session (closed or never opened)",
		foreign:     "handle %#x is not a dump session",
		busy:        "dump session %#x is in use by another call",
		released:    "dump session %#x was closed",
		nullPointer: "dump handle pointer is NULL",
	}}
}

// withDump runs fn on the open dump session of h, one call at a time,
// recording the outcome as the session's last error.
func withDump(h uint64, fn func(s *dumpSession) error) int32 {
	return dumps().with(h, func(s *dumpSession) error {
		if s.phase != dumpOpen {
			return fail(codeInvalidArgument, "the dump was already finished: open a new dump session for another step")
		}
		return fn(s)
	})
}

// dumpColumn turns a field descriptor into a column of n elements for
// reading, with the checks ejecta_bind_gas makes: data not NULL (unless
// the column is optional), a known element type, a stride at least the
// element and a multiple of it, aligned data.
func dumpColumn(name string, f *fieldABI, n int, required bool) (feedback.Column, error) {
	if f.Data == nil {
		if required {
			return feedback.Column{}, fail(codeNullPointer, "%s: data is NULL", name)
		}
		return feedback.Column{}, nil
	}
	t, ok := elemType(f.Type)
	if !ok {
		return feedback.Column{}, fail(codeInvalidArgument, "%s: unknown element type %d", name, f.Type)
	}
	size := int64(t.Size())
	if f.Stride < size || f.Stride%size != 0 {
		return feedback.Column{}, fail(codeInvalidArgument, "%s: stride %d bytes is not a multiple of its %v elements (%d bytes)", name, f.Stride, t, size)
	}
	if f.Stride > math.MaxInt64/int64(n) {
		return feedback.Column{}, fail(codeInvalidArgument, "%s: stride %d bytes times %d elements overflows", name, f.Stride, n)
	}
	if uintptr(f.Data)%uintptr(size) != 0 {
		return feedback.Column{}, fail(codeInvalidArgument, "%s: data %#x is misaligned for %v elements", name, uintptr(f.Data), t)
	}
	return feedback.Strided(f.Data, n, uintptr(f.Stride), t), nil
}

// speciesCodes reads the species list of a descriptor: n codes of the
// session's set, none twice, with their columns.
func (s *dumpSession) speciesCodes(what string, n int32, codes *int32, fields *fieldABI, count int) ([]yields.Species, []feedback.Column, error) {
	if n < 0 || int(n) > numSpecies {
		return nil, nil, fail(codeInvalidArgument, "%s n_species %d outside 0..%d", what, n, numSpecies)
	}
	if n == 0 {
		return nil, nil, nil
	}
	if codes == nil || fields == nil {
		return nil, nil, fail(codeNullPointer, "%s species or its columns NULL with n_species %d", what, n)
	}
	cs := unsafe.Slice(codes, n)
	fs := unsafe.Slice(fields, n)
	species := make([]yields.Species, 0, n)
	cols := make([]feedback.Column, 0, n)
	for k := range cs {
		sp := yields.Species(cs[k])
		if sp < 0 || int(sp) >= s.set.Slots() {
			return nil, nil, fail(codeInvalidArgument, "%s species[%d] = %d is not a species code of the dump's set %s (0..%d)",
				what, k, cs[k], s.set, s.set.Slots()-1)
		}
		if slices.Contains(species, sp) {
			return nil, nil, fail(codeInvalidArgument, "%s species code %d (%s) listed twice", what, sp, s.set.Symbol(sp))
		}
		c, err := dumpColumn(fmt.Sprintf("%s species column %d (%s)", what, k, s.set.Symbol(sp)), &fs[k], count, true)
		if err != nil {
			return nil, nil, err
		}
		species = append(species, sp)
		cols = append(cols, c)
	}
	return species, cols, nil
}

// readFinite copies a column, refusing values that are not finite (the
// audit's reader refuses them too) and, when nonNegative, negative ones.
// noun and ids name the entries in messages ("element 3 (ID 17)").
func readFinite(name string, c feedback.Column, nonNegative bool, noun string, ids []int64) ([]float64, error) {
	out := make([]float64, c.Len())
	for i := range out {
		v := c.At(i)
		if math.IsNaN(v) || math.IsInf(v, 0) || (nonNegative && v < 0) {
			want := "finite"
			if nonNegative {
				want = "finite and >= 0"
			}
			return nil, fail(codeBadValue, "%s of %s %d (ID %d) is %g: must be %s", name, noun, i, ids[i], v, want)
		}
		out[i] = v
	}
	return out, nil
}

// readIDs copies an ID column: integer columns as they are, float columns
// when every value is an integer.
func readIDs(name string, c feedback.Column) ([]int64, error) {
	out := make([]int64, c.Len())
	for i := range out {
		if t := c.Type(); t == feedback.Float64 || t == feedback.Float32 {
			v := c.At(i)
			if v != math.Trunc(v) || math.Abs(v) > 1<<53 {
				return nil, fail(codeBadValue, "%s of element %d is %g: not an integer ID", name, i, v)
			}
		}
		out[i] = c.Int(i)
	}
	return out, nil
}

// snapshot reads the gas the descriptor points at into plain arrays:
// positions, velocities, masses, specific internal energies, IDs and
// species fractions (density and smoothing length are not part of a dump
// and not read).
func (s *dumpSession) snapshot(what string, g *gasABI) (*audit.GasArrays, error) {
	if g == nil {
		return nil, fail(codeNullPointer, "%s: gas descriptor is NULL", what)
	}
	if g.Count <= 0 || g.Count > math.MaxInt32*64 {
		return nil, fail(codeInvalidArgument, "%s: gas count %d must be positive", what, g.Count)
	}
	n := int(g.Count)
	idCol, err := dumpColumn(what+" id", &g.ID, n, true)
	if err != nil {
		return nil, err
	}
	var pos, vel [3]feedback.Column
	axes := [3]string{"x", "y", "z"}
	for a := 0; a < 3; a++ {
		if pos[a], err = dumpColumn(what+" position."+axes[a], &g.Position[a], n, true); err != nil {
			return nil, err
		}
		if vel[a], err = dumpColumn(what+" velocity."+axes[a], &g.Velocity[a], n, true); err != nil {
			return nil, err
		}
	}
	massCol, err := dumpColumn(what+" mass", &g.Mass, n, true)
	if err != nil {
		return nil, err
	}
	energyCol, err := dumpColumn(what+" internal_energy", &g.InternalEnergy, n, true)
	if err != nil {
		return nil, err
	}
	species, fracCols, err := s.speciesCodes(what, g.NSpecies, g.Species, g.SpeciesFraction, n)
	if err != nil {
		return nil, err
	}

	out := &audit.GasArrays{Species: species}
	if out.ID, err = readIDs(what+" id", idCol); err != nil {
		return nil, err
	}
	for a := 0; a < 3; a++ {
		if out.Pos[a], err = readFinite(what+" position."+axes[a], pos[a], false, "element", out.ID); err != nil {
			return nil, err
		}
		if out.Vel[a], err = readFinite(what+" velocity."+axes[a], vel[a], false, "element", out.ID); err != nil {
			return nil, err
		}
	}
	// Negative masses and energies are the audit's to report, not the
	// dump's to refuse.
	if out.Mass, err = readFinite(what+" mass", massCol, false, "element", out.ID); err != nil {
		return nil, err
	}
	if out.Energy, err = readFinite(what+" internal_energy", energyCol, false, "element", out.ID); err != nil {
		return nil, err
	}
	for k, c := range fracCols {
		col, err := readFinite(fmt.Sprintf("%s species fraction %s", what, s.set.Symbol(species[k])), c, false, "element", out.ID)
		if err != nil {
			return nil, err
		}
		out.Fractions = append(out.Fractions, col)
	}
	return out, nil
}

// sortedUnique returns the IDs sorted, refusing an ID held twice.
func sortedUnique(what string, ids []int64) ([]int64, error) {
	sorted := slices.Clone(ids)
	slices.Sort(sorted)
	for i := 1; i < len(sorted); i++ {
		if sorted[i] == sorted[i-1] {
			first := slices.Index(ids, sorted[i])
			second := first + 1 + slices.Index(ids[first+1:], sorted[i])
			return nil, fail(codeInvalidArgument, "%s: elements %d and %d share ID %d: gas IDs must be unique", what, first, second, sorted[i])
		}
	}
	return sorted, nil
}

// gasBefore is behind ejecta_dump_gas_before.
func (s *dumpSession) gasBefore(g *gasABI) error {
	if s.before != nil {
		return fail(codeInvalidArgument, "the gas before the step was already written")
	}
	arr, err := s.snapshot("gas before", g)
	if err != nil {
		return err
	}
	sorted, err := sortedUnique("gas before", arr.ID)
	if err != nil {
		return err
	}
	files, err := audit.WriteGas(s.dir, audit.GasBeforeFolder, arr, s.set)
	if err != nil {
		return fail(codeDumpFile, "%w", err)
	}
	s.before, s.count, s.species, s.sortedIDs = &files, arr.Len(), sortedSpecies(arr.Species), sorted
	return nil
}

// gasAfter is behind ejecta_dump_gas_after.
func (s *dumpSession) gasAfter(g *gasABI) error {
	if s.before == nil {
		return fail(codeInvalidArgument, "no gas before the step: call ejecta_dump_gas_before before the host's feedback, ejecta_dump_gas_after after it")
	}
	if s.after != nil {
		return fail(codeInvalidArgument, "the gas after the step was already written")
	}
	if g != nil && g.Count != int64(s.count) {
		return fail(codeInvalidArgument, "gas after: %d elements, but the gas before had %d: a feedback step neither adds nor removes elements", g.Count, s.count)
	}
	arr, err := s.snapshot("gas after", g)
	if err != nil {
		return err
	}
	if sp := sortedSpecies(arr.Species); !slices.Equal(sp, s.species) {
		return fail(codeInvalidArgument, "gas after: species %s, but the gas before had %s: list the same species",
			symbolList(sp, s.set), symbolList(s.species, s.set))
	}
	sorted, err := sortedUnique("gas after", arr.ID)
	if err != nil {
		return err
	}
	if !slices.Equal(sorted, s.sortedIDs) {
		return fail(codeInvalidArgument, "gas after: %s: the elements must be those of the gas before (in any order)", idChange(s.sortedIDs, sorted))
	}
	files, err := audit.WriteGas(s.dir, audit.GasAfterFolder, arr, s.set)
	if err != nil {
		return fail(codeDumpFile, "%w", err)
	}
	s.after, s.sortedIDs = &files, nil
	return nil
}

// addStars is behind ejecta_dump_stars: the stars are kept until
// ejecta_dump_finish writes them.
func (s *dumpSession) addStars(d *starColumnsABI) error {
	if d == nil {
		return fail(codeNullPointer, "stars descriptor is NULL")
	}
	if d.Count < 0 || d.Count > math.MaxInt32 {
		return fail(codeInvalidArgument, "stars count %d must be >= 0", d.Count)
	}
	n := int(d.Count)
	if n == 0 {
		s.starsGiven = true
		return nil
	}
	required := []struct {
		name string
		f    *fieldABI
	}{
		{"stars id", &d.ID},
		{"stars position.x", &d.Position[0]}, {"stars position.y", &d.Position[1]}, {"stars position.z", &d.Position[2]},
		{"stars velocity.x", &d.Velocity[0]}, {"stars velocity.y", &d.Velocity[1]}, {"stars velocity.z", &d.Velocity[2]},
		{"stars coupling_radius", &d.CouplingRadius}, {"stars ejecta_mass", &d.EjectaMass}, {"stars energy", &d.Energy},
	}
	cols := make([]feedback.Column, len(required))
	for k, r := range required {
		c, err := dumpColumn(r.name, r.f, n, true)
		if err != nil {
			return err
		}
		cols[k] = c
	}
	radiatedCol, err := dumpColumn("stars radiated", &d.Radiated, n, false)
	if err != nil {
		return err
	}
	species, speciesCols, err := s.speciesCodes("stars", d.NSpecies, d.Species, d.SpeciesMass, n)
	if err != nil {
		return err
	}

	ids, err := readIDs("stars id", cols[0])
	if err != nil {
		return err
	}
	values := make([][]float64, len(required))
	for k := 1; k < len(required); k++ {
		// Positions and velocities may be negative; radius and release
		// may not.
		if values[k], err = readFinite(required[k].name, cols[k], k >= 7, "star", ids); err != nil {
			return err
		}
	}
	radiated := make([]float64, n)
	if radiatedCol.Bound() {
		if radiated, err = readFinite("stars radiated", radiatedCol, true, "star", ids); err != nil {
			return err
		}
	}
	speciesMass := make([][]float64, len(species))
	for k, c := range speciesCols {
		if speciesMass[k], err = readFinite("stars species mass "+s.set.Symbol(species[k]), c, true, "star", ids); err != nil {
			return err
		}
	}
	for i := 0; i < n; i++ {
		st := audit.Star{ID: ids[i], Radius: values[7][i], Mass: values[8][i], Energy: values[9][i], Radiated: radiated[i]}
		for a := 0; a < 3; a++ {
			st.Pos[a], st.Vel[a] = values[1+a][i], values[4+a][i]
		}
		for k, sp := range species {
			st.Species[sp] = speciesMass[k][i]
		}
		s.stars = append(s.stars, st)
	}
	for _, sp := range species {
		if !slices.Contains(s.starSpecies, sp) {
			s.starSpecies = append(s.starSpecies, sp)
		}
	}
	s.starSpecies = sortedSpecies(s.starSpecies)
	s.starsGiven = true
	return nil
}

// finish is behind ejecta_dump_finish: it writes the stars and then the
// manifest.
func (s *dumpSession) finish() error {
	var missing []string
	if s.before == nil {
		missing = append(missing, "ejecta_dump_gas_before")
	}
	if s.after == nil {
		missing = append(missing, "ejecta_dump_gas_after")
	}
	if !s.starsGiven {
		missing = append(missing, "ejecta_dump_stars (count 0 for a step without stars)")
	}
	if len(missing) > 0 {
		return fail(codeInvalidArgument, "the dump is not complete: call %s first", strings.Join(missing, " and "))
	}
	stars, err := audit.WriteStars(s.dir, audit.StarsFolder, s.stars, s.starSpecies, s.set)
	if err != nil {
		return fail(codeDumpFile, "%w", err)
	}
	if err := audit.WriteManifest(s.dir, audit.NewManifest(s.box, s.set, *s.before, *s.after, stars)); err != nil {
		return fail(codeDumpFile, "%w", err)
	}
	s.phase = dumpFinished
	s.stars = nil
	return nil
}

// idChange says how two sorted, unique ID lists of the same length
// differ: the first ID of the gas before that is missing after, and the
// first ID after that was not there before.
func idChange(before, after []int64) string {
	missing, added := "", ""
	for _, id := range before {
		if _, found := slices.BinarySearch(after, id); !found {
			missing = fmt.Sprintf("ID %d of the gas before is missing", id)
			break
		}
	}
	for _, id := range after {
		if _, found := slices.BinarySearch(before, id); !found {
			added = fmt.Sprintf("ID %d was not in the gas before", id)
			break
		}
	}
	return strings.Join(slices.DeleteFunc([]string{missing, added}, func(x string) bool { return x == "" }), " and ")
}

// sortedSpecies returns species slots in order.
func sortedSpecies(sp []yields.Species) []yields.Species {
	out := slices.Clone(sp)
	slices.Sort(out)
	return out
}

// symbolList names species slots in the set.
func symbolList(sp []yields.Species, set yields.SpeciesSet) []string {
	out := make([]string, len(sp))
	for i, x := range sp {
		out[i] = set.Symbol(x)
	}
	return out
}

// entryDumpGasBefore is behind ejecta_dump_gas_before.
func entryDumpGasBefore(h uint64, g *gasABI) int32 {
	return withDump(h, func(s *dumpSession) error { return s.gasBefore(g) })
}

// entryDumpGasAfter is behind ejecta_dump_gas_after.
func entryDumpGasAfter(h uint64, g *gasABI) int32 {
	return withDump(h, func(s *dumpSession) error { return s.gasAfter(g) })
}

// entryDumpStars is behind ejecta_dump_stars.
func entryDumpStars(h uint64, d *starColumnsABI) int32 {
	return withDump(h, func(s *dumpSession) error { return s.addStars(d) })
}

// entryDumpFinish is behind ejecta_dump_finish.
func entryDumpFinish(h uint64) int32 {
	return withDump(h, func(s *dumpSession) error { return s.finish() })
}

// entryDumpClose is behind ejecta_dump_close.
func entryDumpClose(h *uint64) int32 { return dumps().release(h) }

// entryDumpLastError is behind ejecta_dump_last_error.
func entryDumpLastError(h uint64, buf *byte, capacity int64, length *int64) int32 {
	return dumps().lastError(h, buf, capacity, length)
}
