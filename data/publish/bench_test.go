package publish

import (
	"context"
	"os"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"baleassay/data/publish/pgtest"
	"github.com/jackc/pgx/v5"
)

// BenchmarkPublish publishes a generated national scenario
// (BALE_PUBLISH_EVENTS events, 100,000 by default; 'make bench-publish'
// runs 1,000,000) from a bbolt store into an empty database, against the
// baseline of the same run: a plain COPY of the same (id, raw) bytes, read
// from the same store in the same batches, one transaction per batch,
// into a table without indexes (copy-raw) and with the primary key
// (copy-raw-pk). publish-again is the next publish with nothing new;
// publish-full walks the whole store again and finds every event present.
// Run with -benchtime 1x.
func BenchmarkPublish(b *testing.B) {
	n := 100_000
	if v := os.Getenv("BALE_PUBLISH_EVENTS"); v != "" {
		var err error
		if n, err = strconv.Atoi(v); err != nil || n < 1000 {
			b.Fatalf("BALE_PUBLISH_EVENTS=%q: give a number of events of at least 1000", v)
		}
	}
	pgtest.ServerDSN(b)
	t0 := time.Now()
	raws := bigScenario(b, n)
	s := storeOf(b, raws)
	var bytes int64
	for _, r := range raws {
		bytes += int64(len(r))
	}
	events := len(raws)
	raws = nil // so that the heap the publish adds is not hidden in the scenario's garbage
	b.Logf("scenario: %d events, %.1f MB of CBOR, stored in %.1f s", events, float64(bytes)/1e6, time.Since(t0).Seconds())
	ctx := context.Background()
	secs := map[string]float64{}
	report := func(b *testing.B, name string, d time.Duration) {
		secs[name] = d.Seconds()
		b.ReportMetric(float64(events)/d.Seconds(), "events/s")
		b.ReportMetric(float64(bytes)/1e6/d.Seconds(), "MB/s")
		b.ReportMetric(0, "ns/op")
	}
	copyRaw := func(withPK bool) func(b *testing.B) {
		return func(b *testing.B) {
			for range b.N {
				conn := pgtest.Conn(b)
				ddl := `CREATE TABLE raw_events (id bytea, raw bytea)`
				if withPK {
					ddl = `CREATE TABLE raw_events (id bytea PRIMARY KEY, raw bytea)`
				}
				if _, err := conn.Exec(ctx, ddl); err != nil {
					b.Fatal(err)
				}
				start := time.Now()
				var after uint64
				for {
					items, err := readBatch(s, after, DefaultBatch)
					if err != nil {
						b.Fatal(err)
					}
					if len(items) == 0 {
						break
					}
					rows := make([][]any, len(items))
					for i, it := range items {
						rows[i] = []any{it.id[:], it.raw}
					}
					err = pgx.BeginFunc(ctx, conn, func(tx pgx.Tx) error {
						_, err := tx.CopyFrom(ctx, pgx.Identifier{"raw_events"}, []string{"id", "raw"}, pgx.CopyFromRows(rows))
						return err
					})
					if err != nil {
						b.Fatal(err)
					}
					after = items[len(items)-1].seq
				}
				name := "copy-raw"
				if withPK {
					name = "copy-raw-pk"
				}
				report(b, name, time.Since(start))
			}
		}
	}
	b.Run("copy-raw", copyRaw(false))
	b.Run("copy-raw-pk", copyRaw(true))
	b.Run("publish", func(b *testing.B) {
		for range b.N {
			conn := pgtest.Conn(b)
			runtime.GC()
			var ms runtime.MemStats
			runtime.ReadMemStats(&ms)
			stopPeak := peakHeap()
			rep, err := Publish(ctx, conn, s, Options{})
			peak := stopPeak()
			peak -= min(ms.HeapInuse, peak) // the publish's own, above the scenario the benchmark holds
			if err != nil {
				b.Fatal(err)
			}
			if rep.New != events {
				b.Fatalf("%d of %d events published", rep.New, events)
			}
			report(b, "publish", rep.Elapsed)
			b.ReportMetric(float64(peak)/1e6, "publish-heap-MB")
			b.Logf("publish: events %.1f s (%.0f events/s), statistics and audits %.1f s (%d audits, %.0f bales/s); %d batches; %s",
				rep.EventTime.Seconds(), float64(rep.New)/rep.EventTime.Seconds(), rep.AuditTime.Seconds(), rep.Audits,
				float64(rep.Audits)/rep.AuditTime.Seconds(), rep.Batches, sizes(b, conn, events))
			b.Logf("queries on the views: %s", viewTimes(b, conn))
			again, err := Publish(ctx, conn, s, Options{})
			if err != nil || again.Read != 0 {
				b.Fatalf("publish again: %+v %v", again, err)
			}
			full, err := Publish(ctx, conn, s, Options{Full: true})
			if err != nil || full.Present != events || full.New != 0 {
				b.Fatalf("publish full: %+v %v", full, err)
			}
			secs["again"], secs["full"] = again.Elapsed.Seconds(), full.Elapsed.Seconds()
		}
	})
	var ru syscall.Rusage
	_ = syscall.Getrusage(syscall.RUSAGE_SELF, &ru)
	b.Logf("publish %.1f s = %.2f× copy-raw (%.1f s), %.2f× copy-raw-pk (%.1f s); publish again (nothing new) %.3f s; full walk, all present %.1f s; peak RSS of the Go process (scenario, store and publish) %.0f MB",
		secs["publish"], secs["publish"]/secs["copy-raw"], secs["copy-raw"], secs["publish"]/secs["copy-raw-pk"], secs["copy-raw-pk"],
		secs["again"], secs["full"], float64(ru.Maxrss)/1024)
}

// sizes reports the database's size per table and per event.
func sizes(tb testing.TB, conn *pgx.Conn, events int) string {
	tb.Helper()
	var total int64
	var detail string
	rows, _ := conn.Query(context.Background(), `SELECT c.relname, pg_total_relation_size(c.oid)
		FROM pg_class c JOIN pg_namespace n ON n.oid = c.relnamespace
		WHERE n.nspname = 'baleassay' AND c.relkind = 'r' ORDER BY 2 DESC`)
	var (
		name string
		size int64
	)
	if _, err := pgx.ForEachRow(rows, []any{&name, &size}, func() error {
		total += size
		if size > 1<<20 {
			detail += " " + name + " " + strconv.FormatInt(size>>20, 10) + " MB,"
		}
		return nil
	}); err != nil {
		tb.Fatal(err)
	}
	return "database " + strconv.FormatInt(total>>20, 10) + " MB (" + strconv.FormatInt(total/int64(events), 10) + " B per event):" + detail
}

// viewTimes times typical queries on the views, each run twice (the
// second, warm, is reported).
func viewTimes(tb testing.TB, conn *pgx.Conn) string {
	tb.Helper()
	qs := []struct{ name, sql string }{
		{"bale count", `SELECT count(*) FROM baleassay.bales`},
		{"site_quality, all sites", `SELECT count(*) FROM (SELECT * FROM baleassay.site_quality) q`},
		{"site_quality, one site", `SELECT * FROM baleassay.site_quality WHERE site = (SELECT id FROM baleassay.sites ORDER BY id LIMIT 1)`},
		{"bale_audits, all", `SELECT count(*), avg(target_pet) FROM baleassay.bale_audits`},
		{"conflicts", `SELECT count(*) FROM baleassay.conflicts`},
		{"10 nearest sites, ST_Distance", `SELECT id FROM baleassay.sites ORDER BY ST_Distance(geog, ST_MakePoint(4.7, 45.0)::geography, false) LIMIT 10`},
		{"sites within 25 km, ST_DWithin", `SELECT count(*) FROM baleassay.sites WHERE ST_DWithin(geog, ST_MakePoint(4.7, 45.0)::geography, 25000, false)`},
	}
	var out []string
	for _, q := range qs {
		var d time.Duration
		for range 2 {
			start := time.Now()
			rows, err := conn.Query(context.Background(), q.sql)
			if err != nil {
				tb.Fatalf("%s: %v", q.name, err)
			}
			for rows.Next() {
			}
			if err := rows.Err(); err != nil {
				return q.name + ": " + err.Error()
			}
			d = time.Since(start)
		}
		out = append(out, q.name+" "+strconv.FormatFloat(float64(d.Microseconds())/1000, 'f', 1, 64)+" ms")
	}
	return strings.Join(out, ", ")
}

// peakHeap samples the Go heap in use every 10 ms until the returned
// function is called, which gives the highest reading.
func peakHeap() func() uint64 {
	done := make(chan struct{})
	res := make(chan uint64)
	go func() {
		var peak uint64
		var ms runtime.MemStats
		tick := time.NewTicker(10 * time.Millisecond)
		defer tick.Stop()
		for {
			runtime.ReadMemStats(&ms)
			peak = max(peak, ms.HeapInuse)
			select {
			case <-done:
				res <- peak
				return
			case <-tick.C:
			}
		}
	}()
	return func() uint64 { close(done); return <-res }
}
