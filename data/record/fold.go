package record

import (
	"bytes"
	"sort"
)

// EntityState is the folded state of one entity: its heads (the events no
// other event of the entity supersedes) in view order, oldest first.
type EntityState struct {
	ID     EntityID
	Kind   Kind
	Heads  []Stamped
	Events int // number of events of the entity, superseded ones included
}

// Conflicted reports whether more than one head stands: concurrent edits
// that no later event has resolved.
func (s EntityState) Conflicted() bool { return len(s.Heads) > 1 }

// Deleted reports whether every head is a tombstone: the entity is hidden
// from views but its events are kept.
func (s EntityState) Deleted() bool {
	for _, h := range s.Heads {
		if !h.Deleted {
			return false
		}
	}
	return len(s.Heads) > 0
}

// Current is the head shown in views: the latest head in view order that
// is not a tombstone (a conflict between an edit and a deletion shows the
// edit, flagged as conflicted). ok is false for a deleted entity.
func (s EntityState) Current() (Stamped, bool) {
	for i := len(s.Heads) - 1; i >= 0; i-- {
		if !s.Heads[i].Deleted {
			return s.Heads[i], true
		}
	}
	return Stamped{}, false
}

// HeadIDs lists the ids of the heads, for an event that supersedes them all.
func (s EntityState) HeadIDs() []EventID {
	ids := make([]EventID, len(s.Heads))
	for i, h := range s.Heads {
		ids[i] = h.ID
	}
	return ids
}

// Fold computes the state of every entity from a set of events. The
// result depends only on the set, not on the order of evs or on
// duplicates in it: a head is an event that no other event of the same
// entity lists in Supersedes. Supersedes entries that name events of other
// entities, or events not in the set, are ignored here.
func Fold(evs []Stamped) map[EntityID]*EntityState {
	type key struct {
		e  EntityID
		id EventID
	}
	superseded := make(map[key]bool)
	uniq := make(map[EventID]Stamped, len(evs))
	for _, e := range evs {
		uniq[e.ID] = e
	}
	for _, e := range uniq {
		for _, s := range e.Supersedes {
			superseded[key{e.Entity, s}] = true
		}
	}
	out := make(map[EntityID]*EntityState)
	for _, e := range uniq {
		st := out[e.Entity]
		if st == nil {
			st = &EntityState{ID: e.Entity, Kind: e.Kind}
			out[e.Entity] = st
		}
		st.Events++
		if !superseded[key{e.Entity, e.ID}] {
			st.Heads = append(st.Heads, e)
		}
	}
	for _, st := range out {
		SortStamped(st.Heads)
	}
	return out
}

func SortStamped(s []Stamped) {
	sort.Slice(s, func(i, j int) bool { return compareStamped(s[i], s[j]) < 0 })
}

func SortEntityIDs(ids []EntityID) {
	sort.Slice(ids, func(i, j int) bool { return bytes.Compare(ids[i][:], ids[j][:]) < 0 })
}
