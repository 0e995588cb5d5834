package feedbacktest_test

import (
	"fmt"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/feedbacktest"
)

// Run the harness on a scheme outside go test (inside a test, use Check).
func ExampleRun() {
	opts := feedbacktest.DefaultOptions()
	opts.Seeds = []uint64{1}
	errs := feedbacktest.Run(feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}, opts)
	fmt.Println("violations:", len(errs))
	// Output:
	// violations: 0
}
