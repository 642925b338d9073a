package assess

import (
	"fmt"
)

// DefaultRelPrecision is the relative precision e of the sample-size
// advice unless the user sets another (ASTM D5231 works with e = 0.10).
const DefaultRelPrecision = 0.10

// AdviceKind says what the advice is about.
type AdviceKind int

// The kinds of advice.
const (
	// AdvicePrecision: no spec; the pulls for a relative precision on the
	// target-PET share (ASTM D5231).
	AdvicePrecision AdviceKind = iota + 1
	// AdviceDecide: the spec is undecided; Need is what decides the
	// governing limit, the one that needs the most.
	AdviceDecide
	// AdvicePassed: every limit passes; no more pulls are needed.
	AdvicePassed
	// AdviceFailed: some limits fail; more pulls cannot change that.
	AdviceFailed
	// AdviceAnotherPull: one pull shows no spread; take another.
	AdviceAnotherPull
	// AdviceWholeBale: the whole bale was sorted; nothing is left to
	// sample.
	AdviceWholeBale
)

func (k AdviceKind) String() string {
	switch k {
	case AdvicePrecision:
		return "precision"
	case AdviceDecide:
		return "decide"
	case AdvicePassed:
		return "passed"
	case AdviceFailed:
		return "failed"
	case AdviceAnotherPull:
		return "another_pull"
	case AdviceWholeBale:
		return "whole_bale"
	}
	return fmt.Sprintf("AdviceKind(%d)", int(k))
}

// Advice says what to do next with the bale's sample. It never disagrees
// with the spec table: for an undecided bale Need is the Need of the
// governing limit.
type Advice struct {
	Kind AdviceKind
	// Item is the item the advice is about: the governing limit's item,
	// or the target-PET share without a spec.
	Item string
	// Governing is the limit that governs an undecided bale (Kind
	// AdviceDecide).
	Governing *LimitVerdict
	// Failing lists the failing limits (Kind AdviceFailed).
	Failing      []LimitVerdict
	RelPrecision float64
	Need         SampleSize
	Why          string
}

// Advise says what the sample needs next.
//
//   - A bale that fails some limit: which, and that more pulls do not
//     change a decided verdict.
//   - An undecided bale: the undecided limit whose decision needs the
//     most pulls governs (a whole-bale sort or an unknown figure counts
//     as the most), and its Need is the advice.
//   - A bale that passes: no more pulls.
//   - Without a spec: the pulls for relative precision e on the
//     target-PET share, n = (t·s/(e·x̄))² of ASTM D5231 with the
//     finite-population correction (PullsForPrecision).
func Advise(r Result, sv *SpecVerdict, e float64) Advice {
	a := Advice{Item: GroupPET.Key(), RelPrecision: e}
	switch {
	case r.SampledShare >= 1:
		a.Kind, a.Need = AdviceWholeBale, SampleSize{State: SizePulls, Total: r.Pulls}
		a.Why = "the whole bale was sorted: every share is known"
		return a
	case sv != nil && sv.Verdict == Fail:
		a.Kind, a.Failing, a.Need = AdviceFailed, sv.Failing(), decided()
		a.Item = a.Failing[0].Item
		a.Why = fmt.Sprintf("the bale fails %s; more pulls are not needed to decide", failingTexts(a.Failing, r.Confidence))
		return a
	case r.Pulls < 2:
		a.Kind, a.Need = AdviceAnotherPull, SampleSize{State: SizePulls, Total: 2, More: 1}
		a.Why = "one pull shows no spread: take at least one more pull, then ask again"
		return a
	case sv != nil && sv.Verdict == Undecided:
		g := governing(sv.Limits)
		a.Kind, a.Item, a.Governing, a.Need = AdviceDecide, g.Item, &g, g.Need
		a.Why = fmt.Sprintf("%s is undecided and needs the most to decide: %s", g.Text(), g.Need.Text())
		if g.Need.State == SizeUnknown {
			a.Why = fmt.Sprintf("%s is undecided: the estimate sits on the limit, so no number of pulls can be promised", g.Text())
		}
		return a
	case sv != nil:
		a.Kind, a.Need = AdvicePassed, decided()
		a.Why = "the bale passes every limit: no more pulls are needed to decide"
		return a
	}
	a.Kind = AdvicePrecision
	sh := r.Group(GroupPET)
	n, err := PullsForPrecision(sh.SD, sh.Fraction, e, r.Confidence, r.Population())
	if err != nil {
		a.Why = "no target PET found, so a relative precision has no meaning"
		return a
	}
	a.Need = n
	a.Why = fmt.Sprintf("for ±%.0f %% relative precision on the target-PET share: %s", 100*e, n.Text())
	return a
}

// governing returns the undecided limit whose decision needs the most:
// an unknown figure (estimate on the limit) or a whole-bale sort first,
// then the most pulls in all. Ties keep the spec's order.
func governing(limits []LimitVerdict) LimitVerdict {
	rank := func(l LimitVerdict) float64 {
		switch l.Need.State {
		case SizeUnknown, SizeWholeBale, SizeBeyondReach:
			return 1 << 40
		}
		return float64(l.Need.Total)
	}
	var best LimitVerdict
	bestRank := -1.0
	for _, l := range limits {
		if l.Verdict != Undecided {
			continue
		}
		if r := rank(l); r > bestRank {
			best, bestRank = l, r
		}
	}
	return best
}
