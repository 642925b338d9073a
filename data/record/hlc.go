package record

import (
	"encoding/binary"
	"fmt"
	"math"
	"sync"
	"time"
)

// MaxClockAhead bounds how far a clock stamp may run ahead of the device's
// own wall clock. A stamp observed from another device that is further
// ahead is capped at now + MaxClockAhead before it is adopted, so a device
// whose clock is a year fast cannot drag every other device's stamps with
// it; ValidateEvent warns about such stamps. The bound holds against the
// latest wall-clock reading: a clock stepped back keeps its stamps
// monotone and may stay ahead of the stepped-back reading until it
// catches up.
const MaxClockAhead = time.Minute

// HLC is a hybrid logical clock stamp (Kulkarni, Demirbas, Madappa, Avva
// and Leone, "Logical Physical Clocks", OPODIS 2014): the largest physical
// time seen, in Unix milliseconds, and a logical counter that orders
// stamps within the same millisecond. It encodes as a CBOR array
// [wall_ms, logical].
type HLC struct {
	_       struct{} `cbor:",toarray"`
	WallMs  int64
	Logical uint32
}

// Compare orders stamps: -1, 0 or +1.
func (h HLC) Compare(o HLC) int {
	switch {
	case h.WallMs < o.WallMs:
		return -1
	case h.WallMs > o.WallMs:
		return 1
	case h.Logical < o.Logical:
		return -1
	case h.Logical > o.Logical:
		return 1
	}
	return 0
}

// Time is the physical part as a time.
func (h HLC) Time() time.Time { return time.UnixMilli(h.WallMs).UTC() }

func (h HLC) String() string {
	return fmt.Sprintf("%s+%d", h.Time().Format("2006-01-02T15:04:05.000Z"), h.Logical)
}

func (h HLC) Bytes() []byte {
	b := make([]byte, 12)
	binary.BigEndian.PutUint64(b, uint64(h.WallMs))
	binary.BigEndian.PutUint32(b[8:], h.Logical)
	return b
}

func HLCFromBytes(b []byte) HLC {
	if len(b) != 12 {
		return HLC{}
	}
	return HLC{WallMs: int64(binary.BigEndian.Uint64(b)), Logical: binary.BigEndian.Uint32(b[8:])}
}

// Clock hands out HLC stamps. It is safe for concurrent use.
type Clock struct {
	mu   sync.Mutex
	now  func() time.Time
	last HLC
}

// NewClock returns a clock reading physical time from now (time.Now when
// nil) that continues after last.
func NewClock(now func() time.Time, last HLC) *Clock {
	if now == nil {
		now = time.Now
	}
	return &Clock{now: now, last: last}
}

// Now returns a stamp for a local event, strictly after every stamp this
// clock has given or observed (the send rule of Kulkarni et al. §3):
//
//	l' = max(l, pt);  c' = c + 1 if l' = l, else 0
func (c *Clock) Now() HLC {
	c.mu.Lock()
	defer c.mu.Unlock()
	pt := c.now().UnixMilli()
	if pt > c.last.WallMs {
		c.last = HLC{WallMs: pt}
	} else if c.last.Logical == math.MaxUint32 {
		c.last = HLC{WallMs: c.last.WallMs + 1}
	} else {
		c.last.Logical++
	}
	return c.last
}

// Observe takes in a stamp from another device (the receive rule, with
// the counter step folded into the next Now). A stamp further than
// MaxClockAhead ahead of the physical clock is capped there, which keeps
// l − pt ≤ MaxClockAhead, the bound ε of Kulkarni et al.
func (c *Clock) Observe(m HLC) {
	c.mu.Lock()
	defer c.mu.Unlock()
	limit := c.now().Add(MaxClockAhead).UnixMilli()
	if m.WallMs > limit {
		m = HLC{WallMs: limit}
	}
	if m.Compare(c.last) > 0 {
		c.last = m
	}
}

// Last is the latest stamp given or observed.
func (c *Clock) Last() HLC {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.last
}
