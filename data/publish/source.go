package publish

import (
	"baleassay/data/record"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"strings"
	"time"
)

// Source is the narrow view of a records store that publishing needs:
// its device id (the cursor's key) and a walk over the stored events in
// local insertion order. *store.Store has both.
type Source interface {
	DeviceID() record.DeviceID
	// ForEachRawSince calls fn for every event inserted after local
	// sequence number afterSeq, in order; raw is valid only during the
	// call. An error from fn stops the walk and is returned.
	ForEachRawSince(afterSeq uint64, fn func(seq uint64, id record.EventID, raw []byte) error) error
}

// item is one stored event read for a batch; raw is a copy.
type item struct {
	seq uint64
	id  record.EventID
	raw []byte
}

var errBatchFull = errors.New("batch full")

// readBatch reads up to n events after afterSeq. The bytes are copied into
// one buffer per batch.
func readBatch(src Source, afterSeq uint64, n int) ([]item, error) {
	items := make([]item, 0, min(n, 4096))
	var buf []byte
	err := src.ForEachRawSince(afterSeq, func(seq uint64, id record.EventID, raw []byte) error {
		if len(items) == n {
			return errBatchFull
		}
		if cap(buf)-len(buf) < len(raw) {
			buf = make([]byte, 0, max(1<<20, len(raw)))
		}
		start := len(buf)
		buf = append(buf, raw...)
		items = append(items, item{seq: seq, id: id, raw: buf[start:len(buf):len(buf)]})
		return nil
	})
	if err != nil && !errors.Is(err, errBatchFull) {
		return nil, err
	}
	return items, nil
}

// eventColumns are the columns of table events that the publisher fills,
// in the order of rowOf (geog, where present, is generated from lat, lon).
var eventColumns = []string{
	"id", "raw", "entity", "kind", "device", "clock_ms", "clock_logical", "clock", "supersedes", "deleted",
	"site_name", "site_kind", "lat", "lon", "site_notes",
	"bale_site", "received", "gross_kg", "length_m", "width_m", "height_m", "tag", "grader", "spec", "bale_notes",
	"pull_bale", "label", "taken", "kg", "pieces", "stated_kg", "parts_kg",
	"setting_kind", "setting_name", "setting_body",
	"measured_line", "measured_bales", "ran", "flake_kg", "moisture_pct", "streams_kg",
	"reactor_flake_kg", "glycol", "glycol_kg", "strip_eg", "product_kg",
	"hydroxyl_value", "hydroxyl_method", "acid_value", "acid_method", "measured_notes",
}

// decodeItem checks a stored event against its id and decodes it. The
// bytes passed record.DecodeEvent's strict checks when the store took
// them in (or when they were published), and their id proves they are
// those bytes, so the decoder's limits suffice here (record.DecodeTrusted).
func decodeItem(it item) (record.Event, error) {
	if record.IDOf(it.raw) != it.id {
		return record.Event{}, &EventError{Seq: it.seq, ID: it.id.String(), Err: ErrCorrupt}
	}
	e, err := record.DecodeTrusted(it.raw)
	if err == nil && e.Version != record.FormatVersion {
		err = fmt.Errorf("%w %d", record.ErrVersion, e.Version)
	}
	if err != nil {
		return record.Event{}, &EventError{Seq: it.seq, ID: it.id.String(), Err: err}
	}
	return e, nil
}

// rowOf gives the values of eventColumns for one event. Values that a
// record leaves unset (a pull not weighed before sorting, a bale not
// measured, a time of 0) are NULL.
func rowOf(id record.EventID, raw []byte, e record.Event) ([]any, error) {
	sup := make([][]byte, len(e.Supersedes))
	for i := range e.Supersedes {
		sup[i] = e.Supersedes[i][:]
	}
	row := make([]any, len(eventColumns))
	row[0], row[1], row[2], row[3] = id[:], raw, [16]byte(e.Entity), int16(e.Kind)
	row[4], row[5], row[6] = e.Device[:], e.Clock.WallMs, int64(e.Clock.Logical)
	row[7], row[8], row[9] = e.Clock.Time(), sup, e.Deleted
	if s := e.Site; s != nil {
		row[10], row[11], row[12], row[13], row[14] = text(s.Name), s.Kind.String(), s.Lat, s.Lon, optText(s.Notes)
	}
	if b := e.Bale; b != nil {
		row[15], row[16], row[17] = [16]byte(b.Site), optTime(b.ReceivedMs), b.GrossKg
		if b.LengthM != 0 || b.WidthM != 0 || b.HeightM != 0 {
			row[18], row[19], row[20] = b.LengthM, b.WidthM, b.HeightM
		}
		row[21], row[22], row[23], row[24] = optText(b.Tag), optText(b.Grader), optText(b.Spec), optText(b.Notes)
	}
	if p := e.Pull; p != nil {
		kg, err := json.Marshal(p.Kg)
		if err != nil {
			return nil, err
		}
		row[25], row[26], row[27], row[28] = [16]byte(p.Bale), text(p.Label), optTime(p.TakenMs), kg
		if len(p.Pieces) > 0 {
			pc, err := json.Marshal(p.Pieces)
			if err != nil {
				return nil, err
			}
			row[29] = pc
		}
		if p.StatedKg != 0 {
			row[30] = p.StatedKg
		}
		row[31] = p.PartsKg()
	}
	if s := e.Setting; s != nil {
		row[32], row[33] = text(s.Kind), text(s.Name)
		// jsonb refuses \u0000; such a body stays readable in raw only.
		if json.Valid(s.Body) && !bytes.Contains(s.Body, []byte(`\u0000`)) {
			row[34] = s.Body
		}
	}
	if m := e.Measured; m != nil {
		if err := measuredColumns(row[35:], m); err != nil {
			return nil, err
		}
	}
	return row, nil
}

// measuredColumns fills the columns of a measured batch; figures not
// measured are NULL.
func measuredColumns(row []any, m *record.MeasuredRecord) error {
	bales := make([][16]byte, len(m.Bales))
	for i, b := range m.Bales {
		bales[i] = b
	}
	row[0], row[1], row[2], row[3] = text(m.Line), bales, optTime(m.RanMs), m.FlakeKg
	if m.MoisturePct != nil {
		row[4] = *m.MoisturePct
	}
	if len(m.StreamsKg) > 0 {
		js, err := json.Marshal(m.StreamsKg)
		if err != nil {
			return err
		}
		row[5] = js
	}
	if r := m.Reactor; r != nil {
		row[6], row[7], row[8], row[9] = r.FlakeKg, text(r.Glycol), r.GlycolKg, r.StripEG
		if r.ProductKg != 0 {
			row[10] = r.ProductKg
		}
		if r.HydroxylValue != 0 {
			row[11], row[12] = r.HydroxylValue, r.HydroxylMethod.String()
		}
		if r.AcidValue != nil {
			row[13], row[14] = *r.AcidValue, r.AcidMethod.String()
		}
	}
	row[15] = optText(m.Notes)
	return nil
}

// text makes a string storable as PostgreSQL text, which cannot hold
// U+0000: each one becomes U+FFFD. The raw CBOR keeps the original.
func text(s string) string {
	if strings.IndexByte(s, 0) < 0 {
		return s
	}
	return strings.ReplaceAll(s, "\x00", "\uFFFD")
}

func optText(s string) any {
	if s == "" {
		return nil
	}
	return text(s)
}

func optTime(ms int64) any {
	if ms == 0 {
		return nil
	}
	return time.UnixMilli(ms).UTC()
}
