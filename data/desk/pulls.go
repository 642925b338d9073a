package desk

import (
	"fmt"
	"strings"

	"baleassay/data/record"
	"baleassay/data/store"
)

// PullRow is a visible pull.
type PullRow struct {
	ID         record.EntityID
	Pull       record.PullRecord
	Conflicted bool
}

// PartsKg is the sum of the sorted parts.
func (p PullRow) PartsKg() float64 { return p.Pull.PartsKg() }

// RemainderKg is what was weighed but not sorted (weighed − parts), 0
// when the pull was not weighed before sorting.
func (p PullRow) RemainderKg() float64 {
	if p.Pull.StatedKg == 0 {
		return 0
	}
	return p.Pull.StatedKg - p.Pull.PartsKg()
}

// Pulls lists a bale's visible pulls by label.
func (d *Desk) Pulls(bale string) (record.EntityID, []PullRow, error) {
	st, err := d.Resolve(bale, record.KindBale)
	if err != nil {
		return st.ID, nil, err
	}
	ps, err := d.st.Pulls(st.ID)
	if err != nil {
		return st.ID, nil, err
	}
	out := make([]PullRow, len(ps))
	for i, p := range ps {
		out[i] = PullRow{p.ID, p.Pull, p.Conflicted}
	}
	return st.ID, out, nil
}

// AddPulls saves new pulls of a bale in one transaction, all or nothing.
// Refused: a label the bale already has (or given twice), and pulls that
// together with the bale's others weigh more than the bale.
func (d *Desk) AddPulls(bale string, pulls []record.PullRecord, opt SaveOptions) (record.EntityID, []record.EntityID, error) {
	st, err := d.Resolve(bale, record.KindBale)
	if err != nil {
		return st.ID, nil, err
	}
	cur, err := live(st)
	if err != nil {
		return st.ID, nil, err
	}
	have, err := d.st.Pulls(st.ID)
	if err != nil {
		return st.ID, nil, err
	}
	if err := checkNewPulls(st.ID, *cur.Bale, have, pulls, record.EntityID{}); err != nil {
		return st.ID, nil, err
	}
	evs := make([]record.Event, len(pulls))
	for i := range pulls {
		p := pulls[i]
		p.Bale = st.ID
		if p.TakenMs == 0 {
			p.TakenMs = d.now().UnixMilli()
		}
		evs[i] = record.Event{Kind: record.KindPull, Pull: &p}
	}
	ids, err := d.st.Save(evs, store.SaveOptions{Confirm: opt.Confirm})
	if err != nil {
		return st.ID, nil, saveError(err)
	}
	ents := make([]record.EntityID, len(ids))
	for i, id := range ids {
		e, err := d.st.Event(id)
		if err != nil {
			return st.ID, nil, err
		}
		ents[i] = e.Entity
	}
	return st.ID, ents, nil
}

// checkNewPulls holds new (or edited: self) pulls to the bale's rules.
func checkNewPulls(bale record.EntityID, b record.BaleRecord, have []store.PullView, add []record.PullRecord, self record.EntityID) error {
	used := map[string]bool{}
	var kg float64
	for _, p := range have {
		if p.ID == self {
			continue
		}
		used[strings.TrimSpace(p.Pull.Label)] = true
		kg += p.Pull.PartsKg()
	}
	for _, p := range add {
		l := strings.TrimSpace(p.Label)
		if used[l] {
			return refused(RefuseDuplicateLabel, "bale %s already has a pull %q: give the new pull another label", bale, p.Label)
		}
		used[l] = true
		kg += p.PartsKg()
	}
	if kg > b.GrossKg {
		return refused(RefuseOverGross, "the pulls of bale %s would weigh %s kg, more than its %s kg gross mass: check the pull masses, the unit or the bale's mass", bale, Num(kg, 2), Num(b.GrossKg, 2))
	}
	return nil
}

// EditPull replaces a pull's masses (and label, weighed mass, time) by a
// new value that supersedes the current one; the bale stays the same.
func (d *Desk) EditPull(text string, p record.PullRecord, opt SaveOptions) (record.EntityID, error) {
	st, err := d.Resolve(text, record.KindPull)
	if err != nil {
		return st.ID, err
	}
	cur, err := live(st)
	if err != nil {
		return st.ID, err
	}
	old := *cur.Pull
	p.Bale = old.Bale
	if p.Label == "" {
		p.Label = old.Label
	}
	if p.TakenMs == 0 {
		p.TakenMs = old.TakenMs
	}
	bst, err := d.st.Entity(old.Bale)
	if err != nil {
		return st.ID, err
	}
	if bcur, ok := bst.Current(); ok && bcur.Bale != nil {
		have, err := d.st.Pulls(old.Bale)
		if err != nil {
			return st.ID, err
		}
		if err := checkNewPulls(old.Bale, *bcur.Bale, have, []record.PullRecord{p}, st.ID); err != nil {
			return st.ID, err
		}
	}
	_, err = d.st.Supersede(st.ID, record.Event{Pull: &p}, store.SaveOptions{Confirm: opt.Confirm})
	return st.ID, saveError(err)
}

// RemovePull saves a tombstone for a pull; its history is kept.
func (d *Desk) RemovePull(text string) (record.EntityID, error) {
	st, err := d.Resolve(text, record.KindPull)
	if err != nil {
		return st.ID, err
	}
	_, err = d.st.Delete(st.ID)
	return st.ID, saveError(err)
}

// Drafts keep a pull while it is typed: every PutDraft is committed and
// synced, so the app may call it on every keystroke.

// PutDraft stores (or replaces) a draft pull of a bale under a name.
func (d *Desk) PutDraft(name, bale string, p record.PullRecord) error {
	st, err := d.Resolve(bale, record.KindBale)
	if err != nil {
		return err
	}
	p.Bale = st.ID
	return saveError(d.st.PutDraft(name, p))
}

// Draft returns a draft; ok is false when there is none of that name.
func (d *Desk) Draft(name string) (record.PullRecord, bool, error) { return d.st.Draft(name) }

// Drafts lists the drafts' names.
func (d *Desk) Drafts() ([]string, error) { return d.st.DraftNames() }

// DiscardDraft removes a draft.
func (d *Desk) DiscardDraft(name string) error { return d.st.DiscardDraft(name) }

// SaveDraft saves a draft as a pull of its bale, with the checks of
// AddPulls, and removes the draft in the same transaction.
func (d *Desk) SaveDraft(name string, opt SaveOptions) (record.EntityID, error) {
	p, ok, err := d.st.Draft(name)
	if err != nil {
		return record.EntityID{}, err
	}
	if !ok {
		return record.EntityID{}, fmt.Errorf("%w: there is no draft %q", ErrNotFound, name)
	}
	bst, err := d.st.Entity(p.Bale)
	if err != nil {
		return record.EntityID{}, err
	}
	cur, ok := bst.Current()
	if !ok || cur.Bale == nil {
		return record.EntityID{}, refused(RefuseDeleted, "the draft's bale %s was removed", p.Bale)
	}
	have, err := d.st.Pulls(p.Bale)
	if err != nil {
		return record.EntityID{}, err
	}
	if err := checkNewPulls(p.Bale, *cur.Bale, have, []record.PullRecord{p}, record.EntityID{}); err != nil {
		return record.EntityID{}, err
	}
	id, _, err := d.st.SaveDraft(name, store.SaveOptions{Confirm: opt.Confirm})
	return id, saveError(err)
}
