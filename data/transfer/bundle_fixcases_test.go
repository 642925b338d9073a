package transfer

// Source: invented test inputs; each expectation follows from
// data/bundle.cddl and the envelope rules of RFC 9052 (COSE_Sign1) named
// beside the case.

import (
	"bytes"
	"errors"
	"math"
	"slices"
	"time"

	"baleassay/assess"
	"baleassay/data/internal/testkit"
	"baleassay/data/record"

	"github.com/fxamacker/cbor/v2"
)

// fixCase is one file of the malformed-file suite: its name (the file
// name, by failure mode), how to build it, the sentinels its refusal
// must wrap (all of them, errors.Is) and optionally a typed error it
// must carry (errors.As). noop marks a file that must be accepted and
// change nothing.
type fixCase struct {
	name  string
	build func(g *fixGen) []byte
	want  []error
	as    func(error) bool
	noop  bool
	// accept > 0 marks a file that must be accepted with that many new
	// events.
	accept int
}

func asType[T error](err error) bool {
	var target T
	return errors.As(err, &target)
}

// Expected errors are the reader's contract: data/bundle_doc.go and
// data/bundle.cddl (source of each expectation), the envelope rules of
// RFC 9052 §4.2, the encoding rules of RFC 8949 §4.2.1 and §3, and the
// records' validation (data/validate.go).
func fixCases() []fixCase {
	hdrWith := func(mod func([]kv) []kv) func(g *fixGen) []byte {
		return func(g *fixGen) []byte {
			return g.signed(g.body(mapOf(mod(g.headerKVs(3))), entriesOf(g.next)))
		}
	}
	hdrBytes := func(mod func(h []byte) []byte) func(g *fixGen) []byte {
		return func(g *fixGen) []byte {
			return g.signed(g.body(mod(mapOf(g.headerKVs(3))), entriesOf(g.next)))
		}
	}
	evRaw := func(mod func(g *fixGen, raw []byte) []byte) func(g *fixGen) []byte {
		return func(g *fixGen) []byte { return g.withEvent(mod(g, bytes.Clone(g.next[2]))) }
	}
	evOf := func(mod func(g *fixGen) record.Event) func(g *fixGen) []byte {
		return func(g *fixGen) []byte { return g.withEvent(testkit.Enc(g.t, mod(g))) }
	}
	truncAt := func(frac float64, back int) func(g *fixGen) []byte {
		return func(g *fixGen) []byte {
			b := g.good()
			n := int(float64(len(b))*frac) - back
			return b[:n]
		}
	}
	envWith := func(prot, unprot []byte, stranger bool) func(g *fixGen) []byte {
		return func(g *fixGen) []byte {
			payload := g.goodBody(g.next)
			p, key := prot, g.trusted
			if p == nil {
				p = stdProtected(g.trusted)
			}
			if stranger {
				key = g.stranger
			}
			return sign1(p, unprot, payload, sigOver(key, p, payload))
		}
	}
	protKV := func(alg []byte, extra ...kv) func(g *fixGen) []byte {
		return func(g *fixGen) []byte {
			kvs := []kv{{coseLabelAlg, alg}, {coseLabelKID, g.cbor([]byte(g.trusted.Public()))}}
			prot := mapOf(append(kvs, extra...))
			payload := g.goodBody(g.next)
			return sign1(prot, []byte{0xa0}, payload, sigOver(g.trusted, prot, payload))
		}
	}
	isDup, isIndef := asType[*cbor.DupMapKeyError], asType[*cbor.IndefiniteLengthError]
	isNest, isTags := asType[*cbor.MaxNestedLevelError], asType[*cbor.TagsMdError]
	return []fixCase{
		// The whole file.
		{name: "empty-file", build: func(*fixGen) []byte { return nil }, want: []error{ErrBundleEmpty}},
		{name: "truncated-after-tag", build: truncAt(0, -1), want: []error{ErrBundleTruncated}},
		{name: "truncated-after-array-head", build: truncAt(0, -2), want: []error{ErrBundleTruncated}},
		{name: "truncated-in-protected-header", build: truncAt(0, -10), want: []error{ErrBundleTruncated}},
		{name: "truncated-in-payload", build: truncAt(0.5, 0), want: []error{ErrBundleTruncated}},
		{name: "truncated-in-signature", build: truncAt(1, 1), want: []error{ErrBundleTruncated}},
		{name: "truncated-before-signature", build: truncAt(1, 66), want: []error{ErrBundleTruncated}},
		{name: "trailing-zero-byte", build: func(g *fixGen) []byte { return append(g.good(), 0) }, want: []error{ErrBundleTrailing}},
		{name: "trailing-second-bundle", build: func(g *fixGen) []byte { return append(g.good(), g.baseFile...) }, want: []error{ErrBundleTrailing}},
		{name: "text-file", build: func(*fixGen) []byte { return []byte("pull,pet_clear\nP1,11.2\n") }, want: []error{ErrBundleNotCOSE}},
		{name: "json-file", build: func(*fixGen) []byte { return []byte(`{"events":[]}`) }, want: []error{ErrBundleNotCOSE}},
		// The COSE envelope.
		{name: "outer-tag-missing", build: func(g *fixGen) []byte { return g.good()[1:] }, want: []error{ErrBundleNotCOSE}},
		{name: "outer-tag-98-cose-sign", build: func(g *fixGen) []byte { return append([]byte{0xd8, 0x62}, g.good()[1:]...) }, want: []error{ErrBundleNotCOSE}},
		{name: "outer-tag-17-cose-mac0", build: func(g *fixGen) []byte { return append([]byte{0xd1}, g.good()[1:]...) }, want: []error{ErrBundleNotCOSE}},
		{name: "outer-tag-nonminimal", build: func(g *fixGen) []byte { return append([]byte{0xd8, 0x12}, g.good()[1:]...) }, want: []error{ErrBundleNonCanon}},
		{name: "array-of-three", build: func(g *fixGen) []byte { return flip(g.good(), 1, 0x84^0x83) }, want: []error{ErrBundleMalformed}},
		{name: "array-of-five", build: func(g *fixGen) []byte { return append(flip(g.good(), 1, 0x84^0x85), 0x40) }, want: []error{ErrBundleMalformed}},
		{name: "array-head-nonminimal", build: func(g *fixGen) []byte { return append([]byte{0xd2, 0x98, 0x04}, g.good()[2:]...) }, want: []error{ErrBundleNonCanon}},
		{name: "array-indefinite", build: func(g *fixGen) []byte { return append(append([]byte{0xd2, 0x9f}, g.good()[2:]...), 0xff) }, want: []error{ErrBundleMalformed}},
		{name: "payload-detached-nil", build: func(g *fixGen) []byte {
			p := stdProtected(g.trusted)
			out := append([]byte{0xd2, 0x84}, appendHead(nil, majBytes, uint64(len(p)))...)
			out = append(append(append(out, p...), 0xa0, 0xf6), appendHead(nil, majBytes, 64)...)
			return append(out, make([]byte, 64)...)
		}, want: []error{ErrBundleMalformed}},
		{name: "payload-length-huge", build: func(g *fixGen) []byte {
			p := stdProtected(g.trusted)
			out := append([]byte{0xd2, 0x84}, appendHead(nil, majBytes, uint64(len(p)))...)
			out = append(append(out, p...), 0xa0)
			return append(appendHead(out, majBytes, 1<<62), 0, 0, 0)
		}, want: []error{ErrBundleTruncated}},
		{name: "unprotected-header-not-empty", build: envWith(nil, []byte{0xa1, 0x04, 0x41, 0x01}, false), want: []error{ErrBadHeaderParam}},
		{name: "unprotected-header-not-a-map", build: envWith(nil, []byte{0x80}, false), want: []error{ErrBundleMalformed}},
		{name: "algorithm-only-unprotected", build: func(g *fixGen) []byte {
			prot := mapOf([]kv{{coseLabelKID, g.cbor([]byte(g.trusted.Public()))}})
			return envWith(prot, []byte{0xa1, 0x01, 0x32}, false)(g)
		}, want: []error{ErrAlgUnprotected}},
		{name: "algorithm-eddsa-minus-8", build: protKV([]byte{0x27}), want: []error{ErrUnexpectedAlg}},
		{name: "algorithm-es256-minus-7", build: protKV([]byte{0x26}), want: []error{ErrUnexpectedAlg}},
		{name: "algorithm-as-text", build: protKV([]byte{0x65, 'E', 'd', 'D', 'S', 'A'}), want: []error{ErrUnexpectedAlg}},
		{name: "protected-header-empty", build: envWith([]byte{}, []byte{0xa0}, false), want: []error{ErrUnexpectedAlg}},
		{name: "protected-extra-content-type", build: protKV([]byte{0x32}, kv{3, []byte{0x01}}), want: []error{ErrBadHeaderParam}},
		{name: "protected-duplicate-alg", build: protKV([]byte{0x32}, kv{coseLabelAlg, []byte{0x32}}), want: []error{ErrBundleMalformed}, as: isDup},
		{name: "protected-keys-unsorted", build: func(g *fixGen) []byte {
			prot := mapOf([]kv{{coseLabelKID, g.cbor([]byte(g.trusted.Public()))}, {coseLabelAlg, []byte{0x32}}})
			return envWith(prot, []byte{0xa0}, false)(g)
		}, want: []error{ErrBundleNonCanon}},
		{name: "kid-wrong-length", build: func(g *fixGen) []byte {
			prot := mapOf([]kv{{coseLabelAlg, []byte{0x32}}, {coseLabelKID, g.cbor([]byte(g.trusted.Public())[:16])}})
			return envWith(prot, []byte{0xa0}, false)(g)
		}, want: []error{ErrBadHeaderParam}},
		// Signer and signature.
		{name: "unknown-signer", build: func(g *fixGen) []byte {
			p := stdProtected(g.stranger)
			payload := g.goodBody(g.next)
			return sign1(p, []byte{0xa0}, payload, sigOver(g.stranger, p, payload))
		}, want: []error{ErrUnknownSigner}, as: asType[*UnknownSignerError]},
		{name: "signed-by-stranger-kid-of-trusted", build: envWith(nil, []byte{0xa0}, true), want: []error{ErrBadSignature}},
		{name: "signature-random", build: func(g *fixGen) []byte {
			b := g.good()
			copy(b[len(b)-64:], bytes.Repeat([]byte{0x5a}, 64))
			return b
		}, want: []error{ErrBadSignature}},
		{name: "signature-byte-flipped", build: func(g *fixGen) []byte { b := g.good(); return flip(b, len(b)-20, 0x04) }, want: []error{ErrBadSignature}},
		{name: "signature-short", build: func(g *fixGen) []byte {
			payload := g.goodBody(g.next)
			p := stdProtected(g.trusted)
			return sign1(p, []byte{0xa0}, payload, sigOver(g.trusted, p, payload)[:63])
		}, want: []error{ErrBadSignature}},
		{name: "signature-empty", build: func(g *fixGen) []byte {
			p := stdProtected(g.trusted)
			return sign1(p, []byte{0xa0}, g.goodBody(g.next), nil)
		}, want: []error{ErrBadSignature}},
		{name: "payload-byte-flipped-in-header", build: func(g *fixGen) []byte { b := g.good(); return flip(b, 60, 0x01) }, want: []error{ErrBadSignature}},
		{name: "payload-byte-flipped-in-event", build: func(g *fixGen) []byte { b := g.good(); return flip(b, len(b)-100, 0x10) }, want: []error{ErrBadSignature}},
		// The body (signed, so these reach the body reader).
		{name: "body-not-an-array", build: func(g *fixGen) []byte { return g.signed([]byte{0xa0}) }, want: []error{ErrBundleMalformed}},
		{name: "body-array-of-four", build: func(g *fixGen) []byte { return g.signed(append(flip(g.goodBody(g.next), 0, 0x83^0x84), 0x80)) }, want: []error{ErrBundleMalformed}},
		{name: "body-trailing-bytes", build: func(g *fixGen) []byte { return g.signed(append(g.goodBody(g.next), 0x00)) }, want: []error{ErrBundleTrailing}},
		{name: "header-duplicate-key", build: hdrWith(func(k []kv) []kv { return append(k, kv{hdrSeq, []byte{0x02}}) }), want: []error{ErrBundleMalformed}, as: isDup},
		{name: "header-indefinite-map", build: hdrBytes(func(h []byte) []byte { return append(append([]byte{0xbf}, h[1:]...), 0xff) }), want: []error{ErrBundleMalformed}, as: isIndef},
		{name: "header-indefinite-text", build: hdrWith(func(k []kv) []kv {
			return set(k, hdrFormat, append(append([]byte{0x7f, 0x69}, "baleassay"...), append(append([]byte{0x67}, "-bundle"...), 0xff)...))
		}), want: []error{ErrBundleMalformed}, as: isIndef},
		{name: "header-tag-epoch-on-clock", build: hdrWith(func(k []kv) []kv {
			h := BundleHeader{WallMs: testkit.XferNow.UnixMilli()}
			return set(k, hdrClock, append(append([]byte{0x82, 0xc1}, appendHead(nil, majUint, uint64(h.WallMs))...), 0x00))
		}), want: []error{ErrBundleMalformed}, as: isTags},
		{name: "header-nesting-10000", build: hdrWith(func(k []kv) []kv { return append(k, kv{10, nested(10000)}) }), want: []error{ErrBundleMalformed}, as: isNest},
		{name: "header-map-claims-2e40-pairs", build: hdrBytes(func(h []byte) []byte { return append(appendHead(nil, majMap, 1<<40), h[1:]...) }), want: []error{ErrBundleMalformed}},
		{name: "header-nonminimal-seq", build: hdrWith(func(k []kv) []kv { return set(k, hdrSeq, []byte{0x1b, 0, 0, 0, 0, 0, 0, 0, 2}) }), want: []error{ErrBundleNonCanon}},
		{name: "header-keys-unsorted", build: hdrWith(func(k []kv) []kv { k[0], k[1] = k[1], k[0]; return k }), want: []error{ErrBundleNonCanon}},
		{name: "header-float-count", build: hdrWith(func(k []kv) []kv { return set(k, hdrCount, []byte{0xf9, 0x42, 0x00}) }), want: []error{ErrBundleHeader}},
		{name: "header-nan-clock", build: hdrWith(func(k []kv) []kv { return set(k, hdrClock, []byte{0x82, 0xf9, 0x7e, 0x00, 0x00}) }), want: []error{ErrBundleMalformed}, as: asType[*cbor.UnacceptableDataItemError]},
		{name: "header-invalid-utf8-format", build: hdrWith(func(k []kv) []kv {
			return set(k, hdrFormat, append([]byte{0x70}, "baleassay-bundl\xff"...))
		}), want: []error{ErrBundleMalformed}},
		{name: "header-format-other", build: hdrWith(func(k []kv) []kv { return set(k, hdrFormat, append([]byte{0x68}, "otherfmt"...)) }), want: []error{ErrBundleFormat}},
		{name: "header-version-3", build: hdrWith(func(k []kv) []kv { return set(append(k, kv{10, []byte{0x01}}), hdrVersion, []byte{0x03}) }), want: []error{ErrBundleVersion}},
		// A file of the format before authorship proofs: [header, events]
		// with version 1. Refused as an older version, not as damaged.
		{name: "header-version-1-without-proofs", build: func(g *fixGen) []byte {
			h := mapOf(set(g.headerKVs(3), hdrVersion, []byte{0x01}))
			return g.signed(append(append(appendHead(nil, majArray, 2), h...), eventsArray(entriesOf(g.next))...))
		}, want: []error{ErrBundleVersion}},
		{name: "header-version-0", build: hdrWith(func(k []kv) []kv { return set(k, hdrVersion, []byte{0x00}) }), want: []error{ErrBundleVersion}},
		{name: "header-unknown-field", build: hdrWith(func(k []kv) []kv { return append(k, kv{10, []byte{0x01}}) }), want: []error{ErrBundleHeader}, as: asType[*cbor.UnknownFieldError]},
		{name: "header-missing-seq", build: hdrWith(func(k []kv) []kv { return drop(k, hdrSeq) }), want: []error{ErrBundleHeader}},
		{name: "header-seq-zero", build: hdrWith(func(k []kv) []kv { return set(set(k, hdrPrev, []byte{0x40}), hdrSeq, []byte{0x00}) }), want: []error{ErrBundleHeader}},
		{name: "header-prev-on-first-bundle", build: hdrWith(func(k []kv) []kv { return set(k, hdrSeq, []byte{0x01}) }), want: []error{ErrBundleHeader}},
		{name: "header-device-short", build: hdrWith(func(k []kv) []kv { return set(k, hdrDevice, []byte{0x43, 1, 2, 3}) }), want: []error{ErrBundleHeader}},
		{name: "header-key-not-signer", build: func(g *fixGen) []byte {
			k := set(g.headerKVs(3), hdrKey, g.cbor(func() []byte { f := g.stranger.Fingerprint(); return f[:] }()))
			return g.signed(g.body(mapOf(k), entriesOf(g.next)))
		}, want: []error{ErrBundleHeader}},
		{name: "header-part-3-of-2", build: hdrWith(func(k []kv) []kv { return set(k, hdrPart, []byte{0x82, 0x03, 0x02}) }), want: []error{ErrBundleHeader}},
		{name: "header-clock-negative", build: hdrWith(func(k []kv) []kv { return set(k, hdrClock, []byte{0x82, 0x20, 0x00}) }), want: []error{ErrBundleHeader}},
		// The events array.
		{name: "events-count-mismatch", build: func(g *fixGen) []byte {
			return g.signed(g.body(mapOf(g.headerKVs(2)), entriesOf(g.next)))
		}, want: []error{ErrBundleEventCount}},
		{name: "events-array-claims-2e32", build: func(g *fixGen) []byte {
			out := append(g.prefix(3, g.next), appendHead(nil, majArray, 1<<32)...)
			return g.signed(append(out, eventsArray(entriesOf(g.next))[1:]...))
		}, want: []error{ErrBundleTooMany}},
		{name: "events-array-claims-1e6", build: func(g *fixGen) []byte {
			out := append(g.prefix(1_000_000, g.next), appendHead(nil, majArray, 1_000_000)...)
			return g.signed(append(out, eventsArray(entriesOf(g.next))[1:]...))
		}, want: []error{ErrBundleTruncated}},
		{name: "events-array-nonminimal-head", build: func(g *fixGen) []byte {
			return g.signed(append(append(g.prefix(3, g.next), 0x98, 0x03), eventsArray(entriesOf(g.next))[1:]...))
		}, want: []error{ErrBundleNonCanon}},
		{name: "events-array-indefinite", build: func(g *fixGen) []byte {
			return g.signed(append(append(append(g.prefix(3, g.next), 0x9f), eventsArray(entriesOf(g.next))[1:]...), 0xff))
		}, want: []error{ErrBundleMalformed}},
		{name: "event-id-mismatch", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			es[1].id = es[2].id
			return g.signed(g.body(mapOf(g.headerKVs(3)), es))
		}, want: []error{ErrBundleEventID}},
		{name: "event-id-short", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			es[0].id = es[0].id[:31]
			return g.signed(g.body(mapOf(g.headerKVs(3)), es))
		}, want: []error{ErrBundleMalformed}},
		{name: "event-twice-in-bundle", build: func(g *fixGen) []byte {
			return g.signed(g.goodBody([][]byte{g.next[0], g.next[1], g.next[0]}))
		}, want: []error{ErrBundleDupEvent}},
		{name: "event-entry-not-a-pair", build: func(g *fixGen) []byte {
			ev := eventsArray(entriesOf(g.next[:1]))
			return g.signed(append(append(append(g.prefix(1, g.next[:1]), ev[0], 0x83), ev[2:]...), 0x00))
		}, want: []error{ErrBundleMalformed}},
		// Events inside a valid envelope: the records' strict decoding
		// and validation refuse them, and with them the whole bundle.
		{name: "event-empty-bytes", build: func(g *fixGen) []byte { return g.withEvent([]byte{}) }, want: []error{ErrBundleEvent, record.ErrDecode}},
		{name: "event-duplicate-map-key", build: evRaw(func(g *fixGen, r []byte) []byte { r[0]++; return append(r, 0x00, 0x01) }), want: []error{ErrBundleEvent, record.ErrDecode}, as: isDup},
		{name: "event-indefinite-map", build: evRaw(func(g *fixGen, r []byte) []byte { return append(append([]byte{0xbf}, r[1:]...), 0xff) }), want: []error{ErrBundleEvent, record.ErrDecode}, as: isIndef},
		{name: "event-tag-on-entity", build: evRaw(func(g *fixGen, r []byte) []byte {
			return append(append(bytes.Clone(r[:4]), 0xd8, 0x25), r[4:]...)
		}), want: []error{ErrBundleEvent, record.ErrDecode}, as: isTags},
		{name: "event-nesting-10000", build: evRaw(func(g *fixGen, r []byte) []byte { r[0]++; return append(append(r, 0x18, 0x1e), nested(10000)...) }), want: []error{ErrBundleEvent, record.ErrDecode}, as: isNest},
		{name: "event-unknown-field", build: evRaw(func(g *fixGen, r []byte) []byte { r[0]++; return append(r, 0x18, 0x1e, 0x00) }), want: []error{ErrBundleEvent, record.ErrDecode}, as: asType[*cbor.UnknownFieldError]},
		{name: "event-nonminimal-kind", build: evRaw(func(g *fixGen, r []byte) []byte {
			return append(append(bytes.Clone(r[:22]), 0x18), r[22:]...)
		}), want: []error{ErrBundleEvent, record.ErrNotCanonical}},
		{name: "event-trailing-byte", build: evRaw(func(g *fixGen, r []byte) []byte { return append(r, 0x00) }), want: []error{ErrBundleEvent}},
		{name: "event-invalid-utf8-name", build: evOf(func(g *fixGen) record.Event {
			return g.mk.Site(g.mk.Entity(), "Yard \xff\xfe", 53.1, -2.1)
		}), want: []error{ErrBundleEvent, record.ErrDecode}},
		{name: "event-nan-mass", build: evOf(func(g *fixGen) record.Event { return g.mk.Pull(g.mk.Entity(), g.baleID, "P9", math.NaN()) }), want: []error{ErrBundleEvent, record.ErrDecode}},
		{name: "event-infinite-gross-kg", build: evOf(func(g *fixGen) record.Event { return g.mk.Bale(g.mk.Entity(), g.siteID, math.Inf(1)) }), want: []error{ErrBundleEvent, record.ErrDecode}},
		{name: "event-negative-mass", build: evOf(func(g *fixGen) record.Event { return g.mk.Pull(g.mk.Entity(), g.baleID, "P9", -0.4) }), want: []error{ErrBundleEvent, record.ErrInvalid, assess.ErrNegativeMass}},
		{name: "event-latitude-91", build: evOf(func(g *fixGen) record.Event { return g.mk.Site(g.mk.Entity(), "Far yard", 91, 10) }), want: []error{ErrBundleEvent, record.ErrLatitude}},
		{name: "event-longitude-minus-181", build: evOf(func(g *fixGen) record.Event { return g.mk.Site(g.mk.Entity(), "Far yard", 10, -181) }), want: []error{ErrBundleEvent, record.ErrLongitude}},
		{name: "event-pull-parts-exceed-stated", build: evOf(func(g *fixGen) record.Event {
			e := g.mk.Pull(g.mk.Entity(), g.baleID, "P9", 12)
			e.Pull.StatedKg = 10
			return e
		}), want: []error{ErrBundleEvent, record.ErrPullParts}},
		{name: "event-format-version-2", build: evOf(func(g *fixGen) record.Event {
			e := g.mk.Pull(g.mk.Entity(), g.baleID, "P9", 1)
			e.Version = 2
			return e
		}), want: []error{ErrBundleEvent, record.ErrVersion}},
		{name: "event-tombstone-supersedes-nothing", build: evOf(func(g *fixGen) record.Event { return g.mk.Tombstone(g.mk.Entity(), record.KindPull) }), want: []error{ErrBundleEvent, record.ErrTombstone}},
		{name: "event-kind-differs-from-entity", build: evOf(func(g *fixGen) record.Event { return g.mk.Bale(g.siteID, g.siteID, 500) }), want: []error{ErrBundleEvent, record.ErrKindMismatch}},
		{name: "event-bad-after-good-ones", build: func(g *fixGen) []byte {
			bad := testkit.Enc(g.t, g.mk.Site(g.mk.Entity(), "", 1, 1))
			return g.signed(g.goodBody(append(append([][]byte(nil), g.next...), bad)))
		}, want: []error{ErrBundleEvent, record.ErrRequired}},
		// Authorship: the header and every event speak only for devices
		// whose keys signed them (bundle_doc.go, "Authorship").
		{name: "header-device-of-stranger", build: hdrWith(func(k []kv) []kv { return set(k, hdrDevice, cborOf(devBytes(seedKey(0x22)))) }), want: []error{ErrBundleDevice}},
		{name: "header-device-of-lab-claims-its-numbers", build: hdrWith(func(k []kv) []kv { return set(k, hdrDevice, cborOf(devBytes(seedKey(0x33)))) }), want: []error{ErrBundleDevice}},
		{name: "event-impersonates-lab-no-proof", build: func(g *fixGen) []byte {
			return g.signed(g.body(mapOf(g.headerKVs(2)), entriesOf([][]byte{g.next[1], g.labEdit()})))
		}, want: []error{ErrBundleEvent, ErrAuthorUnproven}},
		{name: "event-impersonates-lab-proof-signed-by-tablet", build: func(g *fixGen) []byte {
			es := entriesOf([][]byte{g.next[1], g.labEdit()})
			forged := g.signStmt(g.trusted, stmtOf(AuthorshipFormat, 1, g.lab.DeviceID(), [][]byte{es[1].id}))
			return g.signed(bodyOf(mapOf(g.headerKVs(2)), sortedProofs(g.proofBy(g.trusted, es[:1]), forged), es))
		}, want: []error{ErrBundleProof, ErrBundleDevice}},
		{name: "event-impersonates-lab-listed-in-tablet-proof", build: func(g *fixGen) []byte {
			es := entriesOf([][]byte{g.next[1], g.labEdit()})
			return g.signed(bodyOf(mapOf(g.headerKVs(2)), [][]byte{g.proofBy(g.trusted, es)}, es))
		}, want: []error{ErrBundleProof}},
		{name: "event-impersonates-lab-beside-real-lab-event", build: func(g *fixGen) []byte {
			real := testkit.Enc(g.t, g.makerOf(g.lab).Site(g.siteID, "Northgate scrap yard (lab survey)", 53.48, -2.24, record.IDOf(g.base[0])))
			es := entriesOf([][]byte{g.next[1], real, g.labEdit()})
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), sortedProofs(g.proofBy(g.trusted, es[:1]), g.proofBy(g.lab, es[1:2])), es))
		}, want: []error{ErrBundleEvent, ErrAuthorUnproven}},
		{name: "proofs-missing", build: func(g *fixGen) []byte {
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), nil, entriesOf(g.next)))
		}, want: []error{ErrBundleEvent, ErrAuthorUnproven}},
		{name: "proof-own-lists-too-few", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), [][]byte{g.proofBy(g.trusted, es[:2])}, es))
		}, want: []error{ErrBundleProof}},
		{name: "proof-own-split-in-two", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), sortedProofs(g.proofBy(g.trusted, es[:1]), g.proofBy(g.trusted, es[1:])), es))
		}, want: []error{ErrBundleProof}},
		{name: "proof-signature-byte-flipped", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			p := g.proofBy(g.trusted, es)
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), [][]byte{flip(p, len(p)-7, 0x40)}, es))
		}, want: []error{ErrBundleProof, ErrBadSignature}},
		{name: "proof-signed-by-stranger-for-tablet", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			stmt := stmtOf(AuthorshipFormat, 1, g.trusted.DeviceID(), idsOf(es))
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), [][]byte{g.signStmt(g.stranger, stmt)}, es))
		}, want: []error{ErrBundleProof, ErrBundleDevice}},
		{name: "proof-ids-unsorted", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			ids := idsOf(es)
			slices.SortFunc(ids, func(a, b []byte) int { return bytes.Compare(b, a) })
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), [][]byte{g.signStmt(g.trusted, stmtOf(AuthorshipFormat, 1, g.trusted.DeviceID(), ids))}, es))
		}, want: []error{ErrBundleProof, ErrBundleNonCanon}},
		{name: "proof-id-listed-twice", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			ids := idsOf(es)
			slices.SortFunc(ids, bytes.Compare)
			ids = append(ids[:1], ids...)
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), [][]byte{g.signStmt(g.trusted, stmtOf(AuthorshipFormat, 1, g.trusted.DeviceID(), ids))}, es))
		}, want: []error{ErrBundleProof, ErrBundleNonCanon}},
		{name: "proof-no-ids", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), [][]byte{g.signStmt(g.trusted, stmtOf(AuthorshipFormat, 1, g.trusted.DeviceID(), nil))}, es))
		}, want: []error{ErrBundleProof, ErrBundleMalformed}},
		{name: "proof-format-other", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), [][]byte{g.signStmt(g.trusted, stmtOf("baleassay-bundle", 1, g.trusted.DeviceID(), idsOf(es)))}, es))
		}, want: []error{ErrBundleProof, ErrBundleFormat}},
		{name: "proof-version-2", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), [][]byte{g.signStmt(g.trusted, stmtOf(AuthorshipFormat, 2, g.trusted.DeviceID(), idsOf(es)))}, es))
		}, want: []error{ErrBundleProof, ErrBundleVersion}},
		{name: "proof-is-the-bundle-body", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), [][]byte{g.signStmt(g.trusted, g.goodBody(g.next))}, es))
		}, want: []error{ErrBundleProof, ErrBundleMalformed}},
		{name: "proof-not-cose", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), sortedProofs([]byte("not a proof"), g.proofBy(g.trusted, es)), es))
		}, want: []error{ErrBundleProof, ErrBundleNotCOSE}},
		{name: "proof-algorithm-eddsa-minus-8", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			p := g.proofBy(g.trusted, es)
			p[6] = 0x27 // d2 84 58 27 a2 01 32: {1: -19, ...} → {1: -8, ...}; the signature no longer matters
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), [][]byte{p}, es))
		}, want: []error{ErrBundleProof, ErrUnexpectedAlg}},
		{name: "proof-covers-no-event", build: func(g *fixGen) []byte {
			es := entriesOf(g.next)
			junk := g.proofBy(g.stranger, entriesOf(g.base))
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), sortedProofs(g.proofBy(g.trusted, es), junk), es))
		}, want: []error{ErrBundleProof}},
		{name: "proofs-unsorted", build: func(g *fixGen) []byte {
			es := entriesOf(append([][]byte{g.next[1]}, g.southEvents()...))
			ps := sortedProofs(g.proofBy(g.trusted, es[:1]), g.proofBy(g.south, es[1:]))
			ps[0], ps[1] = ps[1], ps[0]
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), ps, es))
		}, want: []error{ErrBundleNonCanon}},
		{name: "proofs-array-claims-2e20", build: func(g *fixGen) []byte {
			out := append(appendHead(nil, majArray, 3), mapOf(g.headerKVs(3))...)
			out = append(appendHead(out, majArray, 1<<20), proofsArray(g.ownProofs(entriesOf(g.next)))[1:]...)
			return g.signed(append(out, eventsArray(entriesOf(g.next))...))
		}, want: []error{ErrBundleTooMany}},
		{name: "relayed-south-without-proof", build: func(g *fixGen) []byte {
			es := entriesOf(append([][]byte{g.next[1]}, g.southEvents()...))
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), [][]byte{g.proofBy(g.trusted, es[:1])}, es))
		}, want: []error{ErrBundleEvent, ErrAuthorUnproven}},
		// Times and values outside their physical range (data/record/ranges.go).
		{name: "header-clock-year-2100", build: hdrWith(func(k []kv) []kv { return set(k, hdrClock, cborOf([]int64{record.MaxTimeMs, 0})) }), want: []error{ErrBundleHeader}},
		{name: "header-clock-2e62", build: hdrWith(func(k []kv) []kv { return set(k, hdrClock, cborOf([]int64{1 << 62, 0})) }), want: []error{ErrBundleHeader}},
		{name: "event-clock-2e62", build: evOf(func(g *fixGen) record.Event {
			e := g.mk.Pull(g.mk.Entity(), g.baleID, "P9", 1)
			e.Clock.WallMs = 1 << 62
			return e
		}), want: []error{ErrBundleEvent, record.ErrOutOfRange}},
		{name: "event-clock-1970", build: evOf(func(g *fixGen) record.Event {
			e := g.mk.Pull(g.mk.Entity(), g.baleID, "P9", 1)
			e.Clock.WallMs = 86_400_000
			return e
		}), want: []error{ErrBundleEvent, record.ErrOutOfRange}},
		{name: "event-pull-masses-sum-to-infinity", build: evOf(func(g *fixGen) record.Event {
			e := g.mk.Pull(g.mk.Entity(), g.baleID, "P9", 1e308)
			e.Pull.Kg["pvc"] = 1e308
			return e
		}), want: []error{ErrBundleEvent, record.ErrOutOfRange}},
		{name: "event-bale-gross-1e9-kg", build: evOf(func(g *fixGen) record.Event { return g.mk.Bale(g.mk.Entity(), g.siteID, 1e9) }), want: []error{ErrBundleEvent, record.ErrOutOfRange}},
		{name: "event-pieces-2e62", build: evOf(func(g *fixGen) record.Event {
			e := g.mk.Pull(g.mk.Entity(), g.baleID, "P9", 1)
			e.Pull.Pieces = map[string]int64{"pet_clear": 1 << 62}
			return e
		}), want: []error{ErrBundleEvent, record.ErrOutOfRange}},
		{name: "event-bale-received-1900", build: evOf(func(g *fixGen) record.Event {
			e := g.mk.Bale(g.mk.Entity(), g.siteID, 500)
			e.Bale.ReceivedMs = time.Date(1900, 1, 1, 0, 0, 0, 0, time.UTC).UnixMilli()
			return e
		}), want: []error{ErrBundleEvent, record.ErrOutOfRange}},
		{name: "event-name-terminal-escape", build: evOf(func(g *fixGen) record.Event {
			return g.mk.Site(g.mk.Entity(), "Yard\x1b]0;owned\x07\x1b[2J", 53.1, -2.1)
		}), want: []error{ErrBundleEvent, record.ErrControlChar}},
		{name: "event-notes-newline", build: evOf(func(g *fixGen) record.Event {
			e := g.mk.Site(g.mk.Entity(), "Yard", 53.1, -2.1)
			e.Site.Notes = "line one\nbale accepted by the lab"
			return e
		}), want: []error{ErrBundleEvent, record.ErrControlChar}},
		{name: "event-tag-bidi-override", build: evOf(func(g *fixGen) record.Event {
			e := g.mk.Bale(g.mk.Entity(), g.siteID, 500)
			e.Bale.Tag = "KL-\u202e7140"
			return e
		}), want: []error{ErrBundleEvent, record.ErrControlChar}},
		// Accepted.
		{name: "relayed-south-with-proof", build: func(g *fixGen) []byte {
			es := entriesOf(append([][]byte{g.next[1]}, g.southEvents()...))
			return g.signed(bodyOf(mapOf(g.headerKVs(3)), sortedProofs(g.proofBy(g.trusted, es[:1]), g.proofBy(g.south, es[1:])), es))
		}, accept: 3},
		// Accepted and without effect.
		{name: "replayed-old-bundle", build: func(g *fixGen) []byte { return bytes.Clone(g.baseFile) }, noop: true},
	}
}
