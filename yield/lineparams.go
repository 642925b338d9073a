package yield

import (
	"fmt"
	"maps"
	"sort"
)

// ParamRef names one share of a line profile: the profile's
// glue_share_of_labels (Stage −1), or a stage's field, with the removal
// key for a removal entry.
type ParamRef struct {
	Stage int    // 0-based stage index; −1 for glue_share_of_labels
	Field string // glue_share_of_labels, pet_loss, removal, dust_made, efficiency, product_loss, moisture
	Key   string // removal key (category, group, glue or dust); "" otherwise
}

// String names the share as a person reads it: "stage 4 (sink_float)
// efficiency", "stage 1 (sort) removal.pvc".
func (r ParamRef) String() string {
	if r.Stage < 0 {
		return r.Field
	}
	f := r.Field
	if r.Key != "" {
		f += "." + r.Key
	}
	return fmt.Sprintf("stage %d %s", r.Stage+1, f)
}

// Label is String with the stage's kind and name from the line.
func (r ParamRef) Label(l Line) string {
	if r.Stage < 0 || r.Stage >= len(l.Stages) {
		return r.String()
	}
	s := l.Stages[r.Stage]
	name := s.Kind.String()
	if s.Name != "" {
		name += ": " + s.Name
	}
	f := r.Field
	if r.Key != "" {
		f += "." + r.Key
	}
	return fmt.Sprintf("stage %d (%s) %s", r.Stage+1, name, f)
}

// LineParams lists every share set in a profile, in a fixed order: the
// glue share, then stage by stage pet_loss, the removal entries by key,
// dust_made, efficiency, product_loss, moisture.
func LineParams(l Line) []ParamRef {
	var out []ParamRef
	if l.GlueShareOfLabels.IsSet() {
		out = append(out, ParamRef{Stage: -1, Field: "glue_share_of_labels"})
	}
	for i, s := range l.Stages {
		if s.PETLoss.IsSet() {
			out = append(out, ParamRef{Stage: i, Field: "pet_loss"})
		}
		keys := make([]string, 0, len(s.Removal))
		for k := range s.Removal {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			out = append(out, ParamRef{Stage: i, Field: "removal", Key: k})
		}
		for _, f := range []struct {
			name string
			p    Param
		}{{"dust_made", s.DustMade}, {"efficiency", s.Efficiency}, {"product_loss", s.ProductLoss}, {"moisture", s.Moisture}} {
			if f.p.IsSet() {
				out = append(out, ParamRef{Stage: i, Field: f.name})
			}
		}
	}
	return out
}

// field returns a pointer to the share r names in l, nil if l has no
// such share. For a removal entry it returns nil: those live in a map
// (see Get and Set).
func (r ParamRef) field(l *Line) *Param {
	if r.Stage < 0 {
		if r.Field == "glue_share_of_labels" {
			return &l.GlueShareOfLabels
		}
		return nil
	}
	if r.Stage >= len(l.Stages) {
		return nil
	}
	s := &l.Stages[r.Stage]
	switch r.Field {
	case "pet_loss":
		return &s.PETLoss
	case "dust_made":
		return &s.DustMade
	case "efficiency":
		return &s.Efficiency
	case "product_loss":
		return &s.ProductLoss
	case "moisture":
		return &s.Moisture
	}
	return nil
}

// Get returns the share r names in l.
func (r ParamRef) Get(l Line) (Param, bool) {
	if r.Field == "removal" {
		if r.Stage < 0 || r.Stage >= len(l.Stages) {
			return Param{}, false
		}
		p, ok := l.Stages[r.Stage].Removal[r.Key]
		return p, ok
	}
	if f := r.field(&l); f != nil && f.IsSet() {
		return *f, true
	}
	return Param{}, false
}

// Set puts p at the share r names in l. l must own its stages and
// removal maps (see CloneLine): the caller's profile is never changed
// through a shared map.
func (r ParamRef) Set(l *Line, p Param) bool {
	if r.Field == "removal" {
		if r.Stage < 0 || r.Stage >= len(l.Stages) || l.Stages[r.Stage].Removal == nil {
			return false
		}
		l.Stages[r.Stage].Removal[r.Key] = p
		return true
	}
	f := r.field(l)
	if f == nil {
		return false
	}
	*f = p
	return true
}

// CloneLine returns a deep copy of l (its own stages and removal maps).
func CloneLine(l Line) Line {
	c := l
	c.Stages = make([]Stage, len(l.Stages))
	for i, s := range l.Stages {
		s.Removal = maps.Clone(s.Removal)
		c.Stages[i] = s
	}
	return c
}
