package main

import (
	"encoding/json"
	"fmt"
	"io"

	"github.com/ejecta-dev/ejecta/feedback/audit"
)

var auditCommand = subcommand{
	name:     "audit",
	synopsis: "-manifest FILE [flags]",
	description: "Checks one feedback step of any code, ejecta's or your own, from its before/after dump: " +
		"the gas columns before and after and each star's release, as NumPy .npy arrays named by a JSON manifest " +
		"(format in \"go doc ./feedback/audit Manifest\"; hosts in C, C++ or Fortran write it with the ejecta_dump_* calls of the C library). It checks that mass, every species, momentum and energy " +
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
	dump, err := audit.ReadDump(*manifest)
	if err != nil {
		fmt.Fprintf(stderr, "ejecta audit: %v\n", err)
		return 2
	}
	opts.Box, opts.Species = dump.Box, dump.Species
	before, stars := dump.Before, dump.Stars
	rep, err := audit.Step(before, dump.After, stars, opts)
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
