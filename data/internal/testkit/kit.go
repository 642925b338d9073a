package testkit

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values; checks compare against
// brute force, round trips or the records' own rules.

import (
	"baleassay/data/record"
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"
)

var (
	DevA = record.DeviceID{0xa1, 1}
	DevB = record.DeviceID{0xb2, 2}
	// t0 is an arbitrary fixed instant for stamps in tests.
	T0 = time.Date(2026, 3, 2, 8, 0, 0, 0, time.UTC)
)

// stamp turns the small clock values tests like to write (1000, 2100)
// into times after T0, so that events stay inside the records' time range
// (2000–2100): a wallMs below 10⁹ (before 1970-01-12) counts in
// milliseconds from T0; larger values are taken as they are.
func stamp(wallMs int64) int64 {
	if wallMs >= 0 && wallMs < 1e9 {
		return T0.UnixMilli() + wallMs
	}
	return wallMs
}

func Ent(b byte) record.EntityID { return record.EntityID{0x01, 0x90, b, 0, 0, 0, 0x70, 0, 0x80, b} }

func SiteEv(e record.EntityID, dev record.DeviceID, wallMs int64, name string, lat, lon float64, sup ...record.EventID) record.Event {
	return record.Event{Version: record.FormatVersion, Entity: e, Kind: record.KindSite, Device: dev, Clock: record.HLC{WallMs: stamp(wallMs)},
		Supersedes: sup, Site: &record.SiteRecord{Name: name, Kind: record.SiteYard, Lat: lat, Lon: lon}}
}

func PullEv(e, bale record.EntityID, dev record.DeviceID, wallMs int64, kg map[string]float64) record.Event {
	return record.Event{Version: record.FormatVersion, Entity: e, Kind: record.KindPull, Device: dev, Clock: record.HLC{WallMs: stamp(wallMs)},
		Pull: &record.PullRecord{Bale: bale, Label: "P1", Kg: kg}}
}

func BaleEv(e, site record.EntityID, dev record.DeviceID, wallMs int64, kg float64) record.Event {
	return record.Event{Version: record.FormatVersion, Entity: e, Kind: record.KindBale, Device: dev, Clock: record.HLC{WallMs: stamp(wallMs)},
		Bale: &record.BaleRecord{Site: site, ReceivedMs: stamp(wallMs), GrossKg: kg, LengthM: 1.22, WidthM: 0.76, HeightM: 1.52}}
}

func MustEncode(t testing.TB, e record.Event) []byte {
	t.Helper()
	b, err := record.EncodeEvent(e)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func StampedOf(t testing.TB, e record.Event) record.Stamped {
	raw := MustEncode(t, e)
	return record.Stamped{ID: record.IDOf(raw), Event: e}
}

func HeadIDs(st *record.EntityState) [][]byte {
	var out [][]byte
	for _, h := range st.Heads {
		out = append(out, bytes.Clone(h.ID[:]))
	}
	return out
}

func Shuffled[T any](r *rand.Rand, xs []T) []T {
	out := append([]T(nil), xs...)
	r.Shuffle(len(out), func(i, j int) { out[i], out[j] = out[j], out[i] })
	return out
}

// xferNow is the wall clock of transfer tests: 2026-03-02 08:00 UTC,
// an invented working day.
var XferNow = time.Date(2026, 3, 2, 8, 0, 0, 0, time.UTC)

// xMaker builds valid events of one invented device with reproducible
// ids and clock stamps.
type Maker struct {
	Dev  record.DeviceID
	rng  *rand.Rand
	Wall int64
}

func NewMaker(devByte byte, seed uint64) *Maker {
	var d record.DeviceID
	for i := range d {
		d[i] = devByte ^ byte(i*17)
	}
	return &Maker{Dev: d, rng: rand.New(rand.NewPCG(seed, uint64(devByte))), Wall: XferNow.Add(-48 * time.Hour).UnixMilli()}
}

func (m *Maker) Entity() record.EntityID {
	var b [10]byte
	for i := range b {
		b[i] = byte(m.rng.Uint32())
	}
	id, err := record.EntityIDAt(m.Wall, bytes.NewReader(b[:]))
	if err != nil {
		panic(err)
	}
	return id
}

func (m *Maker) Stamp() record.HLC {
	m.Wall += 1000 + int64(m.rng.IntN(60000))
	return record.HLC{WallMs: m.Wall}
}

// site returns an event for a site (new when sup is empty).
func (m *Maker) Site(ent record.EntityID, name string, lat, lon float64, sup ...record.EventID) record.Event {
	return record.Event{Version: record.FormatVersion, Entity: ent, Kind: record.KindSite, Device: m.Dev, Clock: m.Stamp(), Supersedes: sup,
		Site: &record.SiteRecord{Name: name, Kind: record.SiteYard, Lat: lat, Lon: lon}}
}

func (m *Maker) Bale(ent, site record.EntityID, kg float64, sup ...record.EventID) record.Event {
	return record.Event{Version: record.FormatVersion, Entity: ent, Kind: record.KindBale, Device: m.Dev, Clock: m.Stamp(), Supersedes: sup,
		Bale: &record.BaleRecord{Site: site, ReceivedMs: m.Wall - 3600_000, GrossKg: kg, LengthM: 1.2, WidthM: 0.76, HeightM: 1.52, Tag: "T-104"}}
}

func (m *Maker) Pull(ent, bale record.EntityID, label string, petKg float64, sup ...record.EventID) record.Event {
	return record.Event{Version: record.FormatVersion, Entity: ent, Kind: record.KindPull, Device: m.Dev, Clock: m.Stamp(), Supersedes: sup,
		Pull: &record.PullRecord{Bale: bale, Label: label, Kg: map[string]float64{"pet_clear": petKg}}}
}

func (m *Maker) Tombstone(ent record.EntityID, kind record.Kind, sup ...record.EventID) record.Event {
	return record.Event{Version: record.FormatVersion, Entity: ent, Kind: kind, Device: m.Dev, Clock: m.Stamp(), Supersedes: sup, Deleted: true}
}

func Enc(t testing.TB, e record.Event) []byte {
	t.Helper()
	b, err := record.EncodeEvent(e)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// xBenchRaws returns n valid events of invented grading weeks: one site
// in 500 events, one bale in 8, the rest pulls weighed in six
// categories (a yard grades several bales a day and takes pulls from
// each).
func BenchRaws(tb testing.TB, n int, seed uint64) ([][]byte, []record.Event) {
	return BenchRawsFrom(tb, n, seed, XferNow.AddDate(-1, 0, 0).UnixMilli()) // 100,000 stamps span about 35 days: all in the past
}

// xBenchRawsFrom is xBenchRaws with the first clock stamp (and so the
// UUIDv7 entity ids) starting at wallMs.
func BenchRawsFrom(tb testing.TB, n int, seed uint64, wallMs int64) ([][]byte, []record.Event) {
	return BenchRawsBy(tb, n, seed, wallMs, record.DeviceID{})
}

// BenchRawsBy is BenchRawsFrom with the events' author set to dev (the
// invented device 0x42's id when dev is zero).
func BenchRawsBy(tb testing.TB, n int, seed uint64, wallMs int64, dev record.DeviceID) ([][]byte, []record.Event) {
	m := NewMaker(0x42, seed)
	m.Wall = wallMs
	if dev != (record.DeviceID{}) {
		m.Dev = dev
	}
	raws := make([][]byte, 0, n)
	evs := make([]record.Event, 0, n)
	var site, bale record.EntityID
	for i := range n {
		var e record.Event
		switch {
		case i%500 == 0:
			site = m.Entity()
			e = m.Site(site, fmt.Sprintf("Invented yard %d", i), 50+float64(i%900)/100, 3+float64(i%700)/100)
		case i%8 == 1:
			bale = m.Entity()
			e = m.Bale(bale, site, 480+float64(i%120))
		default:
			e = m.Pull(m.Entity(), bale, fmt.Sprintf("P%d", i%7), 9.5)
			for j, k := range []string{"pet_tinted", "hdpe", "pp", "labels", "paper"} {
				e.Pull.Kg[k] = 0.05 * float64(j+1)
			}
		}
		raws = append(raws, Enc(tb, e))
		evs = append(evs, e)
	}
	return raws, evs
}

func RawBytes(raws [][]byte) int64 {
	var n int64
	for _, r := range raws {
		n += int64(len(r))
	}
	return n
}

// randLat draws a latitude uniform on the sphere: φ = asin(2u − 1).
func RandLat(r *rand.Rand) float64 { return math.Asin(2*r.Float64()-1) * 180 / math.Pi }
