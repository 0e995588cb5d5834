package main

import (
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// readmeBlock returns the first ```sh block after the heading in the
// repository's README.md.
func readmeBlock(t *testing.T, heading string) string {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "README.md"))
	require.NoError(t, err)
	s := string(b)
	i := strings.Index(s, heading)
	require.GreaterOrEqual(t, i, 0, "README has no %q", heading)
	s = s[i:]
	start := strings.Index(s, "```sh\n")
	require.GreaterOrEqual(t, start, 0)
	s = s[start+len("```sh\n"):]
	end := strings.Index(s, "```")
	require.GreaterOrEqual(t, end, 0)
	return s[:end]
}

// The README's link commands work exactly as written, from the repository
// root: they build the shared library, link the example host at its real
// path and run it. They run in a mirror of the repository (links to its
// files) so that nothing is written into the source tree.
func TestReadmeLinkCommands(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the shared library (about 10 s)")
	}
	requireTool(t, "gcc")
	gobin := goTool(t)
	script := readmeBlock(t, "## Link it into a C, C++ or Fortran code")
	require.Contains(t, script, "cgo/examples/host.c")

	out := runReadmeScript(t, gobin, script)
	assert.Contains(t, out, "result pass")
}

// runReadmeScript runs README commands in a mirror of the repository
// (links to its files) from its root, so that nothing is written into the
// source tree, and returns their output.
func runReadmeScript(t *testing.T, gobin, script string) string {
	t.Helper()
	root, err := filepath.Abs("..")
	require.NoError(t, err)
	mirror := t.TempDir()
	link := func(from, to string) {
		entries, err := os.ReadDir(from)
		require.NoError(t, err)
		for _, e := range entries {
			if e.Name() == ".git" || e.Name() == "build" || (e.Name() == "cgo" && from == root) {
				continue
			}
			require.NoError(t, os.Symlink(filepath.Join(from, e.Name()), filepath.Join(to, e.Name())))
		}
	}
	link(root, mirror)
	require.NoError(t, os.Mkdir(filepath.Join(mirror, "cgo"), 0o755))
	link(filepath.Join(root, "cgo"), filepath.Join(mirror, "cgo"))

	cmd := exec.Command("sh", "-e", "-c", script)
	cmd.Dir = mirror
	cmd.Env = append(os.Environ(), "PWD="+mirror, "PATH="+filepath.Dir(gobin)+string(os.PathListSeparator)+os.Getenv("PATH"))
	out, err := cmd.CombinedOutput()
	require.NoError(t, err, "README commands:\n%s\noutput:\n%s", script, out)
	return string(out)
}

// The README's audit commands work as written: they build the library,
// link the example host that injects with its own scheme, run it and
// audit its dump with the ejecta command.
func TestReadmeAuditCommands(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the shared library and the ejecta command (about 20 s)")
	}
	requireTool(t, "gcc")
	gobin := goTool(t)
	script := readmeBlock(t, "## Test your own injection scheme")
	require.Contains(t, script, "cgo/examples/audit_host.c")
	require.Contains(t, script, "ejecta audit -manifest")
	out := runReadmeScript(t, gobin, script)
	assert.Contains(t, out, "result pass")
	assert.Contains(t, out, "passed")
}

// The README states the exact Go version go.mod requires.
func TestReadmeGoVersion(t *testing.T) {
	mod, err := os.ReadFile(filepath.Join("..", "go.mod"))
	require.NoError(t, err)
	m := regexp.MustCompile(`(?m)^go (\d+\.\d+(\.\d+)?)$`).FindSubmatch(mod)
	require.NotNil(t, m, "go.mod has no go directive")
	readme, err := os.ReadFile(filepath.Join("..", "README.md"))
	require.NoError(t, err)
	assert.Contains(t, string(readme), "Go "+string(m[1])+" or newer")
	assert.Contains(t, string(readme), "`go "+string(m[1])+"`")
}
