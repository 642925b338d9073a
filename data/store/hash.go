package store

import (
	"baleassay/data/record"
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"hash"
	"slices"

	bolt "go.etcd.io/bbolt"
)

// ContentHash is SHA-256 over every bucket in name order, and in each its
// keys and values in key order, each length-prefixed: two stores hash the
// same exactly when their files hold the same data. It covers the local
// parts too (device id, insertion order), so use it to prove that a
// refused write changed nothing; use EventSetHash to compare two stores'
// records.
func (s *Store) ContentHash() ([32]byte, error) {
	var sum [32]byte
	err := s.view(func(tx *bolt.Tx) error {
		h := sha256.New()
		err := tx.ForEach(func(name []byte, b *bolt.Bucket) error {
			putLen(h, name)
			err := b.ForEach(func(k, v []byte) error {
				putLen(h, k)
				putLen(h, v)
				return nil
			})
			h.Write([]byte{0xff, 0xff, 0xff, 0xff})
			return err
		})
		copy(sum[:], h.Sum(nil))
		return err
	})
	return sum, err
}

func putLen(h hash.Hash, b []byte) {
	var n [4]byte
	binary.BigEndian.PutUint32(n[:], uint32(len(b)))
	h.Write(n[:])
	h.Write(b)
}

// eventsByID hashes the stored events (id, length, bytes) in id order.
func eventsByID(tx *bolt.Tx, h hash.Hash) error {
	type ref struct {
		id  record.EventID
		seq uint64
	}
	var refs []ref
	err := tx.Bucket(bIDs).ForEach(func(k, v []byte) error {
		if len(k) != 36 || len(v) != 8 {
			return damagef("the id index has a damaged entry")
		}
		refs = append(refs, ref{record.EventID(k[4:]), binary.BigEndian.Uint64(v)})
		return nil
	})
	if err != nil {
		return err
	}
	slices.SortFunc(refs, func(a, b ref) int { return bytes.Compare(a.id[:], b.id[:]) })
	var n [4]byte
	for _, r := range refs {
		_, raw, err := logEntry(tx, r.seq, r.id)
		if err != nil {
			return err
		}
		h.Write(r.id[:])
		binary.BigEndian.PutUint32(n[:], uint32(len(raw)))
		h.Write(n[:])
		h.Write(raw)
	}
	return nil
}

// EventSetHash is SHA-256 over the events (id and bytes, in id order): it
// depends only on the set of events, so two stores that merged the same
// files in any order hash the same.
func (s *Store) EventSetHash() ([32]byte, error) {
	var sum [32]byte
	err := s.view(func(tx *bolt.Tx) error {
		h := sha256.New()
		err := eventsByID(tx, h)
		copy(sum[:], h.Sum(nil))
		return err
	})
	return sum, err
}

// SharedHash is SHA-256 over everything that two stores which imported
// the same bundles must agree on, whatever the order: the events, every
// index but the local insertion numbers they point with, the site cache,
// the drafts, and of the meta keys only the sequence records that
// imports write ("xfer/seen/", "xfer/b/"). Device id, creation time,
// clock, counts and the exporter's own records are local.
func (s *Store) SharedHash() ([32]byte, error) {
	var sum [32]byte
	err := s.view(func(tx *bolt.Tx) error {
		h := sha256.New()
		if err := eventsByID(tx, h); err != nil {
			return err
		}
		for _, name := range [][]byte{bEnt, bKinds, bConflicts, bSites, bMeta, bDrafts} {
			putLen(h, name)
			err := tx.Bucket(name).ForEach(func(k, v []byte) error {
				switch {
				case bytes.Equal(name, bMeta):
					if !bytes.HasPrefix(k, []byte(MetaTransferPrefix+"seen/")) && !bytes.HasPrefix(k, []byte(MetaTransferPrefix+"b/")) {
						return nil
					}
				case bytes.Equal(name, bEnt) && len(k) > 16 && k[16] == tagHistory && len(v) == 9:
					v = v[8:] // the head flag, without the local insertion number
				}
				putLen(h, k)
				putLen(h, v)
				return nil
			})
			if err != nil {
				return err
			}
		}
		copy(sum[:], h.Sum(nil))
		return nil
	})
	return sum, err
}
