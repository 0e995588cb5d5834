package main

import (
	"runtime/cgo"
	"sync"

	"github.com/ejecta-dev/ejecta/feedback"
)

// phase is where a context stands. Every entry that depends on earlier
// calls asks the phase, and only the transitions below change it:
//
//	unbound  --bind ok-->              bound
//	any live --bind failed-->          unbound
//	bound, stepped, applied --step-->  stepped  (records, ledger kept)
//	stepped  --apply step records-->   applied
//	any live --destroy-->              destroyed
//
// A step that fails before coupling changes nothing; one that fails while
// coupling (or whose gas is refused after it) drops its results and
// leaves the context bound.
type phase uint8

const (
	// phaseUnbound: no gas bound (a new context, or a failed bind).
	phaseUnbound phase = iota
	// phaseBound: gas bound, no step results on it.
	phaseBound
	// phaseStepped: the last step's records wait to be applied.
	phaseStepped
	// phaseApplied: the last step's records were applied.
	phaseApplied
	// phaseDestroyed: the handle was deleted; only a call that raced
	// ejecta_destroy can still see the session.
	phaseDestroyed
)

// stepKind is which call made the results a context holds.
type stepKind uint8

const (
	// releaseStep: ejecta_step, the host stated each star's release.
	releaseStep stepKind = iota + 1
	// populationStep: ejecta_step_population.
	populationStep
)

// session is the state behind one context handle. Every field is reached
// through the handle; nothing is shared between sessions.
type session struct {
	mu      sync.Mutex
	phase   phase
	lastErr string

	cfg feedback.Config
	// opts are the built-in schemes' settings of ejecta_config (the seed
	// among them), also used by the population's channels.
	opts    feedback.SchemeOptions
	coupler *feedback.Coupler

	// gas is the binding of ejecta_bind_gas and what is derived from it.
	gas binding

	// batch is the scratch both kinds of step prepare their stars in.
	batch batch
	// kind made out, the results of the last step (valid from
	// phaseStepped on).
	kind stepKind
	out  feedback.Output

	applier  feedback.Applier
	incoming []feedback.Record
	touched  []feedback.Touched

	// pop is the population of ejecta_step_population (nil until
	// ejecta_enable_population).
	pop *population
}

// newSession prepares the session of a new context.
func newSession(cfg feedback.Config, opts feedback.SchemeOptions) (*session, error) {
	coupler, err := feedback.NewCoupler(cfg)
	if err != nil {
		return nil, failWith(codeInvalidArgument, err, "config")
	}
	return &session{cfg: coupler.Config(), opts: opts, coupler: coupler}, nil
}

// stepped reports whether the context holds the results of a step.
func (s *session) stepped() bool { return s.phase == phaseStepped || s.phase == phaseApplied }

// dropResults forgets the results of the last step.
func (s *session) dropResults() {
	s.out.Records, s.out.Problems, s.out.Ledger = s.out.Records[:0], s.out.Problems[:0], feedback.Ledger{}
	s.kind = 0
	if s.phase == phaseStepped || s.phase == phaseApplied {
		s.phase = phaseBound
	}
}

// lookup turns a handle into its session, refusing 0, destroyed handles
// and handles of other values without crashing.
func lookup(h uint64) (s *session, err error) {
	if h == 0 {
		return nil, fail(codeInvalidContext, "context 0 is not a context (never created, or destroyed)")
	}
	defer func() {
		if r := recover(); r != nil {
			s, err = nil, fail(codeInvalidContext, "context %#x is not a live ejecta context (destroyed or never created)", h)
		}
	}()
	v, ok := cgo.Handle(uintptr(h)).Value().(*session)
	if !ok {
		return nil, fail(codeInvalidContext, "context %#x is not an ejecta context", h)
	}
	return v, nil
}

// claim looks up the session of h and locks it for one call; the caller
// unlocks it.
func claim(h uint64) (*session, error) {
	s, err := lookup(h)
	if err != nil {
		return nil, err
	}
	if !s.mu.TryLock() {
		return nil, fail(codeBusy, "context %#x is in use by another call", h)
	}
	if s.phase == phaseDestroyed {
		s.mu.Unlock()
		return nil, fail(codeInvalidContext, "context %#x was destroyed", h)
	}
	return s, nil
}

// withSession runs fn on the session of h, one call at a time, recording
// the outcome (a recovered panic included) as the session's last error.
func withSession(h uint64, fn func(s *session) error) int32 {
	return run(func() error {
		s, err := claim(h)
		if err != nil {
			return err
		}
		defer s.mu.Unlock()
		err = guard(func() error { return fn(s) })
		if err != nil {
			s.lastErr = err.Error()
		} else {
			s.lastErr = ""
		}
		return err
	})
}

// entryCreate is behind ejecta_create.
func entryCreate(c *configABI, out *uint64, errText *byte, capacity int64) int32 {
	err := guard(func() error {
		if out == nil {
			return fail(codeNullPointer, "context pointer is NULL")
		}
		*out = 0
		cfg, opts, err := parseConfig(c)
		if err != nil {
			return err
		}
		s, err := newSession(cfg, opts)
		if err != nil {
			return err
		}
		*out = uint64(cgo.NewHandle(s))
		return nil
	})
	if err != nil {
		putText(errText, capacity, "ejecta_create: "+err.Error())
	} else {
		putText(errText, capacity, "")
	}
	return codeOf(err)
}

// entryDestroy is behind ejecta_destroy.
func entryDestroy(ctx *uint64) int32 {
	return run(func() error {
		if ctx == nil {
			return fail(codeNullPointer, "context pointer is NULL")
		}
		if *ctx == 0 {
			return nil
		}
		s, err := claim(*ctx)
		if err != nil {
			return err
		}
		defer s.mu.Unlock()
		s.phase = phaseDestroyed
		cgo.Handle(uintptr(*ctx)).Delete()
		*ctx = 0
		return nil
	})
}

// entryLastError is behind ejecta_last_error.
func entryLastError(h uint64, buf *byte, capacity int64, length *int64) int32 {
	return run(func() error {
		if buf == nil && capacity > 0 {
			return fail(codeNullPointer, "buffer is NULL with capacity %d", capacity)
		}
		var msg string
		s, err := claim(h)
		if err != nil {
			msg = err.Error()
		} else {
			msg = s.lastErr
			s.mu.Unlock()
		}
		if length != nil {
			*length = int64(len(msg))
		}
		fits := putText(buf, capacity, msg)
		if err != nil {
			return err
		}
		if !fits {
			return fail(codeBufferTooSmall, "message of %d bytes truncated", len(msg))
		}
		return nil
	})
}
