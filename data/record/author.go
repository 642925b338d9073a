package record

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
	i := 0
	next := func() (byte, bool) {
		if i >= len(raw) {
			return 0, false
		}
		i++
		return raw[i-1], true
	}
	// uintHead skips an unsigned integer item that fits a byte.
	uintHead := func() bool {
		b, ok := next()
		switch {
		case !ok:
			return false
		case b < 0x18:
			return true
		case b == 0x18:
			_, ok = next()
			return ok
		}
		return false
	}
	bstr16 := func(dst []byte) bool {
		if b, ok := next(); !ok || b != 0x50 || len(raw)-i < 16 {
			return false
		}
		copy(dst, raw[i:i+16])
		i += 16
		return true
	}
	var entity [16]byte
	if b, ok := next(); !ok || b>>5 != 5 || b&0x1f < 5 || b&0x1f > 23 {
		return dev, false
	}
	if b, ok := next(); !ok || b != 0x00 || !uintHead() {
		return dev, false
	}
	if b, ok := next(); !ok || b != 0x01 || !bstr16(entity[:]) {
		return dev, false
	}
	if b, ok := next(); !ok || b != 0x02 || !uintHead() {
		return dev, false
	}
	if b, ok := next(); !ok || b != 0x03 || !bstr16(dev[:]) {
		return DeviceID{}, false
	}
	return dev, true
}
