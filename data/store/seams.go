package store

import (
	"bytes"

	bolt "go.etcd.io/bbolt"
)

// ForEachMeta calls fn with every meta key that starts with prefix and
// its value, in key order, inside one read transaction (so fn sees one
// consistent state and must not write). v is valid only during the call.
// Each value is checked against its CRC first (a *DamagedError if it
// does not verify).
func (s *Store) ForEachMeta(prefix string, fn func(key string, v []byte) error) error {
	return s.view(func(tx *bolt.Tx) error {
		c := tx.Bucket(bMeta).Cursor()
		p := []byte(prefix)
		var oc orderCheck
		for k, sealed := c.Seek(p); k != nil && bytes.HasPrefix(k, p); k, sealed = c.Next() {
			v, ok := openCRC(bMeta, k, sealed)
			if !ok || !oc.next(k) {
				return damagef("meta value %q does not verify", k)
			}
			if err := fn(string(k), v); err != nil {
				return err
			}
		}
		return nil
	})
}

// Exclusive runs fn while this process holds the store open (so no other
// process can: bbolt's file lock) and no other write of this process runs
// (the store's write lock). Files kept beside the store, such as the
// trust list, are changed inside it so that two changes never interleave.
// fn must not write to the store.
//
// A store opened read-first takes the write lock (reopens the file for
// writing) first; one opened read-only refuses with ErrReadOnly: a shared
// lock would let another reader change the files at the same time.
func (s *Store) Exclusive(fn func() error) error {
	s.wmu.Lock()
	defer s.wmu.Unlock()
	if err := s.writableLocked(); err != nil {
		return err
	}
	return fn()
}
