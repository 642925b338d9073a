package desk

import (
	"encoding/hex"
	"errors"
	"fmt"
	"strings"

	"baleassay/data/record"
)

// MinIDDigits is the fewest hex digits of an id a user may give.
const MinIDDigits = 4

// Resolve finds the live record of a kind (any kind when kind is 0) that
// text names: its full id, an event id, a unique prefix or suffix of at
// least 4 hex digits of its id (dashes optional, odd lengths too), or, for
// a bale, its tag, and for a site, its name. An ambiguous text gives an
// *AmbiguousError listing the candidates.
func (d *Desk) Resolve(text string, kind record.Kind) (record.EntityState, error) {
	text = strings.TrimSpace(text)
	if text == "" {
		return record.EntityState{}, fmt.Errorf("%w: give an id", ErrUsage)
	}
	ids, err := d.candidates(text, kind)
	if err != nil {
		return record.EntityState{}, err
	}
	switch len(ids) {
	case 0:
		what := "record"
		if kind != 0 {
			what = kind.String()
		}
		return record.EntityState{}, fmt.Errorf("%w: no %s has an id, tag or name %q", ErrNotFound, what, text)
	case 1:
	default:
		ae := &AmbiguousError{Text: text}
		for _, id := range ids {
			ae.Candidates = append(ae.Candidates, d.candidate(id))
		}
		return record.EntityState{}, ae
	}
	st, err := d.st.Entity(ids[0])
	if err != nil {
		return st, err
	}
	if kind != 0 && st.Kind != kind {
		return st, fmt.Errorf("%w: %s is a %s, not a %s", ErrWrongKind, st.ID, st.Kind, kind)
	}
	if st.Deleted() {
		return st, fmt.Errorf("%w: %s %s was removed; its history is kept (show %s)", ErrDeleted, st.Kind, st.ID, st.ID)
	}
	return st, nil
}

// candidates lists the entity ids text may mean, at most 10.
func (d *Desk) candidates(text string, kind record.Kind) ([]record.EntityID, error) {
	if id, err := record.ParseEntityID(text); err == nil && len(text) >= 32 {
		return []record.EntityID{id}, nil
	}
	if ev, err := record.ParseEventID(text); err == nil {
		if e, err := d.st.Event(ev); err == nil {
			return []record.EntityID{e.Entity}, nil
		}
	}
	var out []record.EntityID
	seen := map[record.EntityID]bool{}
	add := func(id record.EntityID) {
		if !seen[id] {
			seen[id] = true
			out = append(out, id)
		}
	}
	h := strings.ToLower(strings.ReplaceAll(text, "-", ""))
	if len(h) >= MinIDDigits && len(h) <= 32 && isHex(h) {
		ids, err := d.st.MatchIDs(h, kind, 10)
		if err != nil {
			return nil, err
		}
		for _, id := range ids {
			if st, err := d.st.Entity(id); err == nil && !st.Deleted() {
				add(id)
			}
		}
	}
	if kind == 0 || kind == record.KindBale {
		bales, err := d.st.Bales(record.EntityID{})
		if err != nil {
			return nil, err
		}
		for _, b := range bales {
			if b.Bale.Tag != "" && strings.EqualFold(b.Bale.Tag, text) {
				add(b.ID)
			}
		}
	}
	if kind == 0 || kind == record.KindSite {
		sites, err := d.st.Sites()
		if err != nil {
			return nil, err
		}
		for _, s := range sites {
			if strings.EqualFold(s.Site.Name, text) {
				add(s.ID)
			}
		}
	}
	return out, nil
}

func isHex(s string) bool {
	_, err := hex.DecodeString(s + strings.Repeat("0", len(s)%2))
	return err == nil
}

// candidate describes an entity for a list of choices.
func (d *Desk) candidate(id record.EntityID) Candidate {
	c := Candidate{ID: id}
	st, err := d.st.Entity(id)
	if err != nil {
		return c
	}
	c.Kind = st.Kind
	if cur, ok := st.Current(); ok {
		switch {
		case cur.Site != nil:
			c.Label = cur.Site.Name
		case cur.Bale != nil:
			c.Label = cur.Bale.Tag
		case cur.Pull != nil:
			c.Label = cur.Pull.Label
		case cur.Setting != nil:
			c.Label = cur.Setting.Name
		case cur.Measured != nil:
			c.Label = "measured " + TimeText(cur.Measured.RanMs)
		}
	}
	return c
}

// Found is what Find turned up.
type Found struct {
	Sites []SiteRow
	Bales []BaleRow
}

// Find looks up sites whose name and bales whose tag contain text
// (case-insensitive).
func (d *Desk) Find(text string) (Found, error) {
	var f Found
	q := strings.ToLower(strings.TrimSpace(text))
	if q == "" {
		return f, fmt.Errorf("%w: give some text to look for", ErrUsage)
	}
	sites, err := d.Sites()
	if err != nil {
		return f, err
	}
	for _, s := range sites {
		if strings.Contains(strings.ToLower(s.Site.Name), q) {
			f.Sites = append(f.Sites, s)
		}
	}
	bales, err := d.Bales(BaleFilter{})
	if err != nil {
		return f, err
	}
	for _, b := range bales {
		if strings.Contains(strings.ToLower(b.Bale.Tag), q) {
			f.Bales = append(f.Bales, b)
		}
	}
	return f, nil
}

// live returns the current value of a resolved entity.
func live(st record.EntityState) (record.Stamped, error) {
	cur, ok := st.Current()
	if !ok {
		return cur, errors.New("record has no current value")
	}
	return cur, nil
}
