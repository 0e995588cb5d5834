package main

import (
	"debug/elf"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// pcLinkLines returns the shared and static link commands of ejecta.pc's
// comment.
func pcLinkLines(t *testing.T) (shared, static string) {
	t.Helper()
	pc, err := os.ReadFile("ejecta.pc")
	require.NoError(t, err)
	line := func(label string) string {
		m := regexp.MustCompile(`(?m)^# ` + label + `:\s+(.+)$`).FindSubmatch(pc)
		require.NotNil(t, m, "ejecta.pc has no %q line", label)
		return string(m[1])
	}
	return line("Shared"), line("Static")
}

// readmeSection returns the text of cgo/README.md from the heading to the
// next heading of any level.
func readmeSection(t *testing.T, heading string) string {
	t.Helper()
	b, err := os.ReadFile("README.md")
	require.NoError(t, err)
	s := string(b)
	i := strings.Index(s, heading)
	require.GreaterOrEqual(t, i, 0, "cgo/README.md has no %q", heading)
	s = s[i+len(heading):]
	if j := strings.Index(s, "\n#"); j >= 0 {
		s = s[:j]
	}
	return s
}

// shBlocks returns the ```sh blocks of a piece of markdown.
func shBlocks(s string) []string {
	var blocks []string
	for _, m := range regexp.MustCompile("(?s)```sh\n(.*?)```").FindAllStringSubmatch(s, -1) {
		blocks = append(blocks, m[1])
	}
	return blocks
}

// TestPkgConfigLinkLines installs libejecta as cgo/README.md says (both
// library kinds, the header, ejecta.pc with its prefix set) into a
// temporary prefix, then links examples/host.c with the two link lines of
// ejecta.pc's comment, which the README repeats. The shared host runs with
// the prefix on the library path. The static host must not need
// libejecta.so: it has no such dependency and runs after the shared
// library is removed.
func TestPkgConfigLinkLines(t *testing.T) {
	lib := libraryDir(t)
	requireTool(t, "gcc")
	requireTool(t, "cc")
	requireTool(t, "pkg-config")
	shared, static := pcLinkLines(t)
	section := readmeSection(t, "### Installing with pkg-config")
	blocks := shBlocks(section)
	require.Len(t, blocks, 2, "the install block and the link block")
	assert.Equal(t, []string{shared, static}, strings.Split(strings.TrimSpace(blocks[1]), "\n"), "README link lines differ from ejecta.pc's")

	// A tree shaped like the repository after the README's build step.
	root := t.TempDir()
	require.NoError(t, os.MkdirAll(filepath.Join(root, "cgo", "build"), 0o755))
	for _, f := range []string{"libejecta.so", "libejecta.a"} {
		require.NoError(t, os.Symlink(filepath.Join(lib, f), filepath.Join(root, "cgo", "build", f)))
	}
	for _, f := range []string{"ejecta.h", "ejecta.pc"} {
		abs, err := filepath.Abs(f)
		require.NoError(t, err)
		require.NoError(t, os.Symlink(abs, filepath.Join(root, "cgo", f)))
	}
	prefix := filepath.Join(t.TempDir(), "prefix")
	run := func(dir, script string, env ...string) string {
		t.Helper()
		cmd := exec.Command("sh", "-e", "-c", script)
		cmd.Dir = dir
		cmd.Env = append(append(os.Environ(), "PREFIX="+prefix, "PKG_CONFIG_PATH="+filepath.Join(prefix, "lib", "pkgconfig")), env...)
		out, err := cmd.CombinedOutput()
		require.NoError(t, err, "%s\n%s", script, out)
		return string(out)
	}
	run(root, blocks[0])

	host, err := filepath.Abs(filepath.Join("examples", "host.c"))
	require.NoError(t, err)
	bin := t.TempDir()
	link := func(line, out string) string {
		line = strings.Replace(line, "host.c", host, 1)
		line = strings.Replace(line, "-o host", "-o "+filepath.Join(bin, out), 1)
		run(bin, line)
		return filepath.Join(bin, out)
	}
	sharedHost, staticHost := link(shared, "host-shared"), link(static, "host-static")
	assert.Contains(t, neededLibraries(t, sharedHost), "libejecta.so", "the shared line links the shared library")
	assert.NotContains(t, neededLibraries(t, staticHost), "libejecta.so", "the static line links the shared library")
	assert.Contains(t, run(bin, sharedHost, "LD_LIBRARY_PATH="+filepath.Join(prefix, "lib")), "result pass")

	require.NoError(t, os.Remove(filepath.Join(prefix, "lib", "libejecta.so")))
	assert.Contains(t, run(bin, staticHost), "result pass")
}

// neededLibraries lists the shared libraries an executable names
// (DT_NEEDED).
func neededLibraries(t *testing.T, path string) []string {
	t.Helper()
	f, err := elf.Open(path)
	require.NoError(t, err)
	defer f.Close()
	libs, err := f.ImportedLibraries()
	require.NoError(t, err)
	return libs
}
