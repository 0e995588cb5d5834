package main

import (
	"fmt"
	"io"

	"github.com/ejecta-dev/ejecta/feedback"
)

var versionCommand = subcommand{
	name:        "version",
	synopsis:    "",
	description: "Prints the version of the ejecta library this command was built from. It takes no flags and no arguments.",
}

func runVersion(args []string, stdout, stderr io.Writer) int {
	fs := versionCommand.newFlagSet()
	if code, ok := versionCommand.parseFlags(fs, args, stdout, stderr); !ok {
		return code
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "ejecta version: takes no arguments, got %q\n", fs.Args())
		return 2
	}
	fmt.Fprintf(stdout, "ejecta %s\n", feedback.Version)
	return 0
}
