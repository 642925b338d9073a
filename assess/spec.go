package assess

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"sort"
	"strings"
)

// Spec is a buyer's specification: limits on mass shares of categories or
// groups, zero-tolerance items, and optional grade bands on the target-PET
// share. Shares are mass fractions in [0, 1].
//
// JSON form (unknown fields are refused):
//
//	{
//	  "name": "glycol-feed",
//	  "description": "free text",
//	  "limits": [
//	    {"item": "pet", "min": 0.72, "note": "why this figure"},
//	    {"item": "pvc", "max": 0.01}
//	  ],
//	  "zero_tolerance": ["hazard"],
//	  "grades": [{"name": "first", "min_pet": 0.94}, {"name": "second", "min_pet": 0.86}]
//	}
//
// An item is a category key or a group key.
type Spec struct {
	Name          string   `json:"name"`
	Description   string   `json:"description,omitempty"`
	Limits        []Limit  `json:"limits"`
	ZeroTolerance []string `json:"zero_tolerance,omitempty"`
	Grades        []Grade  `json:"grades,omitempty"`
	// CountAttached counts the closures and labels that come on the
	// bottles with the target PET (the "pet" item and the grades). Trade
	// audits differ on this; the default leaves them out.
	CountAttached bool `json:"count_attached,omitempty"`
}

// MaxContaminantLimit is the largest maximum a spec may set on a
// contaminant without AllowLargeMax: a larger figure is almost always a
// percentage written where a fraction belongs (0.5 for 0.5 %).
const MaxContaminantLimit = 0.2

// Limit bounds the share of one item from below, above or both.
type Limit struct {
	Item string   `json:"item"`
	Min  *float64 `json:"min,omitempty"`
	Max  *float64 `json:"max,omitempty"`
	Note string   `json:"note,omitempty"`
	// AllowLargeMax confirms a maximum above MaxContaminantLimit on a
	// contaminant.
	AllowLargeMax bool `json:"allow_large_max,omitempty"`
}

// Grade is a band of target-PET share: a bale whose share is at least
// MinPET (and below the next higher band) has this grade.
type Grade struct {
	Name   string  `json:"name"`
	MinPET float64 `json:"min_pet"`
}

// Validate checks that every item exists and every bound lies in [0, 1].
func (s Spec) Validate() error {
	bad := func(format string, args ...any) error {
		return errorf(ErrBadSpec, "spec %q: %s", s.Name, fmt.Sprintf(format, args...))
	}
	if strings.TrimSpace(s.Name) == "" {
		return bad("name is empty; give the spec a name")
	}
	known := func(item string) bool {
		_, cat := CategoryIndex(item)
		_, grp := LookupGroup(item)
		return cat || grp
	}
	inRange := func(v *float64) bool { return v == nil || (*v >= 0 && *v <= 1) }
	for i, l := range s.Limits {
		if !known(l.Item) {
			return bad("limit %d: unknown item %q; use a category key (%s) or a group key (pet, other_plastics, non_plastics, moisture_fines, hazards)", i+1, l.Item, strings.Join(CategoryKeys(), ", "))
		}
		if l.Min == nil && l.Max == nil {
			return bad("limit %d (%s) has neither min nor max", i+1, l.Item)
		}
		if !inRange(l.Min) || !inRange(l.Max) {
			return bad("limit %d (%s): bounds are mass fractions from 0 to 1; write fractions: 0.005 for 0.5 %%", i+1, l.Item)
		}
		if l.Max != nil && *l.Max > MaxContaminantLimit && !isTarget(l.Item) && !l.AllowLargeMax {
			return bad("limit %d (%s): max %s is %s %% of the bale, above %s %% for a contaminant; write fractions: 0.005 for 0.5 %%; if %s %% is meant, add \"allow_large_max\": true to the limit",
				i+1, l.Item, Plain(*l.Max), Plain(100**l.Max), Plain(100*MaxContaminantLimit), Plain(100**l.Max))
		}
		if l.Min != nil && l.Max != nil && *l.Min > *l.Max {
			return bad("limit %d (%s): min %s is above max %s", i+1, l.Item, Plain(*l.Min), Plain(*l.Max))
		}
	}
	for _, z := range s.ZeroTolerance {
		if !known(z) {
			return bad("zero_tolerance: unknown item %q", z)
		}
	}
	names := map[string]bool{}
	for _, g := range s.Grades {
		if g.Name == "" || names[g.Name] {
			return bad("grades need distinct, non-empty names")
		}
		names[g.Name] = true
		if math.IsNaN(g.MinPET) || g.MinPET < 0 || g.MinPET > 1 {
			return bad("grade %q: min_pet %s is not a fraction from 0 to 1", g.Name, Plain(g.MinPET))
		}
	}
	return nil
}

// isTarget reports whether an item is target PET (the group or one of
// its categories).
func isTarget(item string) bool {
	if item == GroupPET.Key() {
		return true
	}
	c, ok := LookupCategory(item)
	return ok && c.IsTargetPET()
}

// ParseSpec reads a spec from JSON, refusing unknown fields, and
// validates it.
func ParseSpec(b []byte) (Spec, error) {
	if len(b) > MaxDocumentFileBytes {
		return Spec{}, fmt.Errorf("spec JSON has %d bytes, more than a spec holds (%d): %w", len(b), MaxDocumentFileBytes, ErrBadSpec)
	}
	if err := CheckJSON(b); err != nil {
		return Spec{}, fmt.Errorf("spec JSON: %v: %w", err, ErrBadSpec)
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	var s Spec
	if err := dec.Decode(&s); err != nil {
		var se *json.SyntaxError
		if errors.Is(err, io.ErrUnexpectedEOF) {
			return Spec{}, errorf(ErrBadSpec, "spec JSON is malformed: it ends too soon; close every brace and bracket")
		}
		if errors.As(err, &se) {
			return Spec{}, errorf(ErrBadSpec, "spec JSON is malformed at byte %d: %v", se.Offset, err)
		}
		return Spec{}, errorf(ErrBadSpec, "spec JSON: %v", err)
	}
	if dec.More() {
		return Spec{}, errorf(ErrBadSpec, "spec JSON has text after the object; a file holds one spec")
	}
	if err := s.Validate(); err != nil {
		return Spec{}, err
	}
	return s, nil
}

// LoadSpec returns a built-in spec by name, or reads a spec file.
func LoadSpec(nameOrPath string) (Spec, error) {
	if s, ok := BuiltinSpec(nameOrPath); ok {
		return s, nil
	}
	b, err := ReadFileLimited(nameOrPath, MaxDocumentFileBytes)
	if err != nil {
		return Spec{}, fmt.Errorf("spec %q is neither a built-in spec (%s) nor a readable spec file: %w", nameOrPath, strings.Join(BuiltinSpecNames(), ", "), err)
	}
	s, err := ParseSpec(b)
	if err != nil {
		return Spec{}, fmt.Errorf("%s: %w", nameOrPath, err)
	}
	return s, nil
}

// sortedGrades returns the grades from the highest band down.
func (s Spec) sortedGrades() []Grade {
	g := append([]Grade(nil), s.Grades...)
	sort.SliceStable(g, func(i, j int) bool { return g[i].MinPET > g[j].MinPET })
	return g
}
