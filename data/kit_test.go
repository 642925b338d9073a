package data

// Source: the coordinates, masses and names in this file are invented test
// inputs (an invented scenario), not check values; checks compare against
// brute force, round trips or the records' own rules.

import (
	"bytes"
	"fmt"
	"math"
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

// xferNow is the wall clock of transfer tests: 2026-03-02 08:00 UTC,
// an invented working day.
var xferNow = time.Date(2026, 3, 2, 8, 0, 0, 0, time.UTC)

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

// xBenchRaws returns n valid events of invented grading weeks: one site
// in 500 events, one bale in 8, the rest pulls weighed in six
// categories (a yard grades several bales a day and takes pulls from
// each).
func xBenchRaws(tb testing.TB, n int, seed uint64) ([][]byte, []Event) {
	return xBenchRawsFrom(tb, n, seed, xferNow.AddDate(-1, 0, 0).UnixMilli()) // 100,000 stamps span about 35 days: all in the past
}

// xBenchRawsFrom is xBenchRaws with the first clock stamp (and so the
// UUIDv7 entity ids) starting at wallMs.
func xBenchRawsFrom(tb testing.TB, n int, seed uint64, wallMs int64) ([][]byte, []Event) {
	m := newXMaker(0x42, seed)
	m.wall = wallMs
	raws := make([][]byte, 0, n)
	evs := make([]Event, 0, n)
	var site, bale EntityID
	for i := range n {
		var e Event
		switch {
		case i%500 == 0:
			site = m.entity()
			e = m.site(site, fmt.Sprintf("Invented yard %d", i), 50+float64(i%900)/100, 3+float64(i%700)/100)
		case i%8 == 1:
			bale = m.entity()
			e = m.bale(bale, site, 480+float64(i%120))
		default:
			e = m.pull(m.entity(), bale, fmt.Sprintf("P%d", i%7), 9.5)
			for j, k := range []string{"pet_tinted", "hdpe", "pp", "labels", "paper"} {
				e.Pull.Kg[k] = 0.05 * float64(j+1)
			}
		}
		raws = append(raws, xEnc(tb, e))
		evs = append(evs, e)
	}
	return raws, evs
}

func xRawBytes(raws [][]byte) int64 {
	var n int64
	for _, r := range raws {
		n += int64(len(r))
	}
	return n
}

// randLat draws a latitude uniform on the sphere: φ = asin(2u − 1).
func randLat(r *rand.Rand) float64 { return math.Asin(2*r.Float64()-1) * 180 / math.Pi }
