package desk

// Source: the rules checked are those of RFC 7946 (The GeoJSON Format,
// 2016): §3 object types, §3.1.1 position order (longitude, latitude),
// §3.1.6 right-hand rule for exterior rings, §3.1.9 antimeridian cutting,
// §4 no "crs" member; coordinates in WGS 84 degrees. Sites are the demo
// scenario and invented points; distances are checked with the haversine
// formula of package geo.

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"testing"

	"baleassay/data/geo"
)

// rfc7946 checks a decoded GeoJSON document against the rules above and
// returns its features.
func rfc7946(t *testing.T, raw []byte) []map[string]any {
	t.Helper()
	var doc map[string]any
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatal(err)
	}
	var noCRS func(v any, path string)
	noCRS = func(v any, path string) {
		switch v := v.(type) {
		case map[string]any:
			for k, x := range v {
				if k == "crs" {
					t.Errorf("%s has a crs member (RFC 7946 §4 removed it)", path)
				}
				noCRS(x, path+"."+k)
			}
		case []any:
			for i, x := range v {
				noCRS(x, fmt.Sprintf("%s[%d]", path, i))
			}
		}
	}
	noCRS(doc, "$")
	if doc["type"] != "FeatureCollection" {
		t.Fatalf("type %v", doc["type"])
	}
	fs, ok := doc["features"].([]any)
	if !ok {
		t.Fatal("no features array")
	}
	var out []map[string]any
	for i, f := range fs {
		fm := f.(map[string]any)
		if fm["type"] != "Feature" {
			t.Fatalf("feature %d: type %v", i, fm["type"])
		}
		if _, ok := fm["properties"].(map[string]any); !ok {
			t.Fatalf("feature %d: properties must be an object", i)
		}
		g := fm["geometry"].(map[string]any)
		switch g["type"] {
		case "Point":
			position(t, g["coordinates"])
		case "Polygon":
			polygon(t, g["coordinates"])
		case "MultiPolygon":
			for _, p := range g["coordinates"].([]any) {
				polygon(t, p)
			}
		default:
			t.Fatalf("feature %d: geometry %v", i, g["type"])
		}
		out = append(out, fm)
	}
	return out
}

// position checks [lon, lat] with lon in [−180, 180] and lat in [−90, 90].
func position(t *testing.T, v any) [2]float64 {
	t.Helper()
	a, ok := v.([]any)
	if !ok || len(a) != 2 {
		t.Fatalf("position %v: want [longitude, latitude]", v)
	}
	lon, lat := a[0].(float64), a[1].(float64)
	if lon < -180 || lon > 180 || lat < -90 || lat > 90 {
		t.Fatalf("position %v out of range", v)
	}
	return [2]float64{lon, lat}
}

// polygon checks each linear ring: closed, at least four positions,
// exterior counter-clockwise (positive shoelace area in lon, lat), holes
// clockwise.
func polygon(t *testing.T, v any) {
	t.Helper()
	for i, r := range v.([]any) {
		var ring [][2]float64
		for _, p := range r.([]any) {
			ring = append(ring, position(t, p))
		}
		if len(ring) < 4 || ring[0] != ring[len(ring)-1] {
			t.Fatalf("ring %d: %d positions, closed %v", i, len(ring), len(ring) > 0 && ring[0] == ring[len(ring)-1])
		}
		if a := shoelace(ring); (i == 0) != (a > 0) {
			t.Fatalf("ring %d: signed area %g: exterior rings run counter-clockwise, holes clockwise (RFC 7946 §3.1.6)", i, a)
		}
	}
}

func shoelace(ring [][2]float64) float64 {
	var a float64
	for i := 0; i+1 < len(ring); i++ {
		a += ring[i][0]*ring[i+1][1] - ring[i+1][0]*ring[i][1]
	}
	return a / 2
}

func TestExportGeoJSONSites(t *testing.T) {
	d := demoScenario(t)
	var buf bytes.Buffer
	n, err := d.ExportGeoJSON(&buf, GeoJSONOptions{})
	if err != nil {
		t.Fatal(err)
	}
	fs := rfc7946(t, buf.Bytes())
	sites, _ := d.Sites()
	if n != len(sites) || len(fs) != len(sites) {
		t.Fatalf("%d features (%d reported), %d sites", len(fs), n, len(sites))
	}
	byID := map[string]SiteRow{}
	for _, s := range sites {
		byID[s.ID.String()] = s
	}
	for _, f := range fs {
		s, ok := byID[f["id"].(string)]
		if !ok {
			t.Fatalf("feature id %v is no site", f["id"])
		}
		// Longitude first: the demo's sites lie near 45° N, 4.7° E, so a
		// swapped pair cannot pass.
		c := f["geometry"].(map[string]any)["coordinates"].([]any)
		if c[0].(float64) != s.Site.Lon || c[1].(float64) != s.Site.Lat {
			t.Errorf("%s: coordinates %v, want [%v, %v]", s.Site.Name, c, s.Site.Lon, s.Site.Lat)
		}
		p := f["properties"].(map[string]any)
		_, sum, err := d.SummarizeSite(s.ID.String(), DateRange{})
		if err != nil {
			t.Fatal(err)
		}
		rows, _ := d.Bales(BaleFilter{Site: s.ID.String()})
		latest := any(nil)
		for _, b := range rows {
			if b.Audit.State == AuditDone && b.Audit.HasVerdict {
				latest = b.Audit.Verdict.String()
			}
		}
		if p["name"] != s.Site.Name || p["kind"] != s.Site.Kind.String() || p["bale_count"] != float64(sum.Bales) ||
			p["latest_verdict"] != latest || math.Abs(p["mean_target_pet_share"].(float64)-sum.TargetPET.Mean) > 5e-7 {
			t.Errorf("%s: properties %v; want %d bales, latest %v, mean PET %v", s.Site.Name, p, sum.Bales, latest, sum.TargetPET.Mean)
		}
	}
}

// TestExportGeoJSONArea adds a region's circle: the polygon obeys the
// RFC, its vertices lie at the radius from the centre, and only the
// region's sites are written.
func TestExportGeoJSONArea(t *testing.T) {
	d := demoScenario(t)
	q := &Query{Lat: 45.0, Lon: 4.7, Km: 25}
	var buf bytes.Buffer
	n, err := d.ExportGeoJSON(&buf, GeoJSONOptions{Within: q, Area: true})
	if err != nil {
		t.Fatal(err)
	}
	fs := rfc7946(t, buf.Bytes())
	hits, _ := d.FindSites(Query{Kind: QueryWithin, Lat: 45, Lon: 4.7, Km: 25})
	if n != len(hits) || len(fs) != n+1 {
		t.Fatalf("%d features for %d sites in the region", len(fs), len(hits))
	}
	area := fs[len(fs)-1]
	if area["properties"].(map[string]any)["kind"] != "area" || area["geometry"].(map[string]any)["type"] != "Polygon" {
		t.Fatalf("last feature %v", area)
	}
	if _, err := d.ExportGeoJSON(&buf, GeoJSONOptions{Area: true}); !errors.Is(err, ErrUsage) {
		t.Fatalf("area without a region: %v", err)
	}
}

// TestAreaPolygons draws circles in the plain case, across the
// antimeridian and around both poles, and checks the RFC's rules and
// the geometry: every point that is not on a cut or the pole's edge lies
// at the radius from the centre (haversine, to 1 m).
func TestAreaPolygons(t *testing.T) {
	cases := []struct {
		name         string
		lat, lon, km float64
		pieces       int
	}{
		{"plain", 45, 4.7, 25, 1},
		{"antimeridian east", -17, 179.5, 200, 2},
		{"antimeridian west", 65, -179.9, 50, 2},
		{"north pole", 85, 30, 800, 2},
		{"south pole", -88, -120, 500, 2},
		{"pole on the seam", 89, 0, 300, 1},
	}
	for _, c := range cases {
		polys, err := AreaPolygons(c.lat, c.lon, c.km)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if len(polys) != c.pieces {
			t.Errorf("%s: %d pieces, want %d", c.name, len(polys), c.pieces)
		}
		var coords []any
		for _, ring := range polys {
			var r []any
			for _, p := range ring {
				r = append(r, []any{p[0], p[1]})
				onCut := math.Abs(math.Abs(p[0])-180) < 1e-9 || math.Abs(math.Abs(p[1])-90) < 1e-9
				if !onCut {
					if dk := geo.HaversineKm(c.lat, c.lon, p[1], p[0]); math.Abs(dk-c.km) > 1e-3 {
						t.Errorf("%s: vertex %v lies %.6f km from the centre, want %v", c.name, p, dk, c.km)
					}
				}
			}
			coords = append(coords, []any{r})
		}
		for _, p := range coords {
			polygon(t, p)
		}
	}
	if _, err := AreaPolygons(10, 10, 10100); !errors.Is(err, ErrAreaTooLarge) {
		t.Fatalf("hemisphere: %v", err)
	}
	if _, err := AreaPolygons(10, 10, 0); !errors.Is(err, ErrUsage) {
		t.Fatalf("zero radius: %v", err)
	}
}

// TestDestination checks the spherical destination formula against
// points known by geometry: a quarter meridian reaches the pole, 1° of
// arc east along the equator reaches 1° E.
func TestDestination(t *testing.T) {
	quarter := math.Pi / 2 * geo.EarthRadiusKm
	degree := geo.EarthRadiusKm * math.Pi / 180
	for _, c := range []struct {
		lat, lon, km, brg, wantLat, wantLon float64
	}{
		// Source: geometry of the sphere (common practice).
		{0, 0, quarter, 0, 90, 0},
		{0, 0, degree, 90, 0, 1},
		{0, 179.5, degree, 90, 0, 180.5}, // continuous across ±180°
		{10, 20, 0, 45, 10, 20},
	} {
		lat, lon := Destination(c.lat, c.lon, c.km, c.brg)
		if math.Abs(lat-c.wantLat) > 1e-9 || math.Abs(lon-c.wantLon) > 1e-9 {
			t.Errorf("Destination(%v, %v, %v km, %v°) = %v, %v; want %v, %v", c.lat, c.lon, c.km, c.brg, lat, lon, c.wantLat, c.wantLon)
		}
	}
}
