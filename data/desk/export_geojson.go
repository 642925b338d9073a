package desk

import (
	"encoding/json"
	"fmt"
	"io"
	"math"

	"baleassay/data/record"
)

// GeoJSONOptions choose what a GeoJSON export holds.
type GeoJSONOptions struct {
	ExportOptions
	// Within, when set, keeps the sites of a region (QueryWithin); Area
	// then adds the region's circle as a polygon feature.
	Within *Query
	Area   bool
}

// The GeoJSON objects of RFC 7946 that the export writes. No "crs"
// member: RFC 7946 §4 fixes WGS 84 longitude, latitude in decimal
// degrees.
type (
	geoCollection struct {
		Type     string       `json:"type"` // FeatureCollection
		Features []geoFeature `json:"features"`
	}
	geoFeature struct {
		Type       string         `json:"type"` // Feature
		ID         string         `json:"id,omitempty"`
		Geometry   geoGeometry    `json:"geometry"`
		Properties map[string]any `json:"properties"`
	}
	geoGeometry struct {
		Type        string `json:"type"` // Point, Polygon, MultiPolygon
		Coordinates any    `json:"coordinates"`
	}
)

// ExportGeoJSON writes the sites as an RFC 7946 FeatureCollection: one
// Point feature per site ([longitude, latitude], §3.1.1), id the site's
// id, properties name, kind, bale_count (bales received in the range),
// audited, latest_verdict and latest_received (the most recent bale with
// a verdict; null without one), mean_target_pet_share (0 to 1, null
// without an audited bale), hazard_bales and conflicted. With
// opt.Within, only the region's sites, and with opt.Area its circle as
// a feature of kind "area". It returns the number of site features.
func (d *Desk) ExportGeoJSON(w io.Writer, opt GeoJSONOptions) (int, error) {
	sites, err := d.Sites()
	if err != nil {
		return 0, err
	}
	if opt.Within != nil {
		q := *opt.Within
		q.Kind = QueryWithin
		hits, err := d.FindSites(q)
		if err != nil {
			return 0, err
		}
		keep := map[record.EntityID]bool{}
		for _, h := range hits {
			keep[h.ID] = true
		}
		var in []SiteRow
		for _, s := range sites {
			if keep[s.ID] {
				in = append(in, s)
			}
		}
		sites = in
	} else if opt.Area {
		return 0, fmt.Errorf("%w: an area needs a region (within LAT LON KM)", ErrUsage)
	}
	stats, _, err := d.collect(sites, opt.Range, nil)
	if err != nil {
		return 0, err
	}
	fc := geoCollection{Type: "FeatureCollection", Features: []geoFeature{}}
	for _, s := range stats {
		props := map[string]any{
			"name": s.Site.Name, "kind": s.Site.Kind.String(), "bale_count": s.Bales, "audited": s.Audited,
			"latest_verdict": nil, "latest_received": nil, "mean_target_pet_share": nil,
			"hazard_bales": s.Hazards, "conflicted": s.Conflicted,
		}
		if s.Latest != nil {
			props["latest_verdict"] = s.LatestVerdict()
			props["latest_received"] = fms(s.Latest.Bale.ReceivedMs)
		}
		if s.TargetPET.N > 0 {
			props["mean_target_pet_share"] = roundTo(s.TargetPET.Mean, 6)
		}
		fc.Features = append(fc.Features, geoFeature{Type: "Feature", ID: s.ID.String(),
			Geometry: geoGeometry{"Point", [2]float64{s.Site.Lon, s.Site.Lat}}, Properties: props})
	}
	if opt.Area {
		q := opt.Within
		polys, err := AreaPolygons(q.Lat, q.Lon, q.Km)
		if err != nil {
			return 0, err
		}
		g := geoGeometry{"Polygon", [][][2]float64{polys[0]}}
		if len(polys) > 1 {
			mp := make([][][][2]float64, len(polys))
			for i, p := range polys {
				mp[i] = [][][2]float64{p}
			}
			g = geoGeometry{"MultiPolygon", mp}
		}
		fc.Features = append(fc.Features, geoFeature{Type: "Feature", Geometry: g, Properties: map[string]any{
			"name": fmt.Sprintf("within %s km of %s, %s", Num(q.Km, 3), Num(q.Lat, 6), Num(q.Lon, 6)), "kind": "area",
			"center_lat": q.Lat, "center_lon": q.Lon, "radius_km": q.Km,
		}})
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", " ")
	return len(stats), enc.Encode(fc)
}

func roundTo(x float64, digits int) float64 {
	p := math.Pow(10, float64(digits))
	return math.Round(x*p) / p
}
