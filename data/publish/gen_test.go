package publish

// Source: invented test inputs (a generated scenario of our own); sizes and
// counts are test parameters, not check values from outside.

import (
	"fmt"
	"math/rand/v2"
	"testing"
	"time"

	"baleassay/data/publish/pgtest"
	"baleassay/data/record"
	"baleassay/data/store"
)

// bigScenario makes n events of a national programme of our own
// invention: sites spread over a country-sized box (42–51° N, 5° W–8° E),
// one site event in about 500, a bale in 8 and its pulls (5–9 of them,
// eight weighed categories each), received over two years in time order,
// with 1 % of bales corrected later, a few of them concurrently on two
// devices (conflicts), and 0.2 % of pulls deleted. Deterministic for a
// given n. A generator for big scenarios shared by the whole project is to
// come; this one serves the publish benchmark until then.
func bigScenario(tb testing.TB, n int) [][]byte {
	tb.Helper()
	r := rand.New(rand.NewPCG(2026, uint64(n)))
	ids := rand.NewChaCha8([32]byte{1, 3})
	devices := make([]record.DeviceID, 40)
	for i := range devices {
		devices[i] = record.DeviceID{0xb0, byte(i)}
	}
	start := time.Date(2025, 1, 6, 7, 0, 0, 0, time.UTC)
	span := 2 * 365 * 24 * time.Hour
	out := make([][]byte, 0, n+16)
	add := func(e record.Event) record.EventID {
		e.Version = record.FormatVersion
		raw, err := record.EncodeEvent(e)
		if err != nil {
			tb.Fatal(err)
		}
		out = append(out, raw)
		return record.IDOf(raw)
	}
	type baleRef struct {
		id   record.EntityID
		head record.EventID
		rec  record.BaleRecord
	}
	var sites []record.EntityID
	var recent []baleRef
	keys := []string{"pet_clear", "pet_tinted", "pet_green", "hdpe", "pp", "closures", "labels", "fines"}
	share := []float64{0.66, 0.08, 0.05, 0.02, 0.02, 0.04, 0.02, 0.01}
	for i := 0; len(out) < n; i++ {
		at := start.Add(time.Duration(float64(span) * float64(len(out)) / float64(n)))
		ms := at.UnixMilli()
		dev := devices[r.IntN(len(devices))]
		ent := func() record.EntityID {
			id, err := record.EntityIDAt(ms, ids)
			if err != nil {
				tb.Fatal(err)
			}
			return id
		}
		if len(sites) == 0 || r.IntN(62) == 0 {
			id := ent()
			add(record.Event{Entity: id, Kind: record.KindSite, Device: dev, Clock: record.HLC{WallMs: ms},
				Site: &record.SiteRecord{Name: fmt.Sprintf("Site %05d", len(sites)), Kind: record.SiteKind(1 + r.IntN(4)),
					Lat: 42 + 9*r.Float64(), Lon: -5 + 13*r.Float64()}})
			sites = append(sites, id)
			continue
		}
		if len(recent) > 0 && r.IntN(100) == 0 { // a correction, sometimes on two devices at once
			b := recent[r.IntN(len(recent))]
			fix := b.rec
			fix.GrossKg += 5
			add(record.Event{Entity: b.id, Kind: record.KindBale, Device: dev, Clock: record.HLC{WallMs: ms},
				Supersedes: []record.EventID{b.head}, Bale: &fix})
			if r.IntN(10) == 0 {
				other := b.rec
				other.Tag += "-B"
				add(record.Event{Entity: b.id, Kind: record.KindBale, Device: devices[(r.IntN(len(devices)-1)+1)%len(devices)],
					Clock: record.HLC{WallMs: ms, Logical: 1}, Supersedes: []record.EventID{b.head}, Bale: &other})
			}
			continue
		}
		bale := ent()
		rec := record.BaleRecord{Site: sites[r.IntN(len(sites))], ReceivedMs: ms, GrossKg: float64(400 + r.IntN(300)),
			LengthM: 1.2, WidthM: 0.76, HeightM: 1.5, Tag: fmt.Sprintf("NP-%07d", i), Grader: "grader", Spec: "glycol-feed"}
		head := add(record.Event{Entity: bale, Kind: record.KindBale, Device: dev, Clock: record.HLC{WallMs: ms}, Bale: &rec})
		recent = append(recent, baleRef{bale, head, rec})
		if len(recent) > 200 {
			recent = recent[1:]
		}
		dirt := r.Float64()
		for p, np := 0, 5+r.IntN(5); p < np; p++ {
			kg := make(map[string]float64, len(keys))
			for k, key := range keys {
				f := share[k] * (0.5 + r.Float64())
				if k > 2 {
					f *= 1 + 3*dirt
				}
				kg[key] = float64(int(f*2500)) / 100
			}
			pull := record.PullRecord{Bale: bale, Label: fmt.Sprintf("P%d", p+1), TakenMs: ms + int64(p)*60_000, Kg: kg}
			pid := ent()
			ph := add(record.Event{Entity: pid, Kind: record.KindPull, Device: dev, Clock: record.HLC{WallMs: ms, Logical: uint32(p + 1)}, Pull: &pull})
			if r.IntN(500) == 0 {
				add(record.Event{Entity: pid, Kind: record.KindPull, Device: dev, Clock: record.HLC{WallMs: ms + 3_600_000},
					Supersedes: []record.EventID{ph}, Deleted: true})
			}
		}
	}
	return out
}

// storeOf writes events into a new store in time order, in parts of
// 50,000 as imports would.
func storeOf(tb testing.TB, raws [][]byte) *store.Store {
	tb.Helper()
	s, err := store.Open(tb.TempDir())
	if err != nil {
		tb.Fatal(err)
	}
	tb.Cleanup(func() { s.Close() })
	for i := 0; i < len(raws); i += 50_000 {
		if _, err := s.ApplyRaw(raws[i:min(i+50_000, len(raws))], nil); err != nil {
			tb.Fatal(err)
		}
	}
	return s
}

// The generated scenario is valid (the store takes it) and publishes to
// the same state as the store holds.
func TestBigScenarioPublishes(t *testing.T) {
	conn := pgtest.Conn(t)
	s := storeOf(t, bigScenario(t, 20_000))
	o := testOptions()
	o.Batch = 3000
	rep := mustPublish(t, conn, s, o)
	if rep.New < 20_000 || rep.Batches < 7 {
		t.Fatalf("%+v", rep)
	}
	checkMatchesStore(t, conn, s)
}
