package assess

import (
	"fmt"
	"math"
)

// DefaultBaleCost is the effort of auditing one more bale (breaking it
// open, moving it, cleaning up) in pulls' worth, besides its pulls: an
// assumption of our own; give the yard's own figure.
const DefaultBaleCost = 2.0

// JudgeLoad applies a spec to a load as Judge does to a bale. An
// undecided limit's Need counts bales to audit in all at the current
// pulls per bale (SizeWholeBale: even every bale of the load would not
// decide it; more pulls per bale might, see AdviseLoad). With one
// audited bale of several there is no between-bale spread, and every
// limit is undecided.
func JudgeLoad(lr LoadResult, s Spec) (SpecVerdict, error) {
	need := func(sh Share, b Bound, limit float64) SampleSize {
		return oneMoreAtLeast(lr.balesToDecide(sh, limit, s.CountAttached), lr.Audited)
	}
	spread := !math.IsNaN(lr.T) || lr.exact
	return judge(lr.Result, s, spread, need)
}

// componentsOf returns the variance components of a share of the load.
func (lr LoadResult) componentsOf(sh Share, attached bool) VarianceComponents {
	if attached && sh.Key == GroupPET.Key() {
		return lr.Components[AttachedKey]
	}
	return lr.Components[sh.Key]
}

// balesToDecide is the smallest number of audited bales n′ (at m̄ pulls
// each) whose projected interval excludes the limit: t_{n′−1}·√V(n′, m̄)
// ≤ |ȳ − limit|, V from LoadVariance. For an item found in no pull, the
// bales whose pulls bring its bound below the limit.
func (lr LoadResult) balesToDecide(sh Share, limit float64, attached bool) SampleSize {
	N := lr.Bales
	bale := lr.MeanPulls * lr.PullShare * lr.MeanBaleKg // kg sorted per bale
	for n := max(2, lr.Audited); n <= N; n++ {
		if sh.Absent() {
			if u, _ := noneFoundUpper(float64(n)*bale, lr.BaleKg, sh.None.PieceKg, lr.Confidence); u <= limit {
				return SampleSize{State: SizePulls, Total: n, More: n - lr.Audited}
			}
			continue
		}
		gap := math.Abs(sh.Fraction - limit)
		if gap == 0 {
			return SampleSize{}
		}
		v := LoadVariance(lr.componentsOf(sh, attached), n, N, lr.MeanPulls, lr.PullShare)
		if StudentT(lr.Confidence, n-1)*math.Sqrt(v) <= gap {
			return SampleSize{State: SizePulls, Total: n, More: n - lr.Audited}
		}
	}
	return SampleSize{State: SizeWholeBale}
}

// pullsPerBaleToDecide is the smallest number of pulls per audited bale
// m′ whose projected interval, with the bales already audited, excludes
// the limit; SizeUnknown when no number of pulls can (the between-bale
// spread alone is too wide, or a single bale shows none).
func (lr LoadResult) pullsPerBaleToDecide(sh Share, limit float64, attached bool) SampleSize {
	n, N := lr.Audited, lr.Bales
	if n < 2 && N > 1 || sh.Absent() {
		return SampleSize{}
	}
	gap := math.Abs(sh.Fraction - limit)
	c := lr.componentsOf(sh, attached)
	t := StudentT(lr.Confidence, max(1, n-1))
	start := int(math.Floor(lr.MeanPulls)) + 1
	for m := start; ; m++ {
		v := LoadVariance(c, n, N, float64(m), lr.PullShare)
		if t*math.Sqrt(v) <= gap {
			return SampleSize{State: SizePulls, Total: m, More: int(math.Ceil(float64(m*n) - lr.MeanPulls*float64(n)))}
		}
		if float64(m)*lr.PullShare >= 1 {
			return SampleSize{} // whole bales sorted and still undecided
		}
	}
}

// LoadRoute is the way to more certainty that the load advice picks.
type LoadRoute int

// The routes.
const (
	RouteNone      LoadRoute = iota // decided, or nothing can be promised
	RouteMoreBales                  // audit more bales at the current pulls each
	RouteMorePulls                  // take more pulls from the bales already audited
)

func (r LoadRoute) String() string {
	switch r {
	case RouteNone:
		return "none"
	case RouteMoreBales:
		return "more_bales"
	case RouteMorePulls:
		return "more_pulls"
	}
	return fmt.Sprintf("LoadRoute(%d)", int(r))
}

// LoadAdvice says whether to audit another bale or take more pulls from
// the audited ones.
type LoadAdvice struct {
	Kind      AdviceKind
	Item      string
	Governing *LimitVerdict
	Failing   []LimitVerdict
	// Bales is the governing limit's Need: bales to audit in all at the
	// current pulls per bale. PullsPerBale is the other route: pulls per
	// audited bale (Total) and pulls to take in all (More).
	Bales, PullsPerBale SampleSize
	// Costs of the two routes in pulls' worth (a bale costs BaleCost plus
	// its pulls); NaN where a route cannot decide.
	CostBales, CostPulls float64
	BaleCost             float64
	Route                LoadRoute
	Why                  string
}

// AdviseLoad picks, for an undecided load, the cheaper of auditing more
// bales and taking more pulls from the audited ones, in pulls' worth of
// effort with baleCost for opening a bale (≤ 0: DefaultBaleCost). This
// is the trade-off of Cochran's optimum sub-sampling (Sampling
// Techniques, 3rd ed., ch. 10: cost c₁n + c₂nm) made concrete for the
// limit that governs the verdict: the between-bale variance S₁² shrinks
// only with more bales, the within-bale S₂² with more pulls too.
func AdviseLoad(lr LoadResult, sv *SpecVerdict, baleCost float64) LoadAdvice {
	if !(baleCost > 0) {
		baleCost = DefaultBaleCost
	}
	a := LoadAdvice{Item: GroupPET.Key(), BaleCost: baleCost, CostBales: math.NaN(), CostPulls: math.NaN()}
	switch {
	case lr.exact:
		a.Kind, a.Why = AdviceWholeBale, "every bale of the load was sorted whole: every share is known"
		return a
	case sv != nil && sv.Verdict == Fail:
		a.Kind, a.Failing = AdviceFailed, sv.Failing()
		a.Item = a.Failing[0].Item
		a.Why = fmt.Sprintf("the load fails %s; more bales or pulls are not needed to decide", failingTexts(a.Failing, lr.Confidence))
		return a
	case lr.Audited < 2 && lr.Bales > 1:
		a.Kind, a.Route = AdviceAnotherPull, RouteMoreBales
		a.Bales = SampleSize{State: SizePulls, Total: 2, More: 1}
		a.Why = "one audited bale shows nothing of how bales differ: audit another bale of the load"
		return a
	case sv == nil || sv.Verdict == Pass:
		a.Kind, a.Why = AdvicePassed, "the load passes every limit: no more bales or pulls are needed to decide"
		if sv == nil {
			a.Kind, a.Why = AdvicePrecision, "no spec: nothing to decide"
		}
		return a
	}
	g := governing(sv.Limits)
	a.Kind, a.Item, a.Governing, a.Bales = AdviceDecide, g.Item, &g, g.Need
	a.PullsPerBale = lr.pullsPerBaleToDecide(g.Share, g.Limit, sv.CountAttached)
	if a.Bales.Known() {
		a.CostBales = float64(a.Bales.More) * (baleCost + lr.MeanPulls)
	}
	if a.PullsPerBale.Known() {
		a.CostPulls = float64(a.PullsPerBale.More)
	}
	switch {
	case a.Bales.Known() && (!a.PullsPerBale.Known() || a.CostBales <= a.CostPulls):
		a.Route = RouteMoreBales
		a.Why = fmt.Sprintf("%s is undecided: audit %d more %s at about %.0f pulls each (%d audited in all)", g.Text(), a.Bales.More,
			plural(a.Bales.More, "bale", "bales"), lr.MeanPulls, a.Bales.Total)
		if a.PullsPerBale.Known() {
			a.Why += fmt.Sprintf("; %d more %s from the audited bales would also decide, at more effort", a.PullsPerBale.More, plural(a.PullsPerBale.More, "pull", "pulls"))
		} else {
			a.Why += "; more pulls from the audited bales alone cannot decide: the bales differ too much"
		}
	case a.PullsPerBale.Known():
		a.Route = RouteMorePulls
		a.Why = fmt.Sprintf("%s is undecided: take %d more %s from the audited bales (%d per bale)", g.Text(), a.PullsPerBale.More, plural(a.PullsPerBale.More, "pull", "pulls"), a.PullsPerBale.Total)
		if a.Bales.Known() {
			a.Why += fmt.Sprintf("; auditing %d more %s would also decide, at more effort", a.Bales.More, plural(a.Bales.More, "bale", "bales"))
		}
	default:
		a.Why = fmt.Sprintf("%s is undecided and neither every bale of the load nor more pulls per bale are expected to decide it at this spread; sort the load's bales whole, or judge it on a wider tolerance", g.Text())
	}
	return a
}
