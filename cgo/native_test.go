package main

import (
	"bufio"
	"bytes"
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/stretchr/testify/require"
)

// nativeLibs holds libejecta built once per test binary (both kinds), in a
// directory removed by TestMain. Test-only state.
type nativeLibs struct {
	once sync.Once
	dir  string
	err  error
}

var libs nativeLibs

func TestMain(m *testing.M) {
	code := m.Run()
	if libs.dir != "" {
		os.RemoveAll(libs.dir)
	}
	os.Exit(code)
}

// requireTool returns the path of a native tool, skipping the test when it
// is missing unless EJECTA_REQUIRE_NATIVE=1, in which case the test fails.
func requireTool(t testing.TB, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("EJECTA_REQUIRE_NATIVE") == "1" {
			t.Fatalf("%s not found and EJECTA_REQUIRE_NATIVE=1: %v", name, err)
		}
		t.Skipf("%s not found (install it, or set EJECTA_REQUIRE_NATIVE=1 to make this a failure): %v", name, err)
	}
	return p
}

func goTool(t testing.TB) string {
	t.Helper()
	if p, err := exec.LookPath("go"); err == nil {
		return p
	}
	if root := os.Getenv("GOROOT"); root != "" {
		return filepath.Join(root, "bin", "go")
	}
	t.Fatal("go command not found")
	return ""
}

// libraryDir builds libejecta.so, libejecta.a (and their generated
// headers) into a shared directory, once per test binary.
func libraryDir(t testing.TB) string {
	t.Helper()
	requireTool(t, "gcc")
	libs.once.Do(func() {
		dir, err := os.MkdirTemp("", "ejecta-cgo-libs-")
		if err != nil {
			libs.err = err
			return
		}
		libs.dir = dir
		gobin := goTool(t)
		for _, mode := range []struct{ buildmode, out string }{
			{"c-shared", "libejecta.so"}, {"c-archive", "libejecta.a"},
		} {
			cmd := exec.Command(gobin, "build", "-buildmode="+mode.buildmode, "-o", filepath.Join(dir, mode.out), ".")
			if out, err := cmd.CombinedOutput(); err != nil {
				libs.err = fmt.Errorf("go build -buildmode=%s: %v\n%s", mode.buildmode, err, out)
				return
			}
		}
	})
	require.NoError(t, libs.err)
	return libs.dir
}

// linkMode is how a host is linked against libejecta.
type linkMode struct {
	name  string
	flags func(lib string) []string
	cflag []string
}

func sharedLink(lib string) []string {
	return []string{"-L" + lib, "-lejecta", "-Wl,-rpath," + lib}
}

func archiveLink(lib string) []string {
	return []string{filepath.Join(lib, "libejecta.a"), "-lpthread"}
}

var linkModes = []linkMode{
	{name: "shared", flags: sharedLink},
	{name: "archive", flags: archiveLink},
	{name: "asan", flags: archiveLink, cflag: []string{"-fsanitize=address", "-fno-omit-frame-pointer", "-g"}},
}

// compile runs a compiler, failing the test with its output.
func compile(t testing.TB, compiler string, args ...string) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	out, err := exec.CommandContext(ctx, compiler, args...).CombinedOutput()
	require.NoError(t, err, "%s %s\n%s", compiler, strings.Join(args, " "), out)
}

// buildCHost compiles the example host examples/name.c with compiler (gcc,
// or an MPI wrapper) into dir, warnings as errors, linked to the library
// in lib as mode says, then to libs and -lm; it returns the binary.
func buildCHost(t testing.TB, compiler, lib, dir, name string, mode linkMode, libs ...string) string {
	t.Helper()
	bin := filepath.Join(dir, name)
	args := append([]string{"-std=c11", "-Wall", "-Wextra", "-Werror", "-O1", "-I."}, mode.cflag...)
	args = append(args, "-o", bin, filepath.Join("examples", name+".c"))
	args = append(args, mode.flags(lib)...)
	args = append(append(args, libs...), "-lm")
	compile(t, compiler, args...)
	return bin
}

// buildFortranHost compiles the example host examples/name.f90 with the
// module ejecta_mod into dir (its .mod files too), warnings as errors,
// linked to the library in lib as mode says; it returns the binary.
func buildFortranHost(t testing.TB, gfortran, lib, dir, name string, mode linkMode) string {
	t.Helper()
	bin := filepath.Join(dir, name)
	args := append([]string{"-std=f2008", "-Wall", "-Werror", "-O1", "-J", dir}, mode.cflag...)
	args = append(args, "-o", bin, filepath.Join("fortran", "ejecta_mod.f90"), filepath.Join("examples", name+".f90"))
	args = append(args, mode.flags(lib)...)
	compile(t, gfortran, args...)
	return bin
}

// runHost runs a built host, returning its stdout; it fails the test on a
// non-zero exit or any AddressSanitizer report.
func runHost(t testing.TB, name string, args ...string) string {
	t.Helper()
	return runHostEnv(t, "halt_on_error=1", name, args...)
}

// runHostEnv is runHost with the given ASAN_OPTIONS.
func runHostEnv(t testing.TB, asanOptions, name string, args ...string) string {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, name, args...)
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	cmd.Env = append(os.Environ(), "ASAN_OPTIONS="+asanOptions)
	err := cmd.Run()
	require.NoError(t, err, "%s %v\nstdout:\n%s\nstderr:\n%s", name, args, stdout.String(), stderr.String())
	require.NotContains(t, stderr.String(), "AddressSanitizer", "sanitizer report")
	require.NotContains(t, stderr.String(), "FAIL")
	return stdout.String()
}

// keyValues parses the key=value words of a host's output.
func keyValues(out string) map[string]string {
	kv := map[string]string{}
	sc := bufio.NewScanner(strings.NewReader(out))
	for sc.Scan() {
		line := sc.Text()
		// Lines holding messages keep everything after the first '='.
		if k, v, ok := strings.Cut(line, "="); ok && strings.HasSuffix(k, "_error") {
			kv[k] = v
			continue
		}
		for _, w := range strings.Fields(line) {
			if k, v, ok := strings.Cut(w, "="); ok {
				kv[k] = v
			}
		}
	}
	return kv
}

func number(t testing.TB, kv map[string]string, key string) float64 {
	t.Helper()
	s, ok := kv[key]
	require.True(t, ok, "output lacks %s", key)
	v, err := strconv.ParseFloat(s, 64)
	require.NoError(t, err, "%s=%s", key, s)
	return v
}
