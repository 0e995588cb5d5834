package main

import "github.com/ejecta-dev/ejecta/feedback"

// phase is where a context stands. Every entry that depends on earlier
// calls asks the phase, and only the transitions below change it:
//
//	unbound  --bind ok-->              bound
//	any live --bind failed-->          unbound
//	bound, stepped, applied --step-->  stepped  (records, ledger kept)
//	stepped  --apply step records-->   applied
//
// A step that fails before coupling changes nothing; one that fails while
// coupling (or whose gas is refused after it) drops its results and
// leaves the context bound. ejecta_destroy releases the handle in any
// phase (handleState.released).
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
	handleState
	phase phase

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

// contexts is the table of context handles.
func contexts() handleTable[*session] {
	return handleTable[*session]{words: handleWords{
		zero:        "context 0 is not a context (never created, or destroyed)",
		dead:        "context %#x is not a live ejecta context (destroyed or never created)",
		foreign:     "context %#x is not an ejecta context",
		busy:        "context %#x is in use by another call",
		released:    "context %#x was destroyed",
		nullPointer: "context pointer is NULL",
	}}
}

// withSession runs fn on the session of h, one call at a time, recording
// the outcome (a recovered panic included) as the session's last error.
func withSession(h uint64, fn func(s *session) error) int32 { return contexts().with(h, fn) }

// entryCreate is behind ejecta_create.
func entryCreate(c *configABI, out *uint64, errText *byte, capacity int64) int32 {
	return contexts().open("ejecta_create", out, errText, capacity, func() (*session, error) {
		cfg, opts, err := parseConfig(c)
		if err != nil {
			return nil, err
		}
		return newSession(cfg, opts)
	})
}

// entryDestroy is behind ejecta_destroy.
func entryDestroy(ctx *uint64) int32 { return contexts().release(ctx) }

// entryLastError is behind ejecta_last_error.
func entryLastError(h uint64, buf *byte, capacity int64, length *int64) int32 {
	return contexts().lastError(h, buf, capacity, length)
}
