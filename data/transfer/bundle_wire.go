package transfer

import "encoding/binary"

// A small reader of CBOR data item heads (RFC 8949 §3), used for the
// fixed outer layers of a bundle: the COSE_Sign1 array, its byte
// strings and the events array. It slices byte strings out of the input
// without copying, so a verified payload is walked event by event, and
// it insists on the preferred (shortest) head encoding of RFC 8949
// §4.2.1, so the walk doubles as the "re-encodes to the same bytes"
// check for these layers. Everything inside a header map goes through
// the strict fxamacker/cbor decoder instead.

// CBOR major types (RFC 8949 §3.1).
const (
	majUint  = 0
	majNint  = 1
	majBytes = 2
	majText  = 3
	majArray = 4
	majMap   = 5
	majTag   = 6
	majOther = 7
)

// wire is a cursor over a buffer; off is where the next head starts.
// base is added to offsets in errors so they count from the file start.
type wire struct {
	buf  []byte
	off  int
	base int
	part string
}

// head reads one item head and returns its major type and argument.
// Indefinite lengths (additional info 31), reserved values (28–30) and
// non-shortest arguments are refused.
func (w *wire) head() (major byte, arg uint64, err error) {
	start := w.off
	if w.off >= len(w.buf) {
		return 0, 0, bundleErr(ErrBundleTruncated, w.part, w.base+start, "expected a CBOR item, found the end of the data")
	}
	ib := w.buf[w.off]
	major, ai := ib>>5, ib&0x1f
	w.off++
	var n int
	switch {
	case ai < 24:
		return major, uint64(ai), nil
	case ai == 24:
		n = 1
	case ai == 25:
		n = 2
	case ai == 26:
		n = 4
	case ai == 27:
		n = 8
	case ai == 31:
		return 0, 0, bundleErr(ErrBundleMalformed, w.part, w.base+start, "indefinite-length item (forbidden)")
	default:
		return 0, 0, bundleErr(ErrBundleMalformed, w.part, w.base+start, "reserved additional information %d", ai)
	}
	if len(w.buf)-w.off < n {
		return 0, 0, bundleErr(ErrBundleTruncated, w.part, w.base+start, "item head cut short")
	}
	b := w.buf[w.off : w.off+n]
	w.off += n
	switch n {
	case 1:
		arg = uint64(b[0])
	case 2:
		arg = uint64(binary.BigEndian.Uint16(b))
	case 4:
		arg = uint64(binary.BigEndian.Uint32(b))
	case 8:
		arg = binary.BigEndian.Uint64(b)
	}
	if major != majOther && !shortest(arg, n) {
		return 0, 0, bundleErr(ErrBundleNonCanon, w.part, w.base+start, "integer or length %d not in its shortest form", arg)
	}
	return major, arg, nil
}

// shortest reports whether arg needed n argument bytes (RFC 8949 §4.2.1).
func shortest(arg uint64, n int) bool {
	switch n {
	case 1:
		return arg >= 24
	case 2:
		return arg > 0xff
	case 4:
		return arg > 0xffff
	default:
		return arg > 0xffffffff
	}
}

// expect reads a head of the given major type.
func (w *wire) expect(major byte, what string) (uint64, error) {
	start := w.off
	m, arg, err := w.head()
	if err != nil {
		return 0, err
	}
	if m != major {
		return 0, bundleErr(ErrBundleMalformed, w.part, w.base+start, "expected %s, found %s", what, majorName(m))
	}
	return arg, nil
}

// bytes reads a definite-length byte string and returns it as a
// sub-slice of the buffer (no copy) with its offset.
func (w *wire) bytes(what string) ([]byte, int, error) {
	start := w.off
	n, err := w.expect(majBytes, what)
	if err != nil {
		return nil, 0, err
	}
	if n > uint64(len(w.buf)-w.off) {
		return nil, 0, bundleErr(ErrBundleTruncated, w.part, w.base+start, "%s claims %d bytes, only %d remain", what, n, len(w.buf)-w.off)
	}
	at := w.off
	b := w.buf[w.off : w.off+int(n)]
	w.off += int(n)
	return b, at, nil
}

// end checks that the buffer is used up.
func (w *wire) end() error {
	if w.off != len(w.buf) {
		return bundleErr(ErrBundleTrailing, w.part, w.base+w.off, "%d extra bytes", len(w.buf)-w.off)
	}
	return nil
}

func majorName(m byte) string {
	return [...]string{"an unsigned integer", "a negative integer", "a byte string", "a text string",
		"an array", "a map", "a tag", "a simple value or float"}[m&7]
}

// appendHead appends a shortest-form head (RFC 8949 §4.2.1).
func appendHead(dst []byte, major byte, arg uint64) []byte {
	m := major << 5
	switch {
	case arg < 24:
		return append(dst, m|byte(arg))
	case arg <= 0xff:
		return append(dst, m|24, byte(arg))
	case arg <= 0xffff:
		return binary.BigEndian.AppendUint16(append(dst, m|25), uint16(arg))
	case arg <= 0xffffffff:
		return binary.BigEndian.AppendUint32(append(dst, m|26), uint32(arg))
	default:
		return binary.BigEndian.AppendUint64(append(dst, m|27), arg)
	}
}
