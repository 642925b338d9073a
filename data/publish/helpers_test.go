package publish

import (
	"bytes"
	"context"
	"crypto/sha256"
	"math"
	"sort"
	"testing"
	"time"

	"baleassay/assess"
	"baleassay/data/demo"
	"baleassay/data/publish/pgtest"
	"baleassay/data/record"
	"baleassay/data/store"

	"github.com/jackc/pgx/v5"
)

// demoEnd fixes the demo scenario's last day so every run is the same.
var demoEnd = time.Date(2026, 11, 27, 0, 0, 0, 0, time.UTC)

func ctxT(t *testing.T) context.Context {
	ctx, cancel := context.WithTimeout(context.Background(), 5*time.Minute)
	t.Cleanup(cancel)
	return ctx
}

// testOptions requires PostGIS in CI, where the server is installed with
// it, and uses it where available elsewhere.
func testOptions() Options {
	o := Options{}
	if pgtest.InCI() {
		o.PostGIS = PostGISRequire
	}
	return o
}

func demoStore(t *testing.T) (*store.Store, demo.DemoSummary) {
	t.Helper()
	s, err := store.Open(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	sum, err := demo.WriteDemo(s, demo.DemoOptions{End: demoEnd})
	if err != nil {
		t.Fatal(err)
	}
	return s, sum
}

// rawEvents lists a store's events in insertion order.
func rawEvents(t *testing.T, s *store.Store) [][]byte {
	t.Helper()
	var out [][]byte
	err := s.ForEachRawSince(0, func(_ uint64, _ record.EventID, raw []byte) error {
		out = append(out, bytes.Clone(raw))
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return out
}

func mustPublish(t *testing.T, conn *pgx.Conn, src Source, o Options) Report {
	t.Helper()
	rep, err := Publish(ctxT(t), conn, src, o)
	if err != nil {
		t.Fatalf("publish: %v", err)
	}
	return rep
}

// dbHash is SHA-256 over the content of every table the publisher
// fills except its own log (publish_log) and cursor: the events, the fold
// and the audits, each in key order.
func dbHash(t *testing.T, conn *pgx.Conn) [32]byte {
	t.Helper()
	return hashQueries(t, conn, append(foldQueries,
		`SELECT coalesce(sha256(string_agg(uuid_send(bale) || inputs || convert_to(coalesce(categories::text, error), 'UTF8'), ''::bytea ORDER BY bale, inputs)), '') FROM baleassay.audits`))
}

// stateHash is dbHash with the current audits (view bale_audits) in place
// of every audit ever written: what does not depend on publishing order.
func stateHash(t *testing.T, conn *pgx.Conn) [32]byte {
	t.Helper()
	return hashQueries(t, conn, append(foldQueries,
		`SELECT coalesce(sha256(string_agg(uuid_send(bale) || inputs || convert_to(coalesce(categories::text, error), 'UTF8'), ''::bytea ORDER BY bale, inputs)), '') FROM baleassay.bale_audits`))
}

var foldQueries = []string{
	`SELECT coalesce(sha256(string_agg(id || raw, ''::bytea ORDER BY id)), '') FROM baleassay.events`,
	`SELECT coalesce(sha256(string_agg(uuid_send(entity) || superseded || superseding, ''::bytea ORDER BY entity, superseded, superseding)), '') FROM baleassay.supersessions`,
	`SELECT coalesce(sha256(string_agg(uuid_send(entity) || event || boolsend(deleted) || int2send(kind) || int8send(clock_ms) || int8send(clock_logical) || device, ''::bytea ORDER BY entity, event)), '') FROM baleassay.heads`,
	`SELECT coalesce(sha256(string_agg(uuid_send(entity) || event || int4send(heads), ''::bytea ORDER BY entity)), '') FROM baleassay.current`,
	`SELECT convert_to(count(*)::text, 'UTF8') FROM baleassay.audit_pending`,
	`SELECT coalesce(sha256(string_agg(uuid_send(bale) || inputs, ''::bytea ORDER BY bale)), '') FROM baleassay.audit_current`,
}

func hashQueries(t *testing.T, conn *pgx.Conn, qs []string) [32]byte {
	t.Helper()
	h := sha256.New()
	for _, q := range qs {
		var b []byte
		if err := conn.QueryRow(ctxT(t), q).Scan(&b); err != nil {
			t.Fatalf("%s: %v", q, err)
		}
		h.Write(b)
		h.Write([]byte{0})
	}
	var out [32]byte
	copy(out[:], h.Sum(nil))
	return out
}

// checkMatchesStore checks that the database holds exactly the events of
// s and that its fold, views and audits give what the store and 'bale'
// give for them.
func checkMatchesStore(t *testing.T, conn *pgx.Conn, s *store.Store) {
	t.Helper()
	ctx := ctxT(t)
	// The event set: the same hash as store.Store.EventSetHash (id, 4-byte
	// big-endian length, bytes, in id order).
	want, err := s.EventSetHash()
	if err != nil {
		t.Fatal(err)
	}
	var got []byte
	if err := conn.QueryRow(ctx, `SELECT sha256(string_agg(id || int4send(octet_length(raw)) || raw, ''::bytea ORDER BY id)) FROM baleassay.events`).Scan(&got); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want[:]) {
		t.Fatalf("event set hash: database %x, store %x", got, want)
	}

	// The fold: heads and shown event of every entity.
	states, err := s.Entities(0)
	if err != nil {
		t.Fatal(err)
	}
	type dbState struct {
		heads   []string
		current string
		n       int
	}
	db := map[record.EntityID]*dbState{}
	var (
		ent [16]byte
		ev  []byte
		del bool
	)
	rows, _ := conn.Query(ctx, `SELECT entity, event, deleted FROM baleassay.heads ORDER BY entity, event`)
	if _, err := pgx.ForEachRow(rows, []any{&ent, &ev, &del}, func() error {
		st := db[ent]
		if st == nil {
			st = &dbState{}
			db[ent] = st
		}
		st.heads = append(st.heads, string(ev))
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	var n int32
	rows, _ = conn.Query(ctx, `SELECT entity, event, heads FROM baleassay.current`)
	currents := 0
	if _, err := pgx.ForEachRow(rows, []any{&ent, &ev, &n}, func() error {
		currents++
		if db[ent] == nil {
			t.Errorf("current row for entity %x without heads", ent)
			return nil
		}
		db[ent].current, db[ent].n = string(ev), int(n)
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	if len(db) != len(states) {
		t.Errorf("entities with heads: database %d, store %d", len(db), len(states))
	}
	visible := 0
	for _, st := range states {
		d := db[st.ID]
		if d == nil {
			t.Errorf("entity %s missing from heads", st.ID)
			continue
		}
		var wantHeads []string
		for _, h := range st.Heads {
			wantHeads = append(wantHeads, string(h.ID[:]))
		}
		sort.Strings(wantHeads)
		if !equalStrings(d.heads, wantHeads) {
			t.Errorf("entity %s heads: database %d, store %d", st.ID, len(d.heads), len(wantHeads))
		}
		cur, ok := st.Current()
		if !ok {
			if d.current != "" {
				t.Errorf("deleted entity %s shown in the database", st.ID)
			}
			continue
		}
		visible++
		if d.current != string(cur.ID[:]) || d.n != len(st.Heads) {
			t.Errorf("entity %s: database shows %x with %d heads, store %s with %d", st.ID, d.current, d.n, cur.ID.Short(), len(st.Heads))
		}
	}
	if currents != visible {
		t.Errorf("current rows %d, visible entities %d", currents, visible)
	}
	// Measured batches: the view shows the shown values.
	var nMeasured int
	var flake float64
	for _, st := range states {
		if cur, ok := st.Current(); ok && st.Kind == record.KindMeasured {
			nMeasured++
			flake += cur.Measured.FlakeKg
		}
	}
	var dbFlake *float64
	if err := conn.QueryRow(ctx, `SELECT count(*), sum(flake_kg) FROM baleassay.measured`).Scan(&n, &dbFlake); err != nil {
		t.Fatal(err)
	}
	if int(n) != nMeasured || (nMeasured > 0 && (dbFlake == nil || !closeTo(*dbFlake, flake, 1e-12))) {
		t.Errorf("measured batches: database %d (%v kg of flake), store %d (%v kg)", n, deref(dbFlake), nMeasured, flake)
	}

	// heads carries copies of its events' columns: they must agree.
	var bad int
	if err := conn.QueryRow(ctx, `SELECT count(*) FROM baleassay.heads h JOIN baleassay.events e ON e.id = h.event
		WHERE (h.entity, h.deleted, h.kind, h.clock_ms, h.clock_logical, h.device) IS DISTINCT FROM
		      (e.entity, e.deleted, e.kind, e.clock_ms, e.clock_logical, e.device)`).Scan(&bad); err != nil {
		t.Fatal(err)
	}
	if bad != 0 {
		t.Errorf("%d heads disagree with their events", bad)
	}

	// Conflicts.
	conf, err := s.Conflicts()
	if err != nil {
		t.Fatal(err)
	}
	var nConf int
	if err := conn.QueryRow(ctx, `SELECT count(*) FROM baleassay.conflicts`).Scan(&nConf); err != nil {
		t.Fatal(err)
	}
	if nConf != len(conf) {
		t.Errorf("conflicts: database %d, store %d", nConf, len(conf))
	}

	// Sites as 'bale sites list' shows them.
	sites, err := s.Sites()
	if err != nil {
		t.Fatal(err)
	}
	type siteRow struct {
		name       string
		lat, lon   float64
		conflicted bool
	}
	dbSites := map[record.EntityID]siteRow{}
	var r siteRow
	rows, _ = conn.Query(ctx, `SELECT id, name, lat, lon, conflicted FROM baleassay.sites`)
	if _, err := pgx.ForEachRow(rows, []any{&ent, &r.name, &r.lat, &r.lon, &r.conflicted}, func() error {
		dbSites[ent] = r
		return nil
	}); err != nil {
		t.Fatal(err)
	}
	if len(dbSites) != len(sites) {
		t.Errorf("sites: database %d, store %d", len(dbSites), len(sites))
	}
	for _, sv := range sites {
		d, ok := dbSites[sv.ID]
		if !ok || d.name != text(sv.Site.Name) || d.lat != sv.Site.Lat || d.lon != sv.Site.Lon || d.conflicted != sv.Conflicted {
			t.Errorf("site %s: database %+v, store %+v conflicted=%v", sv.ID, d, sv.Site, sv.Conflicted)
		}
	}

	// Bale count, and pulls per bale, as 'bale bales list'.
	bales, err := s.Bales(record.EntityID{})
	if err != nil {
		t.Fatal(err)
	}
	byBale, err := s.PullsByBale()
	if err != nil {
		t.Fatal(err)
	}
	var nBales int
	if err := conn.QueryRow(ctx, `SELECT count(*) FROM baleassay.bales`).Scan(&nBales); err != nil {
		t.Fatal(err)
	}
	if nBales != len(bales) {
		t.Errorf("bale count: database %d, store %d", nBales, len(bales))
	}
	dbPulls := map[record.EntityID]int64{}
	var np int64
	rows, _ = conn.Query(ctx, `SELECT id, pulls FROM baleassay.bales`)
	if _, err := pgx.ForEachRow(rows, []any{&ent, &np}, func() error { dbPulls[ent] = np; return nil }); err != nil {
		t.Fatal(err)
	}
	for _, b := range bales {
		if dbPulls[b.ID] != int64(len(byBale[b.ID])) {
			t.Errorf("bale %s pulls: database %d, store %d", b.ID, dbPulls[b.ID], len(byBale[b.ID]))
		}
	}

	// Audits: the target-PET share of every audited bale, as the desk
	// computes it for 'bale show' (store.AuditInput, then assess.Assess),
	// exactly: the same code on the same records. The verdicts are
	// compared with the desk's in data/desk (TestPublishMatchesDesk).
	dbPET := map[record.EntityID]float64{}
	var pet float64
	rows, _ = conn.Query(ctx, `SELECT bale, target_pet FROM baleassay.bale_audits WHERE error IS NULL`)
	if _, err := pgx.ForEachRow(rows, []any{&ent, &pet}, func() error { dbPET[ent] = pet; return nil }); err != nil {
		t.Fatal(err)
	}
	type siteWant struct {
		bales int
		pets  []float64
	}
	perSite := map[record.EntityID]*siteWant{}
	for _, sv := range sites {
		perSite[sv.ID] = &siteWant{}
	}
	for _, b := range bales {
		w := perSite[b.Bale.Site]
		if w != nil {
			w.bales++
		}
		a, _, err := store.AuditInput(b.Bale, byBale[b.ID])
		if err != nil || len(a.Pulls) == 0 {
			continue
		}
		res, err := assess.Assess(a, assess.Options{})
		if err != nil {
			continue
		}
		f := res.Group(assess.GroupPET).Fraction
		if w != nil {
			w.pets = append(w.pets, f)
		}
		got, ok := dbPET[b.ID]
		if !ok || got != f {
			t.Errorf("bale %s target PET: database %v (present %v), store %v", b.ID, got, ok, f)
		}
		delete(dbPET, b.ID)
	}
	if len(sites) == 0 || len(bales) == 0 {
		t.Errorf("nothing to compare: %d sites, %d bales", len(sites), len(bales))
	}
	if len(dbPET) != 0 {
		t.Errorf("%d audits in the database for bales the store does not audit", len(dbPET))
	}

	// Per site: bales, audited bales, mean and sample SD of the
	// target-PET share across them (what 'bale sites summary' gives for
	// one site; compared with the desk itself in data/desk and cmd/bale).
	for _, sv := range sites {
		w := perSite[sv.ID]
		var (
			nb, na   int64
			mean, sd *float64
		)
		if err := conn.QueryRow(ctx, `SELECT bales, audited, target_pet_mean, target_pet_sd FROM baleassay.site_quality WHERE site = $1`,
			[16]byte(sv.ID)).Scan(&nb, &na, &mean, &sd); err != nil {
			t.Fatalf("site %s: %v", sv.ID, err)
		}
		if int(nb) != w.bales || int(na) != len(w.pets) {
			t.Errorf("site %s %q: database %d bales, %d audited; store %d, %d", sv.ID, sv.Site.Name, nb, na, w.bales, len(w.pets))
		}
		m, v := meanSD(w.pets)
		// Summed in another order: agreement to 1e-12 relative, far
		// inside what is printed.
		if len(w.pets) > 0 && (mean == nil || !closeTo(*mean, m, 1e-12)) {
			t.Errorf("site %q target-PET mean: database %v, store %v", sv.Site.Name, deref(mean), m)
		}
		if len(w.pets) > 1 && (sd == nil || !closeTo(*sd, v, 1e-9)) {
			t.Errorf("site %q target-PET SD: database %v, store %v", sv.Site.Name, deref(sd), v)
		}
	}

	// The current audits are those of the records as they stand: the key
	// kept in audit_current is the digest audit_inputs computes afresh.
	if n := count(t, conn, `SELECT count(*) FROM baleassay.audit_current c FULL JOIN baleassay.audit_inputs i USING (bale)
		WHERE c.inputs IS DISTINCT FROM i.inputs AND (c.bale IS NOT NULL OR EXISTS (SELECT 1 FROM baleassay.audits a WHERE a.bale = i.bale AND a.inputs = i.inputs))`); n != 0 {
		t.Errorf("%d bales whose current audit is not that of their records", n)
	}

	// Nothing left pending after a publish.
	var pending int
	if err := conn.QueryRow(ctx, `SELECT count(*) FROM baleassay.audit_pending`).Scan(&pending); err != nil {
		t.Fatal(err)
	}
	if pending != 0 {
		t.Errorf("%d audits pending after publish", pending)
	}
}

func equalStrings(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func closeTo(a, b, rel float64) bool {
	return math.Abs(a-b) <= rel*math.Max(math.Abs(a), math.Abs(b))+1e-15
}

func deref(p *float64) any {
	if p == nil {
		return nil
	}
	return *p
}

// meanSD is the mean and sample standard deviation (n − 1), two-pass.
func meanSD(x []float64) (float64, float64) {
	if len(x) == 0 {
		return 0, 0
	}
	var m float64
	for _, v := range x {
		m += v
	}
	m /= float64(len(x))
	if len(x) < 2 {
		return m, 0
	}
	var ss float64
	for _, v := range x {
		ss += (v - m) * (v - m)
	}
	return m, math.Sqrt(ss / float64(len(x)-1))
}
