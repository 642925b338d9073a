package data

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values; checks compare against
// brute force, round trips or the records' own rules.

import (
	"bytes"
	"crypto/sha256"
	"encoding/binary"
	"math/rand/v2"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"
)

// xferNow is the wall clock of transfer tests: 2026-03-02 08:00 UTC,
// an invented working day.
var xferNow = time.Date(2026, 3, 2, 8, 0, 0, 0, time.UTC)

func xferStore(t testing.TB, dir string, now time.Time) *Store {
	t.Helper()
	s, err := OpenWith(dir, Options{Now: func() time.Time { return now }})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

// xMaker builds valid events of one invented device with reproducible
// ids and clock stamps.
type xMaker struct {
	dev  DeviceID
	rng  *rand.Rand
	wall int64
}

func newXMaker(devByte byte, seed uint64) *xMaker {
	var d DeviceID
	for i := range d {
		d[i] = devByte ^ byte(i*17)
	}
	return &xMaker{dev: d, rng: rand.New(rand.NewPCG(seed, uint64(devByte))), wall: xferNow.Add(-48 * time.Hour).UnixMilli()}
}

func (m *xMaker) entity() EntityID {
	var b [10]byte
	for i := range b {
		b[i] = byte(m.rng.Uint32())
	}
	id, err := EntityIDAt(m.wall, bytes.NewReader(b[:]))
	if err != nil {
		panic(err)
	}
	return id
}

func (m *xMaker) stamp() HLC {
	m.wall += 1000 + int64(m.rng.IntN(60000))
	return HLC{WallMs: m.wall}
}

// site returns an event for a site (new when sup is empty).
func (m *xMaker) site(ent EntityID, name string, lat, lon float64, sup ...EventID) Event {
	return Event{Version: FormatVersion, Entity: ent, Kind: KindSite, Device: m.dev, Clock: m.stamp(), Supersedes: sup,
		Site: &SiteRecord{Name: name, Kind: SiteYard, Lat: lat, Lon: lon}}
}

func (m *xMaker) bale(ent, site EntityID, kg float64, sup ...EventID) Event {
	return Event{Version: FormatVersion, Entity: ent, Kind: KindBale, Device: m.dev, Clock: m.stamp(), Supersedes: sup,
		Bale: &BaleRecord{Site: site, ReceivedMs: m.wall - 3600_000, GrossKg: kg, LengthM: 1.2, WidthM: 0.76, HeightM: 1.52, Tag: "T-104"}}
}

func (m *xMaker) pull(ent, bale EntityID, label string, petKg float64, sup ...EventID) Event {
	return Event{Version: FormatVersion, Entity: ent, Kind: KindPull, Device: m.dev, Clock: m.stamp(), Supersedes: sup,
		Pull: &PullRecord{Bale: bale, Label: label, Kg: map[string]float64{"pet_clear": petKg}}}
}

func (m *xMaker) tombstone(ent EntityID, kind Kind, sup ...EventID) Event {
	return Event{Version: FormatVersion, Entity: ent, Kind: kind, Device: m.dev, Clock: m.stamp(), Supersedes: sup, Deleted: true}
}

func xEnc(t testing.TB, e Event) []byte {
	t.Helper()
	b, err := EncodeEvent(e)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// xMergeHash hashes everything in a store that must not depend on import
// order: all buckets except the local insertion numbers ("seq") and the
// meta keys that are local by design (device id, creation time, clock,
// and the exporter's own "xfer/out/" and "xfer/dest/" records).
func xMergeHash(t testing.TB, s *Store) [32]byte {
	t.Helper()
	h := sha256.New()
	err := s.db.View(func(tx *bolt.Tx) error {
		return tx.ForEach(func(name []byte, b *bolt.Bucket) error {
			if string(name) == "seq" {
				return nil
			}
			h.Write(name)
			return b.ForEach(func(k, v []byte) error {
				if string(name) == "meta" && !bytes.HasPrefix(k, []byte("xfer/seen/")) && !bytes.HasPrefix(k, []byte("xfer/b/")) {
					return nil
				}
				var n [8]byte
				binary.BigEndian.PutUint32(n[:4], uint32(len(k)))
				binary.BigEndian.PutUint32(n[4:], uint32(len(v)))
				h.Write(n[:])
				h.Write(k)
				h.Write(v)
				return nil
			})
		})
	})
	if err != nil {
		t.Fatal(err)
	}
	var out [32]byte
	copy(out[:], h.Sum(nil))
	return out
}

func xContentHash(t testing.TB, s *Store) [32]byte {
	t.Helper()
	h, err := s.ContentHash()
	if err != nil {
		t.Fatal(err)
	}
	return h
}
