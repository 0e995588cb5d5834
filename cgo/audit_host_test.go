package main

import (
	"context"
	"errors"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/yields"
)

// auditCommand is the ejecta command, built once per test binary into the
// library directory (removed by TestMain). Test-only state.
var auditCommand struct {
	once sync.Once
	path string
	err  error
}

// ejectaCommand builds bench/cmd/ejecta once and returns its path.
func ejectaCommand(t *testing.T) string {
	t.Helper()
	dir := libraryDir(t)
	auditCommand.once.Do(func() {
		auditCommand.path = filepath.Join(dir, "ejecta")
		out, err := exec.Command(goTool(t), "build", "-o", auditCommand.path, "../bench/cmd/ejecta").CombinedOutput()
		if err != nil {
			auditCommand.err = errors.New(string(out))
		}
	})
	require.NoError(t, auditCommand.err)
	return auditCommand.path
}

// runAuditCommand runs "ejecta audit -manifest path" and returns its exit
// status and output.
func runAuditCommand(t *testing.T, path string) (int, string) {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
	defer cancel()
	out, err := exec.CommandContext(ctx, ejectaCommand(t), "audit", "-manifest", path).CombinedOutput()
	var exit *exec.ExitError
	if errors.As(err, &exit) {
		return exit.ExitCode(), string(out)
	}
	require.NoError(t, err, "%s", out)
	return 0, string(out)
}

// TestAuditHostC builds examples/audit_host.c, a host that injects
// feedback with its own hand-written scheme and writes the step through
// the ejecta_dump_* calls, and audits the dump through package
// feedback/audit and through "ejecta audit": the conservative injection
// passes; with a planted bookkeeping error (one cell left with less mass
// than it had) the audit fails and names that cell first.
func TestAuditHostC(t *testing.T) {
	lib := libraryDir(t)
	gcc := requireTool(t, "gcc")
	for _, mode := range linkModes {
		t.Run(mode.name, func(t *testing.T) {
			bin := buildCHost(t, gcc, lib, t.TempDir(), "audit_host", mode)

			// The host's own scheme conserves: the audit passes.
			dir := filepath.Join(t.TempDir(), "step")
			out := runHost(t, bin, dir)
			require.Contains(t, out, "result pass")
			kv := keyValues(out)
			checkAuditHostMessages(t, kv)
			manifest := filepath.Join(dir, audit.ManifestFile)
			assert.Equal(t, manifest, kv["dump"])
			d, err := audit.ReadDump(manifest)
			require.NoError(t, err)
			want, err := yields.ParseSpeciesSet("O,Fe")
			require.NoError(t, err)
			assert.Equal(t, want, d.Species, "the dump keeps the host's species set")
			assert.Equal(t, 1000, d.Before.Len())
			assert.Len(t, d.Stars, 3)
			rep, err := audit.Step(d.Before, d.After, d.Stars, d.Options())
			require.NoError(t, err)
			assert.False(t, rep.Failed(), "%v", rep.Problems)
			quantities := map[string]audit.Imbalance{}
			for _, im := range rep.Imbalances {
				quantities[im.Quantity] = im
			}
			for _, q := range []string{"mass", "species Z", "species O", "species Fe", "energy"} {
				require.Contains(t, quantities, q)
			}
			// The gas gained what the host says it released.
			assert.InEpsilon(t, number(t, kv, "released_mass"), quantities["mass"].Gained, 1e-12)
			assert.InEpsilon(t, number(t, kv, "gas_mass_gain"), quantities["mass"].Gained, 1e-12)
			if mode.name == "shared" {
				code, text := runAuditCommand(t, manifest)
				assert.Equal(t, 0, code, text)
				assert.Contains(t, text, "species O")
				assert.Contains(t, text, "passed")
			}

			// One cell lost mass: the audit fails and names it.
			dir = filepath.Join(t.TempDir(), "spoiled")
			out = runHost(t, bin, dir, "lose-mass")
			require.Contains(t, out, "result pass")
			kv = keyValues(out)
			planted, err := strconv.ParseInt(kv["planted_id"], 10, 64)
			require.NoError(t, err)
			manifest = filepath.Join(dir, audit.ManifestFile)
			d, err = audit.ReadDump(manifest)
			require.NoError(t, err)
			rep, err = audit.Step(d.Before, d.After, d.Stars, d.Options())
			require.NoError(t, err)
			require.True(t, rep.Failed())
			for _, im := range rep.Imbalances {
				if im.Quantity == "mass" {
					require.True(t, im.Failed)
					require.NotEmpty(t, im.Elements)
					assert.Equal(t, planted, im.Elements[0], "the cell that lost mass is named first")
					assert.InDelta(t, -number(t, kv, "planted_loss"), im.Absolute, 1e-9)
				}
			}
			if mode.name == "shared" {
				code, text := runAuditCommand(t, manifest)
				assert.Equal(t, 1, code, text)
				assert.Contains(t, text, "mass imbalance")
				assert.Contains(t, text, "elements "+kv["planted_id"])
			}
		})
	}
}

// checkAuditHostMessages checks what the host's deliberate mistakes were
// told.
func checkAuditHostMessages(t *testing.T, kv map[string]string) {
	t.Helper()
	for key, want := range map[string]string{
		"directory_error":   "/dev/null",
		"species_error":     `"Xx" is not a chemical symbol`,
		"order_error":       "call ejecta_dump_gas_before before",
		"null_gas_error":    "gas descriptor is NULL",
		"stride_error":      "gas before mass: stride 4 bytes",
		"null_column_error": "gas before internal_energy: data is NULL",
		"incomplete_error":  "the dump is not complete",
		"count_error":       "999 elements, but the gas before had 1000",
		"nan_error":         "stars energy of star 0 (ID 11) is NaN",
		"finished_error":    "already finished",
		"closed_error":      "not a live dump session",
	} {
		assert.True(t, strings.Contains(kv[key], want), "%s = %q, want it to contain %q", key, kv[key], want)
	}
}

// TestAuditHostFortran builds examples/audit_host.f90, the same kind of
// host in Fortran through ejecta_mod (a periodic box, one star's reach
// wrapping around it), and audits its dump: the injection passes, the
// planted loss fails naming the cell.
func TestAuditHostFortran(t *testing.T) {
	lib := libraryDir(t)
	gfortran := requireTool(t, "gfortran")
	for _, mode := range linkModes {
		t.Run(mode.name, func(t *testing.T) {
			dir := t.TempDir()
			bin := buildFortranHost(t, gfortran, lib, dir, "audit_host", mode)

			out := runHost(t, bin, filepath.Join(dir, "step"))
			require.Contains(t, out, "result pass")
			kv := keyValues(out)
			assert.Contains(t, kv["species_error"], `"Unobtainium" is not a chemical symbol`)
			assert.Contains(t, kv["order_error"], "call ejecta_dump_gas_before before")
			d, err := audit.ReadDump(kv["dump"])
			require.NoError(t, err)
			assert.Equal(t, [3]float64{6, 6, 6}, d.Box.Size)
			rep, err := audit.Step(d.Before, d.After, d.Stars, d.Options())
			require.NoError(t, err)
			assert.False(t, rep.Failed(), "%v", rep.Problems)
			if mode.name == "shared" {
				code, text := runAuditCommand(t, kv["dump"])
				assert.Equal(t, 0, code, text)
			}

			out = runHost(t, bin, filepath.Join(dir, "spoiled"), "lose-mass")
			require.Contains(t, out, "result pass")
			kv = keyValues(out)
			planted, err := strconv.ParseInt(kv["planted_id"], 10, 64)
			require.NoError(t, err)
			d, err = audit.ReadDump(kv["dump"])
			require.NoError(t, err)
			rep, err = audit.Step(d.Before, d.After, d.Stars, d.Options())
			require.NoError(t, err)
			require.True(t, rep.Failed())
			require.Equal(t, "mass", rep.Imbalances[0].Quantity)
			require.NotEmpty(t, rep.Imbalances[0].Elements)
			assert.Equal(t, planted, rep.Imbalances[0].Elements[0])
		})
	}
}
