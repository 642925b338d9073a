package data

import (
	"fmt"

	bolt "go.etcd.io/bbolt"
)

// Supersede saves ev as the new value of an existing entity: its Entity
// and Kind are set from the entity and it supersedes every current head,
// so it also resolves a conflict. It returns the new event's id.
func (s *Store) Supersede(ent EntityID, ev Event, opt SaveOptions) (EventID, error) {
	st, err := s.Entity(ent)
	if err != nil {
		return EventID{}, err
	}
	ev.Entity, ev.Kind, ev.Supersedes = ent, st.Kind, st.HeadIDs()
	ids, err := s.Save([]Event{ev}, opt)
	if err != nil {
		return EventID{}, err
	}
	return ids[0], nil
}

// Delete saves a tombstone that supersedes every head of the entity. The
// entity disappears from views; its events stay in the store.
func (s *Store) Delete(ent EntityID) (EventID, error) {
	st, err := s.Entity(ent)
	if err != nil {
		return EventID{}, err
	}
	if st.Deleted() {
		return EventID{}, fmt.Errorf("%w: %s %s is already deleted", ErrNotFound, st.Kind, ent)
	}
	return s.Supersede(ent, Event{Deleted: true}, SaveOptions{})
}

// Resolve ends a conflict by saving a copy of the chosen head's value (or
// its deletion) that supersedes every head.
func (s *Store) Resolve(ent EntityID, keep EventID) (EventID, error) {
	st, err := s.Entity(ent)
	if err != nil {
		return EventID{}, err
	}
	for _, h := range st.Heads {
		if h.ID == keep {
			ev := Event{Deleted: h.Deleted, Site: h.Site, Bale: h.Bale, Pull: h.Pull, Setting: h.Setting}
			return s.Supersede(ent, ev, SaveOptions{Confirm: true})
		}
	}
	return EventID{}, fmt.Errorf("%w: event %s is not a current value of %s %s", ErrNotFound, keep.Short(), st.Kind, ent)
}

// loadSites bulk-loads the site index from the store.
func (s *Store) loadSites() error {
	var sites []IndexedSite
	err := s.db.View(func(tx *bolt.Tx) error {
		return tx.Bucket(bEntity).ForEach(func(k, v []byte) error {
			if Kind(v[0]) != KindSite {
				return nil
			}
			var id EntityID
			copy(id[:], k)
			st, err := stateTx(tx, id)
			if err != nil {
				return err
			}
			if u := siteUpdateOf(st); !u.remove {
				sites = append(sites, u.site)
			}
			return nil
		})
	})
	if err != nil {
		return fmt.Errorf("data: load site index: %w", err)
	}
	s.sites = NewSiteIndex(sites)
	return nil
}
