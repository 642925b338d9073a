package geo

import "math"

// EarthRadiusKm is the IUGG mean Earth radius R1 = 6371.0088 km (Moritz,
// "Geodetic Reference System 1980", Bulletin Géodésique 54 (1980) 395).
const EarthRadiusKm = 6371.0088

const degToRad = math.Pi / 180

// HaversineKm is the great-circle distance between two WGS 84 points on a
// sphere of radius EarthRadiusKm, by the haversine formula (R. W. Sinnott,
// "Virtues of the Haversine", Sky & Telescope 68 (1984) 159):
//
//	a = sin²(Δφ/2) + cos φ1 · cos φ2 · sin²(Δλ/2)
//	d = 2 R · atan2(√a, √(1 − a))
//
// with φ latitude and λ longitude in radians. The atan2 form stays
// accurate near antipodal points where asin(√a) loses digits.
func HaversineKm(lat1, lon1, lat2, lon2 float64) float64 {
	p1, p2 := lat1*degToRad, lat2*degToRad
	dp := p2 - p1
	dl := (lon2 - lon1) * degToRad
	sp, sl := math.Sin(dp/2), math.Sin(dl/2)
	a := sp*sp + math.Cos(p1)*math.Cos(p2)*sl*sl
	a = math.Min(1, math.Max(0, a))
	return 2 * EarthRadiusKm * math.Atan2(math.Sqrt(a), math.Sqrt(1-a))
}

// UnitVector maps WGS 84 degrees to the point on the unit sphere
//
//	(cos φ cos λ, cos φ sin λ, sin φ).
//
// The chord |u1 − u2| = 2 sin(θ/2) grows monotonically with the central
// angle θ on [0, π], so Euclidean nearest neighbours of unit vectors are
// great-circle nearest neighbours, with no special case at the poles or
// the antimeridian.
func UnitVector(lat, lon float64) [3]float64 {
	p, l := lat*degToRad, lon*degToRad
	cp := math.Cos(p)
	return [3]float64{cp * math.Cos(l), cp * math.Sin(l), math.Sin(p)}
}

// chordForKm is the chord length of a great-circle distance d:
// c = 2 sin(min(d/R, π)/2).
func chordForKm(d float64) float64 {
	return 2 * math.Sin(math.Min(d/EarthRadiusKm, math.Pi)/2)
}

// kmForChord is the inverse: d = 2 R asin(min(c/2, 1)).
func kmForChord(c float64) float64 {
	return 2 * EarthRadiusKm * math.Asin(math.Min(c/2, 1))
}
