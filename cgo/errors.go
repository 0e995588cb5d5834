package main

import (
	"errors"
	"fmt"
	"runtime/debug"
	"unsafe"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
)

// Error codes, the EJECTA_ERR_* values of ejecta.h (checked against the
// header by abiMismatches).
const (
	codeOK              int32 = 0
	codeNullPointer     int32 = 1
	codeInvalidArgument int32 = 2
	codeUnknownName     int32 = 3
	codeInvalidContext  int32 = 4
	codeNoGas           int32 = 5
	codeBadValue        int32 = 6
	codeNeighbors       int32 = 7
	codeBufferTooSmall  int32 = 8
	codeUnknownGas      int32 = 9
	codeBusy            int32 = 10
	codeUndeposited     int32 = 11
	codeImbalance       int32 = 12
	codeAlreadyApplied  int32 = 13
	codeNoPopulation    int32 = 14
	codeYieldsTable     int32 = 15
	codeRemnantTable    int32 = 16
	codeDumpFile        int32 = 17
	codeInternal        int32 = 99
)

// abiError is an error with the code the C caller receives.
type abiError struct {
	code int32
	err  error
}

func (e *abiError) Error() string { return e.err.Error() }
func (e *abiError) Unwrap() error { return e.err }

// fail makes an error the caller receives with the given code.
func fail(code int32, format string, args ...any) error {
	return &abiError{code: code, err: fmt.Errorf(format, args...)}
}

// codeOf is the C code of an error: its abiError's code, else internal.
func codeOf(err error) int32 {
	if err == nil {
		return codeOK
	}
	var ae *abiError
	if errors.As(err, &ae) {
		return ae.code
	}
	return codeInternal
}

// failWith wraps an error of the library's packages (feedback, neighbor,
// yields) with context and the code of its failure kind; fallback is the
// code of the calling entry when the error names no kind.
func failWith(fallback int32, err error, format string, args ...any) error {
	return &abiError{code: codeForFailure(err, fallback), err: fmt.Errorf(format+": %w", append(args, err)...)}
}

// codeForFailure is the one place where a failure kind of the library's
// packages becomes an EJECTA_ERR_* code: the sentinel errors of feedback
// (each failure there matches exactly one), then those of neighbor,
// recognized with errors.Is. A recovered panic (ErrInternal) wins over anything else
// the error may carry, and a call with releases returned undeposited
// (ErrUndeposited, which also matches its first release's reason) is
// UNDEPOSITED. An error that carries no kind gets the code the calling
// entry chose for it.
func codeForFailure(err error, fallback int32) int32 {
	var ae *abiError
	if errors.As(err, &ae) {
		return ae.code
	}
	kinds := [...]struct {
		kind error
		code int32
	}{
		{feedback.ErrInternal, codeInternal},
		{feedback.ErrUndeposited, codeUndeposited},
		{feedback.ErrBusy, codeBusy},
		{feedback.ErrNoNeighbors, codeNeighbors},
		{feedback.ErrUnknownGas, codeUnknownGas},
		{feedback.ErrUnknownName, codeUnknownName},
		{feedback.ErrImbalance, codeImbalance},
		{feedback.ErrBadValue, codeBadValue},
		{feedback.ErrInvalidArgument, codeInvalidArgument},
		// The finder's own errors reach here only from the tree and host
		// rows the ABI builds itself.
		{neighbor.ErrTooFew, codeNeighbors},
		{neighbor.ErrInvalid, codeNeighbors},
		{neighbor.ErrUnreachable, codeNeighbors},
	}
	for _, k := range kinds {
		if errors.Is(err, k.kind) {
			return k.code
		}
	}
	return fallback
}

// guard runs fn, turning a panic into an internal error, with faults on
// bad addresses turned into panics for the duration of the call.
func guard(fn func() error) (err error) {
	old := debug.SetPanicOnFault(true)
	defer debug.SetPanicOnFault(old)
	defer func() {
		if r := recover(); r != nil {
			err = fail(codeInternal, "internal failure: %v", r)
		}
	}()
	return fn()
}

// run is guard for the context-free entries: it returns the code.
func run(fn func() error) int32 { return codeOf(guard(fn)) }

// putText writes msg into the C buffer buf of capacity bytes, truncated and
// NUL-terminated. It reports whether all of msg fitted.
func putText(buf *byte, capacity int64, msg string) bool {
	if buf == nil || capacity <= 0 {
		return len(msg) == 0
	}
	dst := unsafe.Slice(buf, capacity)
	n := copy(dst[:capacity-1], msg)
	dst[n] = 0
	return n == len(msg)
}
