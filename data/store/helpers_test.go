package store

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values; checks compare against
// brute force, round trips or the records' own rules.

import (
	"baleassay/data/internal/testkit"
	"testing"
	"time"
)

func openTemp(t testing.TB) *Store {
	t.Helper()
	s, err := OpenWith(t.TempDir(), Options{Now: func() time.Time { return testkit.T0.Add(24 * time.Hour) }})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

func mustHash(t testing.TB, s *Store) [32]byte {
	t.Helper()
	h, err := s.ContentHash()
	if err != nil {
		t.Fatal(err)
	}
	return h
}

func xferStore(t testing.TB, dir string, now time.Time) *Store {
	t.Helper()
	s, err := OpenWith(dir, Options{Now: func() time.Time { return now }})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

func sharedHash(t testing.TB, s *Store) [32]byte {
	t.Helper()
	h, err := s.SharedHash()
	if err != nil {
		t.Fatal(err)
	}
	return h
}
