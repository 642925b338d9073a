package store_test

// Source: invented test inputs (a site of our own); the printed output is
// the store's own answer.

import (
	"baleassay/data/record"
	"baleassay/data/store"
	"errors"
	"fmt"
	"os"
)

func ExampleStore_Save() {
	dir, _ := os.MkdirTemp("", "baleassay-example")
	defer os.RemoveAll(dir)
	s, err := store.Open(dir)
	if err != nil {
		fmt.Println(err)
		return
	}
	defer s.Close()
	_, err = s.Save([]record.Event{{Kind: record.KindSite, Site: &record.SiteRecord{Name: "Kettleby Yard", Lat: 45.067, Lon: 4.402}}}, store.SaveOptions{})
	fmt.Println("saved:", err == nil)
	_, err = s.Save([]record.Event{{Kind: record.KindSite, Site: &record.SiteRecord{Name: "Bad", Lat: 95, Lon: 0}}}, store.SaveOptions{})
	var fe *record.FieldError
	fmt.Println(errors.As(err, &fe), fe, errors.Is(err, record.ErrLatitude))
	hits, _ := s.SiteIndex().Within(45.0, 4.4, 10)
	fmt.Printf("%s %.1f km\n", hits[0].Name, hits[0].Km)
	// Output:
	// saved: true
	// true site.lat = 95: latitude outside -90..90 degrees true
	// Kettleby Yard 7.5 km
}
