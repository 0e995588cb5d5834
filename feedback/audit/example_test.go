package audit_test

import (
	"fmt"
	"os"
	"path/filepath"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/feedback/feedbacktest"
)

// Audit a before/after dump of one feedback step; here the dump is made by
// ejecta itself and then spoiled by losing some mass.
func ExampleStep() {
	before, after, stars, err := feedbacktest.Dump(feedback.TerminalMomentum{}, "uniform", 1)
	if err != nil {
		panic(err)
	}
	rep, err := audit.Step(before, after, stars, audit.DefaultOptions())
	if err != nil {
		panic(err)
	}
	fmt.Println("exact dump fails:", rep.Failed())
	after.Mass[0] *= 0.5
	rep, _ = audit.Step(before, after, stars, audit.DefaultOptions())
	fmt.Println("spoiled dump fails:", rep.Failed())
	// Output:
	// exact dump fails: false
	// spoiled dump fails: true
}

// Write a step as a dump (the layout the C ABI's ejecta_dump_* calls
// write, and "ejecta audit -manifest" reads), read it back and audit it.
func ExampleWriteDump() {
	before, after, stars, err := feedbacktest.Dump(feedback.ThermalDump{}, "uniform", 1)
	if err != nil {
		panic(err)
	}
	dir, err := os.MkdirTemp("", "ejecta-dump-")
	if err != nil {
		panic(err)
	}
	defer os.RemoveAll(dir)
	if err := audit.WriteDump(dir, &audit.Dump{Before: before, After: after, Stars: stars}); err != nil {
		panic(err)
	}
	d, err := audit.ReadDump(filepath.Join(dir, audit.ManifestFile))
	if err != nil {
		panic(err)
	}
	rep, err := audit.Step(d.Before, d.After, d.Stars, d.Options())
	if err != nil {
		panic(err)
	}
	fmt.Println("elements:", d.Before.Len(), "stars:", len(d.Stars), "fails:", rep.Failed())
	// Output:
	// elements: 400 stars: 1 fails: false
}
