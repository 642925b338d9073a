package record

import (
	"runtime"
	"sync"
	"sync/atomic"
	"time"
)

// checkedEvent is what a write needs of one event that passed
// DecodeEvent and ValidateEvent: its id, its bytes (possibly a sub-slice
// of the caller's buffer, which bbolt reads at commit) and the fields the
// indexes use. The decoded payload is not kept, so a batch holds about
// its encoded bytes and a small constant per event, not the decoded
// events.
type Checked struct {
	ID         EventID
	Raw        []byte
	Entity     EntityID
	Kind       Kind
	Clock      HLC
	Supersedes []EventID
	Demo       bool // an event of the demo scenario or of a demo store
}

func CheckedOf(id EventID, raw []byte, e Event) Checked {
	return Checked{ID: id, Raw: raw, Entity: e.Entity, Kind: e.Kind, Clock: e.Clock, Supersedes: e.Supersedes, Demo: e.Demo}
}

// checkRunMin is the smallest run of events worth a worker of its own:
// below it the goroutine start-up costs more than it saves.
const checkRunMin = 512

// checkWorkers is how many workers checkEvents uses for n events: one
// per CPU the Go scheduler may use, at most one per checkRunMin events.
func CheckWorkers(n int) int {
	return max(1, min(runtime.GOMAXPROCS(0), n/checkRunMin))
}

// checkEvents decodes strictly (DecodeEvent), hashes (IDOf, unless ids
// holds the ids already computed from these bytes, as OpenBundle's are) and
// validates (ValidateEventAt, at now) every event of raws, on workers
// goroutines over contiguous runs of the slice (serially when workers
// ≤ 1). The result does not depend on workers: the events come back in
// input order, the warnings in input order, and on failure the error is
// the one of the lowest failing index, exactly as a serial loop finds it
// (TestCheckEventsParallelSameAsSerial). A worker stops at its first
// failure, and at any index above a failure already found.
func CheckEvents(raws [][]byte, ids []EventID, now time.Time, workers int) ([]Checked, []EventWarning, error) {
	if ids != nil && len(ids) != len(raws) {
		panic("checkEvents: ids do not match raws") // a programmer's mistake
	}
	out := make([]Checked, len(raws))
	if workers <= 1 || len(raws) < 2 {
		w, _, err := checkRun(raws, ids, out, 0, now, nil)
		if err != nil {
			return nil, nil, err
		}
		return out, w, nil
	}
	workers = min(workers, len(raws))
	var failed atomic.Int64 // lowest failing index seen so far
	failed.Store(int64(len(raws)))
	warns := make([][]EventWarning, workers)
	errs := make([]error, workers)
	var wg sync.WaitGroup
	for k := range workers {
		lo, hi := k*len(raws)/workers, (k+1)*len(raws)/workers
		wg.Add(1)
		go func() {
			defer wg.Done()
			var at int
			var part []EventID
			if ids != nil {
				part = ids[lo:hi]
			}
			warns[k], at, errs[k] = checkRun(raws[lo:hi], part, out[lo:hi], lo, now, &failed)
			if errs[k] != nil {
				for {
					cur := failed.Load()
					if int64(at) >= cur || failed.CompareAndSwap(cur, int64(at)) {
						break
					}
				}
			}
		}()
	}
	wg.Wait()
	for k := range workers { // runs are in index order: the first error is the lowest index
		if errs[k] != nil {
			return nil, nil, errs[k]
		}
	}
	var all []EventWarning
	for _, w := range warns {
		all = append(all, w...)
	}
	return out, all, nil
}

// errStopped marks a run abandoned because a lower index already failed;
// it never leaves checkEvents (that lower failure is returned instead).
type errStopped struct{}

func (errStopped) Error() string { return "check stopped" }

// checkRun checks raws[i] into out[i] in order; base is the index of
// raws[0] in the batch. It returns the warnings, and on failure the
// failing batch index and an *EventError.
func checkRun(raws [][]byte, ids []EventID, out []Checked, base int, now time.Time, failed *atomic.Int64) ([]EventWarning, int, error) {
	var warns []EventWarning
	for j, raw := range raws {
		i := base + j
		if failed != nil && j&63 == 0 && failed.Load() < int64(i) {
			return nil, i, errStopped{}
		}
		ev, err := DecodeEvent(raw)
		if err != nil {
			return nil, i, &EventError{Index: i, Err: err}
		}
		var id EventID
		if ids != nil {
			id = ids[j]
		} else {
			id = IDOf(raw)
		}
		w, err := ValidateEventAt(ev, now)
		if err != nil {
			return nil, i, &EventError{Index: i, ID: id, Err: err}
		}
		for _, x := range w {
			warns = append(warns, EventWarning{i, id, x})
		}
		out[j] = CheckedOf(id, raw, ev)
	}
	return warns, 0, nil
}

// EventWarning is a warning about one event of a batch.
type EventWarning struct {
	Index int
	ID    EventID
	Warning
}
