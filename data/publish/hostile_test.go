package publish

import (
	"bytes"
	"errors"
	"slices"
	"strings"
	"testing"

	"baleassay/data/publish/pgtest"
	"baleassay/data/record"
	"baleassay/data/store"

	"github.com/jackc/pgx/v5"
)

// sliceSource is a store stand-in: events in a given order, ids as given.
type sliceSource struct {
	dev  record.DeviceID
	ids  []record.EventID
	raws [][]byte
}

func newSliceSource(dev byte, raws [][]byte) *sliceSource {
	s := &sliceSource{dev: record.DeviceID{dev}}
	for _, r := range raws {
		s.ids = append(s.ids, record.IDOf(r))
		s.raws = append(s.raws, r)
	}
	return s
}

func (s *sliceSource) DeviceID() record.DeviceID { return s.dev }

func (s *sliceSource) ForEachRawSince(after uint64, fn func(uint64, record.EventID, []byte) error) error {
	for i := after; i < uint64(len(s.raws)); i++ {
		if err := fn(i+1, s.ids[i], s.raws[i]); err != nil {
			return err
		}
	}
	return nil
}

func count(t *testing.T, conn *pgx.Conn, q string) int {
	t.Helper()
	var n int
	if err := conn.QueryRow(ctxT(t), q).Scan(&n); err != nil {
		t.Fatalf("%s: %v", q, err)
	}
	return n
}

// Events in reverse order, in small batches: successors arrive before the
// events they supersede, entities span batches. The fold is the same.
func TestPublishReverseOrderSmallBatches(t *testing.T) {
	conn := pgtest.Conn(t)
	s, _ := demoStore(t)
	raws := rawEvents(t, s)
	slices.Reverse(raws)
	o := testOptions()
	o.Batch = 37
	rep := mustPublish(t, conn, newSliceSource(1, raws), o)
	if rep.Batches != (len(raws)+36)/37 {
		t.Fatalf("%d batches for %d events of 37", rep.Batches, len(raws))
	}
	checkMatchesStore(t, conn, s)
}

// A stored event whose bytes do not match its id stops the publish at its
// batch: earlier batches stay, nothing of that batch is written, and a
// later publish from a sound source resumes after the last whole batch.
func TestPublishCorruptEventStopsAtItsBatch(t *testing.T) {
	conn := pgtest.Conn(t)
	s, _ := demoStore(t)
	raws := rawEvents(t, s)
	bad := newSliceSource(2, raws)
	bad.raws[250] = bytes.Clone(raws[250])
	bad.raws[250][len(bad.raws[250])-1] ^= 1
	o := testOptions()
	o.Batch = 100
	rep, err := Publish(ctxT(t), conn, bad, o)
	var ee *EventError
	if !errors.Is(err, ErrCorrupt) || !errors.As(err, &ee) || ee.Seq != 251 {
		t.Fatalf("want ErrCorrupt at sequence 251, got %v", err)
	}
	if rep.New != 200 || rep.ToSeq != 200 {
		t.Fatalf("after the refusal: %+v", rep)
	}
	if n := count(t, conn, `SELECT count(*) FROM baleassay.events`); n != 200 {
		t.Fatalf("%d events in the database, want the 200 of the two whole batches", n)
	}
	good := newSliceSource(2, raws)
	again := mustPublish(t, conn, good, o)
	if !again.Resumed || again.FromSeq != 200 || again.New != len(raws)-200 {
		t.Fatalf("resumed publish: %+v", again)
	}
	checkMatchesStore(t, conn, s)
}

// An event whose entity the database knows as another kind is refused
// with its batch; the database is unchanged.
func TestPublishKindMismatchRefused(t *testing.T) {
	conn := pgtest.Conn(t)
	s, _ := demoStore(t)
	mustPublish(t, conn, s, testOptions())
	before := dbHash(t, conn)
	sites, err := s.Sites()
	if err != nil {
		t.Fatal(err)
	}
	// A bale event that claims a site's entity id.
	e := record.Event{Version: record.FormatVersion, Entity: sites[0].ID, Kind: record.KindBale, Device: record.DeviceID{9},
		Clock: record.HLC{WallMs: demoEnd.UnixMilli()}, Bale: &record.BaleRecord{Site: sites[1].ID, ReceivedMs: demoEnd.UnixMilli(), GrossKg: 500}}
	raw, err := record.EncodeEvent(e)
	if err != nil {
		t.Fatal(err)
	}
	_, err = Publish(ctxT(t), conn, newSliceSource(3, [][]byte{raw}), testOptions())
	if !errors.Is(err, ErrKindMismatch) {
		t.Fatalf("want ErrKindMismatch, got %v", err)
	}
	// Two new events of one new entity with different kinds, in one batch.
	fresh := record.EntityID{0x01, 0x9a, 7}
	e.Entity = fresh
	rawBale, err := record.EncodeEvent(e)
	if err != nil {
		t.Fatal(err)
	}
	e.Kind, e.Bale, e.Site = record.KindSite, nil, &record.SiteRecord{Name: "Twice Yard", Lat: 45, Lon: 4}
	rawSite, err := record.EncodeEvent(e)
	if err != nil {
		t.Fatal(err)
	}
	_, err = Publish(ctxT(t), conn, newSliceSource(3, [][]byte{rawSite, rawBale}), testOptions())
	if !errors.Is(err, ErrKindMismatch) {
		t.Fatalf("one batch, two kinds: want ErrKindMismatch, got %v", err)
	}
	if dbHash(t, conn) != before {
		t.Fatal("a refused batch changed the database")
	}
	if n := count(t, conn, `SELECT count(*) FROM baleassay.publish_cursor WHERE store_device = '\x03000000000000000000000000000000'`); n != 0 {
		t.Fatal("a refused batch moved the cursor")
	}
}

// A store that no longer holds the event the cursor names (a copied or
// rebuilt store with the same device id) is published in full; events the
// database holds are not sent again.
func TestPublishCursorOfAnotherHistory(t *testing.T) {
	conn := pgtest.Conn(t)
	s, sum := demoStore(t)
	raws := rawEvents(t, s)
	mustPublish(t, conn, newSliceSource(4, raws[:500]), testOptions())
	other := newSliceSource(4, append(slices.Clone(raws[500:]), raws[:500]...))
	rep := mustPublish(t, conn, other, testOptions())
	if rep.Resumed || rep.Restart == "" || rep.Read != sum.Events || rep.Present != 500 || rep.New != sum.Events-500 {
		t.Fatalf("publish after the history changed: %+v", rep)
	}
	checkMatchesStore(t, conn, s)
}

// A schema set up by a newer program is refused before anything is
// written.
func TestPublishRefusesNewerSchema(t *testing.T) {
	conn := pgtest.Conn(t)
	s, _ := demoStore(t)
	if _, err := Migrate(ctxT(t), conn, DefaultSchema, PostGISOff); err != nil {
		t.Fatal(err)
	}
	if _, err := conn.Exec(ctxT(t), `INSERT INTO baleassay.schema_version (version, name) VALUES (99, 'from the future')`); err != nil {
		t.Fatal(err)
	}
	_, err := Publish(ctxT(t), conn, s, Options{})
	if !errors.Is(err, ErrSchemaNewer) {
		t.Fatalf("want ErrSchemaNewer, got %v", err)
	}
	if n := count(t, conn, `SELECT count(*) FROM baleassay.events`); n != 0 {
		t.Fatalf("%d events written into a newer schema", n)
	}
}

func TestPublishBadOptions(t *testing.T) {
	conn := pgtest.Conn(t)
	s, _ := demoStore(t)
	for _, o := range []Options{{Schema: "Bad-Name"}, {Schema: "public"}, {Schema: "x; DROP TABLE y"}} {
		if _, err := Publish(ctxT(t), conn, s, o); !errors.Is(err, ErrSchemaName) {
			t.Errorf("schema %q: want ErrSchemaName, got %v", o.Schema, err)
		}
	}
	if _, err := Publish(ctxT(t), conn, s, Options{Batch: -1}); !errors.Is(err, ErrBatchSize) {
		t.Errorf("batch -1: want ErrBatchSize, got %v", err)
	}
}

// Without PostGIS the events, fold, views and audits are all there; only
// the geography column is missing. Text with U+0000, which PostgreSQL
// text cannot hold, would be stored with U+FFFD in the decoded column and
// exactly in raw; a store no longer takes it (record.ErrControlChar), so
// the replacement is checked on its own.
func TestPublishWithoutPostGISAndNUL(t *testing.T) {
	if got := text("Nul\x00Yard"); got != "Nul\uFFFDYard" {
		t.Fatalf("text(%q) = %q", "Nul\x00Yard", got)
	}
	conn := pgtest.Conn(t)
	s, _ := demoStore(t)
	if _, err := s.Save([]record.Event{{Kind: record.KindSite, Site: &record.SiteRecord{Name: "Nul\x00Yard", Lat: 45.2, Lon: 4.9}}}, store.SaveOptions{Confirm: true}); !errors.Is(err, record.ErrControlChar) {
		t.Fatalf("a name with U+0000 saved: %v", err)
	}
	if _, err := s.Save([]record.Event{{Kind: record.KindSite, Site: &record.SiteRecord{Name: "Null Yard", Lat: 45.2, Lon: 4.9}}}, store.SaveOptions{Confirm: true}); err != nil {
		t.Fatal(err)
	}
	rep := mustPublish(t, conn, s, Options{PostGIS: PostGISOff})
	if rep.Schema.PostGIS || !strings.Contains(rep.Schema.Note, "off") {
		t.Fatalf("PostGIS off: %+v", rep.Schema)
	}
	if n := count(t, conn, `SELECT count(*) FROM information_schema.columns WHERE table_schema = 'baleassay' AND column_name = 'geog'`); n != 0 {
		t.Fatal("geography column made with PostGIS off")
	}
	checkMatchesStore(t, conn, s)
	var name string
	var raw []byte
	if err := conn.QueryRow(ctxT(t), `SELECT e.site_name, e.raw FROM baleassay.events e WHERE e.site_name LIKE 'Nul%'`).Scan(&name, &raw); err != nil {
		t.Fatal(err)
	}
	e, err := record.DecodeEvent(raw)
	if err != nil {
		t.Fatal(err)
	}
	if name != "Null Yard" || e.Site.Name != "Null Yard" {
		t.Fatalf("decoded %q, raw %q", name, e.Site.Name)
	}
	// PostGIS added later: the next publish adds the geography column
	// and fills it for the sites already there.
	later := mustPublish(t, conn, s, testOptions())
	if !later.Schema.PostGIS {
		pgtest.SkipOrFail(t, "PostGIS not available on the test server: "+later.Schema.Note)
	}
	if !slices.Equal(later.Schema.Applied, []int{2}) || later.Read != 0 {
		t.Fatalf("publish with PostGIS after one without: %+v", later)
	}
	if n := count(t, conn, `SELECT count(*) FROM baleassay.sites WHERE geog IS NULL`); n != 0 {
		t.Fatalf("%d sites without a geography after PostGIS was added", n)
	}
}
