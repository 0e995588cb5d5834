package main

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
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
	tol := fs.Float64("tol", 1e-10, "largest relative imbalance accepted for each conserved quantity")
	isoTol := fs.Float64("isotropy-tol", 1e-6, "largest net star-frame momentum accepted, as a fraction of the momentum handed out")
	asJSON := fs.Bool("json", false, "print the report as JSON")
	if code, ok := auditCommand.parseFlags(fs, args, stdout, stderr); !ok {
		return code
	}
	if *manifest == "" {
		fmt.Fprintln(stderr, "ejecta audit: -manifest is required; run \"ejecta audit -h\" for the flags")
		return 2
	}
	before, after, stars, box, err := loadAudit(*manifest)
	if err != nil {
		fmt.Fprintf(stderr, "ejecta audit: %v\n", err)
		return 2
	}
	rep, err := audit.Step(before, after, stars, audit.Options{Box: box, Tolerance: *tol, IsotropyTolerance: *isoTol})
	if err != nil {
		fmt.Fprintf(stderr, "ejecta audit: %v\n", err)
		return 2
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(rep); err != nil {
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
	dec := json.NewDecoder(strings.NewReader(string(raw)))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&m); err != nil {
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
	if len(before.Species) != len(after.Species) {
		return nil, nil, nil, box, errors.New("manifest: gas_before and gas_after must list the same mass fractions")
	}
	stars, err = loadAuditStars(dir, m.Stars)
	return before, after, stars, box, err
}

func loadAuditGas(dir, key string, f auditGasFiles) (*audit.GasArrays, error) {
	g := &audit.GasArrays{}
	pos, n, err := readNPY(dir, key+".position", f.Position, 3, -1)
	if err != nil {
		return nil, err
	}
	vel, _, err := readNPY(dir, key+".velocity", f.Velocity, 3, n)
	if err != nil {
		return nil, err
	}
	for k := 0; k < 3; k++ {
		g.Pos[k], g.Vel[k] = make([]float64, n), make([]float64, n)
		for i := 0; i < n; i++ {
			g.Pos[k][i], g.Vel[k][i] = pos[3*i+k], vel[3*i+k]
		}
	}
	if g.Mass, _, err = readNPY(dir, key+".mass", f.Mass, 1, n); err != nil {
		return nil, err
	}
	if g.Energy, _, err = readNPY(dir, key+".internal_energy", f.InternalEnergy, 1, n); err != nil {
		return nil, err
	}
	ids, _, err := readNPY(dir, key+".id", f.ID, 1, n)
	if err != nil {
		return nil, err
	}
	g.ID = make([]int64, n)
	for i, v := range ids {
		g.ID[i] = int64(v)
		if float64(g.ID[i]) != v {
			return nil, fmt.Errorf("%s.id: element %d holds %g, not an integer", key, i, v)
		}
	}
	g.Density = make([]float64, n) // not audited
	species, err := sortedSpecies(key+".mass_fractions", f.MassFractions)
	if err != nil {
		return nil, err
	}
	for _, sp := range species {
		col, _, err := readNPY(dir, key+".mass_fractions."+sp.Symbol(), f.MassFractions[sp.Symbol()], 1, n)
		if err != nil {
			return nil, err
		}
		g.Species = append(g.Species, sp)
		g.Fractions = append(g.Fractions, col)
	}
	return g, nil
}

func loadAuditStars(dir string, f auditStarsFiles) ([]audit.Star, error) {
	ids, n, err := readNPY(dir, "stars.id", f.ID, 1, -1)
	if err != nil {
		return nil, err
	}
	pos, _, err := readNPY(dir, "stars.position", f.Position, 3, n)
	if err != nil {
		return nil, err
	}
	vel, _, err := readNPY(dir, "stars.velocity", f.Velocity, 3, n)
	if err != nil {
		return nil, err
	}
	cols := map[string][]float64{}
	for name, file := range map[string]string{"radius": f.Radius, "ejecta_mass": f.EjectaMass, "energy": f.Energy} {
		if cols[name], _, err = readNPY(dir, "stars."+name, file, 1, n); err != nil {
			return nil, err
		}
	}
	var radiated []float64
	if f.Radiated != "" {
		if radiated, _, err = readNPY(dir, "stars.radiated", f.Radiated, 1, n); err != nil {
			return nil, err
		}
	}
	species, err := sortedSpecies("stars.ejecta_species", f.EjectaSpecies)
	if err != nil {
		return nil, err
	}
	stars := make([]audit.Star, n)
	for i := range stars {
		s := &stars[i]
		s.ID = int64(ids[i])
		for k := 0; k < 3; k++ {
			s.Pos[k], s.Vel[k] = pos[3*i+k], vel[3*i+k]
		}
		s.Radius, s.Mass, s.Energy = cols["radius"][i], cols["ejecta_mass"][i], cols["energy"][i]
		if radiated != nil {
			s.Radiated = radiated[i]
		}
	}
	for _, sp := range species {
		col, _, err := readNPY(dir, "stars.ejecta_species."+sp.Symbol(), f.EjectaSpecies[sp.Symbol()], 1, n)
		if err != nil {
			return nil, err
		}
		for i := range stars {
			stars[i].Species[sp] = col[i]
		}
	}
	return stars, nil
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

// readNPY reads one array named by the manifest key (a path relative to
// the manifest's folder), checking its shape: (n,) for ncol 1, (n, ncol)
// otherwise, with n == want unless want < 0.
func readNPY(dir, key, name string, ncol, want int) ([]float64, int, error) {
	if name == "" {
		return nil, 0, fmt.Errorf("manifest: %s names no file", key)
	}
	path := name
	if !filepath.IsAbs(path) {
		path = filepath.Join(dir, name)
	}
	data, n, err := bench.ReadArray(path, ncol, want)
	if err != nil {
		return nil, 0, fmt.Errorf("%s: %w", key, err)
	}
	return data, n, nil
}
