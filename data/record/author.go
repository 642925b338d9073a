package record

import "math"

// AuthorOf reads the author (field 3, Device) of an encoded event
// without decoding the rest, for the transfer layer's authorship check
// of a whole bundle before the events are decoded on all CPUs. It relies
// on the deterministic layout: keys 0 to 3 are always present (none is
// omitempty) and sort first, so every event DecodeEvent accepts begins
//
//	map head, 0x00 version, 0x01 0x50 <16-byte entity>, 0x02 kind, 0x03 0x50 <16-byte device>
//
// with version and kind as unsigned integers below 256. ok is false for
// bytes that do not begin so; DecodeEvent refuses all of those
// (FuzzAuthorOf holds the two to that), so a caller may refuse them at
// once with DecodeEvent's own error.
func AuthorOf(raw []byte) (dev DeviceID, ok bool) {
	c := headCursor{raw: raw}
	return c.device()
}

// ClockOf reads an event's clock stamp (field 4, [wall ms, logical],
// which follows the author) the way AuthorOf reads the author; ok is
// false where AuthorOf's is, or where the stamp does not follow.
func ClockOf(raw []byte) (h HLC, ok bool) {
	c := headCursor{raw: raw}
	if _, ok := c.device(); !ok {
		return h, false
	}
	if b, ok := c.next(); !ok || b != 0x04 {
		return h, false
	}
	if b, ok := c.next(); !ok || b != 0x82 {
		return h, false
	}
	major, wall, ok := c.int()
	if !ok || major > 1 || wall > math.MaxInt64 {
		return h, false
	}
	h.WallMs = int64(wall)
	if major == 1 {
		h.WallMs = -1 - int64(wall)
	}
	major, logical, ok := c.int()
	if !ok || major != 0 || logical > math.MaxUint32 {
		return HLC{}, false
	}
	h.Logical = uint32(logical)
	return h, true
}

// headCursor reads the fixed head of an encoded event.
type headCursor struct {
	raw []byte
	i   int
}

func (c *headCursor) next() (byte, bool) {
	if c.i >= len(c.raw) {
		return 0, false
	}
	c.i++
	return c.raw[c.i-1], true
}

// int reads an integer item's major type and argument (shortest form
// not checked: DecodeEvent does that).
func (c *headCursor) int() (major byte, arg uint64, ok bool) {
	b, ok := c.next()
	if !ok {
		return 0, 0, false
	}
	major, ai := b>>5, b&0x1f
	if major > 1 {
		return 0, 0, false
	}
	if ai < 24 {
		return major, uint64(ai), true
	}
	if ai > 27 {
		return 0, 0, false
	}
	n := 1 << (ai - 24)
	if len(c.raw)-c.i < n {
		return 0, 0, false
	}
	for _, x := range c.raw[c.i : c.i+n] {
		arg = arg<<8 | uint64(x)
	}
	c.i += n
	return major, arg, true
}

// small skips an unsigned integer item below 256.
func (c *headCursor) small() bool {
	major, arg, ok := c.int()
	return ok && major == 0 && arg < 256
}

func (c *headCursor) bstr16(dst []byte) bool {
	if b, ok := c.next(); !ok || b != 0x50 || len(c.raw)-c.i < 16 {
		return false
	}
	copy(dst, c.raw[c.i:c.i+16])
	c.i += 16
	return true
}

func (c *headCursor) device() (dev DeviceID, ok bool) {
	var entity [16]byte
	if b, ok := c.next(); !ok || b>>5 != 5 || b&0x1f < 5 || b&0x1f > 23 {
		return dev, false
	}
	if b, ok := c.next(); !ok || b != 0x00 || !c.small() {
		return dev, false
	}
	if b, ok := c.next(); !ok || b != 0x01 || !c.bstr16(entity[:]) {
		return dev, false
	}
	if b, ok := c.next(); !ok || b != 0x02 || !c.small() {
		return dev, false
	}
	if b, ok := c.next(); !ok || b != 0x03 || !c.bstr16(dev[:]) {
		return DeviceID{}, false
	}
	return dev, true
}
