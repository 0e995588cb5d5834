package feedback

import (
	"fmt"

	"github.com/ejecta-dev/ejecta/yields"
)

// Record is one star's deposit into one gas element, ready to be applied
// in place or sent to the rank that owns the element. Kick is the speed
// change the deposit alone gives the element and Heating its heat per unit
// mass, for the host's timestep limiter.
type Record struct {
	GasIndex int
	GasID    int64
	StarID   int64
	Channel  yields.Channel
	Deposit
	Kick    float64
	Heating float64
}

// Problem is a source whose release was returned undeposited, and why:
// the star's ID, its index in the call, and the channel of the release.
type Problem struct {
	StarID  int64
	Index   int
	Channel yields.Channel
	Err     error
}

// Output receives the result of Couple. Its slices are reused from call to
// call: keep one Output per simulation to avoid allocation.
type Output struct {
	// Records, grouped by source in input order.
	Records []Record
	// Ledger of the call.
	Ledger Ledger
	// Problems lists the sources returned undeposited.
	Problems []Problem
	// Undeposited holds, for each source in input order, what of its
	// release was returned to the caller: all of it for a Problem (as
	// given, for a release refused as malformed), the energy a scheme
	// could not place (stochastic heating that heated no neighbor), or
	// nothing. Ledger.Undeposited is their sum, except for a refused
	// release with an amount that is not finite, which the ledger does not
	// book at all (neither In nor Undeposited) so that its sums stay
	// finite.
	Undeposited []Quantities
}

// Err is nil when every source of the call was deposited; otherwise an
// error wrapping ErrUndeposited that counts the problems and carries the
// first one's reason (errors.Is also finds its kind, e.g. ErrNoNeighbors).
func (o *Output) Err() error { return problemsErr(o.Problems) }

func problemsErr(problems []Problem) error {
	if len(problems) == 0 {
		return nil
	}
	p := &problems[0]
	// p.Err names the star by its ID already.
	return fmt.Errorf("%w: %d; the first, index %d, channel %s: %w",
		ErrUndeposited, len(problems), p.Index, p.Channel.String(), p.Err)
}
