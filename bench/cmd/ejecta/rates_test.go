package main

import (
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func runRatesJSON(t *testing.T, args ...string) ratesReport {
	t.Helper()
	var out, errOut bytes.Buffer
	code := run(append([]string{"rates", "-json"}, args...), &out, &errOut)
	require.Equal(t, 0, code, errOut.String())
	var rep ratesReport
	dec := json.NewDecoder(&out)
	dec.DisallowUnknownFields()
	require.NoError(t, dec.Decode(&rep))
	return rep
}

func TestRatesJSON(t *testing.T) {
	tests := []struct {
		imf        string
		snLo, snHi float64
	}{
		// Core-collapse SNe per Msun formed, 8–100 Msun over 0.1–100 Msun
		// (common practice, from memory: "one supernova per ~100 Msun"):
		// ~0.0074 Salpeter, 0.01–0.012 Kroupa and Chabrier.
		{"salpeter", 0.0073, 0.0075},
		{"kroupa", 0.010, 0.012},
		{"chabrier", 0.010, 0.012},
	}
	for _, tc := range tests {
		t.Run(tc.imf, func(t *testing.T) {
			rep := runRatesJSON(t, "-imf", tc.imf)
			assert.Equal(t, tc.imf, rep.IMF)
			assert.Equal(t, defaultRatesZ, rep.Metallicity)
			tot := rep.Totals
			assert.GreaterOrEqual(t, tot.SNCCPerMsun, tc.snLo)
			assert.LessOrEqual(t, tot.SNCCPerMsun, tc.snHi)
			// 1.3e-3 SNe Ia per Msun over a Hubble time (Maoz, Mannucci &
			// Nelemans 2014, ARA&A 52, 107; from memory).
			assert.InEpsilon(t, 1.3e-3, tot.SNIaPerMsun, 0.05)
			// 30–55% of the mass formed comes back (common practice, from memory).
			assert.Greater(t, tot.ReturnedMassFraction, 0.3)
			assert.Less(t, tot.ReturnedMassFraction, 0.55)
			assert.Greater(t, tot.MetalYieldPerMsun, defaultRatesZ*tot.ReturnedMassFraction)

			// Bins tile [0, 13.8 Gyr] and add up to the totals.
			require.NotEmpty(t, rep.Bins)
			assert.Zero(t, rep.Bins[0].AgeStart)
			assert.Equal(t, 0.1, rep.Bins[0].AgeEnd)
			assert.Equal(t, 13800.0, rep.Bins[len(rep.Bins)-1].AgeEnd)
			var cc, ia, ej, z float64
			for i, b := range rep.Bins {
				if i > 0 {
					assert.Equal(t, rep.Bins[i-1].AgeEnd, b.AgeStart)
				}
				assert.Greater(t, b.AgeEnd, b.AgeStart)
				require.NotNil(t, b.FUVLuminosity)
				for _, v := range []float64{b.SNCC, b.SNIa, b.Ejecta, b.Metals, b.Energy, b.Luminosity, b.IonizingPerSec, *b.FUVLuminosity} {
					assert.GreaterOrEqual(t, v, 0.0)
				}
				assert.Less(t, *b.FUVLuminosity, b.Luminosity)
				cc += b.SNCC
				ia += b.SNIa
				ej += b.Ejecta
				z += b.Metals
			}
			assert.InEpsilon(t, tot.SNCCPerMsun, cc, 1e-12)
			assert.InEpsilon(t, tot.SNIaPerMsun, ia, 1e-12)
			assert.InEpsilon(t, tot.ReturnedMassFraction, ej, 1e-12)
			assert.InEpsilon(t, tot.MetalYieldPerMsun, z, 1e-12)
			// Young population: ~1e3 Lsun and a few 1e46 photons/s per Msun
			// (order of magnitude, common practice): within a factor of 3 of
			// 1e3 Lsun and in [1e46, 1e47] photons/s for every IMF; for
			// Kroupa, within 30% of 940 Lsun and 40% of 5e46 photons/s
			// (population-synthesis values used in published cloud-disruption
			// work; from memory).
			b0 := rep.Bins[0]
			assert.Greater(t, b0.Luminosity, 1e3/3)
			assert.Less(t, b0.Luminosity, 3e3)
			assert.Greater(t, b0.IonizingPerSec, 1e46)
			assert.Less(t, b0.IonizingPerSec, 1e47)
			if tc.imf == "kroupa" {
				assert.InEpsilon(t, 940, b0.Luminosity, 0.3)
				assert.InEpsilon(t, 5e46, b0.IonizingPerSec, 0.4)
			}
			// A third to a half of a young burst's light is far ultraviolet
			// (Starburst99, Leitherer et al. 1999, ApJS 123, 3; from memory).
			require.NotNil(t, b0.FUVLuminosity)
			assert.GreaterOrEqual(t, *b0.FUVLuminosity/b0.Luminosity, 1.0/3)
			assert.LessOrEqual(t, *b0.FUVLuminosity/b0.Luminosity, 0.5)
		})
	}
}

func TestRatesFromTable(t *testing.T) {
	path := filepath.Join("..", "..", "..", "testdata", "yields", "example_table.csv")
	rep := runRatesJSON(t, "-table", path, "-z", "0.0134")
	builtin := runRatesJSON(t, "-imf", "kroupa", "-z", "0.0134")
	assert.True(t, strings.HasPrefix(rep.IMF, "table:"))
	// The example table is the built-in Kroupa population written to 7
	// digits; at its grid ages the totals agree.
	assert.InEpsilon(t, builtin.Totals.SNCCPerMsun, rep.Totals.SNCCPerMsun, 1e-6)
	assert.InEpsilon(t, builtin.Totals.ReturnedMassFraction, rep.Totals.ReturnedMassFraction, 1e-6)
	// Bin starts from 0.1 Myr on are grid ages of the table: the light agrees.
	for i := 1; i < len(rep.Bins); i++ {
		b, w := rep.Bins[i], builtin.Bins[i]
		assert.InEpsilon(t, w.Luminosity, b.Luminosity, 1e-6, "%g Myr", b.AgeStart)
		require.NotNil(t, b.FUVLuminosity)
		assert.InEpsilon(t, *w.FUVLuminosity, *b.FUVLuminosity, 1e-6, "%g Myr", b.AgeStart)
	}

	// The far-ultraviolet columns are optional: without them the JSON has
	// no fuv_luminosity_lsun key and the text table shows "-".
	raw, err := os.ReadFile(path)
	require.NoError(t, err)
	lines := strings.Split(strings.TrimSpace(string(raw)), "\n")
	drop := map[int]bool{}
	for i, h := range strings.Split(lines[0], ",") {
		if strings.HasPrefix(h, "fuv_") {
			drop[i] = true
		}
	}
	require.Len(t, drop, 2)
	for k, l := range lines {
		var keep []string
		for i, f := range strings.Split(l, ",") {
			if !drop[i] {
				keep = append(keep, f)
			}
		}
		lines[k] = strings.Join(keep, ",")
	}
	noFUV := filepath.Join(t.TempDir(), "no_fuv.csv")
	require.NoError(t, os.WriteFile(noFUV, []byte(strings.Join(lines, "\n")+"\n"), 0o644))
	var out, errOut bytes.Buffer
	require.Equal(t, 0, run([]string{"rates", "-table", noFUV, "-json"}, &out, &errOut), errOut.String())
	assert.NotContains(t, out.String(), "fuv_luminosity_lsun")
	assert.Contains(t, out.String(), "luminosity_lsun")
	out.Reset()
	require.Equal(t, 0, run([]string{"rates", "-table", noFUV}, &out, &errOut), errOut.String())
	assert.Contains(t, out.String(), "L_FUV[Lsun]")
	assert.Contains(t, out.String(), "  -  ")
}

func TestRatesTextAndErrors(t *testing.T) {
	var out, errOut bytes.Buffer
	require.Equal(t, 0, run([]string{"rates", "-imf", "chabrier", "-per-decade", "2"}, &out, &errOut), errOut.String())
	assert.Contains(t, out.String(), "chabrier")
	assert.Contains(t, out.String(), "SN_cc")

	bad := filepath.Join(t.TempDir(), "bad.csv")
	require.NoError(t, os.WriteFile(bad, []byte("age[Gyr],metallicity[mass_fraction]\n1,0.02\n"), 0o644))
	tests := []struct {
		args []string
		code int
		msg  string
	}{
		{[]string{"rates", "-imf", "topheavy"}, 2, "unknown IMF"},
		{[]string{"rates", "-z", "1.5"}, 1, "metallicity"},
		{[]string{"rates", "-per-decade", "0"}, 2, "per-decade"},
		{[]string{"rates", "-table", bad}, 1, "line 1"},
		{[]string{"rates", "-table", filepath.Join(t.TempDir(), "absent.csv")}, 1, "absent.csv"},
		{[]string{"rates", "extra"}, 2, "unexpected argument"},
	}
	for _, tc := range tests {
		out.Reset()
		errOut.Reset()
		assert.Equal(t, tc.code, run(tc.args, &out, &errOut), "%v", tc.args)
		assert.Contains(t, errOut.String(), tc.msg, "%v", tc.args)
	}
}

func TestRatesImfWithTableRefused(t *testing.T) {
	path := filepath.Join("..", "..", "..", "testdata", "yields", "example_table.csv")
	// Even the default IMF, named explicitly, is refused with a table.
	for _, imf := range []string{"kroupa", "salpeter"} {
		code, stdout, stderr := runCLI("rates", "-table", path, "-imf", imf)
		assert.Equal(t, 2, code)
		assert.Empty(t, stdout)
		assert.Contains(t, stderr, "-imf and -table exclude each other")
	}
}

// -elements prints the ejected mass of each element asked for: per bin
// they add up to the totals, and the elements are part of the metals.
func TestRatesElements(t *testing.T) {
	rep := runRatesJSON(t, "-elements", "O,fe,C")
	assert.Equal(t, []string{"O", "Fe", "C"}, rep.Elements)
	sum := map[string]float64{}
	for _, b := range rep.Bins {
		require.Len(t, b.ElementsMsun, 3)
		var elems float64
		for e, m := range b.ElementsMsun {
			assert.GreaterOrEqual(t, m, 0.0, e)
			sum[e] += m
			elems += m
		}
		assert.LessOrEqual(t, elems, b.Metals*(1+1e-12))
	}
	for e, m := range rep.Totals.ElementsMsun {
		assert.InEpsilon(t, m, sum[e], 1e-12, e)
	}
	// Oxygen is the most abundant metal ejected (about half of the metal
	// yield of a stellar population: common practice, from memory), iron
	// and carbon a few to ten per cent of it.
	tot := rep.Totals
	assert.Greater(t, tot.ElementsMsun["O"], 0.3*tot.MetalYieldPerMsun)
	assert.Less(t, tot.ElementsMsun["O"], 0.7*tot.MetalYieldPerMsun)
	assert.Less(t, tot.ElementsMsun["Fe"], tot.ElementsMsun["O"])

	all := runRatesJSON(t, "-elements", "all")
	assert.Equal(t, []string{"H", "He", "C", "N", "O", "Ne", "Mg", "Si", "S", "Ca", "Fe"}, all.Elements)
	// H + He + metals is the ejected mass.
	assert.InEpsilon(t, all.Totals.ReturnedMassFraction,
		all.Totals.ElementsMsun["H"]+all.Totals.ElementsMsun["He"]+all.Totals.MetalYieldPerMsun, 1e-9)

	// A table prints only what it carries: the example table has O and Fe.
	path := filepath.Join("..", "..", "..", "testdata", "yields", "example_table.csv")
	tab := runRatesJSON(t, "-table", path, "-elements", "all")
	assert.Equal(t, []string{"H", "He", "O", "Fe"}, tab.Elements)

	code, stdout, stderr := runCLI("rates", "-elements", "O,Fe", "-per-decade", "1")
	require.Equal(t, 0, code, stderr)
	assert.Regexp(t, `metals\[Msun\] +O\[Msun\] +Fe\[Msun\] +energy\[erg\]`, stdout)
	assert.Contains(t, stdout, "element columns: the mass of that element")

	none := runRatesJSON(t)
	assert.Empty(t, none.Elements)
	assert.Nil(t, none.Bins[0].ElementsMsun)
}

func TestRatesElementsErrors(t *testing.T) {
	path := filepath.Join("..", "..", "..", "testdata", "yields", "example_table.csv")
	tests := []struct {
		args []string
		want string
	}{
		{[]string{"-elements", "O,Xx"}, `"Xx" is not a chemical symbol`},
		{[]string{"-elements", "Z"}, "the total metals (Z) are always tracked"},
		{[]string{"-elements", "O,Fe,o"}, "O named twice"},
		{[]string{"-elements", "O,,Fe"}, "empty entry"},
		{[]string{"-elements", "Ni"}, "the model has no yields for Ni (it carries H,He,C,N,O,Ne,Mg,Si,S,Ca,Fe)"},
		{[]string{"-table", path, "-elements", "C"}, "the model has no yields for C (it carries H,He,O,Fe)"},
	}
	for _, tc := range tests {
		code, stdout, stderr := runCLI(append([]string{"rates"}, tc.args...)...)
		assert.Equal(t, 2, code, "%v", tc.args)
		assert.Empty(t, stdout)
		assert.Contains(t, stderr, tc.want, "%v", tc.args)
	}
}

// Asked about ages or metallicities the model does not cover, rates says
// so (stderr, the text table's header, the JSON notes) and what it did.
func TestRatesCoverageNotes(t *testing.T) {
	path := filepath.Join("..", "..", "..", "testdata", "yields", "example_table.csv")
	// A table cut at 100 Myr and its metallicities 0.001..0.03.
	short := filepath.Join(t.TempDir(), "short.csv")
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	kept := []string{lines[0]}
	for _, l := range lines[1:] {
		var a float64
		_, err := fmt.Sscanf(strings.Split(l, ",")[0], "%g", &a)
		require.NoError(t, err)
		if a <= 100 {
			kept = append(kept, l)
		}
	}
	require.NoError(t, os.WriteFile(short, []byte(strings.Join(kept, "\n")+"\n"), 0o644))

	tests := []struct {
		name string
		args []string
		want []string
	}{
		{"built-in, solar", nil, nil},
		{"built-in, above the lifetime fit", []string{"-z", "0.05"}, []string{"outside the range of the stellar lifetime fit", "those at 0.03 (clamped)"}},
		{"built-in, below the lifetime fit", []string{"-z", "1e-6"}, []string{"those at 7e-05 (clamped)"}},
		{"table, inside", []string{"-table", path, "-z", "0.0134"}, []string{"below the table's first age 0.1 Myr"}},
		{"table, metal-poor", []string{"-table", path, "-z", "1e-4"}, []string{"below the table's lowest 0.001", "those at 0.001 (clamped)"}},
		{"table, metal-rich", []string{"-table", path, "-z", "0.04"}, []string{"above the table's highest 0.03"}},
		{"table, short in age", []string{"-table", short}, []string{"past the table's last age 100 Myr", "nothing more is released"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rep := runRatesJSON(t, tc.args...)
			require.NotNil(t, rep.Notes, "an empty list, not null")
			notes := strings.Join(rep.Notes, "\n")
			for _, w := range tc.want {
				assert.Contains(t, notes, w)
			}
			if tc.want == nil {
				assert.Empty(t, rep.Notes)
			}
			code, stdout, stderr := runCLI(append([]string{"rates", "-per-decade", "1"}, tc.args...)...)
			require.Equal(t, 0, code, stderr)
			for _, w := range tc.want {
				assert.Contains(t, stderr, w)
				assert.Regexp(t, "(?m)^# note: .*"+regexp.QuoteMeta(w), stdout)
			}
			if tc.want == nil {
				assert.NotContains(t, stdout, "# note")
				assert.Empty(t, stderr)
			}
		})
	}
	// Past the last age a short table releases nothing more.
	rep := runRatesJSON(t, "-table", short)
	for _, b := range rep.Bins {
		if b.AgeStart >= 100 {
			assert.Zero(t, b.Ejecta, "bin from %g Myr", b.AgeStart)
		}
	}
}

// The text table explains every column with its unit and prints numbers
// to four significant digits.
func TestRatesTextExplained(t *testing.T) {
	code, stdout, stderr := runCLI("rates", "-per-decade", "2")
	require.Equal(t, 0, code, stderr)
	for _, w := range []string{"age0, age1: the bin", "[Myr]", "SN_cc, SN_Ia: expected", "ejecta: mass returned", "metals: the metal mass",
		"energy: supernova explosion energy plus wind kinetic energy released [erg]", "L: bolometric luminosity", "[Lsun]",
		"Q: hydrogen-ionizing photons emitted per second", "[1/s]"} {
		assert.Contains(t, strings.Join(strings.Fields(strings.ReplaceAll(stdout, "\n# ", " ")), " "), w)
	}
	for _, l := range strings.Split(stdout, "\n") {
		if strings.HasPrefix(l, "#") {
			continue
		}
		for i, f := range strings.Fields(l) {
			if m := regexp.MustCompile(`^(\d+)\.(\d+)(e[+-]\d+)?$`).FindStringSubmatch(f); m != nil {
				assert.LessOrEqual(t, len(strings.TrimLeft(m[1]+m[2], "0")), 4, f)
			}
			if i < 2 && !strings.Contains(f, "[") {
				assert.NotContains(t, f, "e", "ages print without an exponent")
			}
		}
	}
}
