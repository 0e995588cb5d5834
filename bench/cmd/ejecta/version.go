package main

import (
	"flag"
	"fmt"
	"io"

	"github.com/ejecta-dev/ejecta/feedback"
)

func runVersion(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("version", flag.ContinueOnError)
	fs.SetOutput(stderr)
	if err := fs.Parse(args); err != nil {
		return 2
	}
	fmt.Fprintf(stdout, "ejecta %s\n", feedback.Version)
	return 0
}
