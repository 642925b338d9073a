package ui

import (
	"context"
	"errors"
	"sync"
	"testing"
	"time"
)

// A run started later wins even when an earlier one answers after it, and
// the earlier one sees its context cancelled.
func TestLatestNewestWins(t *testing.T) {
	var in inbox
	var l Latest[int]
	release := make(chan struct{})
	var sawCancel error
	var wg sync.WaitGroup
	wg.Add(2)
	started := make(chan struct{})
	l.Start(goRun, &in, func(ctx context.Context) (int, error) {
		defer wg.Done()
		close(started)
		<-release
		sawCancel = ctx.Err()
		return 1, nil
	}, nil)
	<-started
	l.Start(goRun, &in, func(ctx context.Context) (int, error) {
		defer wg.Done()
		return 2, nil
	}, nil)
	time.Sleep(10 * time.Millisecond)
	close(release)
	wg.Wait()
	time.Sleep(5 * time.Millisecond)
	in.drain()
	if !l.Has || l.Value != 2 || l.Busy {
		t.Fatalf("Latest = %+v, want value 2, not busy", l)
	}
	if !errors.Is(sawCancel, context.Canceled) {
		t.Errorf("first run's context: %v, want cancelled", sawCancel)
	}
}

// The owner runs jobs in order on one goroutine.
func TestOwnerRunsInOrder(t *testing.T) {
	o := newOwner()
	var got []int
	for i := 0; i < 100; i++ {
		o.do(func() { got = append(got, i) })
	}
	o.idle()
	o.close()
	for i, v := range got {
		if v != i {
			t.Fatalf("job %d ran as %d", i, v)
		}
	}
	if len(got) != 100 {
		t.Fatalf("%d jobs ran, want 100", len(got))
	}
}

// A cancelled future drops its answer, whether or not its job ran.
func TestLatestCancelDrops(t *testing.T) {
	var in inbox
	var l Latest[string]
	l.Start(goRun, &in, func(ctx context.Context) (string, error) { return "late", nil }, nil)
	l.Cancel()
	deadline := time.Now().Add(5 * time.Second)
	for {
		in.mu.Lock()
		n := len(in.pending)
		in.mu.Unlock()
		if n > 0 || time.Now().After(deadline) {
			break
		}
		time.Sleep(time.Millisecond)
	}
	if !in.drain() {
		t.Fatal("the cancelled job posted nothing in 5 s")
	}
	if l.Has || l.Busy {
		t.Fatalf("cancelled future took its answer: %+v", l)
	}
}
