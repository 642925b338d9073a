package data_test

import (
	"errors"
	"fmt"
	"os"

	"baleassay/data"
)

func ExampleHaversineKm() {
	// Nashville BNA to Los Angeles LAX on the IUGG mean sphere.
	// Source: Rosetta Code, "Haversine formula" task: 2887.2599506 km at
	// R = 6372.8 km, which is 2886.45 km rescaled to R = 6371.0088 km.
	fmt.Printf("%.1f km\n", data.HaversineKm(36.12, -86.67, 33.94, -118.40))
	// Output: 2886.4 km
}

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

func ExampleSiteIndex_Nearest() {
	ix := data.NewSiteIndex([]data.IndexedSite{
		{ID: data.EntityID{1}, Name: "Dateline East", Lat: -16.5, Lon: 179.9},
		{ID: data.EntityID{2}, Name: "Dateline West", Lat: -16.5, Lon: -179.9},
		{ID: data.EntityID{3}, Name: "Far Away", Lat: 40, Lon: 0},
	})
	// Source: hand computation, Δλ·cos φ·R along the parallel:
	// 0.05° and 0.15° at 16.5° S give 5.33 and 15.99 km.
	hits, _ := ix.Nearest(-16.5, -179.95, 2)
	for _, h := range hits {
		fmt.Printf("%s %.2f km\n", h.Name, h.Km)
	}
	// Output:
	// Dateline West 5.33 km
	// Dateline East 15.99 km
}

func ExampleStore_Save() {
	dir, _ := os.MkdirTemp("", "baleassay-example")
	defer os.RemoveAll(dir)
	s, err := data.Open(dir)
	if err != nil {
		fmt.Println(err)
		return
	}
	defer s.Close()
	_, err = s.Save([]data.Event{{Kind: data.KindSite, Site: &data.SiteRecord{Name: "Kettleby Yard", Lat: 45.067, Lon: 4.402}}}, data.SaveOptions{})
	fmt.Println("saved:", err == nil)
	_, err = s.Save([]data.Event{{Kind: data.KindSite, Site: &data.SiteRecord{Name: "Bad", Lat: 95, Lon: 0}}}, data.SaveOptions{})
	var fe *data.FieldError
	fmt.Println(errors.As(err, &fe), fe, errors.Is(err, data.ErrLatitude))
	hits, _ := s.SiteIndex().Within(45.0, 4.4, 10)
	fmt.Printf("%s %.1f km\n", hits[0].Name, hits[0].Km)
	// Output:
	// saved: true
	// true site.lat = 95: latitude outside -90..90 degrees true
	// Kettleby Yard 7.5 km
}
