package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/bench/cooling"
	"github.com/ejecta-dev/ejecta/feedback"
)

// The JSON output carries exactly the documented keys for the shell
// formation point and the history records.
func TestRemnantJSONKeys(t *testing.T) {
	dir := t.TempDir()
	var out, errOut bytes.Buffer
	code := run([]string{"remnant", "-json", "-zones", "30", "-density", "10", "-out", dir}, &out, &errOut)
	require.Equal(t, 0, code, errOut.String())
	var raw map[string]json.RawMessage
	require.NoError(t, json.Unmarshal(out.Bytes(), &raw))
	var sf map[string]float64
	require.NoError(t, json.Unmarshal(raw["shell_formation"], &sf))
	assert.ElementsMatch(t, []string{"time_kyr", "radius_pc", "mass_msun", "momentum_msun_kms"}, keys(sf))
	var hist []map[string]float64
	require.NoError(t, json.Unmarshal(raw["history"], &hist))
	require.NotEmpty(t, hist)
	assert.ElementsMatch(t, []string{"time_kyr", "shock_radius_pc", "radial_momentum_msun_kms", "kinetic_erg", "thermal_erg", "radiated_erg"}, keys(hist[0]))
	// At n = 10 the shell forms near 11 kyr (Kim & Ostriker 2015: 4.4e4 yr
	// n^-0.55 = 12.4 kyr; from memory), even at this coarse resolution.
	assert.InEpsilon(t, 12.4, sf["time_kyr"], 0.3)
	for _, f := range []string{"remnant-momentum.png", "remnant-energy.png"} {
		st, err := os.Stat(filepath.Join(dir, f))
		require.NoError(t, err)
		assert.Greater(t, st.Size(), int64(1000))
	}
	var rep remnantReport
	dec := json.NewDecoder(bytes.NewReader(out.Bytes()))
	dec.DisallowUnknownFields()
	require.NoError(t, dec.Decode(&rep))
	assert.Less(t, rep.Ledger.Residual, 1e-10)
}

func keys(m map[string]float64) []string {
	var k []string
	for s := range m {
		k = append(k, s)
	}
	return k
}

func TestRemnantText(t *testing.T) {
	dir := t.TempDir()
	var out, errOut bytes.Buffer
	code := run([]string{"remnant", "-zones", "30", "-density", "100", "-no-cooling", "-out", dir}, &out, &errOut)
	require.Equal(t, 0, code, errOut.String())
	s := out.String()
	assert.Contains(t, s, "shell formation: none during the run")
	assert.Contains(t, s, "energy ledger")
	assert.Contains(t, s, "columns:")
}

func TestRemnantFlagErrors(t *testing.T) {
	dir := t.TempDir()
	for _, args := range [][]string{
		{"-density", "-1"},
		{"-no-cooling", "-cooling", "x.csv"},
		{"-zones", "2"},
		{"extra"},
		{"-calibrate", "-no-cooling"},
		{"-calibrate", "-densities", "1,x"},
		{"-calibrate", "-densities", "10,1"},
		{"-calibrate", "-workers", "0"},
	} {
		var out, errOut bytes.Buffer
		code := run(append([]string{"remnant", "-out", dir}, args...), &out, &errOut)
		assert.Equal(t, 2, code, "%v: %s", args, errOut.String())
		assert.NotEmpty(t, errOut.String())
	}
	var out, errOut bytes.Buffer
	assert.Equal(t, 1, run([]string{"remnant", "-cooling", filepath.Join(dir, "missing.csv"), "-out", dir}, &out, &errOut))
	out.Reset()
	assert.Equal(t, 0, run([]string{"remnant", "-h"}, &out, &errOut))
	assert.Contains(t, out.String(), "-ejecta-mass")
}

// Calibration with a user's cooling table writes a remnant table that the
// feedback package reads back.
func TestRemnantCalibrate(t *testing.T) {
	dir := t.TempDir()
	c, err := cooling.Builtin(1)
	require.NoError(t, err)
	var sb strings.Builder
	require.NoError(t, cooling.WriteTable(&sb, []float64{1}, []*cooling.Curve{c}))
	coolPath := filepath.Join(dir, "cooling.csv")
	require.NoError(t, os.WriteFile(coolPath, []byte(sb.String()), 0o644))
	var out, errOut bytes.Buffer
	code := run([]string{"remnant", "-calibrate", "-zones", "30", "-densities", "10,100", "-metallicities", "1",
		"-cooling", coolPath, "-out", dir, "-quiet"}, &out, &errOut)
	require.Equal(t, 0, code, errOut.String())
	tab, err := feedback.ReadRemnantTableFile(filepath.Join(dir, "remnant-table.csv"))
	require.NoError(t, err)
	rows := tab.Rows()
	require.Len(t, rows, 2)
	assert.Greater(t, rows[0].ShellMomentum, rows[1].ShellMomentum, "p_sf falls with density")
	assert.Contains(t, out.String(), "remnant table:")
}

// A calibrated remnant table joins the scheme comparison as its own
// variant; a malformed one is refused with its line.
func TestBenchWithRemnantTable(t *testing.T) {
	dir := t.TempDir()
	var out, errOut bytes.Buffer
	require.Equal(t, 0, run([]string{"remnant", "-calibrate", "-zones", "30", "-densities", "1,100", "-metallicities", "1",
		"-out", dir, "-quiet"}, &out, &errOut), errOut.String())
	table := filepath.Join(dir, "remnant-table.csv")
	benchOut := t.TempDir()
	code, stdout, stderr := runCLI("bench", "-quiet", "-skip-speed", "-out", benchOut, "-setups", "uniform-lattice",
		"-schemes", "terminal-momentum", "-remnant-table", table)
	require.Equal(t, 0, code, stderr)
	assert.Contains(t, stdout, "terminal-momentum-table")
	res := readResult(t, benchOut)
	found := false
	for _, c := range res.Convergence {
		if c.Scheme == "terminal-momentum-table" {
			found = true
			assert.Positive(t, c.RadialMomentumMsunKms)
		}
	}
	assert.True(t, found)
	bad := filepath.Join(dir, "bad.csv")
	require.NoError(t, os.WriteFile(bad, []byte(feedback.RemnantTableHeader+"\n1,1,x,1,1,1,1,1,1,1\n"), 0o644))
	code, _, stderr = runCLI("bench", "-quiet", "-skip-speed", "-out", benchOut, "-remnant-table", bad)
	assert.NotEqual(t, 0, code)
	assert.Contains(t, stderr, "line 2")
}
