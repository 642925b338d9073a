package desk

import (
	"fmt"
	"time"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/data/store"
)

// MaxSideM is the longest bale side taken as metres; a longer one is
// refused as centimetres (a bale is about 0.7–1.6 m a side).
const MaxSideM = 5.0

// earliestReceived is the date before which a received date needs
// confirming.
var earliestReceived = time.Date(1990, 1, 1, 0, 0, 0, 0, time.UTC)

// BaleInput is a new bale: the site as the user named it, and the record.
type BaleInput struct {
	Site string // id, prefix, suffix or name of the site
	record.BaleRecord
}

// AddBale saves a new bale. Refused: an unknown site, a spec that is
// neither stored nor built in, a side above 5 m. Confirm: a received
// date in the future or before 1990, an implausible density.
func (d *Desk) AddBale(in BaleInput, opt SaveOptions) (record.EntityID, error) {
	site, err := d.Resolve(in.Site, record.KindSite)
	if err != nil {
		return record.EntityID{}, err
	}
	rec := in.BaleRecord
	rec.Site = site.ID
	if rec.ReceivedMs == 0 {
		rec.ReceivedMs = d.now().UnixMilli()
	}
	if err := d.checkBale(rec, 0, opt); err != nil {
		return record.EntityID{}, err
	}
	return d.saveNew(record.Event{Kind: record.KindBale, Bale: &rec}, opt)
}

// checkBale holds a bale to the desk's rules beyond the record's own;
// pulledKg is what its pulls weigh already.
func (d *Desk) checkBale(b record.BaleRecord, pulledKg float64, opt SaveOptions) error {
	for _, s := range []struct {
		name string
		v    float64
	}{{"length", b.LengthM}, {"width", b.WidthM}, {"height", b.HeightM}} {
		if s.v > MaxSideM {
			return refused(RefuseCentimetres, "the %s %s m is longer than any bale: give metres (e.g. 1.22, not 122)", s.name, Num(s.v, 3))
		}
	}
	if b.Spec != "" {
		if _, ok := assess.BuiltinSpec(b.Spec); !ok {
			if _, found, err := d.setting(SettingSpec, b.Spec); err != nil {
				return err
			} else if !found {
				return refused(RefuseUnknownSpec, "there is no spec %q, stored or built in (built in: %v); add it first (settings add spec FILE)", b.Spec, assess.BuiltinSpecNames())
			}
		}
	}
	if pulledKg > b.GrossKg {
		return refused(RefuseOverGross, "the bale's pulls weigh %s kg, more than its %s kg gross mass", Num(pulledKg, 2), Num(b.GrossKg, 2))
	}
	if opt.Confirm {
		return nil
	}
	var checks []Check
	rx := time.UnixMilli(b.ReceivedMs).UTC()
	if rx.After(d.now().Add(time.Hour)) {
		checks = append(checks, Check{ConcernReceivedFuture, fmt.Sprintf("received %s is in the future", rx.Format("2006-01-02 15:04"))})
	}
	if rx.Before(earliestReceived) {
		checks = append(checks, Check{ConcernReceivedOld, fmt.Sprintf("received %s is before 1990", rx.Format("2006-01-02"))})
	}
	if len(checks) > 0 {
		return &ConfirmError{checks}
	}
	return nil
}

// BaleEdit holds the fields to change; nil leaves a field as it is.
type BaleEdit struct {
	Site                    *string // id, prefix, suffix or name
	GrossKg                 *float64
	Dims                    *[3]float64 // length, width, height in m; all zero: not measured
	Tag, Grader, Spec, Note *string
	Received                *time.Time
}

// EditBale saves a new value of a bale that supersedes the current one.
func (d *Desk) EditBale(text string, e BaleEdit, opt SaveOptions) (record.EntityID, record.BaleRecord, error) {
	st, err := d.Resolve(text, record.KindBale)
	if err != nil {
		return st.ID, record.BaleRecord{}, err
	}
	cur, err := live(st)
	if err != nil {
		return st.ID, record.BaleRecord{}, err
	}
	rec := *cur.Bale
	if e.Site != nil {
		site, err := d.Resolve(*e.Site, record.KindSite)
		if err != nil {
			return st.ID, rec, err
		}
		rec.Site = site.ID
	}
	set(&rec.GrossKg, e.GrossKg)
	if e.Dims != nil {
		rec.LengthM, rec.WidthM, rec.HeightM = e.Dims[0], e.Dims[1], e.Dims[2]
	}
	set(&rec.Tag, e.Tag)
	set(&rec.Grader, e.Grader)
	set(&rec.Spec, e.Spec)
	set(&rec.Notes, e.Note)
	if e.Received != nil {
		rec.ReceivedMs = e.Received.UnixMilli()
	}
	pulls, err := d.st.Pulls(st.ID)
	if err != nil {
		return st.ID, rec, err
	}
	if err := d.checkBale(rec, pullsKg(pulls), opt); err != nil {
		return st.ID, rec, err
	}
	_, err = d.st.Supersede(st.ID, record.Event{Bale: &rec}, store.SaveOptions{Confirm: opt.Confirm})
	return st.ID, rec, saveError(err)
}

// RemoveBale saves a tombstone for a bale; its history is kept.
func (d *Desk) RemoveBale(text string) (record.EntityID, error) {
	st, err := d.Resolve(text, record.KindBale)
	if err != nil {
		return st.ID, err
	}
	_, err = d.st.Delete(st.ID)
	return st.ID, saveError(err)
}

func pullsKg(ps []store.PullView) float64 {
	var kg float64
	for _, p := range ps {
		kg += p.Pull.PartsKg()
	}
	return kg
}

// BaleFilter narrows Bales; zero fields do not filter.
type BaleFilter struct {
	Site  string    // id, prefix, suffix or name of a site
	Range DateRange // received dates
}

// BaleRow is one bale of a listing, joined with its site's name, its
// pulls and its audit.
type BaleRow struct {
	ID         record.EntityID
	Bale       record.BaleRecord
	SiteName   string
	Pulls      int
	Audit      AuditSummary
	Conflicted bool
}

// Bales lists the visible bales by received time, each with its audit
// summary against its own spec (or the default one).
func (d *Desk) Bales(f BaleFilter) ([]BaleRow, error) {
	var site record.EntityID
	if f.Site != "" {
		st, err := d.Resolve(f.Site, record.KindSite)
		if err != nil {
			return nil, err
		}
		site = st.ID
	}
	bales, err := d.st.Bales(site)
	if err != nil {
		return nil, err
	}
	pulls, err := d.st.PullsByBale()
	if err != nil {
		return nil, err
	}
	names := map[record.EntityID]string{}
	sites, err := d.st.Sites()
	if err != nil {
		return nil, err
	}
	for _, s := range sites {
		names[s.ID] = s.Site.Name
	}
	var out []BaleRow
	for _, b := range bales {
		if !f.Range.Contains(b.Bale.ReceivedMs) {
			continue
		}
		ps := pulls[b.ID]
		out = append(out, BaleRow{ID: b.ID, Bale: b.Bale, SiteName: names[b.Bale.Site], Pulls: len(ps),
			Audit: d.summarize(b.Bale, ps), Conflicted: b.Conflicted})
	}
	return out, nil
}
