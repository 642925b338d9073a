package transfer

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values; checks compare against
// brute force, round trips or the records' own rules.

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/record"
	"bytes"
	"crypto/ed25519"
	"crypto/sha256"
	"slices"
	"testing"
	"time"
)

// The generator of the malformed-file suite. It assembles bundles byte
// by byte, independently of SealBundle, so that every layer can be
// broken on purpose and still carry a valid signature where the case
// needs one (a malformed body must get past the signature check to test
// the body reader).

// fixGen holds the invented scenario of the fixtures: the grader tablet
// "tablet-north" (trusted, key seed 0x11) exported bundle 1 to the lab
// store; the fixtures are mostly its bundle 2. Key seed 0x22 belongs to
// a device nobody trusts.
type fixGen struct {
	t        testing.TB
	trusted  *DeviceKey
	stranger *DeviceKey
	lab      *DeviceKey // the lab's key: the fixture store's own device is not it, but events may claim it
	south    *DeviceKey // "tablet-south", untrusted by the lab; its events come relayed with its proof
	mk       *testkit.Maker
	siteID   record.EntityID
	baleID   record.EntityID
	base     [][]byte // events of bundle 1
	baseFile []byte   // bundle 1, made with SealBundle
	next     [][]byte // three valid new events for bundle 2
}

func newFixGen(t testing.TB) *fixGen {
	g := &fixGen{t: t, trusted: xKey(t, 0x11), stranger: xKey(t, 0x22), lab: xKey(t, 0x33), south: xKey(t, 0x44), mk: testkit.NewMaker(0x5a, 7)}
	m := g.mk
	m.Dev = g.trusted.DeviceID() // the tablet's events are its own: their author is its key's device
	g.siteID, g.baleID = m.Entity(), m.Entity()
	site := m.Site(g.siteID, "Northgate scrap yard", 53.48, -2.24)
	siteRaw := testkit.Enc(t, site)
	g.base = [][]byte{siteRaw, testkit.Enc(t, m.Bale(g.baleID, g.siteID, 548)), testkit.Enc(t, m.Pull(m.Entity(), g.baleID, "P1", 11.2))}
	var err error
	g.baseFile, err = SealBundle(g.trusted, g.header(1), g.base, nil)
	if err != nil {
		t.Fatal(err)
	}
	g.next = [][]byte{
		testkit.Enc(t, m.Site(g.siteID, "Northgate scrap yard (gate 2)", 53.481, -2.241, record.IDOf(siteRaw))),
		testkit.Enc(t, m.Pull(m.Entity(), g.baleID, "P2", 9.8)),
		testkit.Enc(t, m.Pull(m.Entity(), g.baleID, "P3", 12.4)),
	}
	return g
}

// header is the header of the tablet's bundle seq.
func (g *fixGen) header(seq uint64) BundleHeader {
	h := BundleHeader{Device: g.trusted.DeviceID(), Key: g.trusted.Fingerprint(), Seq: seq,
		WallMs: testkit.XferNow.Add(-time.Hour).UnixMilli(), Part: 1, Parts: 1}
	if seq > 1 {
		h.Prev = sha256.Sum256(g.baseFile)
	}
	return h
}

// kv is one header map entry: key and its raw encoded value.
type kv struct {
	k int
	v []byte
}

func (g *fixGen) cbor(v any) []byte {
	b, err := detEnc.Marshal(v)
	if err != nil {
		g.t.Fatal(err)
	}
	return b
}

// headerKVs returns the entries of the canonical bundle-2 header.
func (g *fixGen) headerKVs(count int) []kv {
	h := g.header(2)
	return []kv{
		{hdrFormat, g.cbor(BundleFormat)}, {hdrVersion, g.cbor(BundleVersion)},
		{hdrDevice, g.cbor(h.Device[:])}, {hdrKey, g.cbor(h.Key[:])},
		{hdrSeq, g.cbor(h.Seq)}, {hdrPrev, g.cbor(h.Prev[:])},
		{hdrClock, g.cbor([]int64{h.WallMs, 0})}, {hdrCount, g.cbor(count)},
		{hdrPart, g.cbor([]int{1, 1})},
	}
}

// mapOf encodes entries in the given order with a definite map head.
func mapOf(kvs []kv) []byte {
	out := appendHead(nil, majMap, uint64(len(kvs)))
	for _, e := range kvs {
		out = appendHead(out, majUint, uint64(e.k))
		out = append(out, e.v...)
	}
	return out
}

// set replaces (or appends) key k.
func set(kvs []kv, k int, v []byte) []kv {
	out := append([]kv(nil), kvs...)
	for i := range out {
		if out[i].k == k {
			out[i].v = v
			return out
		}
	}
	return append(out, kv{k, v})
}

func drop(kvs []kv, k int) []kv {
	var out []kv
	for _, e := range kvs {
		if e.k != k {
			out = append(out, e)
		}
	}
	return out
}

// entry is one [id, event] pair of the events array.
type entry struct{ id, raw []byte }

func entriesOf(raws [][]byte) []entry {
	out := make([]entry, len(raws))
	for i, r := range raws {
		id := sha256.Sum256(r)
		out[i] = entry{id[:], r}
	}
	return out
}

// bodyOf assembles [header, [proof...], [[id, event]...]] from raw parts;
// proofs are written in the order given.
func bodyOf(header []byte, proofs [][]byte, es []entry) []byte {
	out := appendHead(nil, majArray, 3)
	out = append(out, header...)
	out = append(out, proofsArray(proofs)...)
	return append(out, eventsArray(es)...)
}

func proofsArray(proofs [][]byte) []byte {
	out := appendHead(nil, majArray, uint64(len(proofs)))
	for _, p := range proofs {
		out = appendHead(out, majBytes, uint64(len(p)))
		out = append(out, p...)
	}
	return out
}

func eventsArray(es []entry) []byte {
	out := appendHead(nil, majArray, uint64(len(es)))
	for _, e := range es {
		out = appendHead(out, majArray, 2)
		out = appendHead(out, majBytes, uint64(len(e.id)))
		out = append(out, e.id...)
		out = appendHead(out, majBytes, uint64(len(e.raw)))
		out = append(out, e.raw...)
	}
	return out
}

// proofBy is key's authorship proof over the ids of es.
func (g *fixGen) proofBy(key *DeviceKey, es []entry) []byte {
	var ids []record.EventID
	for _, e := range es {
		ids = append(ids, record.EventID(e.id))
	}
	p, err := NewAuthorProof(key, ids)
	if err != nil {
		g.t.Fatal(err)
	}
	return p
}

// ownProofs is the tablet's proof over those of es it authored (the
// events whose author AuthorOf reads as the tablet), as SealBundle makes
// it; none when there are none.
func (g *fixGen) ownProofs(es []entry) [][]byte {
	var own []entry
	for _, e := range es {
		if dev, ok := record.AuthorOf(e.raw); ok && dev == g.trusted.DeviceID() && len(e.id) == 32 {
			own = append(own, e)
		}
	}
	if len(own) == 0 {
		return nil
	}
	return [][]byte{g.proofBy(g.trusted, own)}
}

// body is bodyOf with the tablet's own proof.
func (g *fixGen) body(header []byte, es []entry) []byte {
	return bodyOf(header, g.ownProofs(es), es)
}

// prefix is the body up to the events array: the body head, the
// header (stating count events) and the tablet's proof over raws.
func (g *fixGen) prefix(count int, raws [][]byte) []byte {
	out := appendHead(nil, majArray, 3)
	out = append(out, mapOf(g.headerKVs(count))...)
	return append(out, proofsArray(g.ownProofs(entriesOf(raws)))...)
}

// goodBody is the valid body of bundle 2 with the given events.
func (g *fixGen) goodBody(raws [][]byte) []byte {
	return g.body(mapOf(g.headerKVs(len(raws))), entriesOf(raws))
}

// stdProtected is {1: -19, 4: public key} of key.
func stdProtected(key *DeviceKey) []byte {
	p := []byte{0xa2, 0x01, 0x32, 0x04, 0x58, 0x20}
	return append(p, key.Public()...)
}

// sigOver signs the RFC 9052 §4.4 Sig_structure for protected and payload.
func sigOver(key *DeviceKey, protected, payload []byte) []byte {
	tbs := appendHead(nil, majArray, 4)
	tbs = appendHead(tbs, majText, 10)
	tbs = append(tbs, "Signature1"...)
	tbs = appendHead(tbs, majBytes, uint64(len(protected)))
	tbs = append(tbs, protected...)
	tbs = appendHead(tbs, majBytes, 0)
	tbs = appendHead(tbs, majBytes, uint64(len(payload)))
	tbs = append(tbs, payload...)
	return ed25519.Sign(key.priv, tbs)
}

// sign1 assembles 18([protected, unprotected, payload, signature]).
func sign1(protected, unprotected, payload, sig []byte) []byte {
	out := []byte{0xd2, 0x84}
	out = appendHead(out, majBytes, uint64(len(protected)))
	out = append(out, protected...)
	out = append(out, unprotected...)
	out = appendHead(out, majBytes, uint64(len(payload)))
	out = append(out, payload...)
	out = appendHead(out, majBytes, uint64(len(sig)))
	return append(out, sig...)
}

// signed is a correctly signed bundle of the trusted key around payload.
func (g *fixGen) signed(payload []byte) []byte {
	p := stdProtected(g.trusted)
	return sign1(p, []byte{0xa0}, payload, sigOver(g.trusted, p, payload))
}

// good is a valid bundle 2 with the three new events.
func (g *fixGen) good() []byte { return g.signed(g.goodBody(g.next)) }

// withEvent is a signed bundle 2 whose events are the first new event
// followed by raw (a broken or refused event), ids correct.
func (g *fixGen) withEvent(raw []byte) []byte {
	return g.signed(g.goodBody([][]byte{g.next[1], raw}))
}

// nested returns n nested one-element arrays around 0.
func nested(n int) []byte {
	return append(bytes.Repeat([]byte{0x81}, n), 0x00)
}

// flip returns b with byte i xored.
func flip(b []byte, i int, x byte) []byte {
	c := bytes.Clone(b)
	c[i] ^= x
	return c
}

// seedKey is the key of a 32-byte seed of b (the fixture keys: 0x11 the
// tablet, 0x22 a stranger, 0x33 the lab, 0x44 tablet-south).
func seedKey(b byte) *DeviceKey {
	k, err := NewDeviceKeyFromSeed(bytes.Repeat([]byte{b}, 32))
	if err != nil {
		panic(err)
	}
	return k
}

func devBytes(k *DeviceKey) []byte { d := k.DeviceID(); return d[:] }

// cborOf is the deterministic encoding of v.
func cborOf(v any) []byte {
	b, err := detEnc.Marshal(v)
	if err != nil {
		panic(err)
	}
	return b
}

// makerOf makes events authored by key's device.
func (g *fixGen) makerOf(key *DeviceKey) *testkit.Maker {
	m := testkit.NewMaker(key.Public()[0], 11)
	m.Dev = key.DeviceID()
	return m
}

// labEdit is an event that claims the lab as its author and supersedes
// the tablet's site: the impersonation a bundle must not carry.
func (g *fixGen) labEdit() []byte {
	return testkit.Enc(g.t, g.makerOf(g.lab).Site(g.siteID, "Northgate scrap yard (closed, per lab)", 53.48, -2.24, record.IDOf(g.base[0])))
}

// southEvents are a site and a bale by tablet-south, which the lab does
// not trust; tablet-north relays them.
func (g *fixGen) southEvents() [][]byte {
	m := g.makerOf(g.south)
	site := m.Entity()
	return [][]byte{
		testkit.Enc(g.t, m.Site(site, "Southmere depot", 51.9, -1.2)),
		testkit.Enc(g.t, m.Bale(m.Entity(), site, 612)),
	}
}

// stmtOf encodes an authorship statement with the given fields, ids in
// the order given (so a case can break the order).
func stmtOf(format string, version uint64, dev record.DeviceID, ids [][]byte) []byte {
	out := appendHead(nil, majMap, 4)
	out = appendHead(out, majUint, 1)
	out = appendHead(out, majText, uint64(len(format)))
	out = append(out, format...)
	out = appendHead(out, majUint, 2)
	out = appendHead(out, majUint, version)
	out = appendHead(out, majUint, 3)
	out = appendHead(out, majBytes, 16)
	out = append(out, dev[:]...)
	out = appendHead(out, majUint, 4)
	out = appendHead(out, majArray, uint64(len(ids)))
	for _, id := range ids {
		out = appendHead(out, majBytes, uint64(len(id)))
		out = append(out, id...)
	}
	return out
}

// signStmt wraps a statement (or any payload) in a COSE_Sign1 of key.
func (g *fixGen) signStmt(key *DeviceKey, stmt []byte) []byte {
	p := stdProtected(key)
	return sign1(p, []byte{0xa0}, stmt, sigOver(key, p, stmt))
}

// idsOf lists the entries' ids, ascending.
func idsOf(es []entry) [][]byte {
	var ids [][]byte
	for _, e := range es {
		ids = append(ids, e.id)
	}
	slices.SortFunc(ids, bytes.Compare)
	return ids
}

// sortedProofs lists proofs in the bytewise order a bundle requires.
func sortedProofs(ps ...[]byte) [][]byte {
	slices.SortFunc(ps, bytes.Compare)
	return ps
}
