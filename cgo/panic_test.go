package main

import (
	"os"
	"os/exec"
	"runtime/cgo"
	"syscall"
	"testing"
	"unsafe"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
)

// panickingScheme stands for a user's scheme with a bug: it panics on the
// star with the given ID (0: on every star).
type panickingScheme struct{ star int64 }

func (panickingScheme) Name() string { return "panicking" }

func (p panickingScheme) Deposit(nb *feedback.Neighborhood, _ []feedback.Deposit) (float64, error) {
	if p.star == 0 || nb.Source.Star.ID == p.star {
		panic("a scheme with a bug")
	}
	return 0, nil
}

// contextWithScheme creates a context whose coupler runs scheme, as a
// library linking its own scheme into the ABI would; the hosts' configs
// can only name built-in schemes.
func contextWithScheme(t *testing.T, scheme feedback.Scheme, workers int32) uint64 {
	t.Helper()
	c := pcConfig()
	c.WorkerThreads = workers
	c.BoxSize = [3]float64{10, 10, 10}
	cfg, opts, err := parseConfig(&c)
	require.NoError(t, err)
	cfg.Scheme = scheme
	s, err := newSession(cfg, opts)
	require.NoError(t, err)
	h := uint64(cgo.NewHandle(s))
	t.Cleanup(func() { entryDestroy(&h) })
	return h
}

// unreadable returns memory of n float64 that faults on every read (a
// host column pointing at memory the process may not touch), and frees it
// at the end of the test.
func unreadable(t *testing.T, n int) unsafe.Pointer {
	t.Helper()
	b, err := syscall.Mmap(-1, 0, 8*n, syscall.PROT_NONE, syscall.MAP_ANON|syscall.MAP_PRIVATE)
	require.NoError(t, err)
	t.Cleanup(func() { syscall.Munmap(b) })
	return unsafe.Pointer(&b[0])
}

// TestWorkerPanicsReturnInternal runs its cases in a child process, so
// that a panic escaping a worker goroutine (which ends a process) fails
// the test instead of ending the test binary: a user's scheme that panics
// and a gas column that faults on read, each at 1 and 4 workers, must give
// EJECTA_ERR_INTERNAL through the normal return path, change no gas, keep
// no records, and leave a process in which the context can be destroyed.
func TestWorkerPanicsReturnInternal(t *testing.T) {
	if os.Getenv("EJECTA_PANIC_CASES") == "1" {
		workerPanicCases(t)
		return
	}
	cmd := exec.Command(os.Args[0], "-test.run=^TestWorkerPanicsReturnInternal$", "-test.v")
	cmd.Env = append(os.Environ(), "EJECTA_PANIC_CASES=1")
	out, err := cmd.CombinedOutput()
	require.NoError(t, err, "the child process died or failed:\n%s", out)
	assert.Contains(t, string(out), "--- PASS: TestWorkerPanicsReturnInternal")
}

func workerPanicCases(t *testing.T) {
	for _, workers := range []int32{1, 4} {
		stars := supernovae(40, 10, 3) // more than one worker's chunk
		t.Run("scheme", func(t *testing.T) {
			g := newTestGas(6, 10, 2)
			before := append([]testElement(nil), g.elems...)
			h := contextWithScheme(t, panickingScheme{star: stars[33].ID}, workers)
			require.Equal(t, codeOK, entryBindGas(h, &g.desc))
			assert.Equal(t, codeInternal, entryStep(h, &stars[0], int64(len(stars)), 0, modeOwnFinder, nil, nil), "%d workers", workers)
			assert.Contains(t, lastError(h), "a scheme with a bug")
			var n int64
			require.Equal(t, codeOK, entryRecordCount(h, &n))
			assert.Zero(t, n, "no records kept")
			assert.Equal(t, codeInvalidArgument, entryApplyStepRecords(h, nil), "nothing to apply")
			assert.Equal(t, before, g.elems)
		})
		t.Run("population", func(t *testing.T) {
			g := denseGas(6, 10, 2)
			h := contextWithScheme(t, panickingScheme{}, workers)
			require.Equal(t, codeOK, entryBindGas(h, &g.desc))
			p := defaultPopulationConfig()
			require.Equal(t, codeOK, entryEnablePopulation(h, &p), lastError(h))
			ps := make([]starParticleABI, 20)
			for i := range ps {
				ps[i] = cluster(int64(1+i), 1e4, 10, 5)
				ps[i].Position[0] = 0.5 * float64(i)
			}
			assert.Equal(t, codeInternal, entryStepPopulation(h, &ps[0], int64(len(ps)), 0.5, 0, modeOwnFinder, nil, nil), "%d workers", workers)
			assert.Contains(t, lastError(h), "a scheme with a bug")
		})
		t.Run("faulting column", func(t *testing.T) {
			g := newTestGas(6, 10, 2)
			g.desc.Mass = fieldABI{Data: unreadable(t, len(g.elems)), Stride: 8, Type: elemFloat64}
			h := contextWithScheme(t, feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}, workers)
			require.Equal(t, codeOK, entryBindGas(h, &g.desc), lastError(h))
			assert.Equal(t, codeInternal, entryStep(h, &stars[0], int64(len(stars)), 0, modeOwnFinder, nil, nil), "%d workers", workers)
			assert.Contains(t, lastError(h), "internal failure")
		})
	}
}
