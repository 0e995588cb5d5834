package feedback

import (
	"fmt"
	"math"
	"runtime/debug"
	"sync"
	"sync/atomic"
)

// poolChunk is how many consecutive items (stars) a worker takes at a time.
const poolChunk = 16

// itemRunner is the work of one call, item by item: worker is the index of
// the goroutine running the item (for per-worker scratch).
type itemRunner interface {
	runItem(worker, item int)
}

// workerPool runs the items of a call in chunks on a number of goroutines.
// A panic in any of them (a user's scheme or finder, or a fault reading
// host memory through a bad column) is recovered and returned as an error
// wrapping ErrInternal; the other workers stop taking chunks. It lives in
// the value that owns the call (Coupler, sharedSearch), so a call
// allocates nothing.
type workerPool struct {
	next atomic.Int64
	wg   sync.WaitGroup
	mu   sync.Mutex
	err  error
}

// run runs items [0, n) of r on up to workers goroutines (the calling
// goroutine when one is enough) and returns the first recovered panic.
func (p *workerPool) run(r itemRunner, workers, n int) error {
	p.err = nil
	p.next.Store(0)
	if workers <= 1 || n <= poolChunk {
		p.work(r, 0, n)
		return p.err
	}
	for w := 0; w < workers; w++ {
		p.wg.Add(1)
		go func() {
			defer p.wg.Done()
			p.work(r, w, n)
		}()
	}
	p.wg.Wait()
	return p.err
}

// work takes chunks until none are left. Faults on bad addresses become
// panics while it runs, and every panic is recovered into p.err.
func (p *workerPool) work(r itemRunner, w, n int) {
	defer debug.SetPanicOnFault(debug.SetPanicOnFault(true))
	defer func() {
		if v := recover(); v != nil {
			p.mu.Lock()
			if p.err == nil {
				p.err = fmt.Errorf("%w: worker %d: %v", ErrInternal, w, v)
			}
			p.mu.Unlock()
			p.next.Store(math.MaxInt64 / 2) // no more chunks for anyone
		}
	}()
	for {
		lo := int(p.next.Add(poolChunk)) - poolChunk
		if lo >= n {
			return
		}
		for i := lo; i < min(lo+poolChunk, n); i++ {
			r.runItem(w, i)
		}
	}
}
