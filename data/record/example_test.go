package record_test

// Source: invented test inputs; the printed output is our own encoding of
// them (RFC 8949 core deterministic CBOR, SHA-256 event id).

import (
	"baleassay/data/record"
	"fmt"
)

func ExampleEncodeEvent() {
	e := record.Event{
		Version: record.FormatVersion,
		Entity:  record.EntityID{0x01, 0x93, 0, 0, 0, 0, 0x70, 0, 0x80},
		Kind:    record.KindSite,
		Device:  record.DeviceID{1},
		Clock:   record.HLC{WallMs: 1764547200000},
		Site:    &record.SiteRecord{Name: "Orrin Bridge Yard", Kind: record.SiteYard, Lat: 45.112, Lon: 4.688},
	}
	raw, _ := record.EncodeEvent(e)
	back, _ := record.DecodeEvent(raw)
	fmt.Println(len(raw), "bytes; id", record.IDOf(raw).Short())
	fmt.Println(back.Site.Name, back.Clock)
	// Output:
	// 96 bytes; id 14fc7d083fcd
	// Orrin Bridge Yard 2025-12-01T00:00:00.000Z+0
}

func ExampleFold() {
	ent := record.EntityID{0x01, 0x93, 0, 0, 0, 0, 0x70, 0, 0x80, 7}
	mk := func(dev byte, ms int64, name string, sup ...record.EventID) record.Stamped {
		e := record.Event{Version: 1, Entity: ent, Kind: record.KindSite, Device: record.DeviceID{dev}, Clock: record.HLC{WallMs: ms},
			Supersedes: sup, Site: &record.SiteRecord{Name: name, Lat: 45, Lon: 4.7}}
		raw, _ := record.EncodeEvent(e)
		return record.Stamped{ID: record.IDOf(raw), Event: e}
	}
	base := mk(1, 1000, "Stenhope Depot")
	a := mk(1, 2000, "Stenhope Depot, north gate", base.ID)
	b := mk(2, 2100, "Stenhope Deposit Depot", base.ID)
	st := record.Fold([]record.Stamped{b, base, a})[ent]
	fmt.Println("conflicted:", st.Conflicted(), "heads:", len(st.Heads))
	fix := mk(2, 3000, "Stenhope Depot, north gate", a.ID, b.ID)
	st = record.Fold([]record.Stamped{base, a, b, fix})[ent]
	cur, _ := st.Current()
	fmt.Println("conflicted:", st.Conflicted(), "value:", cur.Site.Name, "events kept:", st.Events)
	// Output:
	// conflicted: true heads: 2
	// conflicted: false value: Stenhope Depot, north gate events kept: 4
}
