package assess

import (
	"fmt"
	"math"
	"strings"
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
	// Need is what decides an undecided limit at the current spread:
	// pulls in all and more, or a sort of the whole bale; SizeUnknown with
	// one pull (no spread yet) or with the estimate exactly on the limit.
	// For a decided limit it is SizePulls with More = 0.
	Need SampleSize
	Note string
}

// GradeState says how sure a grade is.
type GradeState int

// The grade states.
const (
	// GradeNone: the spec has no grade bands.
	GradeNone GradeState = iota
	// GradeSure: the whole interval of the target-PET share lies in the band.
	GradeSure
	// GradeSpans: the interval reaches into another band.
	GradeSpans
	// GradeNoInterval: one pull, so the band holds the estimate only.
	GradeNoInterval
	// GradeWithheld: the bale fails the spec, so it gets no band.
	GradeWithheld
)

func (g GradeState) String() string {
	switch g {
	case GradeNone:
		return "none"
	case GradeSure:
		return "sure"
	case GradeSpans:
		return "spans"
	case GradeNoInterval:
		return "no_interval"
	case GradeWithheld:
		return "withheld"
	}
	return fmt.Sprintf("GradeState(%d)", int(g))
}

// SpecVerdict is the verdict of a spec on an assessed bale.
type SpecVerdict struct {
	Spec    string
	Verdict Verdict
	Limits  []LimitVerdict
	// Grade is the grade band holding the target-PET estimate ("" when
	// withheld or when the spec has no bands); GradeState says how sure.
	Grade      string
	GradeState GradeState
	// CountAttached is true when the target-PET share counts the closures
	// and labels attached to the bottles (the spec's choice).
	CountAttached bool
}

// Failing lists the limits that fail, as "item bound limit" texts.
func (sv SpecVerdict) Failing() []LimitVerdict {
	var out []LimitVerdict
	for _, l := range sv.Limits {
		if l.Verdict == Fail {
			out = append(out, l)
		}
	}
	return out
}

// failingTexts says why each failing limit fails: "pvc ≤ 1 % (its 90 %
// interval lies wholly outside), hazard: none (found)".
func failingTexts(limits []LimitVerdict, conf float64) string {
	texts := make([]string, len(limits))
	for i, l := range limits {
		why := fmt.Sprintf("its %s %% interval lies wholly outside", levelText(conf))
		if l.Bound == Zero {
			why = "found"
		}
		texts[i] = fmt.Sprintf("%s (%s)", l.Text(), why)
	}
	return strings.Join(texts, ", ")
}

// Text is the limit in words: "pvc ≤ 1 %", "pet ≥ 72 %", "hazard: none".
func (l LimitVerdict) Text() string {
	switch l.Bound {
	case AtLeast:
		return fmt.Sprintf("%s ≥ %s %%", l.Item, trimZeros(fmt.Sprintf("%.3f", 100*l.Limit)))
	case AtMost:
		return fmt.Sprintf("%s ≤ %s %%", l.Item, trimZeros(fmt.Sprintf("%.3f", 100*l.Limit)))
	}
	return l.Item + ": none"
}

// needFunc answers how many pulls (or bales) decide a bound on a share.
type needFunc func(sh Share, b Bound, limit float64) SampleSize

// Judge applies a spec to an assessment. A bound passes when the whole
// interval lies on its right side, fails when the whole interval lies on
// the wrong side, and is undecided when the interval straddles it; with
// one pull (no spread) every bound is undecided, unless the whole bale
// was sorted. A category found in no pull is judged by its one-sided
// bound [0, upper]. Zero-tolerance items fail when any was found in any
// pull, by mass or by count. The spec fails if any bound fails, is
// undecided if any is undecided, and passes otherwise. An undecided
// bound says what decides it at the current spread (Need).
func Judge(r Result, s Spec) (SpecVerdict, error) {
	pop := r.Population()
	need := func(sh Share, b Bound, limit float64) SampleSize {
		if sh.Absent() {
			return oneMoreAtLeast(noneFoundPulls(limit, sh.None.PieceKg, r.Confidence, pop), pop.Taken)
		}
		gap := math.Abs(sh.Fraction - limit)
		if math.IsNaN(sh.SD) || gap == 0 {
			return SampleSize{} // no spread yet, or on the limit
		}
		n, err := PullsForHalfWidth(sh.SD, gap, r.Confidence, pop)
		if err != nil {
			return SampleSize{}
		}
		return oneMoreAtLeast(n, pop.Taken)
	}
	spread := r.Pulls >= 2 || r.SampledShare >= 1
	return judge(r, s, spread, need)
}

func judge(r Result, s Spec, spread bool, need needFunc) (SpecVerdict, error) {
	if err := s.Validate(); err != nil {
		return SpecVerdict{}, err
	}
	sv := SpecVerdict{Spec: s.Name, CountAttached: s.CountAttached}
	item := func(key string) Share {
		if s.CountAttached && key == GroupPET.Key() {
			return r.TargetAttached
		}
		sh, _ := r.Item(key)
		return sh
	}
	for _, l := range s.Limits {
		sh := item(l.Item)
		if l.Min != nil {
			sv.Limits = append(sv.Limits, judgeBound(sh, AtLeast, *l.Min, l.Note, spread, need))
		}
		if l.Max != nil {
			sv.Limits = append(sv.Limits, judgeBound(sh, AtMost, *l.Max, l.Note, spread, need))
		}
	}
	for _, z := range s.ZeroTolerance {
		sh := item(z)
		lv := LimitVerdict{Item: z, Bound: Zero, Share: sh, Verdict: Pass, Need: decided(),
			Note: "zero tolerance: any item found rejects the bale"}
		if sh.Absent() {
			lv.Note = "zero tolerance; " + sh.None.Text() + ", which does not prove the bale free of them"
		}
		if sh.Kg > 0 || foundPieces(r, z) > 0 {
			lv.Verdict = Fail
			lv.Note = "found; zero tolerance"
			if z == "hazard" || z == GroupHazards.Key() {
				lv.Note = fmt.Sprintf("found in pulls %s; zero tolerance", strings.Join(r.HazardPulls, ", "))
			}
		}
		sv.Limits = append(sv.Limits, lv)
	}
	for _, lv := range sv.Limits {
		sv.Verdict = max(sv.Verdict, lv.Verdict)
	}
	pet := r.Group(GroupPET)
	if s.CountAttached {
		pet = r.TargetAttached
	}
	sv.Grade, sv.GradeState = grade(pet, s, spread)
	if sv.Verdict == Fail && sv.GradeState != GradeNone {
		sv.Grade, sv.GradeState = "", GradeWithheld
	}
	return sv, nil
}

func decided() SampleSize { return SampleSize{State: SizePulls} }

// oneMoreAtLeast makes an undecided limit ask for at least one more
// pull: at the edge (the solver's n equals the pulls taken, or a bound
// that one pull reaches but cannot yet judge) the next pull decides.
func oneMoreAtLeast(s SampleSize, taken int) SampleSize {
	if s.State == SizePulls && s.More == 0 {
		s.Total, s.More = taken+1, 1
	}
	return s
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

func judgeBound(sh Share, b Bound, limit float64, note string, spread bool, need needFunc) LimitVerdict {
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
	case ok(sh.Low) && ok(sh.High) && (spread || sh.Kind == IntervalExact):
		lv.Verdict = Pass
	case !ok(sh.Low) && !ok(sh.High) && (spread || sh.Kind == IntervalExact):
		lv.Verdict = Fail
	default:
		lv.Verdict = Undecided
	}
	if lv.Verdict != Undecided {
		lv.Need = decided()
		return lv
	}
	lv.Need = need(sh, b, limit)
	return lv
}

// grade finds the band holding the target-PET estimate and how sure it
// is: sure when the whole interval lies in the band.
func grade(pet Share, s Spec, spread bool) (string, GradeState) {
	bands := s.sortedGrades()
	if len(bands) == 0 {
		return "", GradeNone
	}
	for i, g := range bands {
		if pet.Fraction >= g.MinPET {
			if !pet.HasInterval || (!spread && pet.Kind != IntervalExact) {
				return g.Name, GradeNoInterval
			}
			upper := math.Inf(1)
			if i > 0 {
				upper = bands[i-1].MinPET
			}
			if pet.Low >= g.MinPET && pet.High < upper {
				return g.Name, GradeSure
			}
			return g.Name, GradeSpans
		}
	}
	return "", GradeNone
}
