package geo_test

import (
	"baleassay/data/geo"
	"baleassay/data/record"
	"fmt"
)

func ExampleHaversineKm() {
	// Nashville BNA to Los Angeles LAX on the IUGG mean sphere.
	// Source: Rosetta Code, "Haversine formula" task: 2887.2599506 km at
	// R = 6372.8 km, which is 2886.45 km rescaled to R = 6371.0088 km.
	fmt.Printf("%.1f km\n", geo.HaversineKm(36.12, -86.67, 33.94, -118.40))
	// Output: 2886.4 km
}

func ExampleSiteIndex_Nearest() {
	ix := geo.NewSiteIndex([]geo.IndexedSite{
		{ID: record.EntityID{1}, Name: "Dateline East", Lat: -16.5, Lon: 179.9},
		{ID: record.EntityID{2}, Name: "Dateline West", Lat: -16.5, Lon: -179.9},
		{ID: record.EntityID{3}, Name: "Far Away", Lat: 40, Lon: 0},
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
