package store

import (
	"baleassay/data/record"
	"errors"
	"fmt"
	"runtime/debug"

	bolt "go.etcd.io/bbolt"
)

// Drafts keep a pull while it is being typed: each PutDraft is committed
// and synced, so a flat battery loses at most the keystroke in flight.
// SaveDraft turns a draft into a pull event and removes the draft in the
// same transaction.

// PutDraft stores (or replaces) a draft pull under a name.
func (s *Store) PutDraft(name string, p record.PullRecord) error {
	if err := record.CheckName("draft name", name); err != nil {
		return err
	}
	raw, err := record.EncodePull(p)
	if err != nil {
		return err
	}
	return s.writeTx(func(w wtx, c *counts) error {
		b, k := w.bucket(bDrafts), []byte(name)
		if b.Get(k) == nil {
			c.Drafts++
		}
		return b.Put(k, sealCRC(bDrafts, k, raw))
	})
}

// deleteDraft removes a draft inside a write, keeping the count.
func deleteDraft(w wtx, c *counts, name string) error {
	b, k := w.bucket(bDrafts), []byte(name)
	if b.Get(k) != nil {
		c.Drafts--
	}
	return b.Delete(k)
}

// Draft returns a draft; ok is false when there is none of that name.
func (s *Store) Draft(name string) (p record.PullRecord, ok bool, err error) {
	err = s.view(func(tx *bolt.Tx) error {
		k := []byte(name)
		sealed := tx.Bucket(bDrafts).Get(k)
		if sealed == nil {
			return confirmAbsent(tx.Bucket(bDrafts), bDrafts, k)
		}
		raw, good := openCRC(bDrafts, k, sealed)
		if !good {
			return damagef("draft %q does not verify", name)
		}
		ok = true
		var err error
		p, err = record.DecodePull(raw)
		return err
	})
	return p, ok, err
}

// DraftNames lists the drafts in name order.
func (s *Store) DraftNames() ([]string, error) {
	var out []string
	err := s.view(func(tx *bolt.Tx) error {
		c, err := loadCounts(tx)
		if err != nil {
			return err
		}
		var oc orderCheck
		err = tx.Bucket(bDrafts).ForEach(func(k, v []byte) error {
			if _, ok := openCRC(bDrafts, k, v); !ok || !oc.next(k) {
				return damagef("draft %q does not verify", k)
			}
			out = append(out, string(k))
			return nil
		})
		if err == nil && uint64(len(out)) != c.Drafts {
			err = damagef("%d drafts found, the counts say %d", len(out), c.Drafts)
		}
		return err
	})
	return out, err
}

// DiscardDraft removes a draft.
func (s *Store) DiscardDraft(name string) error {
	return s.writeTx(func(w wtx, c *counts) error { return deleteDraft(w, c, name) })
}

// SaveDraft validates the draft as a new pull, saves it and removes the
// draft, atomically. It returns the pull's entity and event ids.
func (s *Store) SaveDraft(name string, opt SaveOptions) (record.EntityID, record.EventID, error) {
	p, ok, err := s.Draft(name)
	if err != nil {
		return record.EntityID{}, record.EventID{}, err
	}
	if !ok {
		return record.EntityID{}, record.EventID{}, fmt.Errorf("%w: draft %q", ErrNotFound, name)
	}
	ids, evs, err := s.save([]record.Event{{Kind: record.KindPull, Pull: &p}}, opt, func(w wtx, c *counts) error {
		return deleteDraft(w, c, name)
	})
	if err != nil {
		return record.EntityID{}, record.EventID{}, err
	}
	return evs[0].Entity, ids[0], nil
}

// writeTx runs a write transaction outside the event path, with the same
// failure rule: a disk-side error stops the store.
func (s *Store) writeTx(fn func(w wtx, c *counts) error) (err error) {
	s.wmu.Lock()
	defer s.wmu.Unlock()
	if err := s.writableLocked(); err != nil {
		return err
	}
	defer s.nameDamage(&err)
	defer debug.SetPanicOnFault(debug.SetPanicOnFault(true))
	defer recoverDamage(&err)
	err = updateGuarded(s.db, s.noPathGuard, func(w wtx) error {
		c, err := loadCounts(w.Tx)
		if err != nil {
			return err
		}
		if err := fn(w, &c); err != nil {
			return err
		}
		if err := putCounts(w, c); err != nil {
			return err
		}
		if s.hook != nil {
			return s.hook()
		}
		return nil
	})
	if errors.Is(err, ErrDamaged) {
		return err
	}
	if err != nil {
		s.failed = err
		return &WriteError{Err: err}
	}
	return nil
}
