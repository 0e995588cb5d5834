package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// checkHostOutput checks what the C and Fortran hosts report after their
// step: all checks passed, the ledger's deposited mass is what was
// released (every star had gas), and the gas mass change is the sum of the
// records' dm, to round-off.
func checkHostOutput(t *testing.T, out string) {
	t.Helper()
	require.Contains(t, out, "result pass")
	kv := keyValues(out)
	released, deposited := number(t, kv, "ledger_released_mass"), number(t, kv, "ledger_deposited_mass")
	assert.InEpsilon(t, released, deposited, 1e-12)
	dm, gain := number(t, kv, "record_dm_sum"), number(t, kv, "gas_mass_change")
	assert.InEpsilon(t, dm, gain, 1e-12)
	assert.InEpsilon(t, deposited, gain, 1e-12)
	de, egain := number(t, kv, "record_de_sum"), number(t, kv, "gas_energy_change")
	extra := number(t, kv, "reclaimed") + number(t, kv, "shortfall")
	assert.InEpsilon(t, de+extra, egain, 1e-9)
	assert.Equal(t, kv["records"] != "", true)
	assert.Equal(t, kv["elements_changed"], kv["report_elements"])
}

func TestHostC(t *testing.T) {
	lib := libraryDir(t)
	gcc := requireTool(t, "gcc")
	src := filepath.Join("examples", "host.c")
	for _, mode := range linkModes {
		t.Run(mode.name, func(t *testing.T) {
			bin := filepath.Join(t.TempDir(), "host")
			args := append([]string{"-std=c11", "-Wall", "-Wextra", "-Werror", "-O1", "-I."}, mode.cflag...)
			args = append(args, "-o", bin, src)
			args = append(args, mode.flags(lib)...)
			args = append(args, "-lm")
			compile(t, gcc, args...)
			out := runHost(t, bin)
			checkHostOutput(t, out)
			kv := keyValues(out)
			assert.Contains(t, kv["create_error"], "shock-and-awe")
			assert.Contains(t, kv["nan_error"], "non-finite")
			assert.Contains(t, kv["destroyed_error"], "not a live ejecta context")
		})
	}
}

// TestHostCPopulation runs examples/population_host.c, which steps three
// star particles through ejecta_step_population and checks every step's
// ledger and the gas's mass gain itself, once with the built-in population
// and once with the example yields table.
func TestHostCPopulation(t *testing.T) {
	lib := libraryDir(t)
	gcc := requireTool(t, "gcc")
	src := filepath.Join("examples", "population_host.c")
	table, err := filepath.Abs(exampleTable)
	require.NoError(t, err)
	for _, mode := range linkModes {
		t.Run(mode.name, func(t *testing.T) {
			bin := filepath.Join(t.TempDir(), "population_host")
			args := append([]string{"-std=c11", "-Wall", "-Wextra", "-Werror", "-O1", "-I."}, mode.cflag...)
			args = append(args, "-o", bin, src)
			args = append(args, mode.flags(lib)...)
			args = append(args, "-lm")
			compile(t, gcc, args...)
			for _, model := range [][]string{nil, {table}} {
				out := runHost(t, bin, model...)
				require.Contains(t, out, "result pass")
				kv := keyValues(out)
				assert.InEpsilon(t, number(t, kv, "star_mass_loss"), number(t, kv, "gas_mass_gain"), 1e-9)
				assert.Positive(t, number(t, kv, "supernovae_cc"))
				assert.Contains(t, kv["imf_error"], "bottom-light")
				assert.Contains(t, kv["table_error"], "/nonexistent/yields.csv")
				assert.Contains(t, kv["star_error"], "age")
			}
		})
	}
}

func TestHostFortran(t *testing.T) {
	lib := libraryDir(t)
	gfortran := requireTool(t, "gfortran")
	for _, mode := range linkModes {
		t.Run(mode.name, func(t *testing.T) {
			dir := t.TempDir()
			bin := filepath.Join(dir, "host")
			args := append([]string{"-std=f2008", "-Wall", "-Werror", "-O1", "-J", dir}, mode.cflag...)
			args = append(args, "-o", bin, filepath.Join("fortran", "ejecta_mod.f90"), filepath.Join("examples", "host.f90"))
			args = append(args, mode.flags(lib)...)
			compile(t, gfortran, args...)
			out := runHost(t, bin)
			checkHostOutput(t, out)
			kv := keyValues(out)
			assert.Contains(t, kv["create_error"], "by-popular-vote")
			assert.Contains(t, kv["destroyed_error"], "not a live ejecta context")
		})
	}
}

// TestHostFortranPopulation runs examples/population_host.f90 through
// ejecta_mod with the built-in population and with the example table.
func TestHostFortranPopulation(t *testing.T) {
	lib := libraryDir(t)
	gfortran := requireTool(t, "gfortran")
	table, err := filepath.Abs(exampleTable)
	require.NoError(t, err)
	for _, mode := range linkModes {
		t.Run(mode.name, func(t *testing.T) {
			dir := t.TempDir()
			bin := filepath.Join(dir, "population_host")
			args := append([]string{"-std=f2008", "-Wall", "-Werror", "-O1", "-J", dir}, mode.cflag...)
			args = append(args, "-o", bin, filepath.Join("fortran", "ejecta_mod.f90"), filepath.Join("examples", "population_host.f90"))
			args = append(args, mode.flags(lib)...)
			compile(t, gfortran, args...)
			for _, model := range [][]string{nil, {table}} {
				out := runHost(t, bin, model...)
				require.Contains(t, out, "result pass")
				kv := keyValues(out)
				assert.InEpsilon(t, number(t, kv, "star_mass_loss"), number(t, kv, "gas_mass_gain"), 1e-9)
				assert.Contains(t, kv["imf_error"], "flat")
			}
		})
	}
}

// TestHostMPIDecomposition runs the MPI host on 1, 2 and 4 ranks: the
// final gas, gathered and sorted by ID, must be bitwise identical for every
// rank count, and the ledgers summed over ranks must agree to round-off
// (they are summed in different orders). The host itself checks that the
// global ledger balances and that the gas gained what it says.
func TestHostMPIDecomposition(t *testing.T) {
	lib := libraryDir(t)
	mpicc := requireTool(t, "mpicc")
	mpirun := requireTool(t, "mpirun")
	modes := []struct {
		link linkMode
		// Open MPI's own allocations (and those of its unloaded plugins)
		// are still held at exit; leak detection is off for this host
		// only, address errors are still reported.
		asan string
	}{
		{linkModes[0], ""},
		{linkModes[2], "halt_on_error=1:detect_leaks=0"},
	}
	for _, mode := range modes {
		t.Run(mode.link.name, func(t *testing.T) {
			dir := t.TempDir()
			bin := filepath.Join(dir, "mpi_host")
			args := append([]string{"-std=c11", "-Wall", "-Wextra", "-Werror", "-O1", "-I."}, mode.link.cflag...)
			args = append(args, "-o", bin, filepath.Join("examples", "mpi_host.c"))
			args = append(args, mode.link.flags(lib)...)
			args = append(args, "-lm")
			compile(t, mpicc, args...)
			var dumps [][]byte
			var ledgers []map[string]string
			for _, ranks := range []int{1, 2, 4} {
				dump := filepath.Join(dir, fmt.Sprintf("gas-%d.bin", ranks))
				run := []string{"--oversubscribe", "-np", strconv.Itoa(ranks)}
				if os.Geteuid() == 0 {
					run = append([]string{"--allow-run-as-root"}, run...)
				}
				run = append(run, bin, dump)
				out := runHostEnv(t, mode.asan, mpirun, run...)
				require.Contains(t, out, "result pass", "ranks %d", ranks)
				kv := keyValues(out)
				if ranks > 1 {
					assert.Greater(t, number(t, kv, "ghost_records"), 0.0, "records must cross ranks with %d ranks", ranks)
				}
				b, err := os.ReadFile(dump)
				require.NoError(t, err)
				require.NotEmpty(t, b)
				dumps = append(dumps, b)
				ledgers = append(ledgers, kv)
			}
			for i := 1; i < len(dumps); i++ {
				assert.True(t, bytes.Equal(dumps[0], dumps[i]), "final gas on %d ranks differs bitwise from 1 rank", []int{1, 2, 4}[i])
				for _, key := range []string{"released_mass", "deposited_mass", "deposited_energy", "radial_momentum", "gas_mass_gain"} {
					assert.InEpsilon(t, number(t, ledgers[0], key), number(t, ledgers[i], key), 1e-12, key)
				}
				for _, key := range []string{"stars", "records", "elements_changed"} {
					assert.Equal(t, ledgers[0][key], ledgers[i][key], key)
				}
			}
		})
	}
}
