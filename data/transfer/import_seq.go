package transfer

import (
	"baleassay/data/record"
	"encoding/hex"
	"fmt"
	"slices"

	"github.com/fxamacker/cbor/v2"
)

// Meta keys of the transfer layer (all under the "xfer/" prefix the
// records store reserves for it).
//
//	xfer/out/seq            last bundle sequence number this device wrote (8 bytes, big-endian)
//	xfer/out/hash           SHA-256 of that bundle file
//	xfer/dest/<name>        last local insertion seq exported to destination <name> (8 bytes)
//	xfer/seen/<device hex>  bundle sequence numbers seen from a device: CBOR [[lo, hi]...]
//	xfer/b/<device hex>/<seq, 20 digits>  hash ‖ prev of that bundle (64 bytes)
const (
	metaOutSeq  = "xfer/out/seq"
	metaOutHash = "xfer/out/hash"
	metaDest    = "xfer/dest/"
	metaSeen    = "xfer/seen/"
	metaBundle  = "xfer/b/"
)

func metaSeenKey(dev record.DeviceID) string { return metaSeen + hex.EncodeToString(dev[:]) }

func metaBundleKey(dev record.DeviceID, seq uint64) string {
	return fmt.Sprintf("%s%s/%020d", metaBundle, hex.EncodeToString(dev[:]), seq)
}

// SeqRange is an inclusive range of bundle sequence numbers.
type SeqRange struct {
	_      struct{} `cbor:",toarray"`
	Lo, Hi uint64
}

// SeqSet is a set of sequence numbers as sorted, disjoint, non-adjacent
// ranges. Its encoding depends only on the set, never on the order in
// which numbers were added, which keeps imports order-independent.
type SeqSet []SeqRange

// Has reports whether n is in the set.
func (s SeqSet) Has(n uint64) bool {
	i, _ := slices.BinarySearchFunc(s, n, func(r SeqRange, n uint64) int {
		switch {
		case r.Hi < n:
			return -1
		case r.Lo > n:
			return 1
		}
		return 0
	})
	return i < len(s) && s[i].Lo <= n && n <= s[i].Hi
}

// Add returns the set with n added.
func (s SeqSet) Add(n uint64) SeqSet {
	if s.Has(n) {
		return s
	}
	out := append(slices.Clone(s), SeqRange{Lo: n, Hi: n})
	slices.SortFunc(out, func(a, b SeqRange) int {
		switch {
		case a.Lo < b.Lo:
			return -1
		case a.Lo > b.Lo:
			return 1
		}
		return 0
	})
	merged := out[:1]
	for _, r := range out[1:] {
		last := &merged[len(merged)-1]
		if r.Lo <= last.Hi+1 {
			last.Hi = max(last.Hi, r.Hi)
		} else {
			merged = append(merged, r)
		}
	}
	return merged
}

// Missing returns the ranges of numbers from 1 to the highest member
// that are not in the set.
func (s SeqSet) Missing() []SeqRange {
	var out []SeqRange
	next := uint64(1)
	for _, r := range s {
		if r.Lo > next {
			out = append(out, SeqRange{Lo: next, Hi: r.Lo - 1})
		}
		next = r.Hi + 1
	}
	return out
}

// encodeSeqSet / decodeSeqSet store a SeqSet as meta. Decoding checks
// the invariants, so damaged meta reads as an error, not as a wrong set.
func encodeSeqSet(s SeqSet) ([]byte, error) { return detEnc.Marshal([]SeqRange(s)) }

func decodeSeqSet(b []byte) (SeqSet, error) {
	if b == nil {
		return nil, nil
	}
	var s []SeqRange
	if err := cbor.Unmarshal(b, &s); err != nil {
		return nil, fmt.Errorf("data: damaged sequence record: %w", err)
	}
	for i, r := range s {
		if r.Lo == 0 || r.Hi < r.Lo || (i > 0 && r.Lo <= s[i-1].Hi+1) {
			return nil, fmt.Errorf("data: damaged sequence record: range %d [%d, %d]", i, r.Lo, r.Hi)
		}
	}
	return s, nil
}

// SeqGap reports bundles of a device that this store has not seen, below
// the highest one it has.
type SeqGap struct {
	Device   record.DeviceID
	From, To uint64
}

func (g SeqGap) String() string {
	dev := hex.EncodeToString(g.Device[:])
	if g.From == g.To {
		return fmt.Sprintf("bundle %d from device %s has not been seen", g.From, dev)
	}
	return fmt.Sprintf("bundles %d to %d from device %s have not been seen", g.From, g.To, dev)
}
