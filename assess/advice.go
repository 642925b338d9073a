package assess

import (
	"fmt"
	"math"
)

// DefaultRelPrecision is the relative precision e of the sample-size
// advice unless the user sets another (ASTM D5231 works with e = 0.10).
const DefaultRelPrecision = 0.10

// Advice says how many more pulls reach a relative precision on the item
// that governs the decision.
type Advice struct {
	Item         string
	RelPrecision float64
	// Needed is the total number of pulls for the precision and More the
	// pulls still to take; both valid only when Known.
	Needed, More int
	Known        bool
	Why          string // how the item was chosen, or why no figure
}

// Advise picks the item that governs the verdict and returns the pulls
// needed for relative precision e on it (ASTM D5231, see
// PullsForPrecision). The governing item is the undecided limit that
// needs the most pulls; with none undecided, the decided limit whose
// interval lies closest to its bound (in standard errors); with no spec,
// the target-PET share.
func Advise(r Result, sv *SpecVerdict, e float64) Advice {
	a := Advice{Item: GroupPET.Key(), RelPrecision: e, Why: "target-PET share (no spec limits)"}
	if sv != nil {
		if lv, ok := governing(sv.Limits); ok {
			a.Item = lv.Item
			a.Why = fmt.Sprintf("the %s %s of %.2f %% governs the verdict (%s)", lv.Item, lv.Bound, 100*lv.Limit, lv.Verdict)
		}
	}
	sh, _ := r.Item(a.Item)
	switch {
	case r.Pulls < 2 && r.SampledShare < 1:
		a.Why += "; one pull shows no spread: take at least one more pull, then ask again"
		return a
	case sh.Fraction == 0:
		a.Why += "; none found, so a relative precision has no meaning"
		return a
	}
	if r.SampledShare >= 1 {
		a.Known, a.Needed, a.Why = true, r.Pulls, a.Why+"; the whole bale was sorted"
		return a
	}
	n, err := PullsForPrecision(sh.SD, sh.Fraction, e, r.Confidence)
	if err != nil {
		a.Why += "; " + err.Error()
		return a
	}
	a.Known, a.Needed, a.More = true, n, max(0, n-r.Pulls)
	return a
}

// governing returns the limit that governs a spec's verdict.
func governing(limits []LimitVerdict) (LimitVerdict, bool) {
	best, found := LimitVerdict{}, false
	bestScore := math.Inf(-1)
	for _, lv := range limits {
		if lv.Bound == Zero {
			continue
		}
		var score float64
		switch {
		case lv.Verdict == Undecided && !lv.MoreKnown:
			score = math.Inf(1)
		case lv.Verdict == Undecided:
			score = 1e9 + float64(lv.MorePulls)
		default:
			// Decided: the smaller the margin in standard errors, the
			// more it governs.
			margin := math.Abs(lv.Share.Fraction - lv.Limit)
			if lv.Share.SE > 0 {
				margin /= lv.Share.SE
			}
			score = -margin
		}
		if !found || score > bestScore {
			best, bestScore, found = lv, score, true
		}
	}
	return best, found
}
