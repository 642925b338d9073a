package data

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values; checks compare against
// brute force, round trips or the records' own rules.

import (
	"bytes"
	"math/rand/v2"
	"testing"
	"time"
)

var (
	devA = DeviceID{0xa1, 1}
	devB = DeviceID{0xb2, 2}
	// t0 is an arbitrary fixed instant for stamps in tests.
	t0 = time.Date(2026, 3, 2, 8, 0, 0, 0, time.UTC)
)

func ent(b byte) EntityID { return EntityID{0x01, 0x90, b, 0, 0, 0, 0x70, 0, 0x80, b} }

func siteEv(e EntityID, dev DeviceID, wallMs int64, name string, lat, lon float64, sup ...EventID) Event {
	return Event{Version: FormatVersion, Entity: e, Kind: KindSite, Device: dev, Clock: HLC{WallMs: wallMs},
		Supersedes: sup, Site: &SiteRecord{Name: name, Kind: SiteYard, Lat: lat, Lon: lon}}
}

func pullEv(e, bale EntityID, dev DeviceID, wallMs int64, kg map[string]float64) Event {
	return Event{Version: FormatVersion, Entity: e, Kind: KindPull, Device: dev, Clock: HLC{WallMs: wallMs},
		Pull: &PullRecord{Bale: bale, Label: "P1", Kg: kg}}
}

func baleEv(e, site EntityID, dev DeviceID, wallMs int64, kg float64) Event {
	return Event{Version: FormatVersion, Entity: e, Kind: KindBale, Device: dev, Clock: HLC{WallMs: wallMs},
		Bale: &BaleRecord{Site: site, ReceivedMs: wallMs, GrossKg: kg, LengthM: 1.22, WidthM: 0.76, HeightM: 1.52}}
}

func mustEncode(t testing.TB, e Event) []byte {
	t.Helper()
	b, err := EncodeEvent(e)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func stamped(t testing.TB, e Event) Stamped {
	raw := mustEncode(t, e)
	return Stamped{ID: IDOf(raw), Event: e}
}

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

func headIDs(st *EntityState) [][]byte {
	var out [][]byte
	for _, h := range st.Heads {
		out = append(out, bytes.Clone(h.ID[:]))
	}
	return out
}

func shuffled[T any](r *rand.Rand, xs []T) []T {
	out := append([]T(nil), xs...)
	r.Shuffle(len(out), func(i, j int) { out[i], out[j] = out[j], out[i] })
	return out
}
