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
    id bytea, entity uuid, kind smallint, deleted boolean, supersedes bytea[]) ON COMMIT DELETE ROWS;
CREATE TEMP TABLE IF NOT EXISTS publish_audits (LIKE audits) ON COMMIT DELETE ROWS;`

// The fold of a batch, run after the new events are in publish_fresh.
// Each statement touches only the entities of the batch.
var foldSQL = []string{
	// The kind of each new entity; a mismatch is checked just after.
	`INSERT INTO entities (entity, kind) SELECT DISTINCT entity, kind FROM publish_fresh ON CONFLICT (entity) DO NOTHING`,
	`INSERT INTO supersessions (entity, superseded, superseding)
	 SELECT f.entity, s.id, f.id FROM publish_fresh f CROSS JOIN LATERAL unnest(f.supersedes) AS s(id)
	 ON CONFLICT DO NOTHING`,
	// Heads the new events supersede are heads no more.
	`DELETE FROM heads h USING publish_fresh f CROSS JOIN LATERAL unnest(f.supersedes) AS s(id)
	 WHERE h.entity = f.entity AND h.event = s.id`,
	// A new event is a head unless an event of its entity, stored or new,
	// supersedes it (it may arrive after its successor).
	`INSERT INTO heads (entity, event, deleted)
	 SELECT f.entity, f.id, f.deleted FROM publish_fresh f
	 WHERE NOT EXISTS (SELECT 1 FROM supersessions s WHERE s.entity = f.entity AND s.superseded = f.id)`,
	// The shown value: the latest head in (clock, device, id) order that
	// is not a tombstone, as record.EntityState.Current.
	`WITH touched AS (SELECT DISTINCT entity FROM publish_fresh),
	 shown AS (
	   SELECT DISTINCT ON (h.entity) h.entity, e.kind, h.event
	   FROM heads h JOIN events e ON e.id = h.event
	   WHERE h.entity IN (SELECT entity FROM touched) AND NOT h.deleted
	   ORDER BY h.entity, e.clock_ms DESC, e.clock_logical DESC, e.device DESC, h.event DESC),
	 n AS (SELECT entity, count(*)::integer AS heads FROM heads WHERE entity IN (SELECT entity FROM touched) GROUP BY entity)
	 INSERT INTO current (entity, kind, event, heads)
	 SELECT s.entity, s.kind, s.event, n.heads FROM shown s JOIN n USING (entity)
	 ON CONFLICT (entity) DO UPDATE SET kind = excluded.kind, event = excluded.event, heads = excluded.heads
	 WHERE (current.event, current.heads) IS DISTINCT FROM (excluded.event, excluded.heads)`,
	// Entities whose every head is a tombstone are deleted: not shown.
	`DELETE FROM current c USING (SELECT DISTINCT entity FROM publish_fresh) t
	 WHERE c.entity = t.entity AND NOT EXISTS (SELECT 1 FROM heads h WHERE h.entity = c.entity AND NOT h.deleted)`,
	// Bales whose audit may have changed: new bale events, and every bale
	// any event of a changed pull names (a pull may move or be deleted).
	`INSERT INTO audit_pending (bale)
	 SELECT entity FROM publish_fresh WHERE kind = 2
	 UNION
	 SELECT e.pull_bale FROM events e
	 WHERE e.entity IN (SELECT entity FROM publish_fresh WHERE kind = 3) AND e.pull_bale IS NOT NULL
	 ON CONFLICT DO NOTHING`,
}

const insertFreshSQL = `WITH ins AS (
	INSERT INTO events (` + "%s" + `) SELECT ` + "%s" + ` FROM publish_stage
	ON CONFLICT (id) DO NOTHING
	RETURNING id, entity, kind, deleted, supersedes)
INSERT INTO publish_fresh SELECT id, entity, kind, deleted, supersedes FROM ins`

var insertFresh = fmt.Sprintf(insertFreshSQL, strings.Join(eventColumns, ", "), strings.Join(eventColumns, ", "))

const mismatchSQL = `SELECT f.id, f.entity::text, f.kind, en.kind FROM publish_fresh f
JOIN entities en ON en.entity = f.entity WHERE en.kind <> f.kind LIMIT 1`

const cursorSQL = `INSERT INTO publish_cursor (store_device, last_seq, last_event, updated_at) VALUES ($1, $2, $3, now())
ON CONFLICT (store_device) DO UPDATE SET last_seq = excluded.last_seq, last_event = excluded.last_event, updated_at = now()`

// batchResult counts one batch.
type batchResult struct {
	present, sent, added int
}

// publishBatch writes one batch in one transaction: it asks which events
// the database already holds, copies the others, folds them and moves the
// store's cursor. Either all of it commits or nothing does.
func (p *publisher) publishBatch(ctx context.Context, items []item) (batchResult, error) {
	var res batchResult
	err := pgx.BeginFunc(ctx, p.conn, func(tx pgx.Tx) error {
		res = batchResult{}
		if err := p.enter(ctx, tx); err != nil {
			return err
		}
		ids := make([][]byte, len(items))
		for i := range items {
			ids[i] = items[i].id[:]
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
		out := make([][]any, 0, len(items)-len(have))
		for _, it := range items {
			if have[it.id] {
				continue
			}
			e, err := decodeItem(it)
			if err != nil {
				return err
			}
			row, err := rowOf(it.id, it.raw, e)
			if err != nil {
				return &EventError{Seq: it.seq, ID: it.id.String(), Err: err}
			}
			out = append(out, row)
		}
		res.sent = len(out)
		if len(out) > 0 {
			if err := p.fold(ctx, tx, out, &res); err != nil {
				return err
			}
		}
		last := items[len(items)-1]
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
	if _, err := tx.Exec(ctx, foldSQL[0]); err != nil {
		return fmt.Errorf("entities: %w", err)
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
	for i, q := range foldSQL[1:] {
		if _, err := tx.Exec(ctx, q); err != nil {
			return fmt.Errorf("fold step %d: %w", i+2, err)
		}
	}
	return nil
}
