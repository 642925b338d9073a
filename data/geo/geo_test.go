package geo

import (
	"baleassay/data/internal/testkit"
	"math"
	"math/rand/v2"
	"testing"
)

// Source: Rosetta Code, task "Haversine formula": Nashville BNA (36.12,
// −86.67) to Los Angeles LAX (33.94, −118.40) is 2887.2599506071 km with
// R = 6372.8 km and 2886.4444428380 km with R = 6371.0 km.
func TestHaversinePublishedExample(t *testing.T) {
	d := HaversineKm(36.12, -86.67, 33.94, -118.40)
	for _, c := range []struct{ r, want float64 }{{6372.8, 2887.2599506071}, {6371.0, 2886.4444428380}} {
		got := d / EarthRadiusKm * c.r
		if math.Abs(got-c.want) > 1e-6 {
			t.Errorf("R = %g: %.10f km, want %.10f", c.r, got, c.want)
		}
	}
	// Symmetric and zero on the diagonal (invariants).
	if HaversineKm(33.94, -118.40, 36.12, -86.67) != d || HaversineKm(10, 20, 10, 20) != 0 {
		t.Error("haversine is not symmetric or not zero at zero distance")
	}
}

// vincentySphereKm is the special case of Vincenty's inverse formula for
// a sphere (T. Vincenty, Survey Review 23 (1975) 88): an independent
// formula, well-conditioned at every distance.
//
//	Δσ = atan2(√((cos φ2 sin Δλ)² + (cos φ1 sin φ2 − sin φ1 cos φ2 cos Δλ)²),
//	           sin φ1 sin φ2 + cos φ1 cos φ2 cos Δλ)
func vincentySphereKm(lat1, lon1, lat2, lon2 float64) float64 {
	p1, p2, dl := lat1*degToRad, lat2*degToRad, (lon2-lon1)*degToRad
	a := math.Cos(p2) * math.Sin(dl)
	b := math.Cos(p1)*math.Sin(p2) - math.Sin(p1)*math.Cos(p2)*math.Cos(dl)
	c := math.Sin(p1)*math.Sin(p2) + math.Cos(p1)*math.Cos(p2)*math.Cos(dl)
	return EarthRadiusKm * math.Atan2(math.Hypot(a, b), c)
}

// lawOfCosinesKm is the spherical law of cosines, d = R·acos(sin φ1 sin φ2
// + cos φ1 cos φ2 cos Δλ), accurate away from tiny distances.
func lawOfCosinesKm(lat1, lon1, lat2, lon2 float64) float64 {
	p1, p2, dl := lat1*degToRad, lat2*degToRad, (lon2-lon1)*degToRad
	c := math.Sin(p1)*math.Sin(p2) + math.Cos(p1)*math.Cos(p2)*math.Cos(dl)
	return EarthRadiusKm * math.Acos(math.Max(-1, math.Min(1, c)))
}

func TestHaversineAgreesWithReferenceFormulas(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for i := 0; i < 20000; i++ {
		lat1, lon1 := testkit.RandLat(r), r.Float64()*360-180
		lat2, lon2 := testkit.RandLat(r), r.Float64()*360-180
		if i%4 == 0 { // near pairs, where the law of cosines is weak
			lat2, lon2 = math.Max(-90, math.Min(90, lat1+r.NormFloat64()*0.01)), lon1+r.NormFloat64()*0.01
		}
		h := HaversineKm(lat1, lon1, lat2, lon2)
		v := vincentySphereKm(lat1, lon1, lat2, lon2)
		// common practice: double-precision formulas agree to ~1e-9 km.
		if math.Abs(h-v) > 1e-9*math.Max(1, h) {
			t.Fatalf("(%g,%g)-(%g,%g): haversine %.12f, Vincenty %.12f", lat1, lon1, lat2, lon2, h, v)
		}
		if h > 10 {
			if l := lawOfCosinesKm(lat1, lon1, lat2, lon2); math.Abs(h-l) > 1e-5 {
				t.Fatalf("haversine %.9f, law of cosines %.9f", h, l)
			}
		}
		// Chord order equals great-circle order: the chord of the unit
		// vectors maps back to the same distance (geo.go).
		u1, u2 := UnitVector(lat1, lon1), UnitVector(lat2, lon2)
		c := math.Sqrt((u1[0]-u2[0])*(u1[0]-u2[0]) + (u1[1]-u2[1])*(u1[1]-u2[1]) + (u1[2]-u2[2])*(u1[2]-u2[2]))
		if d := kmForChord(c); math.Abs(d-v) > 1e-6*math.Max(1, v) && h < 19000 {
			t.Fatalf("chord distance %.9f, Vincenty %.9f", d, v)
		}
	}
	// Antimeridian and poles need no special case: 179.5 E to 179.5 W on the
	// equator is 1° of arc, 2πR/360 = 111.195 km (computed); pole to pole is πR.
	if d := HaversineKm(0, 179.5, 0, -179.5); math.Abs(d-2*math.Pi*EarthRadiusKm/360) > 1e-9 {
		t.Errorf("across the antimeridian: %.9f km", d)
	}
	if d := HaversineKm(90, 0, -90, 123); math.Abs(d-math.Pi*EarthRadiusKm) > 1e-9 {
		t.Errorf("pole to pole: %.9f km", d)
	}
}
