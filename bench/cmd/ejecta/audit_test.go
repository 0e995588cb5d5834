package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"codeberg.org/sbinet/npyio"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/feedback/feedbacktest"
	"github.com/ejecta-dev/ejecta/yields"
)

// writeDump writes a step with audit.WriteDump (the writer the C ABI's
// dump calls use) and returns the manifest's path.
func writeDump(t *testing.T, before, after *audit.GasArrays, stars []audit.Star) string {
	t.Helper()
	dir := t.TempDir()
	require.NoError(t, audit.WriteDump(dir, &audit.Dump{Before: before, After: after, Stars: stars}))
	return filepath.Join(dir, audit.ManifestFile)
}

func TestAuditCommand(t *testing.T) {
	cases := []struct {
		name  string
		plant func(a *audit.GasArrays, s []audit.Star)
		code  int
		want  string
	}{
		{"exact ejecta dump", func(*audit.GasArrays, []audit.Star) {}, 0, "passed"},
		{"lost mass", func(a *audit.GasArrays, s []audit.Star) { a.Mass[feedbacktest.Nearest(a, s[0].Pos)] *= 0.999 }, 1, "mass imbalance"},
		{"wrong frame", func(a *audit.GasArrays, s []audit.Star) {
			i := feedbacktest.Nearest(a, s[0].Pos)
			for k := 0; k < 3; k++ {
				a.Vel[k][i] -= s[0].Mass * s[0].Vel[k] / a.Mass[i]
			}
		}, 1, "momentum x imbalance"},
		{"one-sided momentum", func(a *audit.GasArrays, s []audit.Star) {
			a.Vel[1][feedbacktest.Nearest(a, s[0].Pos)] += 3
		}, 1, "one-sided"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			before, after, stars, err := feedbacktest.Dump(feedback.TerminalMomentum{}, "moving", 2)
			require.NoError(t, err)
			c.plant(after, stars)
			path := writeDump(t, before, after, stars)
			var out, errOut bytes.Buffer
			code := run([]string{"audit", "-manifest", path}, &out, &errOut)
			assert.Equal(t, c.code, code, "stdout:\n%s\nstderr:\n%s", out.String(), errOut.String())
			assert.Contains(t, out.String(), c.want)
		})
	}
}

func TestAuditCommandBadInput(t *testing.T) {
	var out, errOut bytes.Buffer
	assert.Equal(t, 2, run([]string{"audit"}, &out, &errOut))
	assert.Equal(t, 2, run([]string{"audit", "-manifest", filepath.Join(t.TempDir(), "missing.json")}, &out, &errOut))
	dir := t.TempDir()
	bad := filepath.Join(dir, "m.json")
	require.NoError(t, os.WriteFile(bad, []byte(`{"gas_before": {"position": "nope.npy"}, "unknown_key": 1}`), 0o644))
	errOut.Reset()
	assert.Equal(t, 2, run([]string{"audit", "-manifest", bad}, &out, &errOut))
	assert.Contains(t, errOut.String(), "unknown")
}

// A tolerance that is not a finite non-negative number is refused before
// anything is read: a NaN tolerance once let a spoiled dump pass.
func TestAuditCommandRefusesBadTolerances(t *testing.T) {
	before, after, stars, err := feedbacktest.Dump(feedback.TerminalMomentum{}, "moving", 2)
	require.NoError(t, err)
	after.Mass[0] *= 0.5 // spoiled
	path := writeDump(t, before, after, stars)
	for _, args := range [][]string{
		{"-tol", "NaN", "-isotropy-tol", "NaN"},
		{"-tol", "NaN"},
		{"-isotropy-tol", "nan"},
		{"-tol", "-1e-10"},
		{"-isotropy-tol", "-1"},
		{"-tol", "+Inf"},
		{"-isotropy-tol", "Inf"},
	} {
		t.Run(strings.Join(args, " "), func(t *testing.T) {
			code, out, errOut := runCLI(append([]string{"audit", "-manifest", path}, args...)...)
			assert.Equal(t, 2, code, "stdout:\n%s", out)
			assert.Contains(t, errOut, "must be finite and non-negative")
		})
	}
	code, _, _ := runCLI("audit", "-manifest", path, "-tol", "0", "-isotropy-tol", "0")
	assert.Equal(t, 1, code, "zero tolerances are tolerances: the spoiled dump fails")
}

// Mistakes in a dump are reported in the manifest's terms: which key and
// file, how many bytes a truncated array should have, which file a row
// count disagrees with, and JSON mistakes without Go type names.
func TestAuditCommandMessages(t *testing.T) {
	before, after, stars, err := feedbacktest.Dump(feedback.TerminalMomentum{}, "moving", 2)
	require.NoError(t, err)
	var wantBytes, wantNeed string // set by the truncated-array case
	cases := []struct {
		name  string
		spoil func(t *testing.T, dir string, m map[string]any)
		want  []string
	}{
		{"truncated array", func(t *testing.T, dir string, m map[string]any) {
			p := filepath.Join(dir, "gas_after", "mass.npy")
			info, err := os.Stat(p)
			require.NoError(t, err)
			require.NoError(t, os.Truncate(p, info.Size()-20))
			wantBytes = fmt.Sprintf("%d bytes, but", info.Size()-20)
			wantNeed = fmt.Sprintf("need %d", info.Size())
		}, []string{"gas_after.mass", "gas_after/mass.npy", "truncated"}},
		{"truncated header", func(t *testing.T, dir string, m map[string]any) {
			require.NoError(t, os.Truncate(filepath.Join(dir, "stars", "energy.npy"), 30))
		}, []string{"stars.energy", "stars/energy.npy", "truncated", "header"}},
		{"length mismatch", func(t *testing.T, dir string, m map[string]any) {
			f, err := os.Create(filepath.Join(dir, "short_u.npy"))
			require.NoError(t, err)
			require.NoError(t, npyio.Write(f, after.Energy[1:]))
			require.NoError(t, f.Close())
			m["gas_after"].(map[string]any)["internal_energy"] = "short_u.npy"
		}, []string{"gas_after.internal_energy (short_u.npy)", fmt.Sprint(after.Len() - 1), "gas_after.position (gas_after/position.npy)", fmt.Sprint(after.Len())}},
		{"a number where a file name goes", func(t *testing.T, dir string, m map[string]any) {
			m["gas_before"].(map[string]any)["mass"] = 3
		}, []string{"gas_before.mass", "a JSON number", "a string (a file name)", "line "}},
		{"a string where the box goes", func(t *testing.T, dir string, m map[string]any) {
			m["box"] = "big"
		}, []string{"box", "a JSON string", "an array of three numbers"}},
		{"unknown key", func(t *testing.T, dir string, m map[string]any) {
			m["gas_befor"] = map[string]any{}
		}, []string{`unknown key "gas_befor"`}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			wantBytes, wantNeed = "", ""
			path := writeDump(t, before, after, stars)
			raw, err := os.ReadFile(path)
			require.NoError(t, err)
			var m map[string]any
			require.NoError(t, json.Unmarshal(raw, &m))
			c.spoil(t, filepath.Dir(path), m)
			raw, err = json.MarshalIndent(m, "", "  ")
			require.NoError(t, err)
			require.NoError(t, os.WriteFile(path, raw, 0o644))
			code, _, errOut := runCLI("audit", "-manifest", path)
			assert.Equal(t, 2, code)
			for _, w := range append(c.want, wantBytes, wantNeed) {
				assert.Contains(t, errOut, w)
			}
			for _, leak := range []string{"Go struct", "Go value", "Manifest", "GasFiles", "EOF"} {
				assert.NotContains(t, errOut, leak)
			}
		})
	}
	for _, c := range []struct{ name, text, want string }{
		{"syntax error", "{\n  \"box\": [1, 2, 3],\n  \"gas_before\": {\"mass\" \"m.npy\"}\n}", "line 3, column 26"},
		{"cut short", "{\"box\": [1, 2, 3],", "ends before the manifest's closing brace"},
		{"text after the manifest", "{}\n{}", "text after the closing brace"},
	} {
		t.Run(c.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "m.json")
			require.NoError(t, os.WriteFile(path, []byte(c.text), 0o644))
			code, _, errOut := runCLI("audit", "-manifest", path)
			assert.Equal(t, 2, code)
			assert.Contains(t, errOut, c.want)
			assert.NotContains(t, errOut, "EOF")
		})
	}
}

// -json prints the verdict, the counts and the report with snake_case keys
// and empty lists, not null.
func TestAuditCommandJSON(t *testing.T) {
	before, after, stars, err := feedbacktest.Dump(feedback.TerminalMomentum{}, "moving", 2)
	require.NoError(t, err)
	code, out, errOut := runCLI("audit", "-json", "-manifest", writeDump(t, before, after, stars))
	require.Equal(t, 0, code, errOut)
	assert.NotContains(t, out, "null")
	var doc map[string]any
	require.NoError(t, json.Unmarshal([]byte(out), &doc))
	assert.Equal(t, true, doc["passed"])
	assert.EqualValues(t, after.Len(), doc["gas_elements"])
	assert.EqualValues(t, len(stars), doc["stars"])
	for _, key := range []string{"imbalances", "isotropy", "negative_mass", "negative_energy", "unexplained", "problems"} {
		require.Contains(t, doc, key)
		assert.NotNil(t, doc[key], key)
	}
	for key := range doc {
		assert.Equal(t, strings.ToLower(key), key, "snake_case key")
	}
}

// The species of a dump are those of its species_set: a dump that tracks
// nickel (here the iron of ejecta's own step, relabeled) is audited and
// reported in that set's symbols.
func TestAuditCommandSpeciesSet(t *testing.T) {
	before, after, stars, err := feedbacktest.Dump(feedback.TerminalMomentum{}, "moving", 2)
	require.NoError(t, err)
	set, err := yields.ParseSpeciesSet("Ni")
	require.NoError(t, err)
	nickel, ok := set.Slot(yields.Element(28))
	require.True(t, ok)
	for _, g := range []*audit.GasArrays{before, after} {
		var metals, iron []float64
		for c, sp := range g.Species {
			switch sp {
			case yields.Metals:
				metals = g.Fractions[c]
			case yields.Iron:
				iron = g.Fractions[c]
			}
		}
		g.Species, g.Fractions = []yields.Species{yields.Metals, nickel}, [][]float64{metals, iron}
	}
	for i := range stars {
		var a yields.Abundances
		a[yields.Metals], a[nickel] = stars[i].Species[yields.Metals], stars[i].Species[yields.Iron]
		stars[i].Species = a
	}
	dir := t.TempDir()
	require.NoError(t, audit.WriteDump(dir, &audit.Dump{Species: set, Before: before, After: after, Stars: stars}))
	path := filepath.Join(dir, audit.ManifestFile)
	code, out, errOut := runCLI("audit", "-manifest", path)
	require.Equal(t, 0, code, errOut)
	assert.Contains(t, out, "species Ni")
	assert.NotContains(t, out, "species H ")

	// Half the nickel of one element is lost: the balance that fails is
	// nickel's.
	after.Fractions[1][feedbacktest.Nearest(after, stars[0].Pos)] *= 0.5
	require.NoError(t, audit.WriteDump(dir, &audit.Dump{Species: set, Before: before, After: after, Stars: stars}))
	code, out, _ = runCLI("audit", "-manifest", path)
	assert.Equal(t, 1, code)
	assert.Contains(t, out, "species Ni imbalance")
}
