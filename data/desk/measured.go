package desk

import (
	"errors"
	"fmt"
	"sort"
	"strings"
	"time"

	"baleassay/data/record"
	"baleassay/yield"
)

// Bounds of a plausible flake share of a batch's bales (flake as
// weighed / gross bale mass); outside them a save needs confirming.
// Bale-to-flake yields run about 60–80 % (from memory); these bounds are
// wider on purpose.
const (
	MinPlausibleFlakeShare = 0.40
	MaxPlausibleFlakeShare = 0.95
)

// MeasuredInput is a measured batch as the user gives it.
type MeasuredInput struct {
	Line        string    // a stored line's name or the built-in line's ("" for the built-in line)
	Bales       []string  // ids, unique prefixes or suffixes, or tags
	Ran         time.Time // when the batch ran; zero for now
	FlakeKg     float64   // flake as weighed off the line
	MoisturePct *float64  // its moisture, % of the wet flake (nil: not measured)
	StreamsKg   map[string]float64
	Reactor     *record.ReactorRecord
	Notes       string
}

// lineModel finds a line by name: a stored line wins over the built-in
// one of the same name; "" is the built-in line.
func (d *Desk) lineModel(name string) (*yield.Model, string, error) {
	if name == "" {
		name = yield.BuiltinLineName
	}
	body, found, err := d.setting(SettingLine, name)
	if err != nil {
		return nil, name, err
	}
	if found {
		l, err := yield.ReadLine(strings.NewReader(string(body)), name)
		if err != nil {
			return nil, name, err
		}
		m, err := yield.Compile(l)
		return m, name, err
	}
	if name == yield.BuiltinLineName {
		m, err := yield.Compile(yield.BuiltinLine())
		return m, name, err
	}
	return nil, name, fmt.Errorf("%w: there is no line profile %q in this store (built in: %q); add it first (settings add line FILE)", ErrNotFound, name, yield.BuiltinLineName)
}

// AddMeasured saves what a plant measured of a batch of bales. Refused:
// an unknown bale or line, a stream the line does not have, dry flake
// heavier than the bales, a value outside its physical range (see
// record.MeasuredRecord). Confirm: a flake share of the bales outside
// 40–95 %, a bale already in another measured batch, a bale without
// pulls (it cannot be predicted), a date in the future. A hydroxyl value
// without a method is taken as ASTM D4274, an acid value as ASTM D4662.
func (d *Desk) AddMeasured(in MeasuredInput, opt SaveOptions) (record.EntityID, error) {
	m, line, err := d.lineModel(in.Line)
	if err != nil {
		if errors.Is(err, ErrNotFound) {
			return record.EntityID{}, &RefusedError{Reason: RefuseInvalid, Msg: err.Error(), Err: err}
		}
		return record.EntityID{}, err
	}
	if len(in.Bales) == 0 {
		return record.EntityID{}, fmt.Errorf("%w: name the bales of the batch", ErrUsage)
	}
	rec := record.MeasuredRecord{Line: line, FlakeKg: in.FlakeKg, MoisturePct: in.MoisturePct, StreamsKg: in.StreamsKg, Notes: in.Notes}
	ran := in.Ran
	if ran.IsZero() {
		ran = d.now()
	}
	rec.RanMs = ran.UnixMilli()
	gross := 0.0
	var checks []Check
	measured, err := d.measuredBales()
	if err != nil {
		return record.EntityID{}, err
	}
	for _, text := range in.Bales {
		st, err := d.Resolve(text, record.KindBale)
		if err != nil {
			return record.EntityID{}, err
		}
		cur, err := live(st)
		if err != nil {
			return record.EntityID{}, err
		}
		rec.Bales = append(rec.Bales, st.ID)
		gross += cur.Bale.GrossKg
		label := baleLabel(st.ID, *cur.Bale)
		if other, ok := measured[st.ID]; ok {
			checks = append(checks, Check{ConcernMeasuredTwice, fmt.Sprintf("bale %s is already in measured batch %s", label, other)})
		}
		if pulls, err := d.st.Pulls(st.ID); err != nil {
			return record.EntityID{}, err
		} else if len(pulls) == 0 {
			checks = append(checks, Check{ConcernNotAudited, fmt.Sprintf("bale %s has no pulls: the batch cannot be predicted until it has", label)})
		}
	}
	streams := m.Streams()
	for _, k := range record.SortedKeys(in.StreamsKg) {
		if !contains(streams, k) {
			return record.EntityID{}, refused(RefuseInvalid, "line %q has no stream %q; its streams are %s", line, k, strings.Join(streams, ", "))
		}
	}
	if r := in.Reactor; r != nil {
		rr := *r
		if g, err := yield.LookupGlycol(rr.Glycol); err == nil {
			rr.Glycol = g.Key
		}
		if rr.HydroxylValue > 0 && rr.HydroxylMethod == 0 {
			rr.HydroxylMethod = record.MethodD4274
		}
		if rr.AcidValue != nil && rr.AcidMethod == 0 {
			rr.AcidMethod = record.MethodD4662
		}
		rec.Reactor = &rr
	}
	// The record's own rules first, so that an impossible value is
	// refused before any plausibility question is asked.
	probe := record.Event{Version: record.FormatVersion, Entity: record.EntityID{1}, Kind: record.KindMeasured,
		Device: d.st.DeviceID(), Clock: record.HLC{WallMs: d.now().UnixMilli()}, Measured: &rec}
	if _, err := record.ValidateEventAt(probe, d.now()); err != nil {
		return record.EntityID{}, saveError(err)
	}
	dry := rec.FlakeKg
	if p := rec.MoisturePct; p != nil {
		dry *= 1 - *p/100
	}
	if dry > gross {
		return record.EntityID{}, refused(RefuseOverGross, "the dry flake (%s kg) weighs more than the batch's bales (%s kg gross); check the flake's mass or the bales", Num(dry, 1), Num(gross, 1))
	}
	if share := rec.FlakeKg / gross; share < MinPlausibleFlakeShare || share > MaxPlausibleFlakeShare {
		checks = append(checks, Check{ConcernFlakeShare, fmt.Sprintf("the flake is %s %% of the bales' %s kg; bale-to-flake yields run about 60–80 %%", Num(100*share, 1), Num(gross, 1))})
	}
	if ran.After(d.now().Add(time.Hour)) {
		checks = append(checks, Check{ConcernRanFuture, fmt.Sprintf("the batch ran %s, in the future", ran.UTC().Format("2006-01-02 15:04"))})
	}
	if len(checks) > 0 && !opt.Confirm {
		return record.EntityID{}, &ConfirmError{checks}
	}
	return d.saveNew(record.Event{Kind: record.KindMeasured, Measured: &rec}, opt)
}

func contains(xs []string, s string) bool {
	for _, x := range xs {
		if x == s {
			return true
		}
	}
	return false
}

func baleLabel(id record.EntityID, b record.BaleRecord) string {
	if b.Tag != "" {
		return b.Tag
	}
	return id.String()
}

// measuredBales maps each bale of a visible measured batch to the batch.
func (d *Desk) measuredBales() (map[record.EntityID]record.EntityID, error) {
	rows, err := d.Measured(MeasuredFilter{})
	if err != nil {
		return nil, err
	}
	out := map[record.EntityID]record.EntityID{}
	for _, r := range rows {
		for _, b := range r.Rec.Bales {
			out[b] = r.ID
		}
	}
	return out, nil
}

// MeasuredFilter narrows Measured; zero fields do not filter.
type MeasuredFilter struct {
	Line  string    // the line's name
	Range DateRange // when the batch ran
}

// MeasuredRow is one measured batch.
type MeasuredRow struct {
	ID         record.EntityID
	Rec        record.MeasuredRecord
	Conflicted bool
}

// Measured lists the visible measured batches by the time they ran,
// then id.
func (d *Desk) Measured(f MeasuredFilter) ([]MeasuredRow, error) {
	states, err := d.st.Entities(record.KindMeasured)
	if err != nil {
		return nil, err
	}
	var out []MeasuredRow
	for _, st := range states {
		cur, ok := st.Current()
		if !ok || cur.Measured == nil {
			continue
		}
		if f.Line != "" && cur.Measured.Line != f.Line {
			continue
		}
		if !f.Range.Contains(cur.Measured.RanMs) {
			continue
		}
		out = append(out, MeasuredRow{ID: st.ID, Rec: *cur.Measured, Conflicted: st.Conflicted()})
	}
	sort.Slice(out, func(i, j int) bool {
		if out[i].Rec.RanMs != out[j].Rec.RanMs {
			return out[i].Rec.RanMs < out[j].Rec.RanMs
		}
		return out[i].ID.String() < out[j].ID.String()
	})
	return out, nil
}

// RemoveMeasured saves a tombstone for a measured batch; its history is
// kept.
func (d *Desk) RemoveMeasured(text string) (record.EntityID, error) {
	st, err := d.Resolve(text, record.KindMeasured)
	if err != nil {
		return st.ID, err
	}
	_, err = d.st.Delete(st.ID)
	return st.ID, saveError(err)
}

// DescribeMeasured is a measured batch in one line.
func DescribeMeasured(m record.MeasuredRecord) string {
	t := fmt.Sprintf("measured batch of %s on line %q, ran %s: flake %s kg", Plural(len(m.Bales), "bale", "bales"), m.Line,
		TimeText(m.RanMs), Num(m.FlakeKg, 1))
	if p := m.MoisturePct; p != nil {
		t += fmt.Sprintf(" at %s %% moisture", Num(*p, 2))
	}
	for _, k := range record.SortedKeys(m.StreamsKg) {
		t += fmt.Sprintf(", %s %s kg", k, Num(m.StreamsKg[k], 1))
	}
	if r := m.Reactor; r != nil {
		t += fmt.Sprintf("; reactor %s kg flake + %s kg %s", Num(r.FlakeKg, 1), Num(r.GlycolKg, 1), r.Glycol)
		if r.ProductKg > 0 {
			t += fmt.Sprintf(" → %s kg", Num(r.ProductKg, 1))
		}
		if r.HydroxylValue > 0 {
			t += fmt.Sprintf(", OHV %s mg KOH/g (%s)", Num(r.HydroxylValue, 1), r.HydroxylMethod)
		}
		if r.AcidValue != nil {
			t += fmt.Sprintf(", acid value %s mg KOH/g (%s)", Num(*r.AcidValue, 2), r.AcidMethod)
		}
	}
	return t
}
