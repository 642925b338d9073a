package ui

import (
	"context"
	"sync"
)

// Work off the frame loop.
//
// One goroutine, the owner, runs every job that touches the store, in the
// order they were asked for: screens never touch the store, they return
// actions, and the app turns those into jobs. A job's result comes back
// as a closure posted to the inbox, which the window goroutine drains at
// the start of each frame (Invalidate wakes it). Jobs whose answers
// replace each other (a search, an Outcome's Monte Carlo run) go through
// a Latest: starting a new run cancels the one in flight and an answer
// that is no longer the latest is dropped.

// inbox holds closures posted by background work for the window goroutine.
type inbox struct {
	mu      sync.Mutex
	pending []func()
	wake    func() // e.g. (*app.Window).Invalidate; may be nil
}

func (b *inbox) post(fn func()) {
	b.mu.Lock()
	b.pending = append(b.pending, fn)
	wake := b.wake
	b.mu.Unlock()
	if wake != nil {
		wake()
	}
}

// drain runs the posted closures on the caller's goroutine and reports
// whether there were any.
func (b *inbox) drain() bool {
	b.mu.Lock()
	fns := b.pending
	b.pending = nil
	b.mu.Unlock()
	for _, fn := range fns {
		fn()
	}
	return len(fns) > 0
}

// owner runs jobs one at a time on its own goroutine.
type owner struct {
	jobs chan func()
	wg   sync.WaitGroup // jobs queued or running
	done chan struct{}
	once sync.Once
}

func newOwner() *owner {
	o := &owner{jobs: make(chan func(), 256), done: make(chan struct{})}
	go func() {
		defer close(o.done)
		for job := range o.jobs {
			job()
			o.wg.Done()
		}
	}()
	return o
}

// do queues a job. It must not be called after close.
func (o *owner) do(job func()) {
	o.wg.Add(1)
	o.jobs <- job
}

// idle waits until every queued job has run.
func (o *owner) idle() { o.wg.Wait() }

// close stops the owner after the queued jobs; later calls do nothing.
func (o *owner) close() {
	o.once.Do(func() { close(o.jobs) })
	<-o.done
}

// Latest is a typed future whose newest run wins. Its fields are read and
// written on the window goroutine only.
type Latest[T any] struct {
	gen    uint64
	cancel context.CancelFunc
	Value  T     // the last answer that arrived (kept while a new run is busy)
	Err    error // its error
	Busy   bool  // a run is in flight
	Has    bool  // at least one answer arrived
}

// Start cancels the run in flight and starts fn through run (the owner's
// do, or a goroutine of its own); its answer is posted to in and applied
// only if no later Start came first. then, if not nil, runs on the window
// goroutine after the answer is applied.
func (l *Latest[T]) Start(run func(func()), in *inbox, fn func(ctx context.Context) (T, error), then func()) {
	if l.cancel != nil {
		l.cancel()
	}
	l.gen++
	gen := l.gen
	ctx, cancel := context.WithCancel(context.Background())
	l.cancel = cancel
	l.Busy = true
	run(func() {
		var v T
		var err error
		if ctx.Err() == nil {
			v, err = fn(ctx)
		} else {
			err = ctx.Err()
		}
		in.post(func() {
			if gen != l.gen {
				return // a newer run replaced this one
			}
			cancel()
			l.Busy, l.Has, l.Value, l.Err = false, true, v, err
			if then != nil {
				then()
			}
		})
	})
}

// Cancel stops the run in flight, if any; its answer will be dropped.
func (l *Latest[T]) Cancel() {
	if l.cancel != nil {
		l.cancel()
	}
	l.gen++
	l.Busy = false
}

// goRun runs a job on a goroutine of its own (pure computations that
// need not wait behind store writes).
func goRun(job func()) { go job() }
