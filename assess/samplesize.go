package assess

import (
	"fmt"
	"math"
)

// SizeState says what kind of answer a sample-size solver gave.
type SizeState int

// The answers of a sample-size solver.
const (
	// SizeUnknown: no figure can be given (one pull shows no spread, or
	// the estimate sits exactly on the limit).
	SizeUnknown SizeState = iota
	// SizePulls: Total pulls in all reach the goal.
	SizePulls
	// SizeWholeBale: no number of pulls short of the whole bale reaches
	// the goal; sorting the whole bale always decides (f = 1).
	SizeWholeBale
	// SizeBeyondReach: the bale mass is unknown and the goal needs more
	// pulls than any yard could take (over MaxSearchPulls); only a sort of
	// the whole bale decides.
	SizeBeyondReach
)

func (s SizeState) String() string {
	switch s {
	case SizeUnknown:
		return "unknown"
	case SizePulls:
		return "pulls"
	case SizeWholeBale:
		return "whole_bale"
	case SizeBeyondReach:
		return "beyond_reach"
	}
	return fmt.Sprintf("SizeState(%d)", int(s))
}

// MaxSearchPulls bounds the search when the bale mass is unknown. It is
// never printed as an answer: beyond it the state is SizeBeyondReach.
const MaxSearchPulls = 1 << 30

// SampleSize is the answer of a sample-size solver: Total pulls in all,
// of which More are still to take, when State is SizePulls.
type SampleSize struct {
	State       SizeState
	Total, More int
}

// Known reports whether the answer is a number of pulls.
func (s SampleSize) Known() bool { return s.State == SizePulls }

// Decides reports whether following the answer decides: a number of
// pulls, or a sort of the whole bale.
func (s SampleSize) Decides() bool {
	return s.State == SizePulls || s.State == SizeWholeBale || s.State == SizeBeyondReach
}

// Text is the answer in words, e.g. "4 more pulls (6 in all)".
func (s SampleSize) Text() string {
	switch s.State {
	case SizePulls:
		if s.More == 0 {
			return fmt.Sprintf("no more pulls (%d in all)", s.Total)
		}
		return fmt.Sprintf("%d more %s (%d in all)", s.More, plural(s.More, "pull", "pulls"), s.Total)
	case SizeWholeBale, SizeBeyondReach:
		return "sort the whole bale"
	}
	return "cannot be said yet"
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// Population describes what the pulls are drawn from, for the
// finite-population correction of a sample-size answer: the mean pull
// mass and the bale's mass (0 when unknown: no correction, no ceiling).
type Population struct {
	PullKg, BaleKg float64
	// Taken is the number of pulls already taken; SampleSize.More counts
	// from it.
	Taken int
}

// sampledShare is f after n pulls of the mean mass.
func (p Population) sampledShare(n int) float64 {
	if p.BaleKg <= 0 || p.PullKg <= 0 {
		return 0
	}
	return math.Min(1, float64(n)*p.PullKg/p.BaleKg)
}

// PullsForHalfWidth returns the smallest number of pulls n ≥ 2 for which
// a two-sided interval at level c is no wider than h on each side, given
// the per-pull standard deviation s:
//
//	t_{n−1}·s·√((1 − f_n)/n) ≤ h,   f_n = n·w̄ / M
//
// with t the Student quantile on n − 1 degrees of freedom, w̄ the mean
// pull mass and M the bale mass (f_n = 0 when M is unknown). This is the
// sample-count condition of ASTM D5231 (n = (t·s/h)²) with Cochran's
// finite-population correction (Sampling Techniques, 3rd ed., ch. 4:
// n = n₀/(1 + n₀/N) for a fixed t), solved exactly: the left side falls as n grows
// (t falls, √n grows, 1 − f_n falls), so a doubling search and a
// bisection find the smallest n, where iterating n ← ⌈(t·s/h)²⌉ can
// alternate between two values and stop at the lower one.
//
// When the bale mass is known and only a sort of the whole bale reaches
// h, the answer is SizeWholeBale: it never exceeds what the bale holds.
// Without a bale mass the search stops at MaxSearchPulls
// (SizeBeyondReach).
func PullsForHalfWidth(s, h, c float64, pop Population) (SampleSize, error) {
	switch {
	case math.IsNaN(s) || math.IsInf(s, 0) || s < 0:
		return SampleSize{}, errorf(ErrBadSpread, "the spread %s is not a standard deviation", Plain(s))
	case !(h > 0) || math.IsInf(h, 0):
		return SampleSize{}, errorf(ErrBadPrecision, "the half-width %s must be above 0", Plain(h))
	case !(c > 0 && c < 1):
		return SampleSize{}, errorf(ErrBadConfidence, "confidence %s: give a level between 0 and 1, e.g. 0.90", Plain(c))
	}
	ok := func(n int) bool {
		fpc := 1 - pop.sampledShare(n)
		return StudentT(c, n-1)*s*math.Sqrt(fpc/float64(n)) <= h
	}
	// inBale reports whether n pulls leave some of the bale unsorted.
	inBale := func(n int) bool { return pop.sampledShare(n) < 1 }
	answer := func(n int) SampleSize {
		if !inBale(n) {
			return SampleSize{State: SizeWholeBale}
		}
		return SampleSize{State: SizePulls, Total: n, More: max(0, n-pop.Taken)}
	}
	if ok(2) {
		return answer(2), nil
	}
	lo, hi := 2, 4
	for !ok(hi) {
		if !inBale(hi) {
			// hi pulls would be the whole bale; the answer lies below it
			// or is the whole bale.
			break
		}
		if hi >= MaxSearchPulls {
			return SampleSize{State: SizeBeyondReach}, nil
		}
		lo, hi = hi, min(2*hi, MaxSearchPulls)
	}
	// ok(lo) is false; bisect for the smallest n in (lo, hi] with ok(n),
	// counting an n that sorts the whole bale as ok (it decides).
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if ok(mid) || !inBale(mid) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return answer(hi), nil
}

// PullsForPrecision returns the pulls needed to estimate a share x̄ with
// per-pull standard deviation s to a relative precision e (half-width
// e·x̄) at level c: n = (t·s / (e·x̄))² of ASTM D5231, solved exactly and
// with the finite-population correction as in PullsForHalfWidth.
func PullsForPrecision(s, mean, e, c float64, pop Population) (SampleSize, error) {
	if !(e > 0) || math.IsInf(e, 0) {
		return SampleSize{}, errorf(ErrBadPrecision, "the relative precision %s must be above 0, e.g. 0.10", Plain(e))
	}
	if !(mean > 0) {
		return SampleSize{}, errorf(ErrNoShare, "the share is 0, so no relative precision can be reached")
	}
	return PullsForHalfWidth(s, e*mean, c, pop)
}
