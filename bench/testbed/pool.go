package testbed

import (
	"sync"
	"sync/atomic"
)

// task is the kind of work a pass over the grid does, one plane at a time.
type task uint8

const (
	taskSweepX task = iota
	taskSweepY
	taskSweepZ
	taskCool
	taskTotals
	taskMeasure
	taskSignal
)

// pool runs the planes of one pass on the grid's workers. Planes are taken
// from a shared counter, and every plane writes only its own cells and its
// own partial sums, so the result does not depend on which worker took
// which plane: the grid is bitwise the same for any worker count. Workers
// beyond the calling goroutine are started on the first pass and wait for
// the next one on their own channel, so a pass allocates nothing; Close
// stops them.
type pool struct {
	workers int
	items   int
	next    atomic.Int64
	wake    []chan struct{}
	done    sync.WaitGroup
}

func (p *pool) init(workers int) { p.workers = workers }

// run does task t on items planes, on every worker, and returns when all
// are done.
func (g *Grid) run(t task, items int) {
	g.task = t
	p := &g.pool
	p.items = items
	p.next.Store(0)
	if p.workers == 1 || items == 1 {
		g.work(0)
		return
	}
	if p.wake == nil {
		p.wake = make([]chan struct{}, p.workers-1)
		for w := range p.wake {
			p.wake[w] = make(chan struct{})
			go g.serve(w+1, p.wake[w])
		}
	}
	p.done.Add(len(p.wake))
	for _, c := range p.wake {
		c <- struct{}{}
	}
	g.work(0)
	p.done.Wait()
}

// serve is a worker's life: one pass per wake-up until its channel closes.
func (g *Grid) serve(w int, wake <-chan struct{}) {
	for range wake {
		g.work(w)
		g.pool.done.Done()
	}
}

// Close stops the grid's worker goroutines; a grid with more than one
// worker keeps them between steps until then. The grid stays usable: the
// next pass starts them again.
func (g *Grid) Close() {
	for _, c := range g.pool.wake {
		close(c)
	}
	g.pool.wake = nil
}

// work takes planes until none are left.
func (g *Grid) work(w int) {
	p := &g.pool
	for {
		i := int(p.next.Add(1)) - 1
		if i >= p.items {
			return
		}
		g.do(w, i)
	}
}

// do runs the current task on plane i with worker w's scratch.
func (g *Grid) do(w, i int) {
	switch g.task {
	case taskSweepX:
		g.sweepPlane(&g.scratch[w], 0, i)
	case taskSweepY:
		g.sweepPlane(&g.scratch[w], 1, i)
	case taskSweepZ:
		g.sweepPlane(&g.scratch[w], 2, i)
	case taskCool:
		g.coolPlane(i)
	case taskTotals:
		g.totalsPlane(i)
	case taskMeasure:
		g.measurePlane(i)
	case taskSignal:
		g.signalPlane(i)
	}
}
