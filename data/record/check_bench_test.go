package record_test

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"runtime"
	"testing"
)

// BenchmarkCheckRetained reports what a checked batch keeps on the heap
// beyond the bundle it points into, per event: what checkEvents returns
// for the store write (retained-B/event), against the decoded events
// themselves (decoded-B/event, what a batch of Event values would keep),
// and the events' own encoded size (event-B/event). 20,000 events, about
// one DefaultPartBytes part.
func BenchmarkCheckRetained(b *testing.B) {
	raws, _ := testkit.BenchRaws(b, 20_000, 3)
	heap := func() uint64 {
		runtime.GC()
		var m runtime.MemStats
		runtime.ReadMemStats(&m)
		return m.HeapAlloc
	}
	var kept, decoded uint64
	for b.Loop() {
		h0 := heap()
		items, _, err := record.CheckEvents(raws, nil, testkit.XferNow, record.CheckWorkers(len(raws)))
		if err != nil {
			b.Fatal(err)
		}
		h1 := heap()
		runtime.KeepAlive(items)
		items = nil
		h2 := heap()
		evs := make([]record.Event, len(raws))
		for i, r := range raws {
			if evs[i], err = record.DecodeEvent(r); err != nil {
				b.Fatal(err)
			}
		}
		h3 := heap()
		runtime.KeepAlive(evs)
		kept, decoded = kept+(h1-min(h0, h1)), decoded+(h3-min(h2, h3))
	}
	n := float64(len(raws)) * float64(b.N)
	b.ReportMetric(float64(kept)/n, "retained-B/event")
	b.ReportMetric(float64(decoded)/n, "decoded-B/event")
	b.ReportMetric(float64(testkit.RawBytes(raws))/float64(len(raws)), "event-B/event")
}
