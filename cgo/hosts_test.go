package main

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"testing"
	"unsafe"

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
	for _, mode := range linkModes {
		t.Run(mode.name, func(t *testing.T) {
			bin := buildCHost(t, gcc, lib, t.TempDir(), "host", mode)
			out := runHost(t, bin)
			checkHostOutput(t, out)
			kv := keyValues(out)
			assert.Contains(t, kv["create_error"], "shock-and-awe")
			assert.Equal(t, "0", kv["zero_kinetic_kick_energy"], "a kinetic fraction of 0 gives no kinetic energy")
			assert.InEpsilon(t, 3, number(t, kv, "infrared_boost_ratio"), 1e-12)
			assert.Contains(t, kv["nan_error"], "stars[0] (of 1): star 0: release energy NaN is not finite")
			assert.Contains(t, kv["destroyed_error"], "not a live ejecta context")
		})
	}
}

// TestHostCPlusPlus runs examples/host.cpp, a C++ host (structure of
// std::vectors, int32 IDs, float32 densities, its own species set "O,Fe")
// compiled with g++ against ejecta.h, which must be usable from C++ as it
// stands. Two steps, one applied in place and one from copied records
// located by gas ID; the host checks ledger, records and gas itself, and
// here its figures are checked again.
func TestHostCPlusPlus(t *testing.T) {
	lib := libraryDir(t)
	gxx := requireTool(t, "g++")
	src := filepath.Join("examples", "host.cpp")
	for _, mode := range linkModes {
		t.Run(mode.name, func(t *testing.T) {
			bin := filepath.Join(t.TempDir(), "host_cpp")
			args := append([]string{"-std=c++11", "-Wall", "-Wextra", "-Werror", "-pedantic", "-O1", "-I."}, mode.cflag...)
			args = append(args, "-o", bin, src)
			args = append(args, mode.flags(lib)...)
			compile(t, gxx, args...)
			out := runHost(t, bin)
			checkHostOutput(t, out)
			kv := keyValues(out)
			assert.Equal(t, "Z,O,Fe", kv["species"])
			assert.InEpsilon(t, 4, number(t, kv, "oxygen_deposited"), 1e-12, "four stars of 1 Msun oxygen each")
			assert.InEpsilon(t, 0.4, number(t, kv, "iron_deposited"), 1e-12, "four stars of 0.1 Msun iron each")
			assert.Equal(t, kv["records"], kv["second_step_records"])
			assert.Contains(t, kv["nan_error"], "release energy NaN is not finite")
			assert.Contains(t, kv["duplicate_error"], "appears twice")
			assert.Contains(t, kv["create_error"], "back-of-the-envelope")
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
	table, err := filepath.Abs(exampleTable)
	require.NoError(t, err)
	for _, mode := range linkModes {
		t.Run(mode.name, func(t *testing.T) {
			bin := buildCHost(t, gcc, lib, t.TempDir(), "population_host", mode)
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
			bin := buildFortranHost(t, gfortran, lib, t.TempDir(), "host", mode)
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
			bin := buildFortranHost(t, gfortran, lib, t.TempDir(), "population_host", mode)
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

// mpiModes are the builds the MPI hosts are run in: shared, and static
// with AddressSanitizer. Open MPI's own allocations (and those of its
// unloaded plugins) are still held at exit, so leak detection is off for
// the MPI hosts only; address errors are still reported.
var mpiModes = []struct {
	link linkMode
	asan string
}{
	{linkModes[0], ""},
	{linkModes[2], "halt_on_error=1:detect_leaks=0"},
}

// mpiRanks are the rank counts the population MPI host is run with.
var mpiRanks = []int{1, 2, 4}

// runMPIHost runs bin on the given number of ranks (oversubscribing the
// cores, and allowed to run as root) and returns rank 0's output.
func runMPIHost(t *testing.T, mpirun, asan string, ranks int, bin string, args ...string) string {
	t.Helper()
	run := []string{"--oversubscribe", "-np", strconv.Itoa(ranks)}
	if os.Geteuid() == 0 {
		run = append([]string{"--allow-run-as-root"}, run...)
	}
	run = append(append(run, bin), args...)
	return runHostEnv(t, asan, mpirun, run...)
}

// TestHostMPIDecomposition runs examples/mpi_host.c, three steps of
// stochastic heating (a scheme that draws), on 1, 2, 3 and 4 ranks; in one
// step half the box is quiet, so on several ranks some ranks have no stars
// and skip the call. The final gas, gathered and sorted by ID, must be
// bitwise identical for every rank count (the draws depend on the step
// index the host passes, not on how many calls a rank made), and the
// ledgers summed over ranks must agree to round-off (they are summed in
// different orders). The host itself checks that every step's global
// ledger balances and that the gas gained what they say.
func TestHostMPIDecomposition(t *testing.T) {
	lib := libraryDir(t)
	mpicc := requireTool(t, "mpicc")
	mpirun := requireTool(t, "mpirun")
	ranks := []int{1, 2, 3, 4}
	for _, mode := range mpiModes {
		t.Run(mode.link.name, func(t *testing.T) {
			dir := t.TempDir()
			bin := buildCHost(t, mpicc, lib, dir, "mpi_host", mode.link)
			var dumps [][]byte
			var ledgers []map[string]string
			for _, n := range ranks {
				dump := filepath.Join(dir, fmt.Sprintf("gas-%d.bin", n))
				out := runMPIHost(t, mpirun, mode.asan, n, bin, dump)
				require.Contains(t, out, "result pass", "ranks %d", n)
				kv := keyValues(out)
				if n > 1 {
					assert.Greater(t, number(t, kv, "ghost_records"), 0.0, "records must cross ranks with %d ranks", n)
					assert.Greater(t, number(t, kv, "skipped_calls"), 0.0, "some rank must skip a step with %d ranks", n)
				}
				b, err := os.ReadFile(dump)
				require.NoError(t, err)
				require.NotEmpty(t, b)
				dumps = append(dumps, b)
				ledgers = append(ledgers, kv)
			}
			for i := 1; i < len(dumps); i++ {
				assert.True(t, bytes.Equal(dumps[0], dumps[i]), "final gas on %d ranks differs bitwise from 1 rank", ranks[i])
				for _, key := range []string{"released_mass", "deposited_mass", "deposited_energy", "gas_mass_gain", "gas_energy_gain"} {
					assert.InEpsilon(t, number(t, ledgers[0], key), number(t, ledgers[i], key), 1e-12, key)
				}
				for _, key := range []string{"stars", "records", "elements_changed"} {
					assert.Equal(t, ledgers[0][key], ledgers[i][key], key)
				}
			}
		})
	}
}

// starHistory is one star of the star dump of
// examples/mpi_population_host.c: the particle after the run and its
// results of every step.
type starHistory struct {
	star  starParticleABI
	steps []starResultABI
}

// readStarDump decodes a star dump of n stars of the given number of
// steps, each a star_record of the host.
func readStarDump(t *testing.T, b []byte, n, steps int) []starHistory {
	t.Helper()
	size := int(unsafe.Sizeof(starParticleABI{})) + steps*int(unsafe.Sizeof(starResultABI{}))
	require.Len(t, b, n*size, "star dump of %d stars of %d steps", n, steps)
	r := bytes.NewReader(b)
	out := make([]starHistory, n)
	for i := range out {
		out[i].steps = make([]starResultABI, steps)
		require.NoError(t, binary.Read(r, binary.NativeEndian, &out[i].star))
		require.NoError(t, binary.Read(r, binary.NativeEndian, out[i].steps))
	}
	return out
}

// TestHostMPIPopulationDecomposition runs examples/mpi_population_host.c
// on 1, 2 and 4 ranks: star particles of ages 0-40 Myr, each stepped by
// the rank of its slab with ghost gas refreshed every step and ghost
// records routed to their owners. The host checks every step's global
// ledger and the gas's gains itself; here the final gas (sorted by ID) and
// the star particles with their per-step results (sorted by ID) must be
// bitwise the same for every rank count, every channel must have acted,
// and each star's mass must have fallen by exactly the mass loss its
// results report.
func TestHostMPIPopulationDecomposition(t *testing.T) {
	lib := libraryDir(t)
	mpicc := requireTool(t, "mpicc")
	mpirun := requireTool(t, "mpirun")
	channels := []string{"core_collapse", "type_ia", "massive_winds", "agb_winds", "radiation_pressure", "photoionization",
		"photoelectric_heating"}
	for _, mode := range mpiModes {
		t.Run(mode.link.name, func(t *testing.T) {
			dir := t.TempDir()
			bin := buildCHost(t, mpicc, lib, dir, "mpi_population_host", mode.link)
			var gasDumps, starDumps [][]byte
			var runs []map[string]string
			for _, ranks := range mpiRanks {
				gasDump := filepath.Join(dir, fmt.Sprintf("gas-%d.bin", ranks))
				starDump := filepath.Join(dir, fmt.Sprintf("stars-%d.bin", ranks))
				out := runMPIHost(t, mpirun, mode.asan, ranks, bin, gasDump, starDump)
				require.Contains(t, out, "result pass", "ranks %d", ranks)
				kv := keyValues(out)
				if ranks > 1 {
					assert.Positive(t, number(t, kv, "ghost_elements"), "ghosts imported on %d ranks", ranks)
					assert.Positive(t, number(t, kv, "ghost_records"), "records must cross ranks with %d ranks", ranks)
				}
				g, err := os.ReadFile(gasDump)
				require.NoError(t, err)
				require.NotEmpty(t, g)
				s, err := os.ReadFile(starDump)
				require.NoError(t, err)
				gasDumps, starDumps, runs = append(gasDumps, g), append(starDumps, s), append(runs, kv)
			}

			kv := runs[0]
			assert.Positive(t, number(t, kv, "supernovae_cc"), "supernovae drawn")
			// Mass from every channel that ejects some (radiation pressure,
			// photoionization and photoelectric heating carry energy only),
			// energy from every channel but Type Ia, which draws no event
			// here.
			for _, ch := range []string{"core_collapse", "type_ia", "massive_winds", "agb_winds"} {
				assert.Positive(t, number(t, kv, ch+"_mass"), ch)
			}
			for _, ch := range []string{"core_collapse", "massive_winds", "agb_winds", "radiation_pressure", "photoionization",
				"photoelectric_heating"} {
				assert.Positive(t, number(t, kv, ch+"_energy"), ch)
			}
			assert.InEpsilon(t, number(t, kv, "star_mass_loss"), number(t, kv, "gas_mass_gain"), 1e-12)

			nStars, steps := int(number(t, kv, "stars")), int(number(t, kv, "steps"))
			history := readStarDump(t, starDumps[0], nStars, steps)
			var loss float64
			var cc, ia int64
			for i, h := range history {
				if i > 0 {
					assert.Less(t, history[i-1].star.ID, h.star.ID, "stars sorted by ID")
				}
				m := h.star.FormedMass
				for k, r := range h.steps {
					assert.Equal(t, h.star.ID, r.ID, "star %d step %d", h.star.ID, k)
					assert.GreaterOrEqual(t, r.MassLoss, 0.0)
					assert.GreaterOrEqual(t, r.CarriedEnergy, 0.0)
					m -= r.MassLoss
					loss += r.MassLoss
					cc += r.SupernovaeCC
					ia += r.SupernovaeIa
				}
				// The host subtracts each step's loss in turn: the same
				// operations, so the same bits.
				assert.Equal(t, m, h.star.Mass, "star %d mass", h.star.ID)
				assert.Equal(t, h.steps[steps-1].CarriedEnergy, h.star.CarriedEnergy, "star %d carried energy", h.star.ID)
			}
			assert.InEpsilon(t, number(t, kv, "star_mass_loss"), loss, 1e-12)
			assert.Equal(t, kv["supernovae_cc"], strconv.FormatInt(cc, 10))
			assert.Equal(t, kv["supernovae_ia"], strconv.FormatInt(ia, 10))

			for i := 1; i < len(runs); i++ {
				assert.True(t, bytes.Equal(gasDumps[0], gasDumps[i]), "final gas on %d ranks differs bitwise from 1 rank", mpiRanks[i])
				assert.True(t, bytes.Equal(starDumps[0], starDumps[i]), "stars on %d ranks differ bitwise from 1 rank", mpiRanks[i])
				for _, key := range []string{"records", "supernovae_cc", "supernovae_ia"} {
					assert.Equal(t, runs[0][key], runs[i][key], key)
				}
				keys := []string{"star_mass_loss", "gas_mass_gain", "deposited_energy"}
				for _, ch := range channels {
					keys = append(keys, ch+"_mass", ch+"_energy")
				}
				for _, key := range keys {
					// Summed over ranks in different orders: round-off only.
					assert.InDelta(t, number(t, runs[0], key), number(t, runs[i], key), 1e-12*math.Abs(number(t, runs[0], key)), key)
				}
			}
		})
	}
}

// headerCodes lists the names of every code ejecta.h defines (EJECTA_OK
// and each EJECTA_ERR_*).
func headerCodes(t *testing.T) []string {
	t.Helper()
	h, err := os.ReadFile("ejecta.h")
	require.NoError(t, err)
	var names []string
	for _, m := range regexp.MustCompile(`(?m)^#define (EJECTA_OK|EJECTA_ERR_[A-Z_]+) `).FindAllStringSubmatch(string(h), -1) {
		names = append(names, m[1])
	}
	require.NotEmpty(t, names)
	return names
}

// TestHostErrorCodes runs examples/error_codes.c, which provokes every
// documented error code through the real exports and checks each call
// returns what ejecta.h promises: among them host rows shorter than the
// neighbor count (EJECTA_ERR_NEIGHBORS, nothing done), a context held by
// another thread's call (ejecta_last_error, ejecta_step and
// ejecta_record_count return EJECTA_ERR_BUSY and do nothing; the threads
// are synchronized through a named pipe the holder reads, so the check is
// deterministic),
// a gas element with a metal mass fraction above 1 (its star's release
// comes back: EJECTA_ERR_UNDEPOSITED), and a gas column that faults when
// ejecta's worker threads read it (EJECTA_ERR_INTERNAL, and the process
// goes on). Every code ejecta.h defines must be seen.
func TestHostErrorCodes(t *testing.T) {
	lib := libraryDir(t)
	gcc := requireTool(t, "gcc")
	for _, mode := range linkModes[:2] {
		t.Run(mode.name, func(t *testing.T) {
			bin := buildCHost(t, gcc, lib, t.TempDir(), "error_codes", mode, "-lpthread")
			out := runHost(t, bin)
			require.Contains(t, out, "result pass")
			for _, name := range headerCodes(t) {
				assert.Contains(t, out, "code "+name+" ok\n", "%s never returned as documented", name)
			}
			kv := keyValues(out)
			assert.Contains(t, kv["short_rows_error"], "fewer than neighbor_count 8")
			assert.Contains(t, kv["fraction_error"], "metal mass fraction 1.5")
			assert.Contains(t, kv["busy_error"], "in use by another call")
			assert.Contains(t, kv["internal_error"], "internal failure")
		})
	}
}
