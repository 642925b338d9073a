package transfer

import (
	"baleassay/data/record"
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"errors"
	"fmt"
	"slices"

	"github.com/fxamacker/cbor/v2"
)

// Limits of the bundle reader. MaxBundleBytes caps the file size before
// anything is read; DefaultPartBytes is the payload size at which export
// starts a new part (well under the cap, so every part imports).
// The part size trades the store's transaction cost against its memory:
// the peak heap of a write grows with the events of one transaction
// (bbolt keeps every leaf page it touches as a node and a new page until
// the commit). These figures were taken on the first store layout; the
// project DEVELOPERS.md ("The lab's merge at scale") has the current
// ones. Then, 1,000,000 events took 61 s and peaked at 1.15 GB as 48
// parts of 4 MiB, and 32 s and 1.58 GB as 12 parts of 16 MiB (parts
// stamped in the same weeks; TestImportPeakMemory1M, 2-core machine).
// The smaller, leaner choice wins for the usual files of a week's
// grading.
// MaxBundleEvents caps the events array.
const (
	MaxBundleBytes   = 64 << 20
	DefaultPartBytes = 4 << 20
	MaxBundleEvents  = 1 << 21
)

// minEntryBytes is the smallest encoded [id, event] pair: array head,
// 34-byte id string, and the head of an (empty) byte string.
const minEntryBytes = 1 + 34 + 1

// TrustFunc answers whether a key is trusted and under which name.
type TrustFunc func(Fingerprint) (name string, ok bool)

// OpenedBundle is a bundle that passed every check short of the store:
// signature by a trusted key, strict decoding, deterministic encoding,
// event ids, and a proof of its author for every event. Raws are
// sub-slices of the file bytes (not copies), in bundle order.
type OpenedBundle struct {
	Header     BundleHeader
	Signer     Fingerprint
	SignerName string
	Hash       [32]byte // SHA-256 of the complete file
	Raws       [][]byte
	IDs        []record.EventID // IDs[i] is the SHA-256 of Raws[i], checked against the id the bundle states
	Proofs     []*AuthorProof   // in bundle order; together they cover every event
}

// buildBody returns the deterministic encoding of
// [header, [proof...], [[id, event]...]]; proofs must be sorted.
func buildBody(h BundleHeader, proofs [][]byte, raws [][]byte, ids []record.EventID) ([]byte, error) {
	hdr, err := encodeHeader(h)
	if err != nil {
		return nil, err
	}
	size := 2 + len(hdr) + 18
	for _, p := range proofs {
		size += 9 + len(p)
	}
	for _, r := range raws {
		size += 1 + 34 + 9 + len(r)
	}
	out := make([]byte, 0, size)
	out = appendHead(out, majArray, 3)
	out = append(out, hdr...)
	out = appendHead(out, majArray, uint64(len(proofs)))
	for _, p := range proofs {
		out = appendHead(out, majBytes, uint64(len(p)))
		out = append(out, p...)
	}
	out = appendHead(out, majArray, uint64(len(raws)))
	for i, r := range raws {
		out = appendHead(out, majArray, 2)
		out = appendHead(out, majBytes, 32)
		out = append(out, ids[i][:]...)
		out = appendHead(out, majBytes, uint64(len(r)))
		out = append(out, r...)
	}
	return out, nil
}

// bodyOverhead is the encoded size of one event entry beyond its bytes.
func bodyOverhead(rawLen int) int {
	return 1 + 34 + len(appendHead(nil, majBytes, uint64(rawLen)))
}

// proofOverhead is the encoded size of a proof entry beyond its bytes.
func proofOverhead(n int) int { return len(appendHead(nil, majBytes, uint64(n))) }

// SealBundle encodes h, the proofs and the events' stored bytes as a
// bundle body and signs it with key. It fills h.Device, h.Key and
// h.Count, and proves the events whose author is key's device with a
// new proof; relayed holds the proofs of the other events' authors (as
// stored by an import), never one of key's device.
func SealBundle(key *DeviceKey, h BundleHeader, raws [][]byte, relayed [][]byte) ([]byte, error) {
	h.Key = key.Fingerprint()
	h.Device = key.DeviceID()
	h.Count = uint64(len(raws))
	ids := make([]record.EventID, len(raws))
	var own []record.EventID
	for i, r := range raws {
		ids[i] = record.IDOf(r)
		if dev, ok := record.AuthorOf(r); ok && dev == h.Device {
			own = append(own, ids[i])
		}
	}
	proofs := slices.Clone(relayed)
	if len(own) > 0 {
		p, err := NewAuthorProof(key, own)
		if err != nil {
			return nil, err
		}
		proofs = append(proofs, p)
	}
	slices.SortFunc(proofs, bytes.Compare)
	proofs = slices.CompactFunc(proofs, bytes.Equal)
	body, err := buildBody(h, proofs, raws, ids)
	if err != nil {
		return nil, err
	}
	return sealSign1(key.priv, body)
}

// OpenBundle checks a bundle file's bytes in the order the format
// prescribes: envelope, signer in trust, signature, then the body. A nil
// trusted trusts no key. It never modifies raw and never panics on any
// input.
func OpenBundle(raw []byte, trusted TrustFunc) (*OpenedBundle, error) {
	if len(raw) > MaxBundleBytes {
		return nil, bundleErr(ErrBundleTooLarge, "file", -1, "%d bytes, limit %d", len(raw), MaxBundleBytes)
	}
	// The file's hash is needed only at the end; a large file is hashed
	// on another CPU meanwhile (hashing reads, it decodes nothing). The
	// goroutine never blocks (buffered), so an early refusal leaves it to
	// finish on its own.
	var hashed chan [32]byte
	if len(raw) >= 1<<20 {
		hashed = make(chan [32]byte, 1)
		go func() { hashed <- sha256.Sum256(raw) }()
	}
	env, err := parseSign1(raw)
	if err != nil {
		return nil, err
	}
	fp := FingerprintOf(env.kid)
	var name string
	ok := false
	if trusted != nil {
		name, ok = trusted(fp)
	}
	if !ok {
		return nil, &UnknownSignerError{Fingerprint: fp}
	}
	if err := verifySign1(env, env.kid); err != nil {
		return nil, err
	}
	h, proofRaws, raws, ids, err := decodeBody(env.payload, env.payloadOff)
	if err != nil {
		return nil, err
	}
	if err := checkSigner(h, fp, env.payloadOff); err != nil {
		return nil, err
	}
	proofs, err := checkAuthorship(h.Device, proofRaws, raws, ids)
	if err != nil {
		return nil, err
	}
	var sum [32]byte
	if hashed != nil {
		sum = <-hashed
	} else {
		sum = sha256.Sum256(raw)
	}
	return &OpenedBundle{Header: h, Signer: fp, SignerName: name, Hash: sum, Raws: raws, IDs: ids, Proofs: proofs}, nil
}

// checkSigner checks that the header names the signing key and that
// key's device: a bundle speaks only for the device whose key signed it.
func checkSigner(h BundleHeader, fp Fingerprint, off int) error {
	if h.Key != fp {
		return bundleErr(ErrBundleHeader, "header.key", off, "header names key %s, bundle is signed by %s", h.Key, fp)
	}
	if h.Device != fp.Device() {
		return bundleErr(ErrBundleDevice, "header.device", off, "header claims device %s, but the bundle is signed by the key of device %s", h.Device, fp.Device())
	}
	return nil
}

// decodeBody walks a verified payload: the body array, the header (via
// the strict decoder), the proofs and each [id, event] pair (all sliced,
// not copied). The header's format and version are checked before the
// body's shape, so a file of another version says so.
func decodeBody(p []byte, base int) (h BundleHeader, proofs [][]byte, raws [][]byte, ids []record.EventID, err error) {
	w := &wire{buf: p, base: base, part: "body"}
	items, err := w.expect(majArray, "the body array")
	if err != nil {
		return h, nil, nil, nil, err
	}
	if items == 0 {
		return h, nil, nil, nil, bundleErr(ErrBundleMalformed, "body", base, "body array is empty, want [header, proofs, events]")
	}
	hStart := w.off
	var item cbor.RawMessage
	rest, err := headerDec.UnmarshalFirst(p[hStart:], &item)
	if err != nil {
		return h, nil, nil, nil, cborErr(err, "header", base+hStart)
	}
	w.off = len(p) - len(rest)
	if h, err = decodeHeader(p[hStart:w.off], base+hStart); err != nil {
		return h, nil, nil, nil, err
	}
	if items != 3 {
		return h, nil, nil, nil, bundleErr(ErrBundleMalformed, "body", base, "body array has %d items, want [header, proofs, events]", items)
	}
	if proofs, err = readProofs(w); err != nil {
		return h, nil, nil, nil, err
	}
	w.part = "events"
	at := w.off
	n, err := w.expect(majArray, "the events array")
	if err != nil {
		return h, nil, nil, nil, err
	}
	if n > MaxBundleEvents {
		return h, nil, nil, nil, bundleErr(ErrBundleTooMany, "events", base+at, "array claims %d events, limit %d", n, MaxBundleEvents)
	}
	if n*minEntryBytes > uint64(len(p)-w.off) {
		return h, nil, nil, nil, bundleErr(ErrBundleTruncated, "events", base+at, "array claims %d events, only %d bytes remain", n, len(p)-w.off)
	}
	if n != h.Count {
		return h, nil, nil, nil, bundleErr(ErrBundleEventCount, "events", base+at, "header says %d events, array has %d", h.Count, n)
	}
	raws = make([][]byte, 0, n)
	ids = make([]record.EventID, 0, n)
	for i := range int(n) {
		if err := readEntry(w, i, &raws, &ids); err != nil {
			var be *BundleError
			if errors.As(err, &be) {
				be.Part, be.Event = fmt.Sprintf("events[%d]", i), i
			}
			return h, nil, nil, nil, err
		}
	}
	w.part = "body"
	if err := w.end(); err != nil {
		return h, nil, nil, nil, err
	}
	if i, ok := firstRepeat(ids); ok {
		return h, nil, nil, nil, bundleErr(ErrBundleDupEvent, "events", -1, "event %s appears twice", hex.EncodeToString(ids[i][:]))
	}
	return h, proofs, raws, ids, nil
}

// readProofs reads the proofs array: byte strings in strictly ascending
// bytewise order (so a set of proofs has one encoding), at most
// MaxBundleProofs. Their content is checked by checkAuthorship.
func readProofs(w *wire) ([][]byte, error) {
	w.part = "proofs"
	at := w.off
	n, err := w.expect(majArray, "the proofs array")
	if err != nil {
		return nil, err
	}
	if n > MaxBundleProofs {
		return nil, bundleErr(ErrBundleTooMany, "proofs", w.base+at, "array claims %d proofs, limit %d", n, MaxBundleProofs)
	}
	if n > uint64(len(w.buf)-w.off) {
		return nil, bundleErr(ErrBundleTruncated, "proofs", w.base+at, "array claims %d proofs, only %d bytes remain", n, len(w.buf)-w.off)
	}
	proofs := make([][]byte, 0, n)
	for k := range int(n) {
		b, off, err := w.bytes("a proof")
		if err != nil {
			return nil, err
		}
		if k > 0 && bytes.Compare(proofs[k-1], b) >= 0 {
			return nil, bundleErr(ErrBundleNonCanon, fmt.Sprintf("proofs[%d]", k), w.base+off, "proofs are listed once each, in ascending bytewise order")
		}
		proofs = append(proofs, b)
	}
	return proofs, nil
}

// firstRepeat finds an id that appears twice, if any, and the index of
// one copy. It sorts the ids' first 8 bytes (much faster than sorting
// 32-byte keys); only when two prefixes are equal does it sort whole ids.
func firstRepeat(ids []record.EventID) (int, bool) {
	pre := make([]uint64, len(ids))
	for i := range ids {
		pre[i] = binary.BigEndian.Uint64(ids[i][:8])
	}
	slices.Sort(pre)
	clash := false
	for i := 1; i < len(pre); i++ {
		if pre[i] == pre[i-1] {
			clash = true
			break
		}
	}
	if !clash {
		return 0, false
	}
	idx := make([]int, len(ids))
	for i := range idx {
		idx[i] = i
	}
	slices.SortFunc(idx, func(a, b int) int { return bytes.Compare(ids[a][:], ids[b][:]) })
	for i := 1; i < len(idx); i++ {
		if ids[idx[i]] == ids[idx[i-1]] {
			return idx[i], true
		}
	}
	return 0, false
}

// readEntry reads the i-th [id, event] pair and checks the id.
func readEntry(w *wire, i int, raws *[][]byte, ids *[]record.EventID) error {
	if k, err := w.expect(majArray, "an [id, event] pair"); err != nil {
		return err
	} else if k != 2 {
		return bundleErr(ErrBundleMalformed, "", w.base+w.off, "entry has %d items, want [id, event]", k)
	}
	id, idOff, err := w.bytes("the event id")
	if err != nil {
		return err
	}
	if len(id) != 32 {
		return bundleErr(ErrBundleMalformed, "", w.base+idOff, "event id has %d bytes, want 32", len(id))
	}
	ev, evOff, err := w.bytes("the event bytes")
	if err != nil {
		return err
	}
	sum := sha256.Sum256(ev)
	if !bytes.Equal(sum[:], id) {
		return bundleErr(ErrBundleEventID, "", w.base+evOff, "id %s, bytes hash to %s", hex.EncodeToString(id), hex.EncodeToString(sum[:]))
	}
	*raws = append(*raws, ev)
	*ids = append(*ids, record.EventID(sum))
	return nil
}

// BundleSigner returns the fingerprint of the key that signed a bundle,
// after checking that the signature verifies with that key, so that
// `bale trust add FILE` never trusts the key of a damaged file. It does
// not consult any trust list.
func BundleSigner(raw []byte) (Fingerprint, error) {
	if len(raw) > MaxBundleBytes {
		return Fingerprint{}, bundleErr(ErrBundleTooLarge, "file", -1, "%d bytes, limit %d", len(raw), MaxBundleBytes)
	}
	env, err := parseSign1(raw)
	if err != nil {
		return Fingerprint{}, err
	}
	if err := verifySign1(env, env.kid); err != nil {
		return Fingerprint{}, err
	}
	return FingerprintOf(env.kid), nil
}
