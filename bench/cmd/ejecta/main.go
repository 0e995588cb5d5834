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
//	         (-imf, -z, -table FILE in the CSV format of package yields, -json)
//	audit    check a host's own before/after feedback dump for conservation,
//	         star-frame balance and out-of-range changes (-manifest FILE,
//	         -tol, -isotropy-tol, -json); exit status 1 when a check fails
//	version  print the ejecta version
//
// The audit manifest is a JSON file naming NumPy .npy arrays, paths relative
// to the manifest:
//
//	{
//	  "box": [L, L, L],
//	  "gas_before": {"position": "...", "velocity": "...", "mass": "...",
//	                 "internal_energy": "...", "id": "...",
//	                 "mass_fractions": {"Z": "...", "Fe": "..."}},
//	  "gas_after":  { the same keys },
//	  "stars": {"id": "...", "position": "...", "velocity": "...",
//	            "radius": "...", "ejecta_mass": "...", "energy": "...",
//	            "radiated": "...", "ejecta_species": {"Z": "..."}}
//	}
//
// Vectors are (n, 3) arrays, the rest (n,); "box" and "radiated" are
// optional. Run "ejecta help" for the list of commands.
package main

import (
	"fmt"
	"io"
	"os"
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
	if args[0] == "help" || args[0] == "-h" || args[0] == "--help" {
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

func main() { os.Exit(run(os.Args[1:], os.Stdout, os.Stderr)) }
