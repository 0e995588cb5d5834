package feedback

import "errors"

// Kinds of failure, for errors.Is: every error the package returns for one
// of these reasons wraps the matching sentinel, with the details in its
// text.
var (
	// ErrInternal is a failure of the library itself, or of a user's
	// scheme or finder: a panic recovered in a worker goroutine (a fault
	// reading host memory through a bad column included). Nothing of the
	// call is deposited.
	ErrInternal = errors.New("internal failure")
	// ErrBusy is a call on a Coupler or Stepper that is already running
	// another call.
	ErrBusy = errors.New("already in use by another call")
)
