package store

import (
	"baleassay/data/record"
	"errors"
	"testing"
)

func TestNewStoreTakesGivenDevice(t *testing.T) {
	dir := t.TempDir()
	dev := record.DeviceID{0xd0, 0x0d}
	s, err := OpenWith(dir, Options{Device: dev})
	if err != nil {
		t.Fatal(err)
	}
	if s.DeviceID() != dev {
		t.Fatalf("device %v, want %v", s.DeviceID(), dev)
	}
	s.Close()
	// An existing store keeps its id.
	s, err = OpenWith(dir, Options{Device: record.DeviceID{0xee}})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if s.DeviceID() != dev {
		t.Fatalf("reopened with device %v, want %v", s.DeviceID(), dev)
	}
}

func TestForEachMetaAndExclusive(t *testing.T) {
	s, err := Open(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	if _, err := s.ApplyRaw(nil, map[string][]byte{"xfer/p/b": {2}, "xfer/p/a": {1}, "xfer/q": {3}}); err != nil {
		t.Fatal(err)
	}
	var keys []string
	if err := s.ForEachMeta("xfer/p/", func(k string, v []byte) error { keys = append(keys, k); return nil }); err != nil {
		t.Fatal(err)
	}
	if len(keys) != 2 || keys[0] != "xfer/p/a" || keys[1] != "xfer/p/b" {
		t.Fatalf("keys %v", keys)
	}
	ran := false
	if err := s.Exclusive(func() error { ran = true; return nil }); err != nil || !ran {
		t.Fatalf("Exclusive: %v, ran %v", err, ran)
	}
	s.Close()
	if err := s.Exclusive(func() error { return nil }); !errors.Is(err, ErrClosed) {
		t.Fatalf("Exclusive on a closed store: %v", err)
	}
}
