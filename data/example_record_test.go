package data_test

import (
	"fmt"

	"baleassay/data"
)

func ExampleEncodeEvent() {
	e := data.Event{
		Version: data.FormatVersion,
		Entity:  data.EntityID{0x01, 0x93, 0, 0, 0, 0, 0x70, 0, 0x80},
		Kind:    data.KindSite,
		Device:  data.DeviceID{1},
		Clock:   data.HLC{WallMs: 1764547200000},
		Site:    &data.SiteRecord{Name: "Orrin Bridge Yard", Kind: data.SiteYard, Lat: 45.112, Lon: 4.688},
	}
	raw, _ := data.EncodeEvent(e)
	back, _ := data.DecodeEvent(raw)
	fmt.Println(len(raw), "bytes; id", data.IDOf(raw).Short())
	fmt.Println(back.Site.Name, back.Clock)
	// Output:
	// 96 bytes; id 14fc7d083fcd
	// Orrin Bridge Yard 2025-12-01T00:00:00.000Z+0
}

func ExampleFold() {
	ent := data.EntityID{0x01, 0x93, 0, 0, 0, 0, 0x70, 0, 0x80, 7}
	mk := func(dev byte, ms int64, name string, sup ...data.EventID) data.Stamped {
		e := data.Event{Version: 1, Entity: ent, Kind: data.KindSite, Device: data.DeviceID{dev}, Clock: data.HLC{WallMs: ms},
			Supersedes: sup, Site: &data.SiteRecord{Name: name, Lat: 45, Lon: 4.7}}
		raw, _ := data.EncodeEvent(e)
		return data.Stamped{ID: data.IDOf(raw), Event: e}
	}
	base := mk(1, 1000, "Stenhope Depot")
	a := mk(1, 2000, "Stenhope Depot, north gate", base.ID)
	b := mk(2, 2100, "Stenhope Deposit Depot", base.ID)
	st := data.Fold([]data.Stamped{b, base, a})[ent]
	fmt.Println("conflicted:", st.Conflicted(), "heads:", len(st.Heads))
	fix := mk(2, 3000, "Stenhope Depot, north gate", a.ID, b.ID)
	st = data.Fold([]data.Stamped{base, a, b, fix})[ent]
	cur, _ := st.Current()
	fmt.Println("conflicted:", st.Conflicted(), "value:", cur.Site.Name, "events kept:", st.Events)
	// Output:
	// conflicted: true heads: 2
	// conflicted: false value: Stenhope Depot, north gate events kept: 4
}
