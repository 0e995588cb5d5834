package main

import (
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"strings"
	"text/tabwriter"

	"github.com/schollz/progressbar/v3"

	"github.com/ejecta-dev/ejecta/bench"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// benchFlags are the settings of the bench command.
type benchFlags struct {
	suite, schemes, setups, out, gasDir string
	lengthCm, massG, velocityCmPS       float64
	boxSize                             float64
	neighbors, workers                  int
	seed                                uint64
	skipSpeed, quiet, list              bool
}

func runBench(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("bench", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var f benchFlags
	fs.StringVar(&f.suite, "suite", "quick", "suite to run: quick (seconds) or full (more resolutions, longer timing)")
	fs.StringVar(&f.schemes, "schemes", "", "comma-separated schemes to compare (default all; see -list)")
	fs.StringVar(&f.setups, "setups", "", "comma-separated built-in set-ups to run (default all; see -list)")
	fs.StringVar(&f.out, "out", "ejecta-out", "directory receiving results.json, the CSV tables and the PNG plots")
	fs.StringVar(&f.gasDir, "gas", "", "directory of .npy arrays holding your own gas (pos, vel, mass, density, internal_energy; optional id, metallicity, stars); replaces the built-in set-ups")
	fs.Float64Var(&f.lengthCm, "length-unit-cm", units.Parsec, "with -gas: cm per code length unit (default 1 pc)")
	fs.Float64Var(&f.massG, "mass-unit-g", units.SolarMass, "with -gas: g per code mass unit (default 1 Msun)")
	fs.Float64Var(&f.velocityCmPS, "velocity-unit-cms", units.Kilometre, "with -gas: cm/s per code velocity unit (default 1 km/s)")
	fs.Float64Var(&f.boxSize, "box-size", 0, "with -gas: side of the periodic cubic box in code length units (0: open box)")
	fs.IntVar(&f.neighbors, "neighbors", 0, "gas elements each star couples to (0: the suite's, 64)")
	fs.IntVar(&f.workers, "workers", 1, "goroutines per coupler (results other than speed do not depend on it)")
	fs.Uint64Var(&f.seed, "seed", 0, "seed of the built-in set-ups (0: the suite's)")
	fs.BoolVar(&f.skipSpeed, "skip-speed", false, "skip the speed measurement")
	fs.BoolVar(&f.quiet, "quiet", false, "no progress bar")
	fs.BoolVar(&f.list, "list", false, "list the schemes and set-ups and exit")
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: ejecta bench [flags]")
		fmt.Fprintln(stderr, "Compares coupling schemes on standard gas set-ups (or your own gas with -gas):")
		fmt.Fprintln(stderr, "radial momentum against resolution, isotropy, energy budget and speed.")
		fs.PrintDefaults()
	}
	if err := fs.Parse(args); err != nil {
		if err == flag.ErrHelp {
			return 0
		}
		return 2
	}
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
	summarise(stdout, res)
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
	if f.neighbors < 0 {
		return nil, fmt.Errorf("neighbor count %d must be positive", f.neighbors)
	}
	if f.neighbors > 0 {
		suite.Neighbors = f.neighbors
	}
	if f.seed != 0 {
		suite.Seed = f.seed
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

// summarise prints the headline figures: speed, worst isotropy residual
// per set-up, and the momentum at the reference density on each set-up.
func summarise(w io.Writer, res *bench.Result) {
	fmt.Fprintf(w, "ejecta bench: suite %s, %d schemes, %d set-ups, %d neighbors, one %.0e erg SN with %g Msun ejecta per star\n",
		res.Suite, len(res.Schemes), len(res.Setups), res.Neighbors, res.SupernovaEnergyErg, res.EjectaMassMsun)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	if len(res.Speed) > 0 {
		fmt.Fprintf(w, "\nspeed on %s (%d stars, %d neighbors):\n", res.Speed[0].Setup, res.Speed[0].Stars, res.Speed[0].Neighbors)
		fmt.Fprintln(tw, "scheme\tstars/s\telements/s\ttouch ratio\t")
		for _, r := range res.Speed {
			fmt.Fprintf(tw, "%s\t%.4g\t%.4g\t%.3g\t\n", r.Scheme, r.StarsPerS, r.TouchedPerS, r.TouchRatio)
		}
		tw.Flush()
	}
	fmt.Fprintln(w, "\nworst isotropy residual |sum p|/sum |p| before the net is removed:")
	header := "scheme\t"
	for _, s := range res.Setups {
		header += s.Name + "\t"
	}
	fmt.Fprintln(tw, header)
	for _, sc := range res.Schemes {
		line := sc.Name + "\t"
		for _, s := range res.Setups {
			for _, r := range res.Isotropy {
				if r.Scheme == sc.Name && r.Setup == s.Name {
					line += fmt.Sprintf("%.2g", r.Residual)
				}
			}
			line += "\t"
		}
		fmt.Fprintln(tw, line)
	}
	tw.Flush()
	for _, s := range res.Setups {
		n := referenceDensity(res, s.Name)
		fmt.Fprintf(w, "\nradial momentum per SN [Msun km/s] on %s at n = %g cm^-3:\n", s.Name, n)
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
			line := fmt.Sprintf("%g\t", m)
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
