package publish

import (
	"bytes"
	"context"
	"crypto/sha256"
	"encoding/binary"
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

// DefaultSpec is the spec a bale is judged against when it names none,
// as desk.DefaultSpec.
const DefaultSpec = "glycol-feed"

// auditChunk is the number of bales audited per transaction.
const auditChunk = 1000

// specSetting is the shown value of a spec stored as a setting.
type specSetting struct {
	event      record.EventID
	conflicted bool
	body       []byte
}

// auditInputs is the digest an audit is keyed by, over the shown events
// of the bale, of its shown pulls and of the stored specs of the name it
// is judged against:
//
//	SHA-256(auditTag ‖ bale event id ‖ uint32 BE number of pulls ‖
//	        pull event ids in byte order ‖
//	        (spec event id ‖ 1 if conflicted else 0) in byte order)
func auditInputs(bale record.EventID, pulls []record.EventID, specs []specSetting) []byte {
	ids := make([]record.EventID, len(pulls))
	copy(ids, pulls)
	sort.Slice(ids, func(i, j int) bool { return bytes.Compare(ids[i][:], ids[j][:]) < 0 })
	sp := make([]specSetting, len(specs))
	copy(sp, specs)
	sort.Slice(sp, func(i, j int) bool { return bytes.Compare(sp[i].event[:], sp[j].event[:]) < 0 })
	h := sha256.New()
	h.Write([]byte(auditTag))
	h.Write(bale[:])
	var n [4]byte
	binary.BigEndian.PutUint32(n[:], uint32(len(ids)))
	h.Write(n[:])
	for _, id := range ids {
		h.Write(id[:])
	}
	for _, s := range sp {
		h.Write(s.event[:])
		if s.conflicted {
			h.Write([]byte{1})
		} else {
			h.Write([]byte{0})
		}
	}
	return h.Sum(nil)
}

// specName is the spec a bale asks for: its own, or DefaultSpec.
func specName(b record.BaleRecord) string {
	if b.Spec == "" {
		return DefaultSpec
	}
	return text(b.Spec)
}

// resolveSpec finds the spec a bale is judged against as desk.LoadSpec
// does: a spec stored under that name wins over a built-in one; a stored
// spec changed on two devices at once (a conflict), one that does not
// parse, or a name that is neither stored nor built in gives no verdict.
// Unlike the desk it never reads a spec file: what the database holds
// must not depend on the publishing machine's files.
func resolveSpec(name string, stored []specSetting) (assess.Spec, bool) {
	switch len(stored) {
	case 0:
		return assess.BuiltinSpec(name)
	case 1:
		if stored[0].conflicted {
			return assess.Spec{}, false
		}
		s, err := assess.ParseSpec(stored[0].body)
		return s, err == nil
	}
	return assess.Spec{}, false // two settings of one name: which one is meant is not clear
}

var auditColumns = []string{
	"bale", "inputs", "pulls", "sampled_kg", "bale_kg", "confidence", "method",
	"target_pet", "target_pet_low", "target_pet_high", "other_plastics", "non_plastics", "moisture_fines", "hazards",
	"hazard_found", "categories", "label_clash", "spec", "verdict", "grade", "limiting", "more_pulls", "error",
}

var auditErrCol = len(auditColumns) - 1

// auditRow computes one bale's audit as the desk does for 'bale bales
// list', 'bale show' and 'bale sites summary': store.AuditInput (pulls in
// label order, shared labels kept apart), assess.Assess with the default
// options (Cochran's ratio estimator at 90 %), the verdict of the spec the
// bale names (resolveSpec) and the advice of 'bale assess'. A bale without
// pulls has no audit (ok false); a bale whose pulls cannot be assessed
// gets a row that says why.
func auditRow(bale record.EntityID, head record.Stamped, pulls []store.PullView, specs []specSetting) ([]any, bool) {
	ids := make([]record.EventID, len(pulls))
	for i, p := range pulls {
		ids[i] = p.Head.ID
	}
	row := make([]any, len(auditColumns))
	row[0], row[1], row[2] = [16]byte(bale), auditInputs(head.ID, ids, specs), len(pulls)
	if len(pulls) == 0 {
		return nil, false
	}
	sort.Slice(pulls, func(i, j int) bool {
		if pulls[i].Pull.Label != pulls[j].Pull.Label {
			return pulls[i].Pull.Label < pulls[j].Pull.Label
		}
		return bytes.Compare(pulls[i].ID[:], pulls[j].ID[:]) < 0
	})
	name := specName(*head.Bale)
	row[17] = name
	fail := func(err error) ([]any, bool) {
		row[auditErrCol] = text(err.Error())
		return row, true
	}
	a, clash, err := store.AuditInput(*head.Bale, pulls)
	if len(clash) > 0 {
		row[16] = clash
	}
	if err != nil {
		return fail(err)
	}
	res, err := assess.Assess(a, assess.Options{})
	if err != nil {
		return fail(err)
	}
	var sv *assess.SpecVerdict
	if spec, ok := resolveSpec(name, specs); ok {
		if v, err := assess.Judge(res, spec); err == nil {
			sv = &v
			row[18], row[19] = v.Verdict.String(), optText(v.Grade)
		}
	}
	adv := assess.Advise(res, sv, assess.DefaultRelPrecision)
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
	row[14] = len(res.HazardPulls) > 0 || res.HazardPieces > 0
	row[15], row[20] = cats, optText(adv.Item)
	if adv.Need.Known() {
		row[21] = adv.Need.More
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

const auditSpecsSQL = `SELECT e.setting_name, c.heads, e.id, e.raw FROM current c JOIN events e ON e.id = c.event
WHERE c.kind = 4 AND e.setting_kind = 'spec' AND e.setting_name = ANY($1)`

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
				if _, err := tx.Exec(ctx, `INSERT INTO audit_current (bale, inputs) SELECT bale, inputs FROM publish_audits
					ON CONFLICT (bale) DO UPDATE SET inputs = excluded.inputs`); err != nil {
					return fmt.Errorf("current audits: %w", err)
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
	names := map[string]bool{}
	for _, h := range heads {
		names[specName(*h.Bale)] = true
	}
	specs, err := storedSpecs(ctx, tx, names)
	if err != nil {
		return nil, 0, err
	}
	for _, b := range bales {
		h, ok := heads[record.EntityID(b)]
		if !ok {
			continue // deleted, or not a bale: nothing to audit
		}
		row, ok := auditRow(record.EntityID(b), h, pulls[record.EntityID(b)], specs[specName(*h.Bale)])
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

// storedSpecs reads the shown values of the specs stored under the given
// names, by name.
func storedSpecs(ctx context.Context, tx pgx.Tx, names map[string]bool) (map[string][]specSetting, error) {
	list := make([]string, 0, len(names))
	for n := range names {
		list = append(list, n)
	}
	out := map[string][]specSetting{}
	var (
		name    string
		heads   int32
		id, raw []byte
	)
	rows, _ := tx.Query(ctx, auditSpecsSQL, list)
	_, err := pgx.ForEachRow(rows, []any{&name, &heads, &id, &raw}, func() error {
		e, err := decodeShown(id, raw)
		if err != nil {
			return err
		}
		if e.Setting == nil {
			return fmt.Errorf("%w: shown event %x of setting %s has no setting record", ErrCorrupt, id, e.Entity)
		}
		out[name] = append(out[name], specSetting{event: e.ID, conflicted: heads > 1, body: e.Setting.Body})
		return nil
	})
	if err != nil {
		return nil, fmt.Errorf("read stored specs: %w", err)
	}
	return out, nil
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
