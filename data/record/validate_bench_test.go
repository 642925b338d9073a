package record_test

import (
	"baleassay/data/record"
	"testing"
)

// BenchmarkValidatePull times the validation of one pull of eight
// categories with piece counts, as an import runs it on every pull, against
// the strict decode of the same event in the same run (the baseline: the
// import does both for every event). Source: invented pull masses.
func BenchmarkValidatePull(b *testing.B) {
	p := record.PullRecord{
		Bale:  record.EntityID{0x01, 0x90, 1, 0, 0, 0, 0x70, 0, 0x80, 1},
		Label: "P3",
		Kg: map[string]float64{"pet_clear": 18.2, "pet_tinted": 2.1, "pet_green": 0.9, "hdpe": 0.4,
			"pvc": 0.05, "closures": 0.8, "labels": 0.3, "fines": 0.2},
		Pieces: map[string]int64{"pvc": 3, "hdpe": 5},
	}
	ev := record.Event{Version: record.FormatVersion, Entity: record.EntityID{0x01, 0x90, 2, 0, 0, 0, 0x70, 0, 0x80, 2},
		Kind: record.KindPull, Device: record.DeviceID{7}, Clock: record.HLC{WallMs: 1_780_000_000_000}, Pull: &p}
	raw, err := record.EncodeEvent(ev)
	if err != nil {
		b.Fatal(err)
	}
	b.Run("validate-pull", func(b *testing.B) {
		for b.Loop() {
			if err := record.ValidatePullValues(p); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("decode-event", func(b *testing.B) {
		for b.Loop() {
			if _, err := record.DecodeEvent(raw); err != nil {
				b.Fatal(err)
			}
		}
	})
}
