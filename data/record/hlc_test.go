package record_test

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"testing"
	"time"

	"pgregory.net/rapid"
)

// Properties of the clock (Kulkarni et al. 2014, §3): stamps strictly
// increase; a stamp after observing m is greater than m (up to the cap);
// the physical part never runs ahead of the latest wall-clock reading by
// more than the bound.
func TestClockProperties(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		pt := testkit.T0
		c := record.NewClock(func() time.Time { return pt }, record.HLC{})
		var prev record.HLC
		maxPt := pt
		for i, n := 0, rapid.IntRange(1, 60).Draw(t, "steps"); i < n; i++ {
			switch rapid.IntRange(0, 2).Draw(t, "op") {
			case 0: // wall clock moves, possibly backwards (NTP step)
				pt = pt.Add(time.Duration(rapid.IntRange(-2000, 2000).Draw(t, "dt")) * time.Millisecond)
				if pt.After(maxPt) {
					maxPt = pt
				}
			case 1:
				m := record.HLC{WallMs: pt.UnixMilli() + rapid.Int64Range(-1e9, 1e11).Draw(t, "skew")}
				c.Observe(m)
				got := c.Now()
				capped := min(m.WallMs, pt.Add(record.MaxClockAhead).UnixMilli())
				if got.WallMs < capped || (got.WallMs == capped && got.Logical == 0 && m.WallMs <= capped) {
					t.Fatalf("stamp %v after observing %v is not later", got, m)
				}
				if got.Compare(prev) <= 0 {
					t.Fatalf("stamp %v not after %v", got, prev)
				}
				prev = got
			default:
				got := c.Now()
				if got.Compare(prev) <= 0 {
					t.Fatalf("stamp %v not after %v", got, prev)
				}
				prev = got
			}
			// A clock never runs backwards, so the bound holds against the
			// latest wall-clock reading, not one stepped back since.
			if ahead := c.Last().WallMs - maxPt.UnixMilli(); ahead > record.MaxClockAhead.Milliseconds()+1 {
				// The +1 allows the carry when the logical counter overflows.
				t.Fatalf("clock %d ms ahead of the wall clock, bound %v", ahead, record.MaxClockAhead)
			}
		}
	})
}

func TestClockSameMillisecond(t *testing.T) {
	c := record.NewClock(func() time.Time { return testkit.T0 }, record.HLC{})
	a, b := c.Now(), c.Now()
	// Send rule: same physical time → logical counter steps by one (Kulkarni et al. §3).
	if a.WallMs != b.WallMs || b.Logical != a.Logical+1 {
		t.Fatalf("%v then %v", a, b)
	}
}
