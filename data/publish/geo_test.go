package publish

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"baleassay/data/publish/pgtest"
	"baleassay/data/record"
	"baleassay/data/store"

	"github.com/jackc/pgx/v5"
)

// geoStore holds the demo plus sites spread over the globe, with clusters
// at both poles and along the antimeridian and some sites at exactly the
// same place (ties are ranked by id on both sides).
func geoStore(t *testing.T) *store.Store {
	t.Helper()
	s, _ := demoStore(t)
	r := rand.New(rand.NewPCG(13, 6))
	var evs []record.Event
	add := func(lat, lon float64) {
		evs = append(evs, record.Event{Kind: record.KindSite, Site: &record.SiteRecord{
			Name: fmt.Sprintf("Test site %d", len(evs)), Kind: record.SiteYard, Lat: lat, Lon: lon}})
	}
	for range 1500 { // uniform on the sphere
		add(math.Asin(2*r.Float64()-1)*180/math.Pi, 360*r.Float64()-180)
	}
	for range 200 { // near the poles
		add(89.5+0.5*r.Float64(), 360*r.Float64()-180)
		add(-89.5-0.5*r.Float64(), 360*r.Float64()-180)
	}
	for range 200 { // along ±180°
		add(120*r.Float64()-60, 179.5+r.Float64()*0.5)
		add(120*r.Float64()-60, -179.5-r.Float64()*0.5)
	}
	for range 5 { // coincident
		add(45.05, 4.75)
		add(90, 0)
		add(-12.5, 180)
	}
	if _, err := s.Save(evs, store.SaveOptions{Confirm: true}); err != nil {
		t.Fatal(err)
	}
	return s
}

func queryPoints() [][2]float64 {
	pts := [][2]float64{{45.0, 4.7}, {45.05, 4.75}, {90, 0}, {-90, 0}, {0, 180}, {0, -180}, {-12.5, 180}, {89.9, 90}, {0, 0}}
	r := rand.New(rand.NewPCG(7, 7))
	for range 40 {
		pts = append(pts, [2]float64{math.Asin(2*r.Float64()-1) * 180 / math.Pi, 360*r.Float64() - 180})
	}
	return pts
}

// Spatial queries on the published sites against the store's own site
// index. Nearest: PostGIS's ST_Distance on the sphere (use_spheroid
// false) against 'bale sites near': the same sites in the same order. Tolerance: PostGIS's sphere has the WGS 84 mean radius
// (2a+b)/3 = 6371008.7714 m, ours the IUGG R1 = 6371008.8 m, 4.5e-9
// apart (Source: H. Moritz, Geodetic Reference System 1980, Bulletin
// Géodésique 54 (1980) 395; a and b of WGS 84, NIMA TR8350.2), so
// distances agree to 1e-8 relative plus 1 mm.
func TestSpatialQueries(t *testing.T) {
	conn := pgtest.Conn(t)
	s := geoStore(t)
	rep := mustPublish(t, conn, s, testOptions())
	if !rep.Schema.PostGIS {
		pgtest.SkipOrFail(t, "PostGIS not available on the test server: "+rep.Schema.Note)
	}
	t.Run("nearest", func(t *testing.T) { checkNearest(t, conn, s) })
	t.Run("within", func(t *testing.T) { checkWithin(t, conn, s) })
}

func checkNearest(t *testing.T, conn *pgx.Conn, s *store.Store) {
	ctx := ctxT(t)
	const k = 10
	for _, p := range queryPoints() {
		want, err := s.SiteIndex().Nearest(p[0], p[1], k)
		if err != nil {
			t.Fatal(err)
		}
		rows, _ := conn.Query(ctx, `SELECT id, ST_Distance(geog, ST_SetSRID(ST_MakePoint($2, $1), 4326)::geography, false) AS m
			FROM baleassay.sites ORDER BY m, id LIMIT $3`, p[0], p[1], k)
		var (
			id [16]byte
			m  float64
		)
		i := 0
		if _, err := pgx.ForEachRow(rows, []any{&id, &m}, func() error {
			if i >= len(want) {
				return fmt.Errorf("more rows than the index gives")
			}
			w := want[i]
			if record.EntityID(id) != w.ID || math.Abs(m/1000-w.Km) > 1e-8*w.Km+1e-6 {
				t.Errorf("near %v, rank %d: ST_Distance gives %s at %.9f km, the index %s at %.9f km",
					p, i+1, record.EntityID(id), m/1000, w.ID, w.Km)
			}
			i++
			return nil
		}); err != nil {
			t.Fatal(err)
		}
		if i != len(want) {
			t.Errorf("near %v: %d rows, index gives %d", p, i, len(want))
		}
	}
}

// ST_DWithin through the GiST index finds the sites 'bale sites within'
// finds, and the planner uses the index for it.
func checkWithin(t *testing.T, conn *pgx.Conn, s *store.Store) {
	ctx := ctxT(t)
	const q = `SELECT id FROM baleassay.sites
		WHERE ST_DWithin(geog, ST_SetSRID(ST_MakePoint($2, $1), 4326)::geography, $3, false) ORDER BY id`
	for _, p := range queryPoints() {
		for _, km := range []float64{25, 600} {
			hits, err := s.SiteIndex().Within(p[0], p[1], km)
			if err != nil {
				t.Fatal(err)
			}
			want := map[record.EntityID]bool{}
			for _, h := range hits {
				want[h.ID] = true
			}
			rows, _ := conn.Query(ctx, q, p[0], p[1], km*1000)
			ids, err := pgx.CollectRows(rows, pgx.RowTo[[16]byte])
			if err != nil {
				t.Fatal(err)
			}
			if len(ids) != len(want) {
				t.Errorf("within %g km of %v: ST_DWithin %d sites, index %d", km, p, len(ids), len(want))
			}
			for _, id := range ids {
				if !want[record.EntityID(id)] {
					t.Errorf("within %g km of %v: ST_DWithin has %s, the index not", km, p, record.EntityID(id))
				}
			}
		}
	}
	tx, err := conn.Begin(ctx)
	if err != nil {
		t.Fatal(err)
	}
	defer tx.Rollback(ctx)
	if _, err := tx.Exec(ctx, `SET LOCAL enable_seqscan = off`); err != nil {
		t.Fatal(err)
	}
	rows, _ := tx.Query(ctx, "EXPLAIN "+q, 45.0, 4.7, 25000.0)
	plan, err := pgx.CollectRows(rows, pgx.RowTo[string])
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(strings.Join(plan, "\n"), "events_site_geog") {
		t.Errorf("ST_DWithin does not use the GiST index:\n%s", strings.Join(plan, "\n"))
	}
}
