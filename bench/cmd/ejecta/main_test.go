package main

import (
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Every subcommand answers -h, -help and --help (and "ejecta help CMD") on
// stdout with exit status 0: the usage line, a description paragraph, then
// the flags, each default stated once.
func TestHelpEverySubcommand(t *testing.T) {
	for _, c := range commands() {
		for _, form := range [][]string{{c.name, "-h"}, {c.name, "-help"}, {c.name, "--help"}, {"help", c.name}} {
			t.Run(strings.Join(form, " "), func(t *testing.T) {
				code, stdout, stderr := runCLI(form...)
				require.Equal(t, 0, code, stderr)
				assert.Empty(t, stderr)
				lines := strings.Split(stdout, "\n")
				require.Greater(t, len(lines), 3)
				assert.True(t, strings.HasPrefix(lines[0], "usage: ejecta "+c.name), lines[0])
				assert.Empty(t, lines[1])
				// A paragraph of prose: at least one sentence before any flag.
				para := strings.SplitN(strings.Join(lines[2:], "\n"), "\n\n", 2)[0]
				assert.NotContains(t, para, "\n  -")
				assert.Regexp(t, `^[A-Z][^\n]*[a-z]`, para)
				assert.Greater(t, len(strings.Fields(para)), 8, "description too short")
				// Each flag's block mentions its default at most once.
				blocks := regexp.MustCompile(`(?m)^  -`).Split(stdout, -1)
				for _, b := range blocks[1:] {
					assert.LessOrEqual(t, strings.Count(b, "default"), 1, "flag -%s", b)
				}
			})
		}
	}
}

func TestHelpErrors(t *testing.T) {
	tests := []struct {
		name string
		args []string
		code int
		want string
	}{
		{"bad flag names the help", []string{"rates", "-bogus"}, 2, `run "ejecta rates -h"`},
		{"bad value", []string{"bench", "-neighbors", "many"}, 2, "invalid value"},
		{"help of two commands", []string{"help", "rates", "bench"}, 2, "at most one command"},
		{"help of unknown command", []string{"help", "nope"}, 2, "unknown command"},
		{"no command", nil, 2, "usage: ejecta"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, stdout, stderr := runCLI(tc.args...)
			assert.Equal(t, tc.code, code)
			assert.Contains(t, stderr, tc.want)
			assert.Empty(t, stdout)
		})
	}
}

func TestVersion(t *testing.T) {
	code, stdout, stderr := runCLI("version")
	require.Equal(t, 0, code, stderr)
	assert.Regexp(t, `^ejecta \d+\.\d+\.\d+\n$`, stdout)

	code, stdout, stderr = runCLI("version", "extra")
	assert.Equal(t, 2, code)
	assert.Empty(t, stdout)
	assert.Contains(t, stderr, "takes no arguments")

	code, _, stderr = runCLI("version", "-v")
	assert.Equal(t, 2, code)
	assert.Contains(t, stderr, "-v")
}
