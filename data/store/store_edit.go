package store

import (
	"baleassay/data/geo"
	"baleassay/data/record"
	"bytes"
	"encoding/binary"
	"fmt"
	"math"
	"runtime/debug"

	bolt "go.etcd.io/bbolt"
)

// Supersede saves ev as the new value of an existing entity: its Entity
// and Kind are set from the entity and it supersedes every current head,
// so it also resolves a conflict. It returns the new event's id.
func (s *Store) Supersede(ent record.EntityID, ev record.Event, opt SaveOptions) (record.EventID, error) {
	st, err := s.Entity(ent)
	if err != nil {
		return record.EventID{}, err
	}
	ev.Entity, ev.Kind, ev.Supersedes = ent, st.Kind, st.HeadIDs()
	ids, err := s.Save([]record.Event{ev}, opt)
	if err != nil {
		return record.EventID{}, err
	}
	return ids[0], nil
}

// Delete saves a tombstone that supersedes every head of the entity. The
// entity disappears from views; its events stay in the store.
func (s *Store) Delete(ent record.EntityID) (record.EventID, error) {
	st, err := s.Entity(ent)
	if err != nil {
		return record.EventID{}, err
	}
	if st.Deleted() {
		return record.EventID{}, fmt.Errorf("%w: %s %s is already deleted", ErrNotFound, st.Kind, ent)
	}
	return s.Supersede(ent, record.Event{Deleted: true}, SaveOptions{})
}

// Resolve ends a conflict by saving a copy of the chosen head's value (or
// its deletion) that supersedes every head.
func (s *Store) Resolve(ent record.EntityID, keep record.EventID) (record.EventID, error) {
	st, err := s.Entity(ent)
	if err != nil {
		return record.EventID{}, err
	}
	for _, h := range st.Heads {
		if h.ID == keep {
			ev := record.PayloadOf(h.Event)
			return s.Supersede(ent, ev, SaveOptions{Confirm: true})
		}
	}
	return record.EventID{}, fmt.Errorf("%w: event %s is not a current value of %s %s", ErrNotFound, keep.Short(), st.Kind, ent)
}

// The sites bucket keeps each visible site's shown position and name,
// written in the same transaction as the events that change it, so that
// opening a store loads the index without decoding events:
//
//	entity id → lat (float64 bits, BE) ‖ lon (float64 bits, BE) ‖ name ‖ crc

func putSiteCache(w wtx, c *counts, u geo.Update) error {
	b := w.bucket(bSites)
	k := u.Site.ID[:]
	had := b.Get(k) != nil
	if u.Remove {
		if had {
			c.Sites--
		}
		return b.Delete(k)
	}
	if !had {
		c.Sites++
	}
	v := make([]byte, 16, 16+len(u.Site.Name))
	binary.BigEndian.PutUint64(v, math.Float64bits(u.Site.Lat))
	binary.BigEndian.PutUint64(v[8:], math.Float64bits(u.Site.Lon))
	return b.Put(bytes.Clone(k), sealCRC(bSites, k, append(v, u.Site.Name...)))
}

// readSiteCache reads every entry of the site cache, checking each
// entry's CRC, their order and their number.
func readSiteCache(tx *bolt.Tx) ([]geo.IndexedSite, error) {
	c, err := loadCounts(tx)
	if err != nil {
		return nil, err
	}
	sites := make([]geo.IndexedSite, 0, c.Sites)
	var oc orderCheck
	err = tx.Bucket(bSites).ForEach(func(k, sealed []byte) error {
		v, ok := openCRC(bSites, k, sealed)
		if !ok || len(v) < 16 || len(k) != 16 || !oc.next(k) {
			return damagef("the site index cache has a damaged entry")
		}
		sites = append(sites, geo.IndexedSite{ID: record.EntityID(k), Lat: math.Float64frombits(binary.BigEndian.Uint64(v)),
			Lon: math.Float64frombits(binary.BigEndian.Uint64(v[8:])), Name: string(v[16:])})
		return nil
	})
	if err == nil && uint64(len(sites)) != c.Sites {
		err = damagef("the site index cache holds %d sites, the counts say %d", len(sites), c.Sites)
	}
	return sites, err
}

// loadSites bulk-loads the site index from the sites bucket.
func (s *Store) loadSites() error {
	var sites []geo.IndexedSite
	err := s.view(func(tx *bolt.Tx) error {
		var err error
		sites, err = readSiteCache(tx)
		return err
	})
	if err != nil {
		return err
	}
	s.sites = geo.NewSiteIndex(sites)
	return nil
}

// siteCacheLocked reads the site cache while the caller holds dbmu.
func (s *Store) siteCacheLocked() (sites []geo.IndexedSite, err error) {
	defer s.nameDamage(&err)
	defer debug.SetPanicOnFault(debug.SetPanicOnFault(true))
	defer recoverDamage(&err)
	err = s.db.View(func(tx *bolt.Tx) error {
		sites, err = readSiteCache(tx)
		return err
	})
	return sites, err
}

// siteUpdateOf is the index change an entity's new state makes.
func siteUpdateOf(st record.EntityState) geo.Update {
	cur, ok := st.Current()
	if !ok || cur.Site == nil {
		return geo.Update{Site: geo.IndexedSite{ID: st.ID}, Remove: true}
	}
	return geo.Update{Site: geo.IndexedSite{ID: st.ID, Name: cur.Site.Name, Lat: cur.Site.Lat, Lon: cur.Site.Lon}}
}
