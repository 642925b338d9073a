package publish

import (
	"baleassay/data/record"
	"context"
	"encoding/hex"
	"errors"
	"fmt"
	"strings"

	"github.com/jackc/pgx/v5"
)

// Temporary tables, one set per connection, emptied at every commit.
const tempTablesSQL = `
CREATE TEMP TABLE IF NOT EXISTS publish_stage (LIKE events) ON COMMIT DELETE ROWS;
CREATE TEMP TABLE IF NOT EXISTS publish_fresh (
    id bytea, entity uuid, kind smallint, deleted boolean, supersedes bytea[],
    clock_ms bigint, clock_logical bigint, device bytea) ON COMMIT DELETE ROWS;
CREATE TEMP TABLE IF NOT EXISTS publish_audits (LIKE audits) ON COMMIT DELETE ROWS;`

// insertFresh adds the staged events the database lacks and keeps them in
// publish_fresh for the fold.
var insertFresh = fmt.Sprintf(`WITH ins AS (
	INSERT INTO events (%[1]s) SELECT %[1]s FROM publish_stage
	ON CONFLICT (id) DO NOTHING
	RETURNING id, entity, kind, deleted, supersedes, clock_ms, clock_logical, device)
INSERT INTO publish_fresh SELECT * FROM ins`, strings.Join(eventColumns, ", "))

// mismatchSQL finds a new event whose entity has another kind, in the
// database (every stored entity has a head, and all its events share a
// kind) or in the batch itself.
const mismatchSQL = `(SELECT f.id, f.entity::text, f.kind, h.kind FROM publish_fresh f
  JOIN heads h ON h.entity = f.entity WHERE h.kind <> f.kind LIMIT 1)
UNION ALL
(SELECT (array_agg(f.id))[1], f.entity::text, min(f.kind), max(f.kind) FROM publish_fresh f
  GROUP BY f.entity HAVING count(DISTINCT f.kind) > 1 LIMIT 1)
LIMIT 1`

// The fold of a batch, run after the new events are in publish_fresh and
// their kinds are checked. Each statement touches only the batch's
// entities.
var foldSQL = []string{
	`INSERT INTO supersessions (entity, superseded, superseding)
	 SELECT f.entity, s.id, f.id FROM publish_fresh f CROSS JOIN LATERAL unnest(f.supersedes) AS s(id)
	 ON CONFLICT DO NOTHING`,
	// Heads the new events supersede are heads no more.
	`DELETE FROM heads h USING publish_fresh f CROSS JOIN LATERAL unnest(f.supersedes) AS s(id)
	 WHERE h.entity = f.entity AND h.event = s.id`,
	// A new event is a head unless an event of its entity, stored or new,
	// supersedes it (it may arrive after its successor).
	`INSERT INTO heads (entity, event, deleted, kind, clock_ms, clock_logical, device)
	 SELECT f.entity, f.id, f.deleted, f.kind, f.clock_ms, f.clock_logical, f.device FROM publish_fresh f
	 WHERE NOT EXISTS (SELECT 1 FROM supersessions s WHERE s.entity = f.entity AND s.superseded = f.id)`,
	// The shown value, as record.EntityState.Current: the latest head in
	// (clock, device, id) order that is not a tombstone; an entity whose
	// heads are all tombstones is deleted and not shown.
	`WITH ranked AS (
	   SELECT DISTINCT ON (h.entity) h.entity, h.kind, h.event, h.deleted, count(*) OVER (PARTITION BY h.entity) AS n
	   FROM heads h WHERE h.entity IN (SELECT entity FROM publish_fresh)
	   ORDER BY h.entity, h.deleted, h.clock_ms DESC, h.clock_logical DESC, h.device DESC, h.event DESC),
	 shown AS (
	   INSERT INTO current (entity, kind, event, heads)
	   SELECT entity, kind, event, n FROM ranked WHERE NOT deleted
	   ON CONFLICT (entity) DO UPDATE SET event = excluded.event, heads = excluded.heads
	   WHERE (current.event, current.heads) IS DISTINCT FROM (excluded.event, excluded.heads))
	 DELETE FROM current c USING ranked r WHERE c.entity = r.entity AND r.deleted`,
	// Bales whose audit may have changed: new bale events, and every bale
	// any event of a changed pull names (a pull may move or be deleted).
	`WITH q AS (
	   INSERT INTO audit_pending (bale)
	   SELECT entity FROM publish_fresh WHERE kind = 2
	   UNION
	   SELECT e.pull_bale FROM events e
	   WHERE e.entity IN (SELECT entity FROM publish_fresh WHERE kind = 3) AND e.pull_bale IS NOT NULL
	   ON CONFLICT DO NOTHING RETURNING bale)
	 DELETE FROM audit_current WHERE bale IN (SELECT bale FROM q)`,
}

// specChangedSQL runs only for a batch with setting events (rare): it
// queues every bale judged against a name a changed spec has had.
const specChangedSQL = `WITH q AS (
	   INSERT INTO audit_pending (bale)
	   SELECT c.entity FROM current c JOIN events e ON e.id = c.event
	   WHERE c.kind = 2 AND coalesce(e.spec, 'glycol-feed') IN (
	     SELECT s.setting_name FROM events s
	     WHERE s.entity IN (SELECT entity FROM publish_fresh WHERE kind = 4) AND s.setting_kind = 'spec')
	   ON CONFLICT DO NOTHING RETURNING bale)
	 DELETE FROM audit_current WHERE bale IN (SELECT bale FROM q)`

const cursorSQL = `INSERT INTO publish_cursor (store_device, last_seq, last_event, updated_at) VALUES ($1, $2, $3, now())
ON CONFLICT (store_device) DO UPDATE SET last_seq = excluded.last_seq, last_event = excluded.last_event, updated_at = now()`

// batchResult counts one batch.
type batchResult struct {
	present, sent, added int
}

// batch is a run of store events with their rows for table events,
// prepared while the previous batch is in the database.
type batch struct {
	items []item
	rows  [][]any // rows[i] is items[i]'s
	err   error
}

// prefetch reads and decodes batches of n events after afterSeq, one
// ahead of the consumer; an empty batch ends the stream. It stops when
// ctx is done.
func prefetch(ctx context.Context, src Source, afterSeq uint64, n int) <-chan batch {
	out := make(chan batch, 1)
	go func() {
		defer close(out)
		for {
			b := prepare(src, afterSeq, n)
			select {
			case out <- b:
			case <-ctx.Done():
				return
			}
			if b.err != nil || len(b.items) == 0 {
				return
			}
			afterSeq = b.items[len(b.items)-1].seq
		}
	}()
	return out
}

func prepare(src Source, afterSeq uint64, n int) batch {
	items, err := readBatch(src, afterSeq, n)
	if err != nil {
		return batch{err: fmt.Errorf("read the store: %w", err)}
	}
	b := batch{items: items, rows: make([][]any, len(items))}
	for i, it := range items {
		e, err := decodeItem(it)
		if err != nil {
			return batch{err: err}
		}
		if b.rows[i], err = rowOf(it.id, it.raw, e); err != nil {
			return batch{err: &EventError{Seq: it.seq, ID: it.id.String(), Err: err}}
		}
	}
	return b
}

// publishBatch writes one batch in one transaction: it asks which events
// the database already holds, copies the others, folds them and moves the
// store's cursor. Either all of it commits or nothing does.
func (p *publisher) publishBatch(ctx context.Context, b batch) (batchResult, error) {
	var res batchResult
	err := pgx.BeginFunc(ctx, p.conn, func(tx pgx.Tx) error {
		res = batchResult{}
		if err := p.enter(ctx, tx); err != nil {
			return err
		}
		ids := make([][]byte, len(b.items))
		for i := range b.items {
			ids[i] = b.items[i].id[:]
		}
		rows, _ := tx.Query(ctx, `SELECT id FROM events WHERE id = ANY($1)`, ids)
		have := make(map[record.EventID]bool)
		var id []byte
		_, err := pgx.ForEachRow(rows, []any{&id}, func() error {
			have[record.EventID(id)] = true
			return nil
		})
		if err != nil {
			return fmt.Errorf("ask which events the database holds: %w", err)
		}
		res.present = len(have)
		out := make([][]any, 0, len(b.items)-len(have))
		for i, it := range b.items {
			if !have[it.id] {
				out = append(out, b.rows[i])
			}
		}
		res.sent = len(out)
		if len(out) > 0 {
			if err := p.fold(ctx, tx, out, &res); err != nil {
				return err
			}
		}
		last := b.items[len(b.items)-1]
		_, err = tx.Exec(ctx, cursorSQL, p.device[:], int64(last.seq), last.id[:])
		return err
	})
	return res, err
}

func (p *publisher) fold(ctx context.Context, tx pgx.Tx, rows [][]any, res *batchResult) error {
	if _, err := tx.CopyFrom(ctx, pgx.Identifier{"publish_stage"}, eventColumns, pgx.CopyFromRows(rows)); err != nil {
		return fmt.Errorf("copy events: %w", err)
	}
	tag, err := tx.Exec(ctx, insertFresh)
	if err != nil {
		return fmt.Errorf("insert events: %w", err)
	}
	res.added = int(tag.RowsAffected())
	if res.added == 0 {
		return nil
	}
	var (
		id         []byte
		ent        string
		kind, have int16
	)
	err = tx.QueryRow(ctx, mismatchSQL).Scan(&id, &ent, &kind, &have)
	if err == nil {
		return fmt.Errorf("%w: event %s is a %s event of entity %s, which the database has as a %s; nothing of this batch was written",
			ErrKindMismatch, hex.EncodeToString(id), record.Kind(kind), ent, record.Kind(have))
	}
	if !errors.Is(err, pgx.ErrNoRows) {
		return err
	}
	for i, q := range foldSQL {
		if _, err := tx.Exec(ctx, q); err != nil {
			return fmt.Errorf("fold step %d: %w", i+1, err)
		}
	}
	for _, r := range rows {
		if r[3] == int16(record.KindSetting) {
			if _, err := tx.Exec(ctx, specChangedSQL); err != nil {
				return fmt.Errorf("fold, specs: %w", err)
			}
			break
		}
	}
	return nil
}
