package audit_test

import (
	"fmt"

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
