package desk

import (
	"fmt"
	"sort"
	"strings"
	"time"

	"baleassay/data/record"
)

// Detail is one record with its current values and whole history.
type Detail struct {
	State   record.EntityState
	History []record.Stamped // every event after those it supersedes, then oldest first (record.SortHistory)
	// For a bale: its pulls and its audit summary.
	Pulls []PullRow
	Audit *AuditSummary
}

// Show returns a record by id (prefix, suffix, tag, name or event id),
// removed ones included.
func (d *Desk) Show(text string) (Detail, error) {
	ids, err := d.candidates(strings.TrimSpace(text), 0)
	if err != nil {
		return Detail{}, err
	}
	if len(ids) == 0 {
		// removed records are not candidates; try the plain id index
		h := strings.ToLower(strings.ReplaceAll(text, "-", ""))
		if len(h) >= MinIDDigits && isHex(h) {
			ids, err = d.st.MatchIDs(h, 0, 10)
			if err != nil {
				return Detail{}, err
			}
		}
	}
	switch {
	case len(ids) == 0:
		return Detail{}, fmt.Errorf("%w: no record has an id, tag or name %q", ErrNotFound, text)
	case len(ids) > 1:
		ae := &AmbiguousError{Text: text}
		for _, id := range ids {
			ae.Candidates = append(ae.Candidates, d.candidate(id))
		}
		return Detail{}, ae
	}
	st, err := d.st.Entity(ids[0])
	if err != nil {
		return Detail{}, err
	}
	hist, err := d.st.History(st.ID)
	if err != nil {
		return Detail{}, err
	}
	// Supersession first, then the clock: an edit made on a device whose
	// clock was behind still shows after what it replaced.
	record.SortHistory(hist)
	out := Detail{State: st, History: hist}
	if cur, ok := st.Current(); ok && cur.Bale != nil {
		_, out.Pulls, err = d.Pulls(st.ID.String())
		if err != nil {
			return out, err
		}
		ps, err := d.st.Pulls(st.ID)
		if err != nil {
			return out, err
		}
		a := d.summarize(*cur.Bale, ps)
		out.Audit = &a
	}
	return out, nil
}

// Conflict is a record with concurrent values, or a bale whose pulls
// share a label.
type Conflict struct {
	State record.EntityState // the record with more than one head (Kind 0 for a label clash)
	// For a label clash: the bale, the label and the pulls that share it.
	Bale  record.EntityID
	Label string
	Pulls []record.EntityID
}

// Conflicts lists records edited on two devices at once, then labels
// given to more than one pull of a bale.
func (d *Desk) Conflicts() ([]Conflict, error) {
	cs, err := d.st.Conflicts()
	if err != nil {
		return nil, err
	}
	var out []Conflict
	for _, c := range cs {
		out = append(out, Conflict{State: c})
	}
	by, err := d.st.PullsByBale()
	if err != nil {
		return nil, err
	}
	var bales []record.EntityID
	for b := range by {
		bales = append(bales, b)
	}
	sort.Slice(bales, func(i, j int) bool { return bales[i].String() < bales[j].String() })
	for _, b := range bales {
		labels := map[string][]record.EntityID{}
		var order []string
		for _, p := range by[b] {
			if len(labels[p.Pull.Label]) == 0 {
				order = append(order, p.Pull.Label)
			}
			labels[p.Pull.Label] = append(labels[p.Pull.Label], p.ID)
		}
		for _, l := range order {
			if len(labels[l]) > 1 {
				out = append(out, Conflict{Bale: b, Label: l, Pulls: labels[l]})
			}
		}
	}
	return out, nil
}

// Resolve ends a conflict by keeping the value of one of its events,
// given by at least 6 leading hex digits.
func (d *Desk) ResolveConflict(text, event string) (record.EntityState, record.EventID, error) {
	st, err := d.Resolve(text, 0)
	if err != nil {
		return st, record.EventID{}, err
	}
	if !st.Conflicted() {
		return st, record.EventID{}, fmt.Errorf("%w: %s %s has no conflict", ErrNotFound, st.Kind, st.ID)
	}
	want := strings.ToLower(event)
	var keep []record.EventID
	for _, h := range st.Heads {
		if len(want) >= 6 && strings.HasPrefix(h.ID.String(), want) {
			keep = append(keep, h.ID)
		}
	}
	if len(keep) != 1 {
		return st, record.EventID{}, fmt.Errorf("%w: event %q is not one of the %d current values of %s; give at least 6 hex digits", ErrNotFound, event, len(st.Heads), st.ID)
	}
	_, err = d.st.Resolve(st.ID, keep[0])
	return st, keep[0], saveError(err)
}

// Describe is a one-line text of an event's value.
func Describe(e record.Event) string {
	switch {
	case e.Deleted:
		return "removed"
	case e.Site != nil:
		s := e.Site
		t := fmt.Sprintf("%s (%s) at %s, %s", s.Name, s.Kind, Num(s.Lat, 5), Num(s.Lon, 5))
		if s.Notes != "" {
			t += "; " + s.Notes
		}
		return t
	case e.Bale != nil:
		b := e.Bale
		t := fmt.Sprintf("bale %s from site %s, %s kg, received %s", b.Tag, b.Site, Num(b.GrossKg, 1), TimeText(b.ReceivedMs))
		if dd := b.DensityKgM3(); dd > 0 {
			t += fmt.Sprintf(", %s×%s×%s m, %s kg/m³", Num(b.LengthM, 2), Num(b.WidthM, 2), Num(b.HeightM, 2), Num(dd, 0))
		}
		if b.Spec != "" {
			t += ", spec " + b.Spec
		}
		return t
	case e.Pull != nil:
		p := e.Pull
		keys := record.SortedKeys(p.Kg)
		parts := make([]string, len(keys))
		for i, k := range keys {
			parts[i] = fmt.Sprintf("%s %s", k, Num(p.Kg[k], 3))
		}
		t := fmt.Sprintf("pull %s of bale %s, %s kg", p.Label, p.Bale, Num(p.PartsKg(), 3))
		if p.StatedKg > 0 {
			t += fmt.Sprintf(" of %s kg weighed", Num(p.StatedKg, 3))
		}
		if p.TotalPieces > 0 {
			t += ", " + Plural(int(p.TotalPieces), "piece", "pieces") + " examined"
		}
		return t + ": " + strings.Join(parts, ", ")
	case e.Setting != nil:
		return fmt.Sprintf("%s %q (%d bytes of JSON)", settingKindOf(e.Setting.Kind), e.Setting.Name, len(e.Setting.Body))
	case e.Measured != nil:
		return DescribeMeasured(*e.Measured)
	}
	return "(empty)"
}

// TimeText is a Unix-ms time as RFC 3339 UTC, "" for 0.
func TimeText(ms int64) string {
	if ms == 0 {
		return ""
	}
	return time.UnixMilli(ms).UTC().Format(time.RFC3339)
}
