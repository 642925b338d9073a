package transfer

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values; checks compare against
// brute force, round trips or the records' own rules.

import (
	"baleassay/data/store"
	"crypto/sha256"
	"testing"
	"time"
)

func xferStore(t testing.TB, dir string, now time.Time) *store.Store {
	t.Helper()
	s, _, err := OpenStore(dir, store.Options{Now: func() time.Time { return now }})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

// xMergeHash hashes everything in a store that must not depend on import
// order: all buckets except the local insertion numbers ("seq") and the
// meta keys that are local by design (device id, creation time, clock,
// and the exporter's own "xfer/out/" and "xfer/dest/" records).
func xMergeHash(t testing.TB, s *store.Store) [32]byte {
	t.Helper()
	h, err := s.SharedHash()
	if err != nil {
		t.Fatal(err)
	}
	// The stored authorship proofs are a function of the bundles
	// imported as well.
	sum := sha256.New()
	sum.Write(h[:])
	n := 0
	err = s.ForEachMeta(metaProof, func(k string, v []byte) error {
		n++
		sum.Write([]byte(k))
		sum.Write(v)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	var out [32]byte
	copy(out[:], sum.Sum(nil))
	return out
}

func xContentHash(t testing.TB, s *store.Store) [32]byte {
	t.Helper()
	h, err := s.ContentHash()
	if err != nil {
		t.Fatal(err)
	}
	return h
}
