package data_test

import (
	"errors"
	"fmt"
	"os"

	"baleassay/data"
)

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
