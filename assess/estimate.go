package assess

import (
	"fmt"
	"math"
)

// Method selects the composition estimator.
type Method int

// The estimators.
const (
	// MethodRatio is Cochran's ratio estimator: pulls weigh in by mass.
	MethodRatio Method = iota
	// MethodMean is the mean of per-pull fractions of ASTM D5231: every
	// pull counts the same whatever its mass.
	MethodMean
)

func (m Method) String() string {
	switch m {
	case MethodRatio:
		return "ratio"
	case MethodMean:
		return "mean"
	}
	return fmt.Sprintf("Method(%d)", int(m))
}

// ParseMethod reads "ratio" or "mean".
func ParseMethod(s string) (Method, error) {
	switch s {
	case "ratio":
		return MethodRatio, nil
	case "mean":
		return MethodMean, nil
	}
	return 0, errorf(ErrBadMethod, "unknown estimator %q; use ratio or mean", s)
}

// DefaultConfidence is the two-sided confidence level used unless the
// user chooses another (ASTM D5231 works at 90 %).
const DefaultConfidence = 0.90

// Options tune an assessment.
type Options struct {
	Method     Method
	Confidence float64 // two-sided level in (0, 1); 0 means DefaultConfidence
}

func (o Options) confidence() float64 {
	if o.Confidence == 0 {
		return DefaultConfidence
	}
	return o.Confidence
}

// IntervalKind says what kind of interval a share has.
type IntervalKind int

// The interval kinds.
const (
	// IntervalNone: one pull, found in it: an estimate without spread.
	IntervalNone IntervalKind = iota
	// IntervalT: estimate ± t·SE, Student t on n − 1 degrees of freedom.
	IntervalT
	// IntervalNoneFound: found in no pull: [0, upper bound], see NoneFound.
	IntervalNoneFound
	// IntervalExact: the whole bale was sorted; the share is known.
	IntervalExact
)

func (k IntervalKind) String() string {
	switch k {
	case IntervalNone:
		return "none"
	case IntervalT:
		return "t"
	case IntervalNoneFound:
		return "none_found"
	case IntervalExact:
		return "exact"
	}
	return fmt.Sprintf("IntervalKind(%d)", int(k))
}

// Share is the estimated mass share of one category or group.
type Share struct {
	Key  string
	Code int     // resin identification code, 0 when none (always 0 for groups)
	Kg   float64 // mass found in the pulls
	// Fraction is the estimated mass share of the bale.
	Fraction float64
	// SD is the per-pull standard deviation behind SE, in fraction units
	// (s of ASTM D5231; for the ratio estimator the residual s of
	// Cochran eq. 6.9 divided by the mean pull mass). NaN for one pull.
	SD float64
	// SE is the standard error, finite-population corrected.
	SE float64
	// Low and High bound the interval; valid only when HasInterval.
	Low, High   float64
	HasInterval bool
	Kind        IntervalKind
	// None is the bound of a share found in no pull (Kind
	// IntervalNoneFound or, for a whole-bale sort, IntervalExact).
	None NoneFound
}

// Absent reports whether the item was found in no pull.
func (s Share) Absent() bool { return s.None.Method != 0 }

// Result is what an audit says about its bale.
type Result struct {
	Method       Method
	Confidence   float64
	Pulls        int
	SampledKg    float64
	BaleKg       float64
	SampledShare float64 // f of the finite-population correction
	// T is the Student t quantile used for the intervals (n − 1 degrees
	// of freedom), NaN when there is no interval.
	T          float64
	Categories []Share // catalogue order
	Groups     []Share // Groups() order
	Pieces     []PieceShare
	// HazardPulls lists the labels of pulls in which hazards were found,
	// by mass or by count. Hazards are never averaged away.
	HazardPulls  []string
	HazardPieces int
	// PullKg is the mean pull mass, for sample-size answers.
	PullKg float64
	// TargetAttached is the target-PET share with the closures and labels
	// that came on the bottles counted in (trade audits differ on this;
	// a spec chooses, see Spec.CountAttached).
	TargetAttached Share
	// Spread is the linearised sampling error of the category shares,
	// from which package yield draws compositions.
	Spread Spread
}

// Population is what the pulls were drawn from, for sample-size answers.
func (r Result) Population() Population {
	return Population{PullKg: r.PullKg, BaleKg: r.BaleKg, Taken: r.Pulls}
}

// Category returns the share of a category by key.
func (r Result) Category(key string) (Share, bool) {
	i, ok := CategoryIndex(key)
	if !ok || i >= len(r.Categories) {
		return Share{}, false
	}
	return r.Categories[i], true
}

// Group returns the share of a group.
func (r Result) Group(g Group) Share { return r.Groups[g-GroupPET] }

// Item returns the share of a category or group key.
func (r Result) Item(key string) (Share, bool) {
	if s, ok := r.Category(key); ok {
		return s, true
	}
	if g, ok := LookupGroup(key); ok {
		return r.Group(g), true
	}
	return Share{}, false
}

// Assess estimates the bale's composition from its pulls.
//
// Ratio estimator (Cochran, Sampling Techniques, 3rd ed., Wiley 1977,
// §6.2–6.4, eq. 6.9), for category mass c_i in pull i of mass w_i:
//
//	r = Σ c_i / Σ w_i
//	Var(r) ≈ (1 − f) / (n·w̄²) · Σ (c_i − r·w_i)² / (n − 1)
//
// Mean of fractions (ASTM D5231 §13): p_i = c_i / w_i,
//
//	x̄ = Σ p_i / n,  Var(x̄) = (1 − f) · s² / n
//
// with f the sampled share of the bale by mass (0 when the bale mass is
// unknown). D5231 leaves the correction out; it is applied to both
// methods here. Intervals are r ± t·SE with Student's t on n − 1 degrees
// of freedom, clamped to [0, 1]. One pull gives no interval unless the
// whole bale was sorted (f = 1, zero width). A category found in no pull
// gets the one-sided bound of noneFoundUpper instead, never a zero-width
// interval. Groups are estimated from the per-pull group totals, so
// their variance includes the covariance of their members.
func Assess(a Audit, opt Options) (Result, error) {
	if err := a.Validate(); err != nil {
		return Result{}, err
	}
	conf := opt.confidence()
	if !(conf > 0 && conf < 1) {
		return Result{}, errorf(ErrBadConfidence, "confidence %s: give a level between 0 and 1, e.g. 0.90", Plain(conf))
	}
	n := len(a.Pulls)
	res := Result{
		Method:       opt.Method,
		Confidence:   conf,
		Pulls:        n,
		SampledKg:    a.SampledKg(),
		BaleKg:       a.BaleKg,
		SampledShare: a.SampledShare(),
		T:            math.NaN(),
	}
	res.PullKg = res.SampledKg / float64(n)
	if n > 1 {
		res.T = StudentT(conf, n-1)
	}
	w := make([]float64, n)
	for i, p := range a.Pulls {
		w[i] = p.TotalKg()
	}
	col := make([]float64, n)
	res.Categories = make([]Share, len(catalogue))
	for j, c := range catalogue {
		for i, p := range a.Pulls {
			col[i] = p.Kg[j]
		}
		res.Categories[j] = res.share(c.Key, c.Code, col, w)
	}
	// Per-pull group totals in one pass, then one estimate per group.
	groups := Groups()
	totals := make([]float64, len(groups)*n)
	for i, p := range a.Pulls {
		for j, c := range catalogue {
			totals[int(c.Group-GroupPET)*n+i] += p.Kg[j]
		}
	}
	res.Groups = make([]Share, len(groups))
	for k, g := range groups {
		res.Groups[k] = res.share(g.Key(), 0, totals[k*n:(k+1)*n], w)
	}
	attached := append([]float64(nil), totals[:n]...)
	for _, key := range AttachedKeys {
		j, _ := CategoryIndex(key)
		for i, p := range a.Pulls {
			attached[i] += p.Kg[j]
		}
	}
	res.TargetAttached = res.share(GroupPET.Key(), 0, attached, w)
	res.Pieces = pieceShares(a.Pulls, conf)
	hz, _ := CategoryIndex("hazard")
	for _, p := range a.Pulls {
		pieces := 0
		if p.Pieces != nil && p.Pieces[hz] > 0 {
			pieces = p.Pieces[hz]
		}
		if p.Kg[hz] > 0 || pieces > 0 {
			res.HazardPulls = append(res.HazardPulls, p.Label)
		}
		res.HazardPieces += pieces
	}
	res.Spread = spreadOf(a.Pulls, w, res)
	return res, nil
}

// AttachedKeys are the categories that come attached to the bottles: a
// spec with CountAttached counts them with the target PET.
var AttachedKeys = []string{"closures", "labels"}

// share estimates one column of masses c against pull masses w.
func (res *Result) share(key string, code int, c, w []float64) Share {
	n := float64(len(c))
	s := Share{Key: key, Code: code, SD: math.NaN()}
	var sumC, sumW float64
	for i := range c {
		sumC += c[i]
		sumW += w[i]
	}
	s.Kg = sumC
	fpc := 1 - res.SampledShare
	switch res.Method {
	case MethodMean:
		var mean float64
		for i := range c {
			mean += c[i] / w[i]
		}
		mean /= n
		s.Fraction = mean
		if len(c) > 1 {
			var ss float64
			for i := range c {
				d := c[i]/w[i] - mean
				ss += d * d
			}
			s.SD = math.Sqrt(ss / (n - 1))
		}
	default:
		r := sumC / sumW
		s.Fraction = r
		if len(c) > 1 {
			var ss float64
			for i := range c {
				d := c[i] - r*w[i]
				ss += d * d
			}
			s.SD = math.Sqrt(ss/(n-1)) / (sumW / n)
		}
	}
	if sumC == 0 {
		upper, method := noneFoundUpper(res.SampledKg, res.BaleKg, PieceKg(key), res.Confidence)
		s.None = NoneFound{Pulls: len(c), Kg: res.SampledKg, Level: res.Confidence, Upper: upper, PieceKg: PieceKg(key), Method: method}
		s.SE, s.Low, s.High, s.HasInterval, s.Kind = 0, 0, upper, true, IntervalNoneFound
		if method == BoundWholeBale {
			s.Kind = IntervalExact
		}
		return s
	}
	switch {
	case fpc <= 0:
		// The whole bale was sorted: the share is known exactly.
		s.SE, s.Low, s.High, s.HasInterval, s.Kind = 0, s.Fraction, s.Fraction, true, IntervalExact
	case len(c) > 1:
		s.SE = s.SD * math.Sqrt(fpc/n)
		s.Low = math.Max(0, s.Fraction-res.T*s.SE)
		s.High = math.Min(1, s.Fraction+res.T*s.SE)
		s.HasInterval, s.Kind = true, IntervalT
	default:
		s.SE = math.NaN()
	}
	return s
}
