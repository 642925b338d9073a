package store

import (
	"baleassay/data/record"
	"bytes"
	"encoding/binary"
	"fmt"

	bolt "go.etcd.io/bbolt"
)

// findSeq finds an event's local insertion number through the id index,
// newest generation first. Not finding it, it counts the whole index
// against the event count, so an entry lost to damage is reported
// rather than not found (the walk costs one pass over the index, only
// for ids that are not there).
func findSeq(tx *bolt.Tx, id record.EventID) (uint64, bool, error) {
	c, err := loadCounts(tx)
	if err != nil {
		return 0, false, err
	}
	b := tx.Bucket(bIDs)
	k := idKey(0, id)
	for g := int64(c.Events >> idGenShift); g >= 0; g-- {
		binary.BigEndian.PutUint32(k, uint32(g))
		if v := b.Get(k); v != nil {
			if len(v) != 8 {
				return 0, false, damagef("id index entry of event %s is damaged", id.Short())
			}
			seq := binary.BigEndian.Uint64(v)
			if seq>>idGenShift != uint64(g) {
				return 0, false, damagef("id index entry of event %s is in the wrong generation", id.Short())
			}
			if _, _, err := logEntry(tx, seq, id); err != nil {
				return 0, false, err
			}
			return seq, true, nil
		}
	}
	var n uint64
	var oc orderCheck
	cur := b.Cursor()
	for k, _ := cur.First(); k != nil; k, _ = cur.Next() {
		if len(k) != 36 || !oc.next(k) {
			return 0, false, damagef("the id index has a damaged entry")
		}
		n++
	}
	if n != c.Events {
		return 0, false, damagef("the id index holds %d events, the counts say %d", n, c.Events)
	}
	return 0, false, nil
}

// Has reports whether the store holds the event.
func (s *Store) Has(id record.EventID) (bool, error) {
	var ok bool
	err := s.view(func(tx *bolt.Tx) error {
		var err error
		_, ok, err = findSeq(tx, id)
		return err
	})
	return ok, err
}

// rawByID reads an event's checked bytes (valid during the transaction),
// ErrNotFound if absent.
func rawByID(tx *bolt.Tx, id record.EventID) ([]byte, error) {
	seq, ok, err := findSeq(tx, id)
	if err != nil {
		return nil, err
	}
	if !ok {
		return nil, fmt.Errorf("%w: event %s", ErrNotFound, id.Short())
	}
	_, raw, err := logEntry(tx, seq, id)
	return raw, err
}

// Raw returns a copy of an event's stored bytes, ErrNotFound if absent.
func (s *Store) Raw(id record.EventID) ([]byte, error) {
	var out []byte
	err := s.view(func(tx *bolt.Tx) error {
		raw, err := rawByID(tx, id)
		out = bytes.Clone(raw)
		return err
	})
	return out, err
}

// Event returns one stored event.
func (s *Store) Event(id record.EventID) (record.Stamped, error) {
	var e record.Stamped
	err := s.view(func(tx *bolt.Tx) error {
		raw, err := rawByID(tx, id)
		if err != nil {
			return err
		}
		ev, err := record.DecodeTrusted(raw)
		if err != nil {
			return damagef("event %s does not decode: %v", id.Short(), err)
		}
		e = record.Stamped{ID: id, Event: ev}
		return nil
	})
	return e, err
}

// releaseEvery is how many bytes a long walk reads between drops of the
// mapped pages it read (releaseMapped).
const releaseEvery = 64 << 20

// ForEachRawSince calls fn for every event inserted after local sequence
// number afterSeq, in insertion order (numbers start at 1). Every event's
// bytes are checked against its id before fn sees them, and numbers must
// follow each other up to the event count. raw is valid only during the
// call: copy it to keep it. An error from fn stops the walk and is
// returned. fn runs inside a read transaction: it may read the store but
// must not write to it (a write that grows the file would wait for the
// read to end).
func (s *Store) ForEachRawSince(afterSeq uint64, fn func(seq uint64, id record.EventID, raw []byte) error) error {
	return s.view(func(tx *bolt.Tx) error {
		c, err := loadCounts(tx)
		if err != nil {
			return err
		}
		if afterSeq >= c.Events {
			return nil
		}
		want := afterSeq + 1
		read := 0
		cur := tx.Bucket(bLog).Cursor()
		for k, v := cur.Seek(seqKey(want)); k != nil; k, v = cur.Next() {
			if len(k) != 8 || binary.BigEndian.Uint64(k) != want {
				return damagef("the log skips from event %d to key %x", want-1, k)
			}
			id, raw, err := checkLogValue(want, v, record.EventID{})
			if err != nil {
				return err
			}
			if err := fn(want, id, raw); err != nil {
				return err
			}
			if read += len(v); read > releaseEvery {
				releaseMapped(s.db, tx)
				read = 0
			}
			want++
		}
		if want != c.Events+1 {
			return damagef("the log ends at event %d, the counts say %d events", want-1, c.Events)
		}
		return nil
	})
}

// LastSeq is the local sequence number of the latest inserted event, 0
// for an empty store.
func (s *Store) LastSeq() (uint64, error) {
	var n uint64
	err := s.view(func(tx *bolt.Tx) error {
		c, err := loadCounts(tx)
		if err != nil {
			return err
		}
		n = c.Events
		return checkLogEnd(tx, c)
	})
	return n, err
}

// Meta returns a copy of a meta value, nil and no error when absent.
func (s *Store) Meta(key string) ([]byte, error) {
	var out []byte
	err := s.view(func(tx *bolt.Tx) error {
		v, ok, err := metaGet(tx.Bucket(bMeta), key)
		if ok {
			out = bytes.Clone(v)
		}
		return err
	})
	return out, err
}
