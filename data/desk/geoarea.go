package desk

import (
	"fmt"
	"math"
	"slices"

	"baleassay/data/geo"
)

// AreaVertices is how many points draw a region's circle.
const AreaVertices = 96

// Destination is the point at distance km and initial bearing (degrees
// clockwise from north) from (lat, lon) on the sphere of radius
// geo.EarthRadiusKm (J. P. Snyder, Map Projections—A Working Manual, USGS
// Professional Paper 1395, 1987, eqs. 5-5 and 5-6; from memory):
//
//	φ2 = asin(sin φ1 cos c + cos φ1 sin c cos Az)
//	λ2 = λ1 + atan2(sin c sin Az cos φ1, cos c − sin φ1 sin φ2)
//
// with c = km / R. The longitude is λ1 plus a difference in (−180°,
// 180°], not wrapped into ±180°, so a ring of destinations stays
// continuous across the antimeridian.
func Destination(lat, lon, km, bearing float64) (float64, float64) {
	const rad = math.Pi / 180
	p1, az, c := lat*rad, bearing*rad, km/geo.EarthRadiusKm
	sp2 := math.Sin(p1)*math.Cos(c) + math.Cos(p1)*math.Sin(c)*math.Cos(az)
	sp2 = math.Max(-1, math.Min(1, sp2))
	p2 := math.Asin(sp2)
	dl := math.Atan2(math.Sin(az)*math.Sin(c)*math.Cos(p1), math.Cos(c)-math.Sin(p1)*sp2)
	return p2 / rad, lon + dl/rad
}

// CircleRing is the circle of radius km around (lat, lon) as a closed
// ring of [lon, lat] positions, counter-clockwise (bearings decreasing),
// with continuous longitudes that may pass ±180°. It does not handle a
// circle around a pole (see AreaPolygons).
func CircleRing(lat, lon, km float64, n int) [][2]float64 {
	ring := make([][2]float64, 0, n+1)
	for i := range n {
		la, lo := Destination(lat, lon, km, -360*float64(i)/float64(n))
		ring = append(ring, [2]float64{lo, la})
	}
	return append(ring, ring[0])
}

// ErrAreaTooLarge refuses a region's circle of a hemisphere or more.
var ErrAreaTooLarge = fmt.Errorf("%w: the area is a hemisphere or more", ErrUsage)

// AreaPolygons is the circle of radius km around (lat, lon) as GeoJSON
// polygon rings by the rules of RFC 7946: exterior rings counter-
// clockwise (§3.1.6), longitudes in [−180°, 180°], a ring that would
// cross the antimeridian cut in two along it (§3.1.9), and a circle
// around a pole closed along the pole's parallel. Each element is one
// polygon's exterior ring.
func AreaPolygons(lat, lon, km float64) ([][][2]float64, error) {
	c := km / geo.EarthRadiusKm * 180 / math.Pi // angular radius, degrees
	if !(km > 0) || c >= 90 {
		return nil, fmt.Errorf("%w (radius %s km): give a radius above 0 and below %s km", ErrAreaTooLarge, Num(km, 3), Num(math.Pi/2*geo.EarthRadiusKm, 0))
	}
	var ring [][2]float64
	switch {
	case lat+c >= 90:
		ring = poleCap(lat, lon, km, c, 1)
	case lat-c <= -90:
		ring = poleCap(lat, lon, km, c, -1)
	default:
		ring = CircleRing(lat, lon, km, AreaVertices)
	}
	var out [][][2]float64
	for _, piece := range [][][2]float64{
		clipLon(clipLon(ring, 180, true), -180, false),
		shift(clipLon(ring, 180, false), -360),
		shift(clipLon(ring, -180, true), 360),
	} {
		if piece = tidy(piece); len(piece) >= 4 {
			out = append(out, piece)
		}
	}
	return out, nil
}

// poleCap is the ring of a circle that holds the north (side 1) or south
// (side −1) pole: the circle's points by longitude from lon − 180° to
// lon + 180°, closed along the pole, counter-clockwise.
func poleCap(lat, lon, km, c float64, side float64) [][2]float64 {
	seam := side*180 - lat - side*c // latitude where the circle meets lon ± 180°
	var pts [][2]float64
	for i := range AreaVertices {
		la, lo := Destination(lat, lon, km, 360*float64(i)/float64(AreaVertices))
		d := math.Mod(lo-lon+540, 360) - 180 // into [−180, 180)
		if d == -180 {
			continue // on the seam, added below
		}
		pts = append(pts, [2]float64{lon + d, la})
	}
	slices.SortFunc(pts, func(a, b [2]float64) int {
		if side > 0 {
			return cmpf(a[0], b[0])
		}
		return cmpf(b[0], a[0])
	})
	west, east := [2]float64{lon - 180, seam}, [2]float64{lon + 180, seam}
	pole := side * 90
	if side > 0 {
		ring := append([][2]float64{west}, pts...)
		return append(ring, east, [2]float64{lon + 180, pole}, [2]float64{lon - 180, pole}, west)
	}
	ring := append([][2]float64{east}, pts...)
	return append(ring, west, [2]float64{lon - 180, pole}, [2]float64{lon + 180, pole}, east)
}

func cmpf(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// clipLon keeps the part of a closed ring on one side of the meridian
// at edge (below: lon ≤ edge), by Sutherland–Hodgman clipping against
// one half-plane (I. E. Sutherland and G. W. Hodgman, "Reentrant polygon
// clipping", Commun. ACM 17 (1974) 32). A meridian cuts a circle on the
// sphere at most twice, so the part kept is one piece.
func clipLon(ring [][2]float64, edge float64, below bool) [][2]float64 {
	in := func(p [2]float64) bool {
		if below {
			return p[0] <= edge
		}
		return p[0] >= edge
	}
	var out [][2]float64
	for i := 0; i+1 < len(ring); i++ {
		a, b := ring[i], ring[i+1]
		switch {
		case in(a) && in(b):
			out = append(out, a)
		case in(a):
			out = append(out, a, cut(a, b, edge))
		case in(b):
			out = append(out, cut(a, b, edge))
		}
	}
	if len(out) > 0 {
		out = append(out, out[0])
	}
	return out
}

// cut is where segment a–b meets the meridian at edge, interpolated
// linearly in latitude.
func cut(a, b [2]float64, edge float64) [2]float64 {
	t := (edge - a[0]) / (b[0] - a[0])
	return [2]float64{edge, a[1] + t*(b[1]-a[1])}
}

func shift(ring [][2]float64, by float64) [][2]float64 {
	for i := range ring {
		ring[i][0] += by
	}
	return ring
}

// tidy drops repeated points (keeping the ring closed) and clamps the
// last bits of rounding into the valid ranges.
func tidy(ring [][2]float64) [][2]float64 {
	var out [][2]float64
	for _, p := range ring {
		p[0] = math.Max(-180, math.Min(180, p[0]))
		p[1] = math.Max(-90, math.Min(90, p[1]))
		if len(out) > 0 && out[len(out)-1] == p {
			continue
		}
		out = append(out, p)
	}
	if len(out) > 1 && out[0] != out[len(out)-1] {
		out = append(out, out[0])
	}
	return out
}
