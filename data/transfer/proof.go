package transfer

import (
	"baleassay/data/record"
	"bytes"
	"encoding/binary"
	"encoding/hex"
	"errors"
	"fmt"
	"math/bits"
	"slices"
)

// Authorship proofs. A device signs, with its own key, the statement
// "the device with id D wrote the events with these ids"; D must be
// DeviceIDOf(that key), and an event id is SHA-256 of the event's exact
// bytes, which hold the author's device id. So a proof binds each listed
// event, byte for byte, to the one key its author field names, and it
// stays valid whoever carries it: the lab passes a tablet's proofs on
// with the tablet's events, and every receiver checks them the same way.
// The format is in BundleFormat and bundle.cddl.

// AuthorshipFormat is the format name in every authorship statement.
const AuthorshipFormat = "baleassay-authorship"

// authorshipVersion is the statement version written and read.
const authorshipVersion = 1

// MaxBundleProofs caps the proofs of one bundle, so that checking a
// hostile file costs a bounded number of signature checks (about 50 µs
// each). An export starts a new part before a part would need more.
const MaxBundleProofs = 16384

// idEntry is the encoded size of one id in a statement: the head 0x58
// 0x20 and 32 bytes.
const idEntry = 34

// AuthorProof is an authorship proof that passed ParseAuthorProof: its
// envelope is strict, its signature verifies with the key in it, and its
// statement names that key's device.
type AuthorProof struct {
	Raw    []byte          // the proof as carried: a COSE_Sign1 message
	Device record.DeviceID // the author: DeviceIDOf(Key's public key)
	Key    Fingerprint
	ids    []byte // the statement's id entries, idEntry bytes each, ascending

	shift  uint // Has's index: see buildIndex
	starts []int32
}

// Len is the number of events the proof lists.
func (p *AuthorProof) Len() int { return len(p.ids) / idEntry }

// ID is the i-th listed event id, in ascending order.
func (p *AuthorProof) ID(i int) record.EventID {
	var id record.EventID
	copy(id[:], p.ids[i*idEntry+2:(i+1)*idEntry])
	return id
}

// Has reports whether the proof lists id. Event ids are SHA-256 hashes,
// spread evenly, so a table of where each run of leading bits starts
// (one entry per listed id, rounded up to a power of two: built on the
// first call, about 4 bytes per id) finds an id's place in one step;
// a binary search within its run finishes, so ids chosen to crowd one
// run cost at most log₂ n steps.
func (p *AuthorProof) Has(id record.EventID) bool {
	if p.starts == nil {
		p.buildIndex()
	}
	key := binary.BigEndian.Uint64(id[:8])
	b := key >> p.shift
	lo, hi := int(p.starts[b]), int(p.starts[b+1]) // ids with these leading bits are in [lo, hi)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if p.prefix(m) < key {
			lo = m + 1
		} else {
			hi = m
		}
	}
	for i := lo; i < p.Len() && p.prefix(i) == key; i++ {
		if bytes.Equal(p.ids[i*idEntry+2:(i+1)*idEntry], id[:]) {
			return true
		}
	}
	return false
}

// prefix is the first 8 bytes of the i-th id as a number.
func (p *AuthorProof) prefix(i int) uint64 { return binary.BigEndian.Uint64(p.ids[i*idEntry+2:]) }

// buildIndex fills starts: starts[b] is the first id whose leading
// 64 − shift bits are at least b.
func (p *AuthorProof) buildIndex() {
	n := p.Len()
	bitsN := max(1, bits.Len(uint(n)))
	p.shift = uint(64 - bitsN)
	p.starts = make([]int32, 1<<bitsN+1)
	j := 0
	for b := range p.starts {
		for j < n && p.prefix(j)>>p.shift < uint64(b) {
			j++
		}
		p.starts[b] = int32(j)
	}
}

// statement returns the deterministic CBOR of the authorship statement
// (RFC 8949 §4.2.1): {1: format, 2: version, 3: device, 4: [ids...]},
// ids ascending.
func statement(dev record.DeviceID, ids []record.EventID) []byte {
	out := make([]byte, 0, 64+len(ids)*idEntry)
	out = appendHead(out, majMap, 4)
	out = appendHead(out, majUint, 1)
	out = appendHead(out, majText, uint64(len(AuthorshipFormat)))
	out = append(out, AuthorshipFormat...)
	out = appendHead(out, majUint, 2)
	out = appendHead(out, majUint, authorshipVersion)
	out = appendHead(out, majUint, 3)
	out = appendHead(out, majBytes, uint64(len(dev)))
	out = append(out, dev[:]...)
	out = appendHead(out, majUint, 4)
	out = appendHead(out, majArray, uint64(len(ids)))
	for _, id := range ids {
		out = appendHead(out, majBytes, 32)
		out = append(out, id[:]...)
	}
	return out
}

// NewAuthorProof signs, with key, the statement that key's device wrote
// the events with the given ids (at least one; order and repeats do not
// matter).
func NewAuthorProof(key *DeviceKey, ids []record.EventID) ([]byte, error) {
	if len(ids) == 0 {
		return nil, errors.New("an authorship proof lists at least one event")
	}
	s := slices.Clone(ids)
	slices.SortFunc(s, func(a, b record.EventID) int { return bytes.Compare(a[:], b[:]) })
	s = slices.Compact(s)
	return sealSign1(key.priv, statement(key.DeviceID(), s))
}

// ProofError locates a refused proof: its index in the bundle's proofs
// array. It unwraps to ErrBundleProof and to the cause (a sentinel such
// as ErrBadSignature or ErrBundleNonCanon).
type ProofError struct {
	Index int
	Err   error
}

func (e *ProofError) Error() string {
	return fmt.Sprintf("%v: proofs[%d]: %v", ErrBundleProof, e.Index, e.Err)
}

func (e *ProofError) Unwrap() []error { return []error{ErrBundleProof, e.Err} }

// ParseAuthorProof checks a proof strictly (the COSE_Sign1 rules of a
// bundle envelope, a statement in deterministic encoding with ids
// strictly ascending, the statement's device equal to DeviceIDOf(key))
// and verifies its signature. The result's slices point into raw.
func ParseAuthorProof(raw []byte) (*AuthorProof, error) {
	env, err := parseSign1(raw)
	if err != nil {
		return nil, err
	}
	if err := verifySign1(env, env.kid); err != nil {
		return nil, err
	}
	p := &AuthorProof{Raw: raw, Key: FingerprintOf(env.kid)}
	p.Device = p.Key.Device()
	w := &wire{buf: env.payload, part: "statement"}
	bad := func(format string, args ...any) error {
		return bundleErr(ErrBundleMalformed, "statement", -1, format, args...)
	}
	if n, err := w.expect(majMap, "the statement map"); err != nil {
		return nil, err
	} else if n != 4 {
		return nil, bad("statement has %d fields, want 4", n)
	}
	key := func(want uint64) error {
		k, err := w.expect(majUint, "a statement key")
		if err == nil && k != want {
			err = bundleErr(ErrBundleNonCanon, "statement", -1, "key %d where key %d belongs (keys 1 to 4, in order)", k, want)
		}
		return err
	}
	if err := key(1); err != nil {
		return nil, err
	}
	n, err := w.expect(majText, "the format name")
	if err != nil {
		return nil, err
	}
	if n > uint64(len(w.buf)-w.off) || string(w.buf[w.off:w.off+int(n)]) != AuthorshipFormat {
		return nil, bundleErr(ErrBundleFormat, "statement", -1, "not an authorship statement (format %q)", AuthorshipFormat)
	}
	w.off += int(n)
	if err := key(2); err != nil {
		return nil, err
	}
	if v, err := w.expect(majUint, "the statement version"); err != nil {
		return nil, err
	} else if v != authorshipVersion {
		return nil, bundleErr(ErrBundleVersion, "statement", -1, "statement version %d; this program reads version %d", v, authorshipVersion)
	}
	if err := key(3); err != nil {
		return nil, err
	}
	dev, _, err := w.bytes("the author's device id")
	if err != nil {
		return nil, err
	}
	if !bytes.Equal(dev, p.Device[:]) {
		return nil, bundleErr(ErrBundleDevice, "statement", -1, "statement names device %s, but it is signed by the key of device %s",
			hex.EncodeToString(dev), p.Device)
	}
	if err := key(4); err != nil {
		return nil, err
	}
	n, err = w.expect(majArray, "the event ids")
	if err != nil {
		return nil, err
	}
	switch {
	case n == 0:
		return nil, bad("statement lists no event")
	case n > MaxBundleEvents:
		return nil, bundleErr(ErrBundleTooMany, "statement", -1, "statement lists %d events, limit %d", n, MaxBundleEvents)
	case n*idEntry != uint64(len(w.buf)-w.off):
		return nil, bundleErr(ErrBundleMalformed, "statement", -1, "%d ids need %d bytes, %d remain", n, n*idEntry, len(w.buf)-w.off)
	}
	p.ids = w.buf[w.off:]
	for i := range int(n) {
		e := p.ids[i*idEntry : (i+1)*idEntry]
		if e[0] != 0x58 || e[1] != 0x20 {
			return nil, bad("ids[%d] is not a 32-byte string", i)
		}
		if i > 0 && bytes.Compare(p.ids[(i-1)*idEntry+2:i*idEntry], e[2:]) >= 0 {
			return nil, bundleErr(ErrBundleNonCanon, "statement", -1, "ids[%d] is not above ids[%d]: ids are listed once, in ascending order", i, i-1)
		}
	}
	return p, nil
}

// checkAuthorship checks that every event of a bundle is covered by a
// proof of its author, in the order the format prescribes:
//
//  1. every proof parses and verifies (ParseAuthorProof);
//  2. every proof covers at least one event of the bundle by its device
//     (no proof is carried for nothing);
//  3. the signer's own events are listed by exactly one proof of the
//     signer's device, which lists exactly them;
//  4. every event's author (record.AuthorOf) has a proof that lists the
//     event's id.
//
// ids[i] is the checked id of raws[i]. It returns the parsed proofs in
// bundle order.
func checkAuthorship(signer record.DeviceID, proofRaws, raws [][]byte, ids []record.EventID) ([]*AuthorProof, error) {
	proofs := make([]*AuthorProof, len(proofRaws))
	for k, pr := range proofRaws {
		p, err := ParseAuthorProof(pr)
		if err != nil {
			return nil, &ProofError{Index: k, Err: err}
		}
		proofs[k] = p
	}
	// Proofs by device; at most one of the signer's.
	byDev := map[record.DeviceID][]int{}
	for k, p := range proofs {
		if p.Device == signer && len(byDev[signer]) == 1 {
			return nil, &ProofError{Index: k, Err: fmt.Errorf("a second proof of the signing device %s: its events are listed by one proof", signer)}
		}
		byDev[p.Device] = append(byDev[p.Device], k)
	}
	authors := make([]record.DeviceID, len(raws))
	covered := make([]bool, len(raws))
	used := make([]bool, len(proofs))
	own, ownListed := 0, 0
	for i, raw := range raws {
		dev, ok := record.AuthorOf(raw)
		if !ok {
			err := fmt.Errorf("%w: the event does not begin with its version, entity, kind and device", record.ErrDecode)
			if _, derr := record.DecodeEvent(raw); derr != nil {
				err = derr
			}
			return nil, &EventRefusedError{Index: i, ID: ids[i].String(), Err: err}
		}
		authors[i] = dev
		if dev == signer {
			own++
		}
		// Binary search in the author's proofs (their ids are sorted): the
		// first that lists the event covers it.
		for _, k := range byDev[dev] {
			if proofs[k].Has(ids[i]) {
				covered[i], used[k] = true, true
				if dev == signer {
					ownListed++
				}
				break
			}
		}
	}
	// A proof not yet credited must still list some event of its device
	// (it may list only events an earlier proof covers).
	for k, p := range proofs {
		for i := 0; !used[k] && i < len(raws); i++ {
			used[k] = authors[i] == p.Device && p.Has(ids[i])
		}
		if !used[k] {
			return nil, &ProofError{Index: k, Err: fmt.Errorf("the proof of device %s covers no event of this bundle", p.Device)}
		}
		if p.Device == signer && (ownListed != p.Len() || own != p.Len()) {
			return nil, &ProofError{Index: k, Err: fmt.Errorf("the signing device's proof lists %d events; the bundle holds %d of its events and the proof must list exactly those", p.Len(), own)}
		}
	}
	for i, ok := range covered {
		if !ok {
			return nil, &EventRefusedError{Index: i, ID: ids[i].String(), Err: fmt.Errorf(
				"%w: the event names device %s as its author, but no proof in the bundle signed by that device's key lists it (a bundle carries another device's events only with that device's proof)",
				ErrAuthorUnproven, authors[i])}
		}
	}
	return proofs, nil
}
