package main

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// writeKOTable writes a remnant table holding the Kim & Ostriker 2015
// fit's values on the given densities (cm^-3), at metallicities 1e-3 and
// 10 solar.
func writeKOTable(t *testing.T, path string, densities []float64) {
	t.Helper()
	var rows []feedback.RemnantTableRow
	for _, z := range []float64{1e-3, 10} {
		for _, n := range densities {
			r := feedback.KimOstriker2015.Remnant(units.FOE, n, z*yields.SolarMetals)
			rows = append(rows, feedback.RemnantTableRow{
				Density: n, Metallicity: z, Energy: units.FOE, ShellTime: 1,
				ShellRadius: r.CoolingRadius / units.Parsec, ShellMass: r.SwitchMass / units.SolarMass,
				ShellMomentum: r.SwitchMomentum / units.MsunKms,
				// The fit's final momentum, where its momentum law reaches it.
				LateTime: 10, LateMomentum: r.TerminalMomentum / units.MsunKms,
				LateMass: r.SwitchMass * math.Pow(r.TerminalMomentum/r.SwitchMomentum, 1/r.GrowthExponent) / units.SolarMass,
			})
		}
	}
	var sb strings.Builder
	require.NoError(t, feedback.WriteRemnantTable(&sb, nil, rows))
	require.NoError(t, os.WriteFile(path, []byte(sb.String()), 0o644))
}

// A remnant table named in the config replaces the remnant fit: one
// holding the Kim & Ostriker 2015 fit's values steps like the fit; gas
// outside a table's grid is returned undeposited; unreadable or malformed
// tables fail ejecta_create with EJECTA_ERR_REMNANT_TABLE naming the file
// and line.
func TestConfigRemnantTable(t *testing.T) {
	dir := t.TempDir()
	wide := filepath.Join(dir, "wide.csv")
	writeKOTable(t, wide, []float64{1e-12, 1e-6, 1, 1e6, 1e12})
	narrow := filepath.Join(dir, "narrow.csv")
	writeKOTable(t, narrow, []float64{1e10, 1e11})
	malformed := filepath.Join(dir, "malformed.csv")
	require.NoError(t, os.WriteFile(malformed, []byte(feedback.RemnantTableHeader+"\n1,1,1e51,1,1,1,x,1,1,1\n"), 0o644))

	step := func(path string) (int32, ledgerABI, string) {
		g := newTestGas(4, 8, 4)
		c := pcConfig()
		if path != "" {
			c.RemnantTable = cString(path)
		}
		h := create(t, c)
		require.Equal(t, codeOK, entryBindGas(h, &g.desc))
		stars := supernovae(3, 8, 5)
		code := entryStep(h, &stars[0], int64(len(stars)), 0, modeOwnFinder, nil, nil)
		msg := lastError(h)
		var l ledgerABI
		require.Equal(t, codeOK, entryGetLedger(h, &l))
		return code, l, msg
	}
	codeFit, fit, _ := step("")
	require.Equal(t, codeOK, codeFit)
	codeTab, tab, _ := step(wide)
	require.Equal(t, codeOK, codeTab)
	assert.InEpsilon(t, fit.RadialMomentum, tab.RadialMomentum, 1e-9)
	code, l, msg := step(narrow)
	assert.Equal(t, codeUndeposited, code)
	assert.Contains(t, msg, "remnant table: density")
	assert.Contains(t, msg, "outside the grid")
	assert.Equal(t, int64(3), l.Skipped)

	for _, tc := range []struct{ path, text string }{
		{filepath.Join(dir, "none.csv"), "none.csv"},
		{malformed, "line 2"},
	} {
		c := pcConfig()
		c.RemnantTable = cString(tc.path)
		var h uint64
		var buf [512]byte
		assert.Equal(t, codeRemnantTable, entryCreate(&c, &h, &buf[0], int64(len(buf))))
		text := string(buf[:strings.IndexByte(string(buf[:]), 0)])
		assert.Contains(t, text, tc.text)
		assert.Contains(t, text, "remnant_table")
		assert.Zero(t, h)
	}
}

// The winds of population steps take the context's remnant table,
// whatever scheme couples the supernovae: a table of the Kim & Ostriker
// 2015 fit's values gives the winds the fit's momentum, and gas outside a
// table's grid returns the winds undeposited.
func TestPopulationWindsTakeTheRemnantTable(t *testing.T) {
	dir := t.TempDir()
	wide := filepath.Join(dir, "wide.csv")
	writeKOTable(t, wide, []float64{1e-12, 1e-6, 1, 1e6, 1e12})
	narrow := filepath.Join(dir, "narrow.csv")
	writeKOTable(t, narrow, []float64{1e10, 1e11})
	winds := func(path string) (int32, ledgerABI, string) {
		c := withScheme("thermal-dump", 10)
		if path != "" {
			c.RemnantTable = cString(path)
		}
		h := withPopulation(t, c, nil)
		g := denseGas(6, 10, 12)
		require.Equal(t, codeOK, entryBindGas(h, &g.desc))
		st := cluster(1, 1e4, 10, 3)
		code := entryStepPopulation(h, &st, 1, 0.5/myrPerCodeTime, 0, modeOwnFinder, nil, nil)
		msg := lastError(h)
		var l ledgerABI
		require.Equal(t, codeOK, entryGetChannelLedger(h, int32(yields.MassiveWinds), &l))
		return code, l, msg
	}
	code, fit, _ := winds("")
	require.Equal(t, codeOK, code)
	require.Positive(t, fit.RadialMomentum)
	code, tab, _ := winds(wide)
	require.Equal(t, codeOK, code)
	assert.InEpsilon(t, fit.RadialMomentum, tab.RadialMomentum, 1e-9)
	code, out, msg := winds(narrow)
	assert.Equal(t, codeUndeposited, code)
	assert.Contains(t, msg, "outside the grid")
	assert.Equal(t, int64(1), out.Skipped)
	assert.Zero(t, out.Deposited.Mass)
}
