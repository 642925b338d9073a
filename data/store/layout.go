package store

import (
	"baleassay/data/record"
	"encoding/binary"
	"hash/crc32"
)

// The on-disk layout (version 2), described with its reasons in
// DEVELOPERS.md. Keys that a write adds cluster: events go to the end of
// the log under their local insertion number, the id index is cut into
// generations of idGenSize insertion numbers so new ids land in the last
// one or two, and everything about one entity (UUIDv7, time-ordered)
// lies side by side in one bucket.
var (
	bLog       = []byte("log")       // seq (8, BE) → event id (32) ‖ event bytes
	bIDs       = []byte("ids")       // generation (4, BE) ‖ event id → seq (8)
	bEnt       = []byte("ent")       // entity ‖ tag ‖ ... (see the tags below)
	bKinds     = []byte("kinds")     // kind (1) ‖ entity → empty
	bConflicts = []byte("conflicts") // entity → empty, for entities with two heads or more
	bSites     = []byte("sites")     // site entity → lat ‖ lon ‖ name ‖ crc
	bMeta      = []byte("meta")      // key → value ‖ crc
	bDrafts    = []byte("drafts")    // draft name → CBOR of a PullRecord ‖ crc
	allBuckets = [][]byte{bLog, bIDs, bEnt, bKinds, bConflicts, bSites, bMeta, bDrafts}
)

// Tags after the entity id in bucket ent. Every key of one entity starts
// with its 16-byte id, so its record, history and supersessions share a
// page or a few neighbouring ones.
const (
	tagRecord  = 0x00 // entity ‖ 00 → kind (1) ‖ events (8) ‖ heads (8) ‖ crc
	tagHistory = 0x01 // entity ‖ 01 ‖ event id → seq (8) ‖ flags (1)
	tagSupBy   = 0x02 // entity ‖ 02 ‖ superseded id ‖ superseding id → crc
)

// Flags of a history entry.
const flagHead = 0x01 // no event of the entity supersedes this one

// histVal is the value of a history entry.
func histVal(dst []byte, seq uint64, head bool) []byte {
	dst = binary.BigEndian.AppendUint64(dst, seq)
	if head {
		return append(dst, flagHead)
	}
	return append(dst, 0)
}

// parseHist reads a history entry's value.
func parseHist(v []byte) (seq uint64, head, ok bool) {
	if len(v) != 9 || v[8]&^flagHead != 0 {
		return 0, false, false
	}
	return binary.BigEndian.Uint64(v), v[8] == flagHead, true
}

// layoutVersion is stored under meta "layout"; a store without it and
// with the version 1 buckets is upgraded on the first writable open.
const layoutVersion = 2

// idGenShift: generation g of the id index holds the events with local
// insertion numbers g<<idGenShift to (g+1)<<idGenShift - 1. A lookup by
// id alone probes every generation (about 250 at 2,000,000 events); an
// import only ever writes into the last one or two.
const idGenShift = 13

// Meta keys owned by the store itself.
const (
	metaDevice  = "device"
	metaClock   = "clock"
	metaCreated = "created"
	metaDemo    = "demo"
	metaLayout  = "layout"
	metaCounts  = "counts" // the counts record (see counts)
	// MetaTransferPrefix is the prefix of meta keys that ApplyRaw may write.
	MetaTransferPrefix = "xfer/"
)

var crcTable = crc32.MakeTable(crc32.Castagnoli)

// sealCRC appends to val a CRC-32C over the bucket name, the key and the
// value, so a value copied to another key or bucket, or changed in
// place, no longer verifies.
func sealCRC(bucket, key, val []byte) []byte {
	out := make([]byte, len(val), len(val)+4)
	copy(out, val)
	return binary.BigEndian.AppendUint32(out, entryCRC(bucket, key, val))
}

func entryCRC(bucket, key, val []byte) uint32 {
	c := crc32.Update(0, crcTable, bucket)
	c = crc32.Update(c, crcTable, []byte{0})
	c = crc32.Update(c, crcTable, key)
	c = crc32.Update(c, crcTable, []byte{0})
	return crc32.Update(c, crcTable, val)
}

// openCRC checks and strips the CRC that sealCRC added.
func openCRC(bucket, key, sealed []byte) ([]byte, bool) {
	if len(sealed) < 4 {
		return nil, false
	}
	val := sealed[:len(sealed)-4]
	return val, binary.BigEndian.Uint32(sealed[len(val):]) == entryCRC(bucket, key, val)
}

// entRecord is the per-entity record: its kind and how many events and
// heads it has, kept so that a write never counts an entity's keys.
type entRecord struct {
	Kind   record.Kind
	Events uint64
	Heads  uint64
}

func recKey(e record.EntityID) []byte {
	k := make([]byte, 17)
	copy(k, e[:])
	k[16] = tagRecord
	return k
}

func (r entRecord) encode(key []byte) []byte {
	v := make([]byte, 17)
	v[0] = byte(r.Kind)
	binary.BigEndian.PutUint64(v[1:], r.Events)
	binary.BigEndian.PutUint64(v[9:], r.Heads)
	return sealCRC(bEnt, key, v)
}

func decodeEntRecord(key, sealed []byte) (entRecord, bool) {
	v, ok := openCRC(bEnt, key, sealed)
	if !ok || len(v) != 17 || !record.Kind(v[0]).Valid() {
		return entRecord{}, false
	}
	return entRecord{Kind: record.Kind(v[0]), Events: binary.BigEndian.Uint64(v[1:]), Heads: binary.BigEndian.Uint64(v[9:])}, true
}

// entKey builds entity ‖ tag ‖ id (an id of 32 bytes).
func entKey(e record.EntityID, tag byte, id record.EventID) []byte {
	k := make([]byte, 49)
	copy(k, e[:])
	k[16] = tag
	copy(k[17:], id[:])
	return k
}

func entPrefix(e record.EntityID, tag byte) []byte {
	k := make([]byte, 17)
	copy(k, e[:])
	k[16] = tag
	return k
}

func supByKey(e record.EntityID, target, by record.EventID) []byte {
	k := make([]byte, 81)
	copy(k, e[:])
	k[16] = tagSupBy
	copy(k[17:], target[:])
	copy(k[49:], by[:])
	return k
}

func idKey(seq uint64, id record.EventID) []byte {
	k := make([]byte, 36)
	binary.BigEndian.PutUint32(k, uint32(seq>>idGenShift))
	copy(k[4:], id[:])
	return k
}

func seqKey(n uint64) []byte { return binary.BigEndian.AppendUint64(nil, n) }

func kindKey(k record.Kind, e record.EntityID) []byte {
	out := make([]byte, 17)
	out[0] = byte(k)
	copy(out[1:], e[:])
	return out
}

// maxKinds bounds the per-kind entity counts of the counts record.
const maxKinds = 16

// counts is the store-wide record under meta "counts": totals that every
// listing checks what it found against, so a page that a damaged disk
// hid is reported instead of silently left out.
type counts struct {
	Events    uint64
	Entities  [maxKinds]uint64 // by kind
	Conflicts uint64           // entities with two heads or more
	Sites     uint64           // entries of the site cache
	Meta      uint64           // meta keys other than "counts"
	Drafts    uint64
}

const countsLen = 8 * (1 + maxKinds + 4)

func (c counts) encode() []byte {
	v := make([]byte, 0, countsLen)
	v = binary.BigEndian.AppendUint64(v, c.Events)
	for _, n := range c.Entities {
		v = binary.BigEndian.AppendUint64(v, n)
	}
	for _, n := range []uint64{c.Conflicts, c.Sites, c.Meta, c.Drafts} {
		v = binary.BigEndian.AppendUint64(v, n)
	}
	return v
}

func decodeCounts(v []byte) (counts, bool) {
	var c counts
	if len(v) != countsLen {
		return c, false
	}
	next := func() uint64 { n := binary.BigEndian.Uint64(v); v = v[8:]; return n }
	c.Events = next()
	for i := range c.Entities {
		c.Entities[i] = next()
	}
	c.Conflicts, c.Sites, c.Meta, c.Drafts = next(), next(), next(), next()
	return c, true
}

func (c counts) allEntities() uint64 {
	var n uint64
	for _, x := range c.Entities {
		n += x
	}
	return n
}

// beUint64 reads a big-endian number of up to 8 bytes.
func beUint64(b []byte) uint64 {
	var n uint64
	for _, c := range b {
		n = n<<8 | uint64(c)
	}
	return n
}
