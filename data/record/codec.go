package record

import (
	"bytes"
	"fmt"
	"sort"
	"sync"

	"github.com/fxamacker/cbor/v2"
)

// Bounds of the strict decoder. An event is small: a pull with every
// category weighed and counted is well under 2 KiB.
const (
	MaxEventBytes    = 128 << 10 // bytes of one encoded event
	maxNestedLevels  = 6         // event → payload → map, with slack
	maxArrayElements = 1024      // supersedes list
	maxMapPairs      = 128       // category maps (the catalogue has 24 keys)
)

var (
	encMode cbor.UserBufferEncMode
	decMode cbor.DecMode
	// reencodeBufs holds the buffers DecodeEvent re-encodes into.
	reencodeBufs = sync.Pool{New: func() any { return new(bytes.Buffer) }}
)

func init() {
	var err error
	// RFC 8949 §4.2.1 core deterministic encoding: shortest integer and
	// float forms, definite lengths, map keys sorted bytewise.
	encMode, err = cbor.CoreDetEncOptions().UserBufferEncMode()
	if err != nil {
		panic(err)
	}
	decMode, err = cbor.DecOptions{
		DupMapKey:         cbor.DupMapKeyEnforcedAPF,
		IndefLength:       cbor.IndefLengthForbidden,
		TagsMd:            cbor.TagsForbidden,
		NaN:               cbor.NaNDecodeForbidden,
		Inf:               cbor.InfDecodeForbidden,
		ExtraReturnErrors: cbor.ExtraDecErrorUnknownField,
		MaxNestedLevels:   maxNestedLevels + 10, // the library's minimum is 4; depth is rechecked by re-encoding
		MaxArrayElements:  maxArrayElements,
		MaxMapPairs:       maxMapPairs,
		UTF8:              cbor.UTF8RejectInvalid,
	}.DecMode()
	if err != nil {
		panic(err)
	}
}

// DecodeError wraps a CBOR decoding failure. It unwraps to ErrDecode and
// to the library's error.
type DecodeError struct{ Err error }

func (e *DecodeError) Error() string   { return "malformed event: " + e.Err.Error() }
func (e *DecodeError) Unwrap() []error { return []error{ErrDecode, e.Err} }

// EncodeEvent encodes e in the core deterministic form of RFC 8949 §4.2
// (fxamacker/cbor CoreDetEncOptions). Equal events give equal bytes.
func EncodeEvent(e Event) ([]byte, error) {
	b, err := encMode.Marshal(e)
	if err != nil {
		return nil, fmt.Errorf("encode event: %w", err)
	}
	return b, nil
}

// DecodeEvent decodes one event strictly: duplicate map keys, indefinite
// lengths, tags, NaN and infinities, unknown fields, trailing bytes and
// oversized containers are refused, and the bytes must be exactly what
// EncodeEvent gives for the decoded value (so non-minimal integers,
// unsorted keys and the like are refused too). It does not validate the
// values; see ValidateEvent.
func DecodeEvent(raw []byte) (Event, error) {
	var e Event
	if len(raw) == 0 {
		return e, &DecodeError{Err: fmt.Errorf("empty input")}
	}
	if len(raw) > MaxEventBytes {
		return e, fmt.Errorf("%w: %d bytes, the limit is %d", ErrTooLarge, len(raw), MaxEventBytes)
	}
	if err := decMode.Unmarshal(raw, &e); err != nil {
		return Event{}, &DecodeError{Err: err}
	}
	buf := reencodeBufs.Get().(*bytes.Buffer)
	defer reencodeBufs.Put(buf)
	buf.Reset()
	// Room for the event and for the staging area the encoder uses to
	// sort a map's pairs, so that neither allocates; &e, not e, so the
	// event is not copied into an interface.
	buf.Grow(2*len(raw) + 64)
	if err := encMode.MarshalToBuffer(&e, buf); err != nil {
		return Event{}, &DecodeError{Err: err}
	}
	if again := buf.Bytes(); !bytes.Equal(again, raw) {
		return Event{}, fmt.Errorf("%w (%d bytes re-encode to %d different bytes)", ErrNotCanonical, len(raw), len(again))
	}
	if e.Version != FormatVersion {
		return Event{}, &FieldError{Field: "version", Value: fmt.Sprint(e.Version), Err: ErrVersion}
	}
	return e, nil
}

// DecodeTrusted decodes bytes that DecodeEvent accepted before (a store's
// own events): the decoder's limits hold, the re-encoding check is left
// out.
func DecodeTrusted(raw []byte) (Event, error) {
	var e Event
	if err := decMode.Unmarshal(raw, &e); err != nil {
		return Event{}, &DecodeError{Err: err}
	}
	return e, nil
}

// EncodePull encodes a pull record on its own (a draft being typed).
func EncodePull(p PullRecord) ([]byte, error) {
	b, err := encMode.Marshal(p)
	if err != nil {
		return nil, fmt.Errorf("encode pull: %w", err)
	}
	return b, nil
}

// DecodePull decodes what EncodePull wrote.
func DecodePull(raw []byte) (PullRecord, error) {
	var p PullRecord
	if err := decMode.Unmarshal(raw, &p); err != nil {
		return p, &DecodeError{Err: err}
	}
	return p, nil
}

// DiagnosticOf renders CBOR bytes in the diagnostic notation of RFC 8949 §8.
func DiagnosticOf(raw []byte) (string, error) {
	dm, err := cbor.DiagOptions{ByteStringEncoding: cbor.ByteStringBase16Encoding}.DiagMode()
	if err != nil {
		return "", err
	}
	return dm.Diagnose(raw)
}

func SortedKeys[V any](m map[string]V) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}
