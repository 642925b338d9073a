package transfer

import (
	"baleassay/data/record"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"

	"github.com/fxamacker/cbor/v2"
)

// BundleVersion is the version of the bundle format this code writes
// and the only one it reads.
const BundleVersion = 2

// Header labels of the bundle body (see bundle.cddl).
const (
	hdrFormat = 1 + iota
	hdrVersion
	hdrDevice
	hdrKey
	hdrSeq
	hdrPrev
	hdrClock
	hdrCount
	hdrPart
)

var headerLabelName = map[int64]string{
	hdrFormat: "format", hdrVersion: "version", hdrDevice: "device", hdrKey: "key",
	hdrSeq: "seq", hdrPrev: "prev", hdrClock: "clock", hdrCount: "count", hdrPart: "part",
}

// BundleHeader is the first half of a bundle body: who exported it, the
// place of this bundle in that device's sequence, and how many events
// follow.
type BundleHeader struct {
	Device  record.DeviceID // exporting device (the store's device id)
	Key     Fingerprint     // fingerprint of the signing key; must match the COSE kid
	Seq     uint64          // per-device bundle sequence number, from 1
	Prev    [32]byte        // SHA-256 of the device's previous bundle file; zero when Seq == 1
	WallMs  int64           // exporting device's clock at export, ms since 1970 UTC
	Logical uint64          // hybrid logical clock counter at export
	Count   uint64          // number of events in the body
	Part    uint64          // this part's number, 1..Parts, within one export
	Parts   uint64          // number of parts the export was split into
}

// headerWire is the CBOR shape of BundleHeader (keys as small ints).
type headerWire struct {
	Format  string   `cbor:"1,keyasint"`
	Version uint64   `cbor:"2,keyasint"`
	Device  []byte   `cbor:"3,keyasint"`
	Key     []byte   `cbor:"4,keyasint"`
	Seq     uint64   `cbor:"5,keyasint"`
	Prev    []byte   `cbor:"6,keyasint"`
	Clock   [2]int64 `cbor:"7,keyasint"`
	Count   uint64   `cbor:"8,keyasint"`
	Part    [2]int64 `cbor:"9,keyasint"`
}

var (
	// detEnc is RFC 8949 §4.2.1 core deterministic encoding.
	detEnc cbor.EncMode
	// headerDec decodes header maps strictly: duplicate keys, indefinite
	// lengths, tags, NaN and infinities, invalid UTF-8 and unknown fields
	// are errors; nesting and sizes are bounded.
	headerDec cbor.DecMode
)

func init() {
	var err error
	if detEnc, err = cbor.CoreDetEncOptions().EncMode(); err != nil {
		panic(err)
	}
	headerDec, err = cbor.DecOptions{
		DupMapKey:         cbor.DupMapKeyEnforcedAPF,
		IndefLength:       cbor.IndefLengthForbidden,
		TagsMd:            cbor.TagsForbidden,
		NaN:               cbor.NaNDecodeForbidden,
		Inf:               cbor.InfDecodeForbidden,
		UTF8:              cbor.UTF8RejectInvalid,
		ExtraReturnErrors: cbor.ExtraDecErrorUnknownField,
		MaxNestedLevels:   8,
		MaxArrayElements:  64,
		MaxMapPairs:       64,
		IntDec:            cbor.IntDecConvertSignedOrFail,
	}.DecMode()
	if err != nil {
		panic(err)
	}
}

// classifyCBOR maps a decoder error to the bundle sentinel it means.
func classifyCBOR(err error) error {
	if errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF) {
		return ErrBundleTruncated
	}
	var ufe *cbor.UnknownFieldError
	var ute *cbor.UnmarshalTypeError
	if errors.As(err, &ufe) || errors.As(err, &ute) {
		return ErrBundleHeader
	}
	return ErrBundleMalformed
}

// cborErr wraps a decoder error with its sentinel and keeps the decoder's
// typed error reachable through errors.As.
func cborErr(err error, part string, off int) error {
	be := bundleErr(classifyCBOR(err), part, off, "%v", err)
	return &causedError{BundleError: be, cause: err}
}

// causedError is a BundleError that also unwraps to the decoder error.
type causedError struct {
	*BundleError
	cause error
}

func (e *causedError) Unwrap() []error { return []error{e.BundleError, e.cause} }

// encodeHeader returns the deterministic CBOR of h.
func encodeHeader(h BundleHeader) ([]byte, error) {
	w := headerWire{
		Format: BundleFormat, Version: BundleVersion,
		Device: h.Device[:], Key: h.Key[:], Seq: h.Seq,
		Clock: [2]int64{h.WallMs, int64(h.Logical)},
		Count: h.Count, Part: [2]int64{int64(h.Part), int64(h.Parts)},
		Prev: []byte{},
	}
	if h.Seq > 1 {
		w.Prev = h.Prev[:]
	}
	return detEnc.Marshal(w)
}

// decodeHeader decodes and checks the header item b found at offset off.
// Order of checks: well-formed and strict CBOR, format name, version (so
// a newer file says "newer version", not "unknown field"), required
// fields, field types and ranges, deterministic encoding.
func decodeHeader(b []byte, off int) (BundleHeader, error) {
	var h BundleHeader
	var m map[int64]cbor.RawMessage
	if err := headerDec.Unmarshal(b, &m); err != nil {
		return h, cborErr(err, "header", off)
	}
	var format string
	if err := headerDec.Unmarshal(m[hdrFormat], &format); err != nil && m[hdrFormat] != nil {
		return h, cborErr(err, "header.format", off)
	}
	if format != BundleFormat {
		return h, bundleErr(ErrBundleFormat, "header.format", off, "format name %q, want %q", format, BundleFormat)
	}
	var version uint64
	if err := headerDec.Unmarshal(m[hdrVersion], &version); err != nil {
		return h, bundleErr(ErrBundleVersion, "header.version", off, "version is not an unsigned integer")
	}
	if version != BundleVersion {
		return h, bundleErr(ErrBundleVersion, "header.version", off, "file has format version %d; this program reads version %d", version, BundleVersion)
	}
	labels := make([]int64, 0, len(headerLabelName))
	for l := range headerLabelName {
		labels = append(labels, l)
	}
	sort.Slice(labels, func(i, j int) bool { return labels[i] < labels[j] })
	for _, l := range labels {
		if _, ok := m[l]; !ok {
			return h, bundleErr(ErrBundleHeader, "header."+headerLabelName[l], off, "required field missing")
		}
	}
	var w headerWire
	if err := headerDec.Unmarshal(b, &w); err != nil {
		return h, cborErr(err, "header", off)
	}
	field := func(name, detail string, args ...any) error {
		return bundleErr(ErrBundleHeader, "header."+name, off, detail, args...)
	}
	switch {
	case len(w.Device) != len(h.Device):
		return h, field("device", "device id has %d bytes, want 16", len(w.Device))
	case len(w.Key) != len(h.Key):
		return h, field("key", "key fingerprint has %d bytes, want 32", len(w.Key))
	case w.Seq == 0:
		return h, field("seq", "sequence numbers start at 1")
	case w.Seq == 1 && len(w.Prev) != 0:
		return h, field("prev", "first bundle of a device has no previous bundle")
	case w.Seq > 1 && len(w.Prev) != len(h.Prev):
		return h, field("prev", "previous-bundle hash has %d bytes, want 32", len(w.Prev))
	case w.Clock[0] < 0 || w.Clock[1] < 0:
		return h, field("clock", "clock stamp [%d, %d] is negative", w.Clock[0], w.Clock[1])
	case w.Clock[0] < record.MinTimeMs || w.Clock[0] >= record.MaxTimeMs || w.Clock[1] > math.MaxUint32:
		return h, field("clock", "clock stamp [%d, %d] lies outside 2000–2099 (the exporting device's clock is wrong)", w.Clock[0], w.Clock[1])
	case w.Part[0] < 1 || w.Part[1] < w.Part[0]:
		return h, field("part", "part [%d, %d] is not 1 ≤ part ≤ parts", w.Part[0], w.Part[1])
	}
	copy(h.Device[:], w.Device)
	copy(h.Key[:], w.Key)
	copy(h.Prev[:], w.Prev)
	h.Seq, h.WallMs, h.Logical = w.Seq, w.Clock[0], uint64(w.Clock[1])
	h.Count, h.Part, h.Parts = w.Count, uint64(w.Part[0]), uint64(w.Part[1])
	canon, err := encodeHeader(h)
	if err != nil {
		return h, fmt.Errorf("re-encoding header: %w", err)
	}
	if string(canon) != string(b) {
		return h, bundleErr(ErrBundleNonCanon, "header", off, "header does not re-encode to the same bytes (RFC 8949 §4.2)")
	}
	return h, nil
}
