package main

import (
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"sort"
	"strings"
	"text/tabwriter"

	"github.com/schollz/progressbar/v3"

	"github.com/ejecta-dev/ejecta/bench"
	"github.com/ejecta-dev/ejecta/bench/testbed"
	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// benchFlags are the settings of the bench command.
type benchFlags struct {
	suite, schemes, setups, out, gasDir string
	remnantTable                        string
	lengthCm, massG, velocityCmPS       float64
	boxSize                             float64
	neighbors, workers                  int
	seed                                uint64
	neighborsGiven, seedGiven           bool // set by the command line, not left at their defaults
	skipSpeed, skipOutcome, quiet, list bool
}

var benchCommand = subcommand{
	name:     "bench",
	synopsis: "[flags]",
	description: "Compares the coupling schemes on the same gas: the built-in set-ups " +
		"(uniform lattice, glass, a star at the edge of a dense slab, and the clumpy-cloud demo) " +
		"at several densities and gas element masses, or your own gas read from .npy arrays with -gas. " +
		"For each scheme it reports the radial momentum handed out per supernova against the " +
		"energy-conserving and terminal-momentum references, the isotropy residual, where the " +
		"energy went, and the speed against a touch-only floor; it writes results.json, one CSV " +
		"per table and PNG plots to -out and prints a summary.",
}

func runBench(args []string, stdout, stderr io.Writer) int {
	fs := benchCommand.newFlagSet()
	var f benchFlags
	fs.StringVar(&f.suite, "suite", "quick", "suite to run: quick (seconds) or full (more resolutions, longer timing)")
	fs.StringVar(&f.schemes, "schemes", "", "comma-separated schemes to compare (default all; see -list)")
	fs.StringVar(&f.remnantTable, "remnant-table", "", "also compare the terminal-momentum scheme with its remnant from this remnant table (\"ejecta remnant -calibrate\" writes one), as "+bench.RemnantTableSchemeName)
	fs.StringVar(&f.setups, "setups", "", "comma-separated built-in set-ups to run (default all; see -list)")
	fs.StringVar(&f.out, "out", "ejecta-out", "directory receiving results.json, the CSV tables and the PNG plots")
	fs.StringVar(&f.gasDir, "gas", "", "directory of .npy arrays holding your own gas (pos, vel, mass, density, internal_energy; optional id, metallicity, stars); replaces the built-in set-ups. Every position must lie in the box of -box-size; a star outside the region the gas fills is refused")
	fs.Float64Var(&f.lengthCm, "length-unit-cm", units.Parsec, "with -gas: cm per code length unit (default 3.0857e18, 1 pc)")
	fs.Float64Var(&f.massG, "mass-unit-g", units.SolarMass, "with -gas: g per code mass unit (default 1.9884e33, 1 Msun)")
	fs.Float64Var(&f.velocityCmPS, "velocity-unit-cms", units.Kilometer, "with -gas: cm/s per code velocity unit (default 1e5, 1 km/s)")
	fs.Float64Var(&f.boxSize, "box-size", 0, "with -gas: side of the periodic cubic box [0, L) in code length units (0: open box)")
	fs.IntVar(&f.neighbors, "neighbors", 0, "gas elements each star couples to (when not given: the suite's, 64)")
	fs.IntVar(&f.workers, "workers", runtime.NumCPU(), "goroutines per coupler, and 3D outcome cases run at once (results other than speed do not depend on it)")
	fs.Uint64Var(&f.seed, "seed", 0, "seed of the built-in set-ups (when not given: the suite's; 0 is a seed like any other)")
	fs.BoolVar(&f.skipSpeed, "skip-speed", false, "skip the speed measurement (no speed table or plot is written)")
	fs.BoolVar(&f.skipOutcome, "skip-outcome", false, "skip the evolved outcome on the 3D grid (the suite's longest part; no outcome table or plots are written)")
	fs.BoolVar(&f.quiet, "quiet", false, "no progress bar")
	fs.BoolVar(&f.list, "list", false, "list the schemes and set-ups and exit")
	if code, ok := benchCommand.parseFlags(fs, args, stdout, stderr); !ok {
		return code
	}
	fs.Visit(func(fl *flag.Flag) {
		switch fl.Name {
		case "neighbors":
			f.neighborsGiven = true
		case "seed":
			f.seedGiven = true
		}
	})
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "ejecta bench: unexpected arguments %q\n", fs.Args())
		return 2
	}
	if f.list {
		listSchemes(stdout)
		return 0
	}
	res, err := benchResult(&f, stderr)
	if err != nil {
		fmt.Fprintf(stderr, "ejecta bench: %v\n", err)
		return 1
	}
	files, err := bench.WriteResults(f.out, res)
	if err != nil {
		fmt.Fprintf(stderr, "ejecta bench: %v\n", err)
		return 1
	}
	summarize(stdout, res)
	fmt.Fprintln(stdout, "\nwritten:")
	for _, p := range files {
		fmt.Fprintf(stdout, "  %s\n", p)
	}
	return 0
}

func listSchemes(w io.Writer) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "scheme\tdescription")
	for _, s := range bench.Schemes() {
		fmt.Fprintf(tw, "%s\t%s\n", s.Name, s.Description)
	}
	fmt.Fprintln(tw, "\t")
	fmt.Fprintln(tw, "set-up\tdescription")
	for _, s := range bench.StandardSetups() {
		fmt.Fprintf(tw, "%s\t%s\n", s.Name, s.Description)
	}
	tw.Flush()
}

func splitList(s string) []string {
	if strings.TrimSpace(s) == "" {
		return nil
	}
	var out []string
	for _, x := range strings.Split(s, ",") {
		if x = strings.TrimSpace(x); x != "" {
			out = append(out, x)
		}
	}
	return out
}

// benchResult runs the suite, or the user's gas, as the flags say.
func benchResult(f *benchFlags, stderr io.Writer) (*bench.Result, error) {
	suite, err := bench.SuiteByName(f.suite)
	if err != nil {
		return nil, err
	}
	schemes, err := bench.SelectSchemes(splitList(f.schemes))
	if err != nil {
		return nil, err
	}
	if f.remnantTable != "" {
		tab, err := feedback.ReadRemnantTableFile(f.remnantTable)
		if err != nil {
			return nil, err
		}
		schemes = append(schemes, bench.RemnantTableScheme(tab, f.remnantTable))
	}
	if f.neighborsGiven {
		if f.neighbors < 1 {
			return nil, fmt.Errorf("neighbor count %d must be positive", f.neighbors)
		}
		suite.Neighbors = f.neighbors
	}
	if f.seedGiven {
		suite.Seed = f.seed
	}
	if f.skipOutcome {
		suite.Outcome.DensitiesCm3 = nil
	}
	if f.skipSpeed {
		suite.Speed.Stars = 0
	}
	bar := newProgress(stderr, f.quiet)
	opts := bench.Options{Schemes: schemes, Workers: f.workers, Progress: bar.update}
	defer bar.finish()
	if f.gasDir != "" {
		if f.setups != "" {
			return nil, fmt.Errorf("-setups and -gas exclude each other")
		}
		u := units.CodeUnits{LengthCm: f.lengthCm, MassG: f.massG, VelocityCmPS: f.velocityCmPS}
		box := neighbor.Box{Size: [3]float64{f.boxSize, f.boxSize, f.boxSize}}
		c, err := bench.ReadGasDir(f.gasDir, u, box)
		if err != nil {
			return nil, err
		}
		return bench.RunCase(c, suite.Neighbors, suite.Speed, opts)
	}
	if suite.Setups, err = bench.SelectSetups(splitList(f.setups)); err != nil {
		return nil, err
	}
	return bench.Run(suite, opts)
}

// progress shows a progress bar on stderr when it is a terminal.
type progress struct {
	w     io.Writer
	quiet bool
	bar   *progressbar.ProgressBar
}

func newProgress(w io.Writer, quiet bool) *progress {
	if !quiet {
		f, ok := w.(*os.File)
		if !ok {
			quiet = true
		} else if st, err := f.Stat(); err != nil || st.Mode()&os.ModeCharDevice == 0 {
			quiet = true
		}
	}
	return &progress{w: w, quiet: quiet}
}

func (p *progress) update(done, total int) {
	if p.quiet {
		return
	}
	if p.bar == nil {
		p.bar = progressbar.NewOptions(total, progressbar.OptionSetWriter(p.w),
			progressbar.OptionSetDescription("bench"), progressbar.OptionShowCount(),
			progressbar.OptionClearOnFinish())
	}
	_ = p.bar.Set(done)
}

func (p *progress) finish() {
	if p.bar != nil {
		_ = p.bar.Finish()
	}
}

// summarize prints the headline figures: speed, worst isotropy residual
// per set-up, and the momentum at the reference density on each set-up,
// each table followed by what its columns mean.
func summarize(w io.Writer, res *bench.Result) {
	fmt.Fprintf(w, "ejecta bench: suite %s, %d schemes, %d set-ups, %d neighbors, one %.3g erg SN with %g Msun ejecta per star\n",
		res.Suite, len(res.Schemes), len(res.Setups), res.Neighbors, res.SupernovaEnergyErg, res.EjectaMassMsun)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	if len(res.Speed) > 0 {
		fmt.Fprintf(w, "\nspeed on %s (%d stars, %d neighbors each):\n", res.Speed[0].Setup, res.Speed[0].Stars, res.Speed[0].Neighbors)
		fmt.Fprintln(tw, "scheme\tstars/s\telements/s\ttouch ratio\t")
		for _, r := range res.Speed {
			fmt.Fprintf(tw, "%s\t%.3g\t%.3g\t%.2f\t\n", r.Scheme, r.StarsPerS, r.TouchedPerS, r.TouchRatio)
		}
		tw.Flush()
		printLegend(w,
			"stars/s: stars whose release is coupled (Couple) and applied (Apply) per second, fastest pass",
			"elements/s: gas elements written per second in those passes",
			"touch ratio: the scheme's time over the touch-only floor's (the same neighbor search, reads and "+
				"writes of the same gas fields, no physics), timed alternately in the same run; 1 would be the memory floor")
	}

	summarizeOutcome(w, res)

	fmt.Fprintln(w, "\nworst isotropy residual per set-up (worst star over its cases):")
	oneSided := map[string]int{}
	for _, r := range res.Isotropy {
		oneSided[r.Setup] = max(oneSided[r.Setup], r.OneSidedStars)
	}
	header := "scheme\t"
	for _, s := range res.Setups {
		header += s.Name + "\t"
	}
	fmt.Fprintln(tw, header)
	marked := false
	for _, sc := range res.Schemes {
		line := sc.Name + "\t"
		for _, s := range res.Setups {
			for _, r := range res.Isotropy {
				if r.Scheme == sc.Name && r.Setup == s.Name {
					line += formatResidual(r.Residual)
					if sc.IsotropyCorrected && r.OneSidedStars > 0 {
						line += "*"
						marked = true
					}
				}
			}
			line += "\t"
		}
		fmt.Fprintln(tw, line)
	}
	tw.Flush()
	printLegend(w,
		"residual: |sum p_j| / sum |p_j| of the radial momenta handed to the neighbors, before the coupler "+
			"removes their net vector to conserve momentum; 0 is a perfectly balanced star, 1 all gas on one side. "+
			"Schemes whose name ends in -uncorrected share by kernel-volume weights alone; the others after the isotropy "+
			"correction. Values below 1e-9 are round-off of a balanced correction")
	for _, s := range res.Setups {
		if n := oneSided[s.Name]; n > 0 {
			mark := ""
			if marked {
				mark = "* "
			}
			printLegend(w, fmt.Sprintf("%s%s: %d stars have all their coupled gas on one side (in one closed half-space); "+
				"no strictly positive weights balance them, so the correction either leaves a residual or reaches balance "+
				"only by giving the gas off their boundary plane vanishing weights: the residual there is not the figure "+
				"of a corrected, isotropic coupling", mark, s.Name, n))
		}
	}

	for _, s := range res.Setups {
		n := referenceDensity(res, s.Name)
		fmt.Fprintf(w, "\nradial momentum per SN [Msun km/s] on %s at n = %g cm^-3, by gas element mass:\n", s.Name, n)
		header := "gas mass [Msun]\t"
		for _, sc := range res.Schemes {
			header += sc.Name + "\t"
		}
		header += "energy-conserving\tterminal\t"
		fmt.Fprintln(tw, header)
		var masses []float64
		for _, r := range res.Convergence {
			if r.Setup == s.Name && r.DensityCm3 == n && r.Scheme == res.Schemes[0].Name {
				masses = append(masses, r.GasMassMsun)
			}
		}
		for _, m := range masses {
			line := fmt.Sprintf("%.4g\t", m)
			var ec, pt float64
			for _, sc := range res.Schemes {
				for _, r := range res.Convergence {
					if r.Setup == s.Name && r.DensityCm3 == n && r.GasMassMsun == m && r.Scheme == sc.Name {
						line += fmt.Sprintf("%.3g\t", r.RadialMomentumMsunKms)
						if sc.Name == res.Schemes[0].Name {
							ec, pt = r.EnergyConservingMsunKm, r.TerminalMsunKms
						}
					}
				}
			}
			line += fmt.Sprintf("%.3g\t%.3g\t", ec, pt)
			fmt.Fprintln(tw, line)
		}
		tw.Flush()
	}
	if len(res.Setups) > 0 {
		printLegend(w,
			"gas mass: mass of one gas element; each star couples to its nearest neighbors, so the coupled mass grows with it",
			"scheme columns: radial momentum the scheme handed out, sum_j dp_j . n_j in the star's frame, per supernova",
			"energy-conserving: sqrt(2 E (M_ej + 0.28 M_sw)), the momentum of the ejecta and the coupled gas M_sw swept up "+
				"without radiating (0.28: Sedov-Taylor kinetic fraction, Chevalier 1974)",
			"terminal: the terminal momentum of a radiative remnant ("+res.TerminalFit+" fit) at each neighbor's density and "+
				"metallicity, shared as the scheme shared the ejecta; a scheme should approach it once the coupled mass exceeds "+
				"the shell-formation mass",
			"every table at all densities is in convergence.csv; results.json has the same rows")
	}
}

// summarizeOutcome prints, for each density and measurement time, the
// radial momentum each scheme delivered on the 3D grid over the 1D
// reference's, by cell mass in cooling masses.
func summarizeOutcome(w io.Writer, res *bench.Result) {
	if len(res.Outcome) == 0 {
		return
	}
	type key struct {
		medium string
		n, t   float64
	}
	var keys []key
	seen := map[key]bool{}
	var ratios []float64
	var schemes []string
	seenR := map[float64]bool{}
	seenS := map[string]bool{}
	for _, o := range res.Outcome {
		if !seenS[o.Scheme] {
			seenS[o.Scheme] = true
			schemes = append(schemes, o.Scheme)
		}
		if k := (key{o.Medium, o.DensityCm3, o.TimeOverShellFormation}); !seen[k] {
			seen[k] = true
			keys = append(keys, k)
		}
		if !seenR[o.CellMassOverCoolingMass] {
			seenR[o.CellMassOverCoolingMass] = true
			ratios = append(ratios, o.CellMassOverCoolingMass)
		}
	}
	sort.Float64s(ratios)
	sort.SliceStable(keys, func(i, j int) bool {
		if keys[i].t != keys[j].t {
			return keys[i].t < keys[j].t
		}
		if keys[i].medium != keys[j].medium {
			return keys[i].medium > keys[j].medium // uniform before clumpy
		}
		return keys[i].n < keys[j].n
	})
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	for _, k := range keys {
		var ref testbed.ReferenceInfo
		for _, r := range res.References {
			if r.DensityCm3 == k.n {
				ref = r
			}
		}
		fmt.Fprintf(w, "\nevolved radial momentum over the 1D reference in %s gas at n = %g cm^-3, t = %g t_sf (t_sf = %.3g kyr, cooling mass %.3g Msun):\n",
			k.medium, k.n, k.t, ref.ShellFormationKyr, ref.CoolingMassMsun)
		header := "scheme\t"
		for _, r := range ratios {
			header += fmt.Sprintf("%g M_c\t", r)
		}
		fmt.Fprintln(tw, header)
		for _, name := range schemes {
			line := name + "\t"
			for _, r := range ratios {
				cell := "-"
				for _, o := range res.Outcome {
					if o.Scheme == name && o.Medium == k.medium && o.DensityCm3 == k.n && o.TimeOverShellFormation == k.t && o.CellMassOverCoolingMass == r {
						cell = fmt.Sprintf("%.2f", math.Max(o.MomentumRatio(), 0))
						if o.UndepositedShare > 0.5 {
							cell += "*"
						}
					}
				}
				line += cell + "\t"
			}
			fmt.Fprintln(tw, line)
		}
		tw.Flush()
	}
	printLegend(w,
		"each scheme's supernova goes into a periodic 3D grid of uniform gas through the coupler and Apply, and the grid "+
			"evolves it with the same cooling as the 1D reference remnant; columns are cell masses in cooling masses "+
			"(M_c, the 1D reference's mass at shell formation), entries the radial momentum about the star over the "+
			"1D reference's at the same time: 1 is right, below 1 overcooled, above 1 too much momentum",
		"*: the scheme handed most of the energy back undeposited (stochastic heating that cannot pay for one "+
			"heated cell keeps carrying it)",
		"terminal-momentum-calibrated: the terminal-momentum scheme with a remnant table calibrated from these "+
			"same 1D references (the cooling the grid runs)",
		"energies, hot gas and the momentum histories are in outcome.csv and outcome_history.csv")
}

// formatResidual prints an isotropy residual to two digits, and those
// below 1e-9 (round-off of a balanced correction) as such.
func formatResidual(r float64) string {
	if r == 0 {
		return "0"
	}
	if r < 1e-9 {
		return "<1e-9"
	}
	return fmt.Sprintf("%.2g", r)
}

// printLegend prints what a table's columns mean after a blank line, one
// wrapped item each.
func printLegend(w io.Writer, items ...string) {
	fmt.Fprintln(w)
	for _, it := range items {
		fmt.Fprintln(w, indentText(wrapText(it, 76), "  "))
	}
}

// referenceDensity is the density of a set-up's rows closest to 1 cm^-3
// in log.
func referenceDensity(res *bench.Result, setup string) float64 {
	best := math.NaN()
	for _, r := range res.Convergence {
		if r.Setup == setup && (math.IsNaN(best) || math.Abs(math.Log10(r.DensityCm3)) < math.Abs(math.Log10(best))) {
			best = r.DensityCm3
		}
	}
	return best
}
