package data

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values; checks compare against
// brute force, round trips or the records' own rules.

import (
	"testing"
	"time"
)

func openTemp(t testing.TB) *Store {
	t.Helper()
	s, err := OpenWith(t.TempDir(), Options{Now: func() time.Time { return t0.Add(24 * time.Hour) }})
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
