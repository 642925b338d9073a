package publish

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/json"
	"fmt"
	"math"
	"sort"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/data/store"

	"github.com/jackc/pgx/v5"
)

// auditTag opens the digest of an audit's inputs. It is also written in
// the view audit_inputs (sql/001_events.sql): a change to how audits are
// computed needs a new schema step that redefines the view with a new tag
// and queues every bale.
const auditTag = "baleassay audit 1"

// AuditSpec is the spec audits are judged against: the default of
// 'bale assess'.
const AuditSpec = "glycol-feed"

// auditChunk is the number of bales audited per transaction.
const auditChunk = 1000

// auditInputs is the digest an audit is keyed by:
//
//	SHA-256(auditTag ‖ bale event id ‖ pull event ids in byte order)
//
// over the shown events of the bale and of its shown pulls.
func auditInputs(bale record.EventID, pulls []record.EventID) []byte {
	ids := make([]record.EventID, len(pulls))
	copy(ids, pulls)
	sort.Slice(ids, func(i, j int) bool { return bytes.Compare(ids[i][:], ids[j][:]) < 0 })
	h := sha256.New()
	h.Write([]byte(auditTag))
	h.Write(bale[:])
	for _, id := range ids {
		h.Write(id[:])
	}
	return h.Sum(nil)
}

var auditColumns = []string{
	"bale", "inputs", "pulls", "sampled_kg", "bale_kg", "confidence", "method",
	"target_pet", "target_pet_low", "target_pet_high", "other_plastics", "non_plastics", "moisture_fines", "hazards",
	"hazard_found", "categories", "spec", "verdict", "grade", "limiting", "more_pulls", "error",
}

var auditErrCol = len(auditColumns) - 1

// auditRow computes one bale's audit as 'bale show' and 'bale sites
// summary' do (store.AuditOf, then assess.Assess with the default options:
// Cochran's ratio estimator at 90 %), judged against AuditSpec with the
// advice of 'bale assess'. A bale without pulls has no audit (ok false);
// a bale whose pulls cannot be assessed (e.g. one label twice, from two
// devices) gets a row that says why.
func auditRow(bale record.EntityID, head record.Stamped, pulls []store.PullView) ([]any, bool) {
	ids := make([]record.EventID, len(pulls))
	for i, p := range pulls {
		ids[i] = p.Head.ID
	}
	row := make([]any, len(auditColumns))
	row[0], row[1], row[2] = [16]byte(bale), auditInputs(head.ID, ids), len(pulls)
	sort.Slice(pulls, func(i, j int) bool {
		if pulls[i].Pull.Label != pulls[j].Pull.Label {
			return pulls[i].Pull.Label < pulls[j].Pull.Label
		}
		return bytes.Compare(pulls[i].ID[:], pulls[j].ID[:]) < 0
	})
	fail := func(err error) ([]any, bool) {
		row[auditErrCol] = text(err.Error())
		return row, true
	}
	a, err := store.AuditOf(*head.Bale, pulls)
	if err != nil {
		return fail(err)
	}
	if len(a.Pulls) == 0 {
		return nil, false
	}
	res, err := assess.Assess(a, assess.Options{})
	if err != nil {
		return fail(err)
	}
	spec, _ := assess.BuiltinSpec(AuditSpec)
	sv, err := assess.Judge(res, spec)
	if err != nil {
		return fail(err)
	}
	adv := assess.Advise(res, &sv, assess.DefaultRelPrecision)
	found := map[string]float64{}
	for _, c := range res.Categories {
		if c.Kg > 0 {
			found[c.Key] = c.Fraction
		}
	}
	cats, err := json.Marshal(found)
	if err != nil {
		return fail(err)
	}
	pet := res.Group(assess.GroupPET)
	row[3], row[4], row[5], row[6] = res.SampledKg, res.BaleKg, res.Confidence, res.Method.String()
	row[7] = pet.Fraction
	if pet.HasInterval {
		row[8], row[9] = pet.Low, pet.High
	}
	row[10] = res.Group(assess.GroupOtherPlastics).Fraction
	row[11] = res.Group(assess.GroupNonPlastics).Fraction
	row[12] = res.Group(assess.GroupMoistureFines).Fraction
	row[13] = res.Group(assess.GroupHazards).Fraction
	row[14] = len(res.HazardPulls) > 0
	row[15], row[16], row[17], row[18], row[19] = cats, sv.Spec, sv.Verdict.String(), optText(sv.Grade), optText(adv.Item)
	if adv.Known {
		row[20] = adv.More
	}
	for _, v := range row[3:14] {
		if f, ok := v.(float64); ok && (math.IsNaN(f) || math.IsInf(f, 0)) {
			return fail(fmt.Errorf("assess gave a non-finite figure"))
		}
	}
	return row, true
}

const pendingSQL = `SELECT bale FROM audit_pending ORDER BY bale LIMIT $1`

const auditBalesSQL = `SELECT c.entity, e.id, e.raw FROM current c JOIN events e ON e.id = c.event
WHERE c.kind = 2 AND c.entity = ANY($1)`

const auditPullsSQL = `SELECT e.id, e.raw FROM events e JOIN current c ON c.event = e.id
WHERE e.pull_bale = ANY($1) AND c.kind = 3`

// runAudits empties audit_pending, a chunk of bales per transaction: each
// bale's shown event and shown pulls are read back from the database (so
// events published by other labs count), decoded with record.DecodeEvent
// and audited in Go.
func (p *publisher) runAudits(ctx context.Context, rep *Report, progress func(Progress)) error {
	for {
		n := 0
		err := pgx.BeginFunc(ctx, p.conn, func(tx pgx.Tx) error {
			if err := p.enter(ctx, tx); err != nil {
				return err
			}
			rows, _ := tx.Query(ctx, pendingSQL, auditChunk)
			bales, err := pgx.CollectRows(rows, pgx.RowTo[[16]byte])
			if err != nil {
				return fmt.Errorf("pending audits: %w", err)
			}
			n = len(bales)
			if n == 0 {
				return nil
			}
			out, errs, err := auditChunkRows(ctx, tx, bales)
			if err != nil {
				return err
			}
			if len(out) > 0 {
				if _, err := tx.CopyFrom(ctx, pgx.Identifier{"publish_audits"}, auditColumns, pgx.CopyFromRows(out)); err != nil {
					return fmt.Errorf("copy audits: %w", err)
				}
				tag, err := tx.Exec(ctx, `INSERT INTO audits SELECT * FROM publish_audits ON CONFLICT (bale, inputs) DO NOTHING`)
				if err != nil {
					return fmt.Errorf("insert audits: %w", err)
				}
				rep.Audits += int(tag.RowsAffected())
				rep.AuditErr += errs
			}
			_, err = tx.Exec(ctx, `DELETE FROM audit_pending WHERE bale = ANY($1)`, bales)
			return err
		})
		if err != nil {
			return err
		}
		if n == 0 {
			return nil
		}
		if progress != nil {
			progress(Progress{Step: StepAudits, Seq: rep.ToSeq, Read: rep.Read, New: rep.New, Audits: rep.Audits})
		}
	}
}

// auditChunkRows reads the shown records of a chunk of bales and computes
// their audit rows; errs counts rows that record a failure.
func auditChunkRows(ctx context.Context, tx pgx.Tx, bales [][16]byte) (out [][]any, errs int, err error) {
	heads := map[record.EntityID]record.Stamped{}
	var (
		ent [16]byte
		id  []byte
		raw []byte
	)
	rows, _ := tx.Query(ctx, auditBalesSQL, bales)
	_, err = pgx.ForEachRow(rows, []any{&ent, &id, &raw}, func() error {
		s, err := decodeShown(id, raw)
		if err != nil {
			return err
		}
		if s.Bale == nil {
			return fmt.Errorf("%w: shown event %x of bale %s has no bale record", ErrCorrupt, id, record.EntityID(ent))
		}
		heads[record.EntityID(ent)] = s
		return nil
	})
	if err != nil {
		return nil, 0, fmt.Errorf("read bales: %w", err)
	}
	pulls := map[record.EntityID][]store.PullView{}
	rows, _ = tx.Query(ctx, auditPullsSQL, bales)
	_, err = pgx.ForEachRow(rows, []any{&id, &raw}, func() error {
		s, err := decodeShown(id, raw)
		if err != nil {
			return err
		}
		if s.Pull == nil {
			return fmt.Errorf("%w: shown event %x of pull %s has no pull record", ErrCorrupt, id, s.Entity)
		}
		pulls[s.Pull.Bale] = append(pulls[s.Pull.Bale], store.PullView{View: store.View{ID: s.Entity, Head: s}, Pull: *s.Pull})
		return nil
	})
	if err != nil {
		return nil, 0, fmt.Errorf("read pulls: %w", err)
	}
	for _, b := range bales {
		h, ok := heads[record.EntityID(b)]
		if !ok {
			continue // deleted, or not a bale: nothing to audit
		}
		row, ok := auditRow(record.EntityID(b), h, pulls[record.EntityID(b)])
		if !ok {
			continue
		}
		if row[auditErrCol] != nil {
			errs++
		}
		out = append(out, row)
	}
	return out, errs, nil
}

// decodeShown decodes an event read back from the database, checking it
// against its id.
func decodeShown(id, raw []byte) (record.Stamped, error) {
	var eid record.EventID
	copy(eid[:], id)
	e, err := decodeItem(item{id: eid, raw: raw})
	if err != nil {
		return record.Stamped{}, err
	}
	return record.Stamped{ID: eid, Event: e}, nil
}

// queueAllBales marks every shown bale for a new audit.
func (p *publisher) queueAllBales(ctx context.Context) error {
	return pgx.BeginFunc(ctx, p.conn, func(tx pgx.Tx) error {
		if err := p.enter(ctx, tx); err != nil {
			return err
		}
		_, err := tx.Exec(ctx, `INSERT INTO audit_pending (bale) SELECT entity FROM current WHERE kind = 2 ON CONFLICT DO NOTHING`)
		return err
	})
}
