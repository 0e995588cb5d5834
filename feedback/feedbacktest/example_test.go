package feedbacktest_test

import (
	"fmt"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/feedbacktest"
)

// Run the harness on a scheme outside go test (inside a test, use Check).
func ExampleRun() {
	errs := feedbacktest.Run(feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}, feedbacktest.Options{Seeds: []uint64{1}})
	fmt.Println("violations:", len(errs))
	// Output:
	// violations: 0
}

// Audit a before/after dump of one feedback step; here the dump is made by
// ejecta itself and then spoiled by losing some mass.
func ExampleAudit() {
	before, after, stars, err := feedbacktest.Dump(feedback.TerminalMomentum{}, "uniform", 1)
	if err != nil {
		panic(err)
	}
	rep, err := feedbacktest.Audit(before, after, stars, feedbacktest.AuditOptions{})
	if err != nil {
		panic(err)
	}
	fmt.Println("exact dump fails:", rep.Failed())
	after.Mass[0] *= 0.5
	rep, _ = feedbacktest.Audit(before, after, stars, feedbacktest.AuditOptions{})
	fmt.Println("spoiled dump fails:", rep.Failed())
	// Output:
	// exact dump fails: false
	// spoiled dump fails: true
}
