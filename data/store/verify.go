package store

import (
	"baleassay/data/record"
	"bytes"
	"crypto/sha256"

	bolt "go.etcd.io/bbolt"
)

// Verification of what is read. Event bytes are checked against their
// content id (SHA-256) every time they are read; index entries either
// point at an event whose stored id must match, or carry a CRC; listings
// compare what they found with the counts record. A mismatch is a
// *DamagedError: the store reports damage, it never answers from data
// that does not hold together.

// logEntry reads event seq from the log and checks it: the entry must
// hold the expected id (when want is non-zero) and bytes whose SHA-256 is
// that id.
func logEntry(tx *bolt.Tx, seq uint64, want record.EventID) (record.EventID, []byte, error) {
	v := tx.Bucket(bLog).Get(seqKey(seq))
	if v == nil {
		return want, nil, damagef("event %d is missing from the log", seq)
	}
	return checkLogValue(seq, v, want)
}

func checkLogValue(seq uint64, v []byte, want record.EventID) (record.EventID, []byte, error) {
	var id record.EventID
	if len(v) < 33 {
		return id, nil, damagef("log entry %d is cut short", seq)
	}
	copy(id[:], v)
	raw := v[32:]
	if want != (record.EventID{}) && id != want {
		return id, nil, damagef("log entry %d holds event %s where the index expects %s", seq, id.Short(), want.Short())
	}
	if sha256.Sum256(raw) != id {
		return id, nil, damagef("the bytes of event %s (log entry %d) do not match its id", id.Short(), seq)
	}
	return id, raw, nil
}

// eventAt reads, checks and decodes event seq, which the index says is
// event id of entity ent and kind kind.
func eventAt(tx *bolt.Tx, seq uint64, id record.EventID, ent record.EntityID, kind record.Kind) (record.Stamped, error) {
	_, raw, err := logEntry(tx, seq, id)
	if err != nil {
		return record.Stamped{}, err
	}
	e, err := record.DecodeTrusted(raw)
	if err != nil {
		return record.Stamped{}, damagef("event %s does not decode: %v", id.Short(), err)
	}
	if e.Entity != ent || e.Kind != kind {
		return record.Stamped{}, damagef("event %s is filed under %s %s but is about %s %s", id.Short(), kind, ent, e.Kind, e.Entity)
	}
	return record.Stamped{ID: id, Event: e}, nil
}

// entryID reads the event id at the end of an entity key (entity ‖ tag ‖ id).
func entryID(k []byte) record.EventID {
	var id record.EventID
	copy(id[:], k[17:49])
	return id
}

// verifyEntity checks everything bucket ent holds about one entity, and
// its neighbours' order: its record verifies, keys come in order, the
// history has as many events as the record says, every supersession
// entry verifies, and the events marked as heads are exactly those that
// no event of the entity supersedes; the kind index and the conflict set
// agree with the record. Cost: the entity's own keys.
func verifyEntity(tx *bolt.Tx, e record.EntityID) error {
	var v entVerifier
	return v.verify(tx, tx.Bucket(bEnt).Cursor(), e, true)
}

// entVerifier holds what verifyEntity needs, reused from one entity to
// the next.
type entVerifier struct {
	heads   []histHead
	targets map[record.EventID]struct{}
	prev    []byte
}

type histHead struct {
	id   record.EventID
	head bool
}

// verify checks entity e through cur; with checkIndexes it also looks
// the entity up in the kind index and the conflict set (a write skips
// that for the entities it has just made and indexed itself).
func (ev *entVerifier) verify(tx *bolt.Tx, cur *bolt.Cursor, e record.EntityID, checkIndexes bool) error {
	k, v := cur.Seek(e[:])
	if k == nil || !bytes.HasPrefix(k, e[:]) {
		return damagef("entity %s has no record", e)
	}
	if pk, _ := cur.Prev(); pk != nil {
		if bytes.Compare(pk, e[:]) >= 0 {
			return damagef("entity keys out of order before %s", e)
		}
		k, v = cur.Next()
	} else {
		k, v = cur.First()
	}
	if len(k) != 17 || !bytes.HasPrefix(k, e[:]) || k[16] != tagRecord {
		return damagef("entity %s: first key is not its record", e)
	}
	rec, ok := decodeEntRecord(k, v)
	if !ok {
		return damagef("the record of entity %s does not verify", e)
	}
	if ev.targets == nil {
		ev.targets = map[record.EventID]struct{}{}
	}
	clear(ev.targets)
	ev.heads = ev.heads[:0]
	var events uint64
	ev.prev = append(ev.prev[:0], k...)
	for k, v = cur.Next(); k != nil && bytes.HasPrefix(k, e[:]); k, v = cur.Next() {
		if bytes.Compare(ev.prev, k) >= 0 {
			return damagef("entity %s: keys out of order", e)
		}
		ev.prev = append(ev.prev[:0], k...)
		switch {
		case len(k) == 49 && k[16] == tagHistory:
			_, head, ok := parseHist(v)
			if !ok {
				return damagef("entity %s: a damaged history entry", e)
			}
			events++
			ev.heads = append(ev.heads, histHead{entryID(k), head})
		case len(k) == 81 && k[16] == tagSupBy:
			if _, ok := openCRC(bEnt, k, v); !ok {
				return damagef("entity %s: a supersession entry does not verify", e)
			}
			ev.targets[entryID(k)] = struct{}{}
		default:
			return damagef("entity %s: a key of %d bytes with tag %d", e, len(k), k[16])
		}
	}
	if k != nil && bytes.Compare(ev.prev, k) >= 0 {
		return damagef("entity keys out of order after %s", e)
	}
	var heads uint64
	for _, h := range ev.heads {
		_, sup := ev.targets[h.id]
		if h.head == sup {
			return damagef("entity %s: the head mark of event %s disagrees with the supersessions", e, h.id.Short())
		}
		if h.head {
			heads++
		}
	}
	switch {
	case events != rec.Events:
		return damagef("entity %s: %d events in its history, its record says %d", e, events, rec.Events)
	case heads != rec.Heads:
		return damagef("entity %s: %d heads in its history, its record says %d", e, heads, rec.Heads)
	case !checkIndexes:
		return nil
	case tx.Bucket(bKinds).Get(kindKey(rec.Kind, e)) == nil:
		return damagef("entity %s is missing from the index of kind %s", e, rec.Kind)
	case (tx.Bucket(bConflicts).Get(e[:]) != nil) != (rec.Heads > 1):
		return damagef("entity %s: the conflict set disagrees with its %d heads", e, rec.Heads)
	}
	return nil
}

// orderCheck follows a cursor's keys and reports keys out of order (a
// page that a damaged branch put in the wrong place).
type orderCheck struct{ prev []byte }

func (o *orderCheck) next(k []byte) bool {
	if o.prev != nil && bytes.Compare(o.prev, k) >= 0 {
		return false
	}
	o.prev = append(o.prev[:0], k...)
	return true
}
