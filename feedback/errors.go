package feedback

import (
	"errors"
	"fmt"
)

// Kinds of failure, for errors.Is: every error the package returns for one
// of these reasons matches exactly one of them, with the details in its
// text. Wrapping layers add context, never a second kind. The C ABI maps
// each kind to one of its codes.
var (
	// ErrInvalidArgument is a call or configuration the package cannot act
	// on: a nil output or finder, a negative neighbor count or step
	// length, gas columns of mismatched length, type or stride, duplicate
	// gas IDs, a record applied twice.
	ErrInvalidArgument = errors.New("invalid argument")
	// ErrBadValue is a value outside its domain in the gas, a star or a
	// release: NaN, infinite, a negative mass or energy, a mass fraction
	// outside [0, 1], a species outweighing its ejecta, amounts that
	// overflow float64.
	ErrBadValue = errors.New("bad value")
	// ErrNoNeighbors is a star whose neighbor search failed or found no
	// gas, or fewer neighbors than the configuration asks for, or a
	// neighbor list naming an element the gas does not hold.
	ErrNoNeighbors = errors.New("no usable gas neighbors")
	// ErrUndeposited is a call in which some releases were returned to the
	// caller undeposited (Output.Err, StepOutput.Err); the error also
	// matches the kind of the first one's reason.
	ErrUndeposited = errors.New("releases returned undeposited")
	// ErrUnknownGas is a record naming a gas element the gas does not
	// hold: an index out of range, an ID that is not there or not at that
	// index.
	ErrUnknownGas = errors.New("unknown gas element")
	// ErrUnknownName is a scheme or remnant fit name that is not one of the
	// built-in ones.
	ErrUnknownName = errors.New("unknown name")
	// ErrImbalance is a ledger whose books do not balance within the
	// tolerance asked for.
	ErrImbalance = errors.New("ledger imbalance")
	// ErrBusy is a call on a Coupler or Stepper that is already running
	// another call.
	ErrBusy = errors.New("already in use by another call")
	// ErrInternal is a failure of the library itself, or of a user's
	// scheme or finder: a panic recovered in a worker goroutine (a fault
	// reading host memory through a bad column included). Nothing of the
	// call is deposited.
	ErrInternal = errors.New("internal failure")
)

// kindError is an error of a known kind: errors.Is matches its kind and
// whatever it wraps; its text is its own.
type kindError struct {
	kind, err error
}

func (e *kindError) Error() string   { return e.err.Error() }
func (e *kindError) Unwrap() []error { return []error{e.kind, e.err} }

// errorf is fmt.Errorf with a kind of failure attached for errors.Is.
func errorf(kind error, format string, args ...any) error {
	return &kindError{kind: kind, err: fmt.Errorf(format, args...)}
}
