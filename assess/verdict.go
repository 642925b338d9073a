package assess

import (
	"fmt"
	"math"
)

// Verdict is the outcome of a limit or of a whole spec.
type Verdict int

// The verdicts, in increasing severity.
const (
	Pass Verdict = iota
	Undecided
	Fail
)

func (v Verdict) String() string {
	switch v {
	case Pass:
		return "pass"
	case Undecided:
		return "undecided"
	case Fail:
		return "fail"
	}
	return fmt.Sprintf("Verdict(%d)", int(v))
}

// Bound says which side of a limit is acceptable.
type Bound int

// The bounds.
const (
	AtLeast Bound = iota + 1 // share ≥ limit
	AtMost                   // share ≤ limit
	Zero                     // nothing may be found
)

func (b Bound) String() string {
	switch b {
	case AtLeast:
		return "min"
	case AtMost:
		return "max"
	case Zero:
		return "zero"
	}
	return fmt.Sprintf("Bound(%d)", int(b))
}

// LimitVerdict is the verdict on one bound of one item.
type LimitVerdict struct {
	Item    string
	Bound   Bound
	Limit   float64
	Share   Share
	Verdict Verdict
	// MorePulls is how many more pulls are expected to decide an
	// undecided limit at the current spread; 0 when decided. Valid only
	// when MoreKnown: it is unknown with one pull (no spread yet) and when
	// the estimate sits exactly on the limit.
	MorePulls int
	MoreKnown bool
	Note      string
}

// SpecVerdict is the verdict of a spec on an assessed bale.
type SpecVerdict struct {
	Spec    string
	Verdict Verdict
	Limits  []LimitVerdict
	// Grade is the grade band holding the target-PET estimate, and
	// GradeSure is true when the whole interval lies in that band.
	Grade     string
	GradeSure bool
}

// Judge applies a spec to an assessment. A bound passes when the whole
// interval lies on its right side, fails when the whole interval lies on
// the wrong side, and is undecided when the interval straddles it; with
// no interval (one pull) it is undecided. Zero-tolerance items fail when
// any was found in any pull, by mass or by count. The spec fails if any
// bound fails, is undecided if any is undecided, and passes otherwise.
func Judge(r Result, s Spec) (SpecVerdict, error) {
	if err := s.Validate(); err != nil {
		return SpecVerdict{}, err
	}
	sv := SpecVerdict{Spec: s.Name}
	for _, l := range s.Limits {
		sh, _ := r.Item(l.Item)
		if l.Min != nil {
			sv.Limits = append(sv.Limits, judgeBound(r, sh, AtLeast, *l.Min, l.Note))
		}
		if l.Max != nil {
			sv.Limits = append(sv.Limits, judgeBound(r, sh, AtMost, *l.Max, l.Note))
		}
	}
	for _, z := range s.ZeroTolerance {
		sh, _ := r.Item(z)
		lv := LimitVerdict{Item: z, Bound: Zero, Share: sh, Verdict: Pass, MoreKnown: true,
			Note: "zero tolerance: any item found rejects the bale"}
		if sh.Kg > 0 || foundPieces(r, z) > 0 {
			lv.Verdict = Fail
			lv.Note = fmt.Sprintf("found in pulls %v; zero tolerance", r.HazardPulls)
			if z != "hazard" && z != GroupHazards.Key() {
				lv.Note = "found; zero tolerance"
			}
		}
		sv.Limits = append(sv.Limits, lv)
	}
	for _, lv := range sv.Limits {
		sv.Verdict = max(sv.Verdict, lv.Verdict)
	}
	sv.Grade, sv.GradeSure = grade(r.Group(GroupPET), s)
	return sv, nil
}

// foundPieces counts pieces of a category or group found in the pulls.
func foundPieces(r Result, item string) int {
	n := 0
	for _, p := range r.Pieces {
		c, _ := LookupCategory(p.Key)
		if p.Key == item || c.Group.Key() == item {
			n += p.Pieces
		}
	}
	return n
}

func judgeBound(r Result, sh Share, b Bound, limit float64, note string) LimitVerdict {
	lv := LimitVerdict{Item: sh.Key, Bound: b, Limit: limit, Share: sh, Note: note}
	ok := func(x float64) bool {
		if b == AtLeast {
			return x >= limit
		}
		return x <= limit
	}
	switch {
	case !sh.HasInterval:
		lv.Verdict = Undecided
	case ok(sh.Low) && ok(sh.High):
		lv.Verdict = Pass
	case !ok(sh.Low) && !ok(sh.High):
		lv.Verdict = Fail
	default:
		lv.Verdict = Undecided
	}
	if lv.Verdict != Undecided {
		lv.MoreKnown = true
		return lv
	}
	gap := math.Abs(sh.Fraction - limit)
	if math.IsNaN(sh.SD) || gap == 0 {
		return lv // no spread yet, or on the limit: cannot say
	}
	need, err := PullsForHalfWidth(sh.SD, gap, r.Confidence)
	if err != nil {
		return lv
	}
	lv.MorePulls, lv.MoreKnown = max(1, need-r.Pulls), true
	return lv
}

// grade finds the band holding the target-PET estimate and whether the
// whole interval lies in it.
func grade(pet Share, s Spec) (string, bool) {
	bands := s.sortedGrades()
	for i, g := range bands {
		if pet.Fraction >= g.MinPET {
			upper := math.Inf(1)
			if i > 0 {
				upper = bands[i-1].MinPET
			}
			sure := pet.HasInterval && pet.Low >= g.MinPET && pet.High < upper
			if i == 0 {
				sure = pet.HasInterval && pet.Low >= g.MinPET
			}
			return g.Name, sure
		}
	}
	return "", false
}
