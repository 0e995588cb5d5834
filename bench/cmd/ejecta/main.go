// Command ejecta runs the ejecta tools: the scheme comparison suite, the
// stellar-population release table, the conservation audit of a host's own
// feedback dump, and the version.
//
// Usage:
//
//	ejecta <command> [flags]
//
// Commands:
//
//	bench    compare coupling schemes on standard gas set-ups (the default
//	         quick suite includes the demo cloud); writes results.json, CSV
//	         tables and PNG plots to -out (default ./ejecta-out); -gas DIR
//	         compares them on a user's own .npy snapshot
//	rates    print what one Msun of a single burst releases, by age
//	         (-imf or -table FILE in the CSV format of package yields, -z,
//	         -elements O,Fe for per-element masses, -json); says where the
//	         model is asked about ages or metallicities it does not cover
//	audit    check a host's own before/after feedback dump for conservation,
//	         star-frame balance and out-of-range changes (-manifest FILE,
//	         -tol, -isotropy-tol, -json); exit status 1 when a check fails
//	remnant  follow one supernova remnant with the 1D spherical solver
//	         (-density, -metallicity, -energy, -ejecta-mass, -cooling FILE,
//	         -no-cooling, -json, -out DIR); -calibrate runs a grid of
//	         -densities and -metallicities and writes a remnant table
//	version  print the ejecta version
//
// The audit manifest is a JSON file naming NumPy .npy arrays, paths relative
// to the manifest:
//
//	{
//	  "box": [L, L, L],
//	  "species_set": ["H", "He", "Fe"],
//	  "gas_before": {"position": "...", "velocity": "...", "mass": "...",
//	                 "internal_energy": "...", "id": "...",
//	                 "mass_fractions": {"Z": "...", "Fe": "..."}},
//	  "gas_after":  { the same keys },
//	  "stars": {"id": "...", "position": "...", "velocity": "...",
//	            "radius": "...", "ejecta_mass": "...", "energy": "...",
//	            "radiated": "...", "ejecta_species": {"Z": "..."}}
//	}
//
// The species keys are "Z" (all metals) and the chemical symbols of the
// elements of "species_set", the user's choice of tracked elements (any
// elements; without it the default set H, He, C, N, O, Ne, Mg, Si, S, Ca,
// Fe). A C, C++ or Fortran host writes the whole dump, arrays and manifest,
// from the same column descriptors it binds gas with, through the
// ejecta_dump_* calls of the C library (cgo/ejecta.h, cgo/README.md); Go
// code writes one with audit.WriteDump. The full format is in
// "go doc ./feedback/audit Manifest".
//
// Vectors are (n, 3) arrays, the rest (n,); "box", "species_set" and
// "radiated" are optional. Run "ejecta help" for the list of commands and "ejecta CMD -h"
// for a command's description and flags.
package main

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strings"
)

// command is one subcommand of the CLI.
type command struct {
	name    string
	summary string
	run     func(args []string, stdout, stderr io.Writer) int
}

func commands() []command {
	return []command{
		{"version", "print the ejecta version", runVersion},
		{"bench", "compare coupling schemes on standard gas set-ups", runBench},
		{"rates", "print what a stellar population releases, by age", runRates},
		{"audit", "check a host's own feedback step for conservation", runAudit},
		{"remnant", "follow one supernova remnant with the 1D solver, or calibrate a remnant table", runRemnant},
	}
}

func usage(w io.Writer) {
	fmt.Fprintln(w, "usage: ejecta <command> [flags]")
	fmt.Fprintln(w, "commands:")
	for _, c := range commands() {
		fmt.Fprintf(w, "  %-8s %s\n", c.name, c.summary)
	}
}

func run(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		usage(stderr)
		return 2
	}
	if args[0] == "help" || args[0] == "-h" || args[0] == "-help" || args[0] == "--help" {
		if len(args) == 2 && args[0] == "help" {
			// "ejecta help CMD" is "ejecta CMD -h".
			return run([]string{args[1], "-h"}, stdout, stderr)
		}
		if len(args) > 1 {
			fmt.Fprintf(stderr, "ejecta: help takes at most one command, got %q\n", args[1:])
			return 2
		}
		usage(stdout)
		return 0
	}
	for _, c := range commands() {
		if c.name == args[0] {
			return c.run(args[1:], stdout, stderr)
		}
	}
	fmt.Fprintf(stderr, "ejecta: unknown command %q\n", args[0])
	usage(stderr)
	return 2
}

// subcommand describes one subcommand's flags for its help text.
type subcommand struct {
	// name is the subcommand ("bench").
	name string
	// synopsis follows "usage: ejecta NAME" ("[flags]").
	synopsis string
	// description is one paragraph saying what the command does, printed
	// wrapped before the flags.
	description string
}

// newFlagSet makes the flag set of a subcommand. Parse it with parseFlags:
// the flag package's own messages are silenced so that help goes to
// stdout and errors to stderr, each once.
func (c subcommand) newFlagSet() *flag.FlagSet {
	fs := flag.NewFlagSet(c.name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.Usage = func() {}
	return fs
}

// parseFlags parses args into fs. It returns ok = false and the exit
// status when the command must stop: 0 after printing the help asked for
// with -h, -help or --help, 2 after a bad flag or value (reported on
// stderr with a pointer to the help).
func (c subcommand) parseFlags(fs *flag.FlagSet, args []string, stdout, stderr io.Writer) (code int, ok bool) {
	err := fs.Parse(args)
	switch {
	case err == nil:
		return 0, true
	case errors.Is(err, flag.ErrHelp):
		c.printHelp(stdout, fs)
		return 0, false
	}
	fmt.Fprintf(stderr, "ejecta %s: %v\nrun \"ejecta %s -h\" for the flags\n", c.name, err, c.name)
	return 2, false
}

// printHelp writes the usage line, the description paragraph and the
// flags, each with its default stated once.
func (c subcommand) printHelp(w io.Writer, fs *flag.FlagSet) {
	fmt.Fprintln(w, strings.TrimSpace("usage: ejecta "+c.name+" "+c.synopsis))
	fmt.Fprintln(w)
	fmt.Fprintln(w, wrapText(c.description, 78))
	n := 0
	fs.VisitAll(func(*flag.Flag) { n++ })
	if n == 0 {
		return
	}
	fmt.Fprintln(w, "\nflags:")
	fs.VisitAll(func(f *flag.Flag) {
		kind, text := flag.UnquoteUsage(f)
		line := "  -" + f.Name
		if kind != "" {
			line += " " + kind
		}
		if d := defaultNote(f); d != "" && !strings.Contains(text, "(default") {
			text += " (default " + d + ")"
		}
		fmt.Fprintln(w, line)
		fmt.Fprintln(w, indentText(wrapText(text, 72), "      "))
	})
}

// defaultNote is a flag's default as help shows it: empty for the zero
// value of its type (false, 0, ""), strings quoted.
func defaultNote(f *flag.Flag) string {
	switch f.DefValue {
	case "", "0", "false":
		return ""
	}
	if kind, _ := flag.UnquoteUsage(f); kind == "string" {
		return fmt.Sprintf("%q", f.DefValue)
	}
	return f.DefValue
}

// wrapText fills words into lines of at most width columns.
func wrapText(s string, width int) string {
	var b strings.Builder
	col := 0
	for _, word := range strings.Fields(s) {
		switch {
		case col == 0:
		case col+1+len(word) > width:
			b.WriteByte('\n')
			col = 0
		default:
			b.WriteByte(' ')
			col++
		}
		b.WriteString(word)
		col += len(word)
	}
	return b.String()
}

// indentText prefixes every line of s.
func indentText(s, prefix string) string {
	return prefix + strings.ReplaceAll(s, "\n", "\n"+prefix)
}

func main() { os.Exit(run(os.Args[1:], os.Stdout, os.Stderr)) }
