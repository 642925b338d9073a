package publish

import (
	"testing"

	"baleassay/data/publish/pgtest"
)

// The demo store published, published again (nothing changes, nothing is
// read past the cursor), and published in full (every event found
// present, nothing sent).
func TestPublishDemo(t *testing.T) {
	conn := pgtest.Conn(t)
	s, sum := demoStore(t)
	rep := mustPublish(t, conn, s, testOptions())
	if rep.Read != sum.Events || rep.New != sum.Events || rep.Present != 0 || rep.Resumed {
		t.Fatalf("first publish: %+v, demo has %d events", rep, sum.Events)
	}
	if rep.Audits == 0 {
		t.Fatalf("no audits written: %+v", rep)
	}
	if pgtest.InCI() && !rep.Schema.PostGIS {
		t.Fatalf("PostGIS not used in CI: %s", rep.Schema.Note)
	}
	t.Logf("first publish: %+v", rep)
	checkMatchesStore(t, conn, s)
	before := dbHash(t, conn)

	again := mustPublish(t, conn, s, testOptions())
	if again.Read != 0 || again.New != 0 || again.Audits != 0 || !again.Resumed {
		t.Fatalf("second publish: %+v", again)
	}
	full := mustPublish(t, conn, s, Options{Full: true})
	if full.Read != sum.Events || full.Present != sum.Events || full.Sent != 0 || full.New != 0 || full.Audits != 0 {
		t.Fatalf("full publish: %+v", full)
	}
	if after := dbHash(t, conn); after != before {
		t.Fatal("publishing again changed the database")
	}
	checkMatchesStore(t, conn, s)
}
