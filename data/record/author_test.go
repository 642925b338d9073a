package record_test

import (
	"testing"

	"baleassay/data/internal/testkit"
	"baleassay/data/record"

	"pgregory.net/rapid"
)

// Property: AuthorOf reads the author of every encodable event.
func TestAuthorOfProperty(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		e := genEvent(t)
		e.Clock.WallMs = rapid.Int64().Draw(t, "wall")               // negative stamps too
		e.Kind = record.Kind(rapid.IntRange(0, 255).Draw(t, "kind")) // kinds above 23 take a two-byte head
		raw, err := record.EncodeEvent(e)
		if err != nil {
			t.Fatal(err)
		}
		dev, ok := record.AuthorOf(raw)
		if !ok || dev != e.Device {
			t.Fatalf("AuthorOf = %v, %v; want %v", dev, ok, e.Device)
		}
		if h, ok := record.ClockOf(raw); !ok || h != e.Clock {
			t.Fatalf("ClockOf = %v, %v; want %v", h, ok, e.Clock)
		}
	})
}

// FuzzAuthorOf: whatever DecodeEvent accepts, AuthorOf reads, with the
// same author; so bytes AuthorOf cannot read are refused by DecodeEvent
// too, and the transfer layer may refuse them at once.
func FuzzAuthorOf(f *testing.F) {
	f.Add(testkit.MustEncode(f, testkit.SiteEv(testkit.Ent(1), testkit.DevA, 1000, "A", 1, 2)))
	f.Add(testkit.MustEncode(f, testkit.PullEv(testkit.Ent(2), testkit.Ent(3), testkit.DevB, 5, map[string]float64{"pet_clear": 1})))
	f.Add([]byte{0xa5, 0x00, 0x01})
	f.Fuzz(func(t *testing.T, raw []byte) {
		dev, ok := record.AuthorOf(raw)
		e, err := record.DecodeEvent(raw)
		if err != nil {
			return
		}
		if !ok || dev != e.Device {
			t.Fatalf("DecodeEvent accepted an event by %v, AuthorOf says %v, %v", e.Device, dev, ok)
		}
		if h, ok := record.ClockOf(raw); !ok || h != e.Clock {
			t.Fatalf("DecodeEvent accepted an event stamped %v, ClockOf says %v, %v", e.Clock, h, ok)
		}
	})
}
