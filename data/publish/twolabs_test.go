package publish

// Source: invented test inputs (two stores of the demo scenario); the
// expected counts follow from the edits the test makes.

import (
	"testing"

	"baleassay/data/publish/pgtest"
	"baleassay/data/record"
	"baleassay/data/store"

	"github.com/jackc/pgx/v5"
)

// twoLabs makes two stores that share the demo and then diverge: both
// edit one site (a conflict), one edits a bale the other deletes (an edit
// against a deletion), the second adds a pull, moves a pull to another
// bale, deletes a pull and a bale, and adds a site. It returns both and a
// third store holding their union, which is what the database must show.
func twoLabs(t *testing.T) (a, b, union *store.Store) {
	t.Helper()
	a, sum := demoStore(t)
	raws := rawEvents(t, a)
	open := func() *store.Store {
		s, err := store.Open(t.TempDir())
		if err != nil {
			t.Fatal(err)
		}
		t.Cleanup(func() { s.Close() })
		return s
	}
	b = open()
	applyAll(t, b, raws)
	yes := store.SaveOptions{Confirm: true}
	sites, err := a.Sites()
	if err != nil {
		t.Fatal(err)
	}
	bales, err := a.Bales(record.EntityID{})
	if err != nil {
		t.Fatal(err)
	}
	byBale, err := a.PullsByBale()
	if err != nil {
		t.Fatal(err)
	}
	var site store.SiteView
	for _, s := range sites {
		if s.ID != sum.ConflictSite {
			site = s
			break
		}
	}
	must := func(_ record.EventID, err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	// Both labs edit the same site offline.
	sa, sb := site.Site, site.Site
	sa.Notes = "lab A: weighbridge replaced"
	sb.Lat += 0.01
	must(a.Supersede(site.ID, record.Event{Site: &sa}, yes))
	must(b.Supersede(site.ID, record.Event{Site: &sb}, yes))
	// Lab A corrects a bale's mass; lab B deletes the same bale.
	edited := bales[3]
	be := edited.Bale
	be.GrossKg += 12.5
	must(a.Supersede(edited.ID, record.Event{Bale: &be}, yes))
	must(b.Delete(edited.ID))
	// Lab B deletes another bale outright.
	must(b.Delete(bales[5].ID))
	// Lab B adds a pull to one bale, moves a pull of a second bale to a
	// third, and deletes a pull of a fourth: four audits change.
	grow, from, to, shrink := bales[7], bales[8], bales[9], bales[10]
	extra := byBale[grow.ID][0].Pull
	extra.Label = "P9"
	if _, err := b.Save([]record.Event{{Kind: record.KindPull, Pull: &extra}}, yes); err != nil {
		t.Fatal(err)
	}
	moved := byBale[from.ID][0]
	mp := moved.Pull
	mp.Bale, mp.Label = to.ID, "P8"
	must(b.Supersede(moved.ID, record.Event{Pull: &mp}, yes))
	must(b.Delete(byBale[shrink.ID][1].ID))
	// Both labs add a pull labelled P7 to the same bale: a label used
	// twice, which the audit keeps apart.
	twice := bales[11]
	for _, s := range []*store.Store{a, b} {
		p := byBale[twice.ID][0].Pull
		p.Label = "P7"
		if _, err := s.Save([]record.Event{{Kind: record.KindPull, Pull: &p}}, yes); err != nil {
			t.Fatal(err)
		}
	}
	// And a new site.
	if _, err := b.Save([]record.Event{{Kind: record.KindSite, Site: &record.SiteRecord{Name: "Quillon Ferry Depot", Kind: record.SiteDepot, Lat: 45.31, Lon: 4.6}}}, yes); err != nil {
		t.Fatal(err)
	}
	union = open()
	for _, s := range []*store.Store{a, b} {
		applyAll(t, union, rawEvents(t, s))
	}
	conf, err := union.Conflicts()
	if err != nil {
		t.Fatal(err)
	}
	if len(conf) < 3 { // the demo's own, the site, the bale
		t.Fatalf("union has %d conflicts, want at least 3", len(conf))
	}
	return a, b, union
}

// Two labs publish into one database in either order: the database ends
// up as their union, conflicts and all, and both orders give the same
// events, fold and current audits.
func TestPublishTwoLabs(t *testing.T) {
	a, b, union := twoLabs(t)
	var states [2][32]byte
	for i, order := range [][]*store.Store{{a, b}, {b, a}} {
		conn := pgtest.Conn(t)
		first := mustPublish(t, conn, order[0], testOptions())
		second := mustPublish(t, conn, order[1], testOptions())
		if second.Present == 0 || second.New == 0 || second.Read != second.Present+second.Sent {
			t.Fatalf("order %d: second lab's publish %+v", i, second)
		}
		if first.New+second.New != countEvents(t, union) {
			t.Fatalf("order %d: %d + %d new events, the union has %d", i, first.New, second.New, countEvents(t, union))
		}
		checkMatchesStore(t, conn, union)
		checkConflictsView(t, conn, union)
		if n := count(t, conn, `SELECT count(*) FROM baleassay.bale_audits WHERE label_clash = '{P7}'`); n != 1 {
			t.Fatalf("order %d: %d audits show the label P7 used twice, want 1", i, n)
		}
		states[i] = stateHash(t, conn)
		// Again, from both: nothing changes.
		full := mustPublish(t, conn, order[0], Options{Full: true})
		again := mustPublish(t, conn, order[1], testOptions())
		if full.New != 0 || again.New != 0 || again.Read != 0 {
			t.Fatalf("order %d: publishing again added events: %+v %+v", i, full, again)
		}
		if stateHash(t, conn) != states[i] {
			t.Fatalf("order %d: publishing again changed the database", i)
		}
	}
	if states[0] != states[1] {
		t.Fatal("the two publishing orders give different databases")
	}
}

func countEvents(t *testing.T, s *store.Store) int {
	t.Helper()
	n, err := s.LastSeq()
	if err != nil {
		t.Fatal(err)
	}
	return int(n)
}

// checkConflictsView compares the conflicts view with 'bale conflicts':
// the same entities with the same heads in the same order.
func checkConflictsView(t *testing.T, conn *pgx.Conn, s *store.Store) {
	t.Helper()
	conf, err := s.Conflicts()
	if err != nil {
		t.Fatal(err)
	}
	got := map[record.EntityID][][]byte{}
	var (
		ent [16]byte
		evs [][]byte
	)
	rows, _ := conn.Query(ctxT(t), `SELECT id, events FROM baleassay.conflicts`)
	if _, err := pgx.ForEachRow(rows, []any{&ent, &evs}, func() error { got[ent] = evs; return nil }); err != nil {
		t.Fatal(err)
	}
	if len(got) != len(conf) {
		t.Fatalf("conflicts: database %d, store %d", len(got), len(conf))
	}
	for _, st := range conf {
		g := got[st.ID]
		if len(g) != len(st.Heads) {
			t.Fatalf("conflict %s: database %d heads, store %d", st.ID, len(g), len(st.Heads))
		}
		for i, h := range st.Heads {
			if string(g[i]) != string(h.ID[:]) {
				t.Errorf("conflict %s head %d: database %x, store %s (order by clock, device, id)", st.ID, i, g[i], h.ID.Short())
			}
		}
	}
}

// applyAll imports events as a bundle would, demo records allowed.
func applyAll(t *testing.T, s *store.Store, raws [][]byte) {
	t.Helper()
	ids := make([]record.EventID, len(raws))
	for i, r := range raws {
		ids[i] = record.IDOf(r)
	}
	if _, err := s.ApplyRawWithIDs(raws, ids, nil, store.ApplyOptions{AllowDemo: true}); err != nil {
		t.Fatal(err)
	}
}
