package store

import (
	"baleassay/data/record"
	"fmt"

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
	return s.writeTx(func(tx *bolt.Tx) error { return tx.Bucket(bDrafts).Put([]byte(name), raw) })
}

// Draft returns a draft; ok is false when there is none of that name.
func (s *Store) Draft(name string) (p record.PullRecord, ok bool, err error) {
	err = s.view(func(tx *bolt.Tx) error {
		raw := tx.Bucket(bDrafts).Get([]byte(name))
		if raw == nil {
			return nil
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
		return tx.Bucket(bDrafts).ForEach(func(k, _ []byte) error {
			out = append(out, string(k))
			return nil
		})
	})
	return out, err
}

// DiscardDraft removes a draft.
func (s *Store) DiscardDraft(name string) error {
	return s.writeTx(func(tx *bolt.Tx) error { return tx.Bucket(bDrafts).Delete([]byte(name)) })
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
	ids, evs, err := s.save([]record.Event{{Kind: record.KindPull, Pull: &p}}, opt, func(tx *bolt.Tx) error {
		return tx.Bucket(bDrafts).Delete([]byte(name))
	})
	if err != nil {
		return record.EntityID{}, record.EventID{}, err
	}
	return evs[0].Entity, ids[0], nil
}

// writeTx runs a write transaction outside the event path, with the same
// failure rule: a disk-side error stops the store.
func (s *Store) writeTx(fn func(tx *bolt.Tx) error) error {
	s.wmu.Lock()
	defer s.wmu.Unlock()
	if err := s.writableLocked(); err != nil {
		return err
	}
	err := s.db.Update(func(tx *bolt.Tx) error {
		if err := fn(tx); err != nil {
			return err
		}
		if s.hook != nil {
			return s.hook()
		}
		return nil
	})
	if err != nil {
		s.failed = err
		return &WriteError{Err: err}
	}
	return nil
}
