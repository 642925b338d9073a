package publish

import (
	"baleassay/data/record"
	"bytes"
	"context"
	"errors"
	"fmt"
	"strings"
	"time"

	"github.com/jackc/pgx/v5"
)

// DefaultSchema is the PostgreSQL schema (namespace) published into.
const DefaultSchema = "baleassay"

// analyzeAfter is the number of new events after which a publish
// refreshes the planner's statistics itself.
const analyzeAfter = 1000

// DefaultBatch is the number of store events per transaction.
const DefaultBatch = 10_000

// Options tune Publish. The zero value is the normal setting.
type Options struct {
	Schema  string  // DefaultSchema when empty
	Batch   int     // store events per transaction; DefaultBatch when 0
	PostGIS PostGIS // PostGISAuto by default
	// Full walks the whole store instead of resuming after the cursor.
	// Events the database holds are still not sent again.
	Full bool
	// Reaudit recomputes the audit of every bale, not only of those whose
	// records changed.
	Reaudit bool
	// Progress, when set, is called after every batch and audit chunk.
	Progress func(Progress)
}

// Progress reports a publish under way.
type Progress struct {
	Step   Step
	Seq    uint64 // store sequence number reached
	Read   int    // store events read so far
	New    int    // events added to the database so far
	Audits int    // audits written so far
}

// Step is the stage of a publish.
type Step int

// Steps of a publish.
const (
	StepEvents Step = iota // copying events
	StepAudits             // computing audits
)

func (s Step) String() string {
	if s == StepAudits {
		return "audits"
	}
	return "events"
}

// Report says what a publish did.
type Report struct {
	Schema   SchemaInfo
	Device   record.DeviceID // the publishing store
	FromSeq  uint64          // events after this store sequence number were read
	ToSeq    uint64          // the cursor now
	Resumed  bool            // the cursor of an earlier publish was used
	Restart  string          // why the cursor was not used, when it existed
	Read     int             // events read from the store
	Present  int             // of which the database already held
	Sent     int             // of which sent
	New      int             // of which added (Sent − New arrived meanwhile)
	Batches  int             // transactions that carried events
	Audits   int             // audits written
	AuditErr int             // of which audits recording why no estimate was possible
	Elapsed  time.Duration
	// EventTime is the time spent on the events (the batches), AuditTime
	// on the statistics and the audits.
	EventTime, AuditTime time.Duration
}

type publisher struct {
	conn   *pgx.Conn
	schema string
	path   string
	device record.DeviceID
}

// enter prepares a transaction: the schema's search path and the
// publishers' advisory lock.
func (p *publisher) enter(ctx context.Context, tx pgx.Tx) error {
	if _, err := tx.Exec(ctx, "SELECT set_config('search_path', $1, true)", p.path); err != nil {
		return err
	}
	_, err := tx.Exec(ctx, lockSQL, p.schema)
	return err
}

// Publish loads the events of src that the database lacks, batch by batch,
// then computes the audits of the bales they changed. The connection's
// session gets temporary tables; nothing else of it is changed. On an
// error the batches already committed stay (each is whole), and the
// report says how far the publish got; publishing again resumes there.
func Publish(ctx context.Context, conn *pgx.Conn, src Source, o Options) (rep Report, err error) {
	start := time.Now()
	defer func() { rep.Elapsed = time.Since(start) }()
	if o.Schema == "" {
		o.Schema = DefaultSchema
	}
	if o.Batch == 0 {
		o.Batch = DefaultBatch
	}
	rep = Report{Device: src.DeviceID()}
	if o.Batch < 1 {
		return rep, fmt.Errorf("%w (got %d)", ErrBatchSize, o.Batch)
	}
	info, err := Migrate(ctx, conn, o.Schema, o.PostGIS)
	rep.Schema = info
	if err != nil {
		return rep, err
	}
	p := &publisher{conn: conn, schema: o.Schema, device: rep.Device,
		path: pgx.Identifier{o.Schema}.Sanitize() + ", public"}
	if info.gisPath != "" && info.gisPath != "public" {
		p.path = pgx.Identifier{o.Schema}.Sanitize() + ", " + pgx.Identifier{info.gisPath}.Sanitize() + ", public"
	}
	if err := p.tempTables(ctx); err != nil {
		return rep, err
	}
	after, err := p.resumeAt(ctx, src, o.Full, &rep)
	if err != nil {
		return rep, err
	}
	rep.FromSeq, rep.ToSeq = after, after
	tEvents := time.Now()
	pctx, stop := context.WithCancel(ctx)
	defer stop()
	for b := range prefetch(pctx, src, after, o.Batch) {
		if b.err != nil {
			return rep, b.err // the batch with a bad event is refused whole
		}
		if len(b.items) == 0 {
			break
		}
		res, err := p.publishBatch(ctx, b)
		if err != nil {
			return rep, err
		}
		items := b.items
		after = items[len(items)-1].seq
		rep.ToSeq = after
		rep.Read += len(items)
		rep.Present += res.present
		rep.Sent += res.sent
		rep.New += res.added
		if res.sent > 0 {
			rep.Batches++
		}
		if o.Progress != nil {
			o.Progress(Progress{Step: StepEvents, Seq: after, Read: rep.Read, New: rep.New})
		}
	}
	rep.EventTime = time.Since(tEvents)
	tAudits := time.Now()
	if o.Reaudit {
		if err := p.queueAllBales(ctx); err != nil {
			return rep, err
		}
	}
	if rep.New >= analyzeAfter {
		// Fresh statistics, so that the planner sees the new rows (for
		// the audits' reads just below, and the spatial index) before
		// autovacuum gets round to it.
		if _, err := conn.Exec(ctx, "ANALYZE "+analyzeTables(o.Schema)); err != nil {
			return rep, err
		}
	}
	err = p.runAudits(ctx, &rep, o.Progress)
	rep.AuditTime = time.Since(tAudits)
	if err != nil {
		return rep, err
	}
	_, err = conn.Exec(ctx, `INSERT INTO `+pgx.Identifier{o.Schema, "publish_log"}.Sanitize()+
		` (store_device, from_seq, to_seq, read, new_events, audits) VALUES ($1, $2, $3, $4, $5, $6)`,
		rep.Device[:], int64(rep.FromSeq), int64(rep.ToSeq), rep.Read, rep.New, rep.Audits)
	return rep, err
}

func analyzeTables(schema string) string {
	var names []string
	for _, t := range []string{"events", "supersessions", "heads", "current", "audits"} {
		names = append(names, pgx.Identifier{schema, t}.Sanitize())
	}
	return strings.Join(names, ", ")
}

func (p *publisher) tempTables(ctx context.Context) error {
	return pgx.BeginFunc(ctx, p.conn, func(tx pgx.Tx) error {
		if _, err := tx.Exec(ctx, "SELECT set_config('search_path', $1, true)", p.path); err != nil {
			return err
		}
		_, err := tx.Exec(ctx, tempTablesSQL)
		return err
	})
}

// resumeAt finds where the last publish of this store stopped. The cursor
// is trusted only if the store still holds the same event at that
// sequence number (a store folder copied and then written on two machines,
// or rebuilt, does not).
func (p *publisher) resumeAt(ctx context.Context, src Source, full bool, rep *Report) (uint64, error) {
	var (
		seq  int64
		last []byte
	)
	err := p.conn.QueryRow(ctx, `SELECT last_seq, last_event FROM `+pgx.Identifier{p.schema, "publish_cursor"}.Sanitize()+
		` WHERE store_device = $1`, p.device[:]).Scan(&seq, &last)
	if errors.Is(err, pgx.ErrNoRows) {
		return 0, nil
	}
	if err != nil {
		return 0, err
	}
	if full {
		rep.Restart = "a full publish was asked for"
		return 0, nil
	}
	if seq <= 0 {
		return 0, nil
	}
	at, err := readBatch(src, uint64(seq)-1, 1)
	if err != nil {
		return 0, fmt.Errorf("read the store: %w", err)
	}
	if len(at) == 0 || at[0].seq != uint64(seq) || !bytes.Equal(at[0].id[:], last) {
		rep.Restart = fmt.Sprintf("the store no longer holds the event published last at its sequence number %d (a copied or rebuilt store): publishing in full", seq)
		return 0, nil
	}
	rep.Resumed = true
	return uint64(seq), nil
}
