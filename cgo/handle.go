package main

import (
	"runtime/cgo"
	"sync"
)

// handleState is what the state behind every kind of handle (a context, a
// dump session) carries: the lock that lets one call in at a time, whether
// the handle was released, and the outcome of the last call.
type handleState struct {
	mu sync.Mutex
	// released is set, under mu, just before the handle is deleted; only a
	// call that raced the release can still see the state.
	released bool
	lastErr  string
}

// handleOf gives the shared part of a handle's state.
func (s *handleState) handleOf() *handleState { return s }

// handled is the state behind one kind of handle.
type handled interface {
	handleOf() *handleState
}

// handleWords are the messages about one kind of handle; every format
// takes the handle's value except zero and nullPointer.
type handleWords struct {
	zero        string // the handle is 0
	dead        string // the handle was deleted or never made
	foreign     string // the handle holds another kind of state
	busy        string // another call holds the state
	released    string // a call raced the release and lost
	nullPointer string // the pointer to the handle is NULL
}

// handleTable reaches the states of one kind of handle (runtime/cgo
// handles holding a T) and keeps the rules every kind follows: 0, deleted
// and foreign handles are refused without crashing (codeInvalidContext),
// one call at a time (codeBusy), the last call's error kept for the host.
type handleTable[T handled] struct {
	words handleWords
}

// open makes the state of a new handle with build and stores the handle
// in *out (0 when anything fails); the error text, prefixed by name, goes
// to errText, which is cleared on success.
func (t handleTable[T]) open(name string, out *uint64, errText *byte, capacity int64, build func() (T, error)) int32 {
	err := guard(func() error {
		if out == nil {
			return fail(codeNullPointer, "%s", t.words.nullPointer)
		}
		*out = 0
		s, err := build()
		if err != nil {
			return err
		}
		*out = uint64(cgo.NewHandle(s))
		return nil
	})
	if err != nil {
		putText(errText, capacity, name+": "+err.Error())
	} else {
		putText(errText, capacity, "")
	}
	return codeOf(err)
}

// lookup turns a handle into its state, refusing 0, deleted handles and
// handles of other values without crashing.
func (t handleTable[T]) lookup(h uint64) (s T, err error) {
	if h == 0 {
		return s, fail(codeInvalidContext, "%s", t.words.zero)
	}
	defer func() {
		if r := recover(); r != nil {
			var none T
			s, err = none, fail(codeInvalidContext, t.words.dead, h)
		}
	}()
	v, ok := cgo.Handle(uintptr(h)).Value().(T)
	if !ok {
		return s, fail(codeInvalidContext, t.words.foreign, h)
	}
	return v, nil
}

// claim looks up the state of h and locks it for one call; the caller
// unlocks it.
func (t handleTable[T]) claim(h uint64) (T, error) {
	s, err := t.lookup(h)
	if err != nil {
		return s, err
	}
	hs := s.handleOf()
	if !hs.mu.TryLock() {
		var none T
		return none, fail(codeBusy, t.words.busy, h)
	}
	if hs.released {
		hs.mu.Unlock()
		var none T
		return none, fail(codeInvalidContext, t.words.released, h)
	}
	return s, nil
}

// with runs fn on the state of h, one call at a time, recording the
// outcome (a recovered panic included) as the state's last error.
func (t handleTable[T]) with(h uint64, fn func(s T) error) int32 {
	return run(func() error {
		s, err := t.claim(h)
		if err != nil {
			return err
		}
		hs := s.handleOf()
		defer hs.mu.Unlock()
		err = guard(func() error { return fn(s) })
		if err != nil {
			hs.lastErr = err.Error()
		} else {
			hs.lastErr = ""
		}
		return err
	})
}

// release deletes the handle *h and sets it to 0; releasing 0 does
// nothing. A handle in use by another call is not released (codeBusy).
func (t handleTable[T]) release(h *uint64) int32 {
	return run(func() error {
		if h == nil {
			return fail(codeNullPointer, "%s", t.words.nullPointer)
		}
		if *h == 0 {
			return nil
		}
		s, err := t.claim(*h)
		if err != nil {
			return err
		}
		hs := s.handleOf()
		defer hs.mu.Unlock()
		hs.released = true
		cgo.Handle(uintptr(*h)).Delete()
		*h = 0
		return nil
	})
}

// lastError copies the last call's error on h (or why h is refused) into
// buf, its length without the NUL to *length when length is not NULL.
func (t handleTable[T]) lastError(h uint64, buf *byte, capacity int64, length *int64) int32 {
	return run(func() error {
		if buf == nil && capacity > 0 {
			return fail(codeNullPointer, "buffer is NULL with capacity %d", capacity)
		}
		var msg string
		s, err := t.claim(h)
		if err != nil {
			msg = err.Error()
		} else {
			hs := s.handleOf()
			msg = hs.lastErr
			hs.mu.Unlock()
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
