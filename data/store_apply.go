package data

import (
	"bytes"
	"errors"
	"fmt"
	"strings"

	bolt "go.etcd.io/bbolt"
)

// ApplyResult counts what a write did.
type ApplyResult struct {
	New       int // events inserted
	Present   int // events already in the store (or repeated in the batch), left as they were
	Conflicts int // entities that became conflicted by this write
	// Warnings are the implausible values found in the new events (kept:
	// an import does not ask; a local Save asks first).
	Warnings []EventWarning
}

// EventWarning is a warning about one event of a batch.
type EventWarning struct {
	Index int
	ID    EventID
	Warning
}

type item struct {
	id  EventID
	raw []byte
	ev  Event
}

// ApplyRaw adds encoded events (from an import) and meta values in one
// committed and synced transaction, all or nothing. Every event is first
// decoded strictly (DecodeEvent) and validated (ValidateEvent); the first
// failure is returned as an *EventError naming its index and field, and
// nothing is written. Events already present are counted, not rewritten.
// raws may alias a larger buffer: the store copies what it keeps. Meta
// keys must start with MetaTransferPrefix.
func (s *Store) ApplyRaw(raws [][]byte, meta map[string][]byte) (ApplyResult, error) {
	items := make([]item, len(raws))
	var warns []EventWarning
	now := s.now()
	for i, raw := range raws {
		ev, err := DecodeEvent(raw)
		if err != nil {
			return ApplyResult{}, &EventError{Index: i, Err: err}
		}
		id := IDOf(raw)
		w, err := ValidateEventAt(ev, now)
		if err != nil {
			return ApplyResult{}, &EventError{Index: i, ID: id, Err: err}
		}
		for _, x := range w {
			warns = append(warns, EventWarning{i, id, x})
		}
		items[i] = item{id: id, raw: raw, ev: ev}
	}
	for k := range meta {
		if !strings.HasPrefix(k, MetaTransferPrefix) || len(k) > 200 {
			return ApplyResult{}, fmt.Errorf("%w: %q (want %q...)", ErrMetaKey, k, MetaTransferPrefix)
		}
	}
	res, err := s.commit(items, meta, true, nil)
	res.Warnings = warns
	return res, err
}

// SaveOptions tune Save.
type SaveOptions struct {
	// Confirm accepts warnings. Without it a save with warnings is
	// refused with a *WarningsError and nothing is written.
	Confirm bool
}

// Save stamps local events (format version, this device, a fresh clock
// stamp, and a new entity id where Entity is zero), validates them and
// writes them in one committed and synced transaction. It returns the new
// event ids in order, and the entity ids through the events' Entity when
// they were made here.
func (s *Store) Save(evs []Event, opt SaveOptions) ([]EventID, error) {
	ids, _, err := s.save(evs, opt, nil)
	return ids, err
}

// save is Save with an extra step run inside the transaction.
func (s *Store) save(evs []Event, opt SaveOptions, extra func(tx *bolt.Tx) error) ([]EventID, []Event, error) {
	items := make([]item, len(evs))
	var warns []Warning
	now := s.now()
	out := make([]Event, len(evs))
	for i, e := range evs {
		e.Version = FormatVersion
		e.Device = s.device
		e.Clock = s.clock.Now()
		if e.Entity.IsZero() {
			id, err := NewEntityID()
			if err != nil {
				return nil, nil, err
			}
			e.Entity = id
		}
		raw, err := EncodeEvent(e)
		if err != nil {
			return nil, nil, &EventError{Index: i, Err: err}
		}
		id := IDOf(raw)
		w, err := ValidateEventAt(e, now)
		if err != nil {
			return nil, nil, &EventError{Index: i, ID: id, Err: err}
		}
		warns = append(warns, w...)
		items[i] = item{id: id, raw: raw, ev: e}
		out[i] = e
	}
	if len(warns) > 0 && !opt.Confirm {
		return nil, nil, &WarningsError{Warnings: warns}
	}
	if _, err := s.commit(items, nil, false, extra); err != nil {
		return nil, nil, err
	}
	ids := make([]EventID, len(items))
	for i, it := range items {
		ids[i] = it.id
	}
	return ids, out, nil
}

// writable reports why the store cannot take a write, if it cannot.
func (s *Store) writableLocked() error {
	if s.closed {
		return ErrClosed
	}
	if s.failed != nil {
		return &WriteError{Err: s.failed}
	}
	return nil
}

// commit inserts the items and meta values in one bbolt transaction.
func (s *Store) commit(items []item, meta map[string][]byte, observe bool, extra func(tx *bolt.Tx) error) (ApplyResult, error) {
	s.wmu.Lock()
	defer s.wmu.Unlock()
	if err := s.writableLocked(); err != nil {
		return ApplyResult{}, err
	}
	var res ApplyResult
	var siteUpdates []siteUpdate
	err := s.db.Update(func(tx *bolt.Tx) error {
		res = ApplyResult{}
		siteUpdates = siteUpdates[:0]
		evB, seqB, entB := tx.Bucket(bEvents), tx.Bucket(bSeq), tx.Bucket(bEntity)
		byB, headB, supB := tx.Bucket(bByEntity), tx.Bucket(bHeads), tx.Bucket(bSupBy)
		var seq uint64
		if k, _ := seqB.Cursor().Last(); k != nil {
			seq = beUint64(k)
		}
		before := make(map[EntityID]int)
		var order []EntityID
		for i, it := range items {
			if evB.Get(it.id[:]) != nil {
				res.Present++
				continue
			}
			ent := it.ev.Entity
			if k := entB.Get(ent[:]); k != nil {
				if Kind(k[0]) != it.ev.Kind {
					return dataError{&EventError{Index: i, ID: it.id, Err: &FieldError{Field: "kind",
						Value: fmt.Sprintf("%s (entity %s is a %s)", it.ev.Kind, ent, Kind(k[0])), Err: ErrKindMismatch}}}
				}
			} else if err := entB.Put(ent[:], []byte{byte(it.ev.Kind)}); err != nil {
				return err
			}
			if _, ok := before[ent]; !ok {
				before[ent] = countPrefix(headB, ent[:])
				order = append(order, ent)
			}
			seq++
			if err := evB.Put(it.id[:], bytes.Clone(it.raw)); err != nil {
				return err
			}
			if err := seqB.Put(seqKey(seq), it.id[:]); err != nil {
				return err
			}
			pk := pairKey(ent, it.id)
			if err := byB.Put(pk, nil); err != nil {
				return err
			}
			if countPrefix(supB, pk) == 0 {
				if err := headB.Put(pk, nil); err != nil {
					return err
				}
			}
			for _, t := range it.ev.Supersedes {
				tk := pairKey(ent, t)
				if err := supB.Put(append(tk, it.id[:]...), nil); err != nil {
					return err
				}
				if err := headB.Delete(tk); err != nil {
					return err
				}
			}
			if observe {
				s.clock.Observe(it.ev.Clock)
			}
			res.New++
		}
		m := tx.Bucket(bMeta)
		for _, k := range sortedKeys(meta) {
			if err := m.Put([]byte(k), bytes.Clone(meta[k])); err != nil {
				return err
			}
		}
		if res.New > 0 {
			if err := m.Put([]byte(metaClock), s.clock.Last().bytes()); err != nil {
				return err
			}
		}
		for _, ent := range order {
			if after := countPrefix(headB, ent[:]); after > 1 && before[ent] <= 1 {
				res.Conflicts++
			}
			if Kind(entB.Get(ent[:])[0]) == KindSite {
				st, err := stateTx(tx, ent)
				if err != nil {
					return err
				}
				u := siteUpdateOf(st)
				if err := putSiteCache(tx, u); err != nil {
					return err
				}
				siteUpdates = append(siteUpdates, u)
			}
		}
		if extra != nil {
			if err := extra(tx); err != nil {
				return err
			}
		}
		if s.hook != nil {
			if err := s.hook(); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		var de dataError
		if errors.As(err, &de) {
			return ApplyResult{}, de.err
		}
		s.failed = err
		return ApplyResult{}, &WriteError{Err: err}
	}
	s.sites.apply(siteUpdates)
	return res, nil
}

func beUint64(b []byte) uint64 {
	var n uint64
	for _, c := range b {
		n = n<<8 | uint64(c)
	}
	return n
}

// countPrefix counts the keys of b that start with prefix.
func countPrefix(b *bolt.Bucket, prefix []byte) int {
	n := 0
	c := b.Cursor()
	for k, _ := c.Seek(prefix); k != nil && bytes.HasPrefix(k, prefix); k, _ = c.Next() {
		n++
	}
	return n
}
