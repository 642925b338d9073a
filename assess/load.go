package assess

import (
	"math"
	"strconv"
)

// LoadBale is one audited bale of a load: its label and its audit. The
// bale's mass (Audit.BaleKg) is required: a load weighs its bales in.
type LoadBale struct {
	Label string
	Audit Audit
}

// Load is one delivery: Bales bales in all, some of them audited.
type Load struct {
	Bales   int
	Audited []LoadBale
	// LoadKg is the load's mass; 0 means Bales × the mean audited bale.
	LoadKg float64
}

// Validate checks the load: at least one audited bale, no more audited
// than delivered, every audited bale valid with its mass, unique labels
// and a load mass not below what was audited.
func (l Load) Validate() error {
	if len(l.Audited) == 0 {
		return errorf(ErrBadLoad, "no bale of the load was audited; audit at least one")
	}
	if l.Bales < len(l.Audited) {
		return errorf(ErrBadLoad, "the load has %d %s but %d were audited; give the number of bales delivered", l.Bales, plural(l.Bales, "bale", "bales"), len(l.Audited))
	}
	seen := map[string]bool{}
	var kg float64
	for i, b := range l.Audited {
		label := b.Label
		if label == "" {
			label = "bale " + strconv.Itoa(i+1)
		}
		if seen[label] {
			return errorf(ErrBadLoad, "bale %q is listed twice; give every bale its own label", label)
		}
		seen[label] = true
		if !(b.Audit.BaleKg > 0) || math.IsInf(b.Audit.BaleKg, 0) {
			return errorf(ErrBadLoad, "bale %q: its mass is needed for a load (the bales weigh in by mass); give it in kg", label)
		}
		if err := b.Audit.Validate(); err != nil {
			return &Error{Msg: "bale " + strconv.Quote(label) + ": " + err.Error(), Err: err}
		}
		kg += b.Audit.BaleKg
	}
	if math.IsNaN(l.LoadKg) || math.IsInf(l.LoadKg, 0) || l.LoadKg < 0 {
		return errorf(ErrBadLoad, "the load mass %s kg is not a mass; give it in kg, or 0 to count it from the bales", Plain(l.LoadKg))
	}
	if l.LoadKg > 0 && l.LoadKg < kg*(1-1e-9) {
		return errorf(ErrBadLoad, "the load (%s kg) weighs less than its audited bales (%s kg)", Plain(l.LoadKg), Plain(kg))
	}
	return nil
}

// LoadResult is what the audited bales say about their load.
type LoadResult struct {
	// Result is the load's composition in the form of a bale's: shares
	// with intervals, pieces pooled over the audited bales, hazards by
	// "bale/pull", the spread for package yield. Its BaleKg is the load's
	// mass and Pulls the pulls of all audited bales.
	Result
	Bales, Audited int
	// F1 is the share of the load's bales that were audited, n/N.
	F1 float64
	// MeanBaleKg is the mean mass of the audited bales, M̄.
	MeanBaleKg float64
	// MeanPulls is the mean number of pulls per audited bale, m̄.
	MeanPulls float64
	// PerBale are the audited bales' own results.
	PerBale []Result
	Labels  []string
	// Components are, by item key (category, group, and "pet" with its
	// attached closures and labels under AttachedKey), the estimated
	// between-bale and within-bale variance components that project the
	// load's variance to more bales or more pulls (LoadVariance).
	Components map[string]VarianceComponents
	// PullShare is the mean pull's share of the mean bale, w̄/M̄: m pulls
	// sort f₂ = m·PullShare of a bale.
	PullShare float64
	// exact is true when every bale of the load was sorted whole.
	exact bool
	// PooledWithin is true when some bale had one pull and borrowed the
	// within-bale spread of the others.
	PooledWithin bool
	// NoWithin is true when no audited bale had two pulls, so the
	// within-bale term is left out (it is multiplied by F1).
	NoWithin bool
}

// VarianceComponents are Cochran's S₁² (the variance of the bales' true
// shares, size-weighted) and S₂² (the per-pull variance within a bale) of
// one item, in fraction² units.
type VarianceComponents struct {
	Between, Within float64
}

// AttachedKey names the component of target PET with its attached
// closures and labels in LoadResult.Components.
const AttachedKey = "pet+attached"

// AssessLoad estimates a load's composition from its audited bales by
// two-stage sampling: bales (first-stage units of unequal size M_i,
// drawn with equal probability) and pulls within them. With ȳ_i the
// ratio estimate of bale i from its own pulls (Assess), the load's share
// is the ratio-to-size estimate
//
//	ȳ_R = Σ M_i·ȳ_i / Σ M_i
//
// with the sample estimate of its variance
//
//	v(ȳ_R) = (1 − f₁)/(n·M̄²) · Σ M_i²(ȳ_i − ȳ_R)²/(n − 1)
//	       + f₁/(n²·M̄²) · Σ M_i²·v(ȳ_i)
//
// where n bales of N were audited, f₁ = n/N, M̄ = Σ M_i / n and v(ȳ_i) is
// bale i's own (finite-population corrected) variance (Cochran, Sampling
// Techniques, 3rd ed., Wiley 1977, ch. 11, sub-sampling with units of
// unequal sizes, the ratio-to-size estimator; ch. 10 for equal sizes,
// where the second term's factor f₁ is Theorem 10.2's). A bale with one
// pull borrows the pooled within-bale variance of the bales with two or
// more. The interval is ȳ_R ± t·√v on n − 1 degrees of freedom; with
// every bale audited (f₁ = 1) only the within term is left and the
// degrees of freedom are the smallest of any bale's m_i − 1. One audited
// bale of several shows no between-bale spread: no interval.
//
// A category found in no pull of any bale is bounded as in Assess, with
// the pulls of all audited bales read as drawn from the whole load.
func AssessLoad(l Load, opt Options) (LoadResult, error) {
	if err := l.Validate(); err != nil {
		return LoadResult{}, err
	}
	conf := opt.confidence()
	if !(conf > 0 && conf < 1) {
		return LoadResult{}, errorf(ErrBadConfidence, "confidence %s: give a level between 0 and 1, e.g. 0.90", Plain(conf))
	}
	n := len(l.Audited)
	lr := LoadResult{Bales: l.Bales, Audited: n, F1: float64(n) / float64(l.Bales)}
	var sizeSum, pulls float64
	for i, b := range l.Audited {
		r, err := Assess(b.Audit, Options{Method: MethodRatio, Confidence: conf})
		if err != nil {
			return LoadResult{}, err
		}
		label := b.Label
		if label == "" {
			label = "bale " + strconv.Itoa(i+1)
		}
		lr.PerBale = append(lr.PerBale, r)
		lr.Labels = append(lr.Labels, label)
		sizeSum += b.Audit.BaleKg
		pulls += float64(len(b.Audit.Pulls))
	}
	lr.MeanBaleKg = sizeSum / float64(n)
	lr.MeanPulls = pulls / float64(n)
	lr.exact = lr.F1 >= 1
	for _, r := range lr.PerBale {
		lr.exact = lr.exact && r.SampledShare >= 1
	}
	loadKg := l.LoadKg
	if loadKg == 0 {
		loadKg = lr.MeanBaleKg * float64(l.Bales)
	}
	terms, df, pooled, none := lr.loadTerms(l)
	lr.PooledWithin, lr.NoWithin = pooled, none
	res := Result{Method: MethodRatio, Confidence: conf, BaleKg: loadKg, T: math.NaN()}
	for _, r := range lr.PerBale {
		res.Pulls += r.Pulls
		res.SampledKg += r.SampledKg
	}
	res.SampledShare = math.Min(1, res.SampledKg/loadKg)
	res.PullKg = res.SampledKg / float64(res.Pulls)
	if df > 0 {
		res.T = StudentT(conf, df)
	}
	// The load's shares: size-weighted means of the bales' shares, with
	// the variance of the terms.
	weights := make([]float64, n)
	for i, b := range l.Audited {
		weights[i] = b.Audit.BaleKg / sizeSum
	}
	mean := func(pick func(Result) Share) (float64, float64) {
		f, kg := 0.0, 0.0
		for i, r := range lr.PerBale {
			s := pick(r)
			f += weights[i] * s.Fraction
			kg += s.Kg
		}
		return f, kg
	}
	lr.Result = res
	lr.Categories = make([]Share, len(catalogue))
	for j, c := range catalogue {
		f, kg := mean(func(r Result) Share { return r.Categories[j] })
		lr.Categories[j] = lr.loadShare(c.Key, c.Code, f, kg, terms, []int{j}, df)
	}
	for k, g := range Groups() {
		var members []int
		for j, c := range catalogue {
			if c.Group == g {
				members = append(members, j)
			}
		}
		f, kg := mean(func(r Result) Share { return r.Groups[k] })
		lr.Groups = append(lr.Groups, lr.loadShare(g.Key(), 0, f, kg, terms, members, df))
	}
	attached := []int{}
	for j, c := range catalogue {
		if c.Group == GroupPET {
			attached = append(attached, j)
		}
	}
	for _, key := range AttachedKeys {
		j, _ := CategoryIndex(key)
		attached = append(attached, j)
	}
	f, kg := mean(func(r Result) Share { return r.TargetAttached })
	lr.TargetAttached = lr.loadShare(GroupPET.Key(), 0, f, kg, terms, attached, df)
	var allPulls []Pull
	for i, b := range l.Audited {
		for _, p := range b.Audit.Pulls {
			q := p
			q.Label = lr.Labels[i] + "/" + p.Label
			allPulls = append(allPulls, q)
		}
		for _, h := range lr.PerBale[i].HazardPulls {
			lr.HazardPulls = append(lr.HazardPulls, lr.Labels[i]+"/"+h)
		}
		lr.HazardPieces += lr.PerBale[i].HazardPieces
	}
	lr.Pieces = pieceShares(allPulls, conf)
	lr.Spread = Spread{Fractions: make([]float64, len(catalogue)), Terms: terms, DF: df}
	for j, c := range lr.Categories {
		lr.Spread.Fractions[j] = c.Fraction
	}
	if df == 0 {
		lr.Spread.Terms = nil
	}
	lr.Components = lr.components(l)
	return lr, nil
}

// loadShare makes one share of the load from its estimate and the terms
// of its members.
func (lr *LoadResult) loadShare(key string, code int, f, kg float64, terms [][]float64, members []int, df int) Share {
	s := Share{Key: key, Code: code, Kg: kg, Fraction: f, SD: math.NaN(), SE: math.NaN()}
	if kg == 0 {
		upper, method := noneFoundUpper(lr.SampledKg, lr.BaleKg, PieceKg(key), lr.Confidence)
		s.None = NoneFound{Pulls: lr.Pulls, Kg: lr.SampledKg, Level: lr.Confidence, Upper: upper, PieceKg: PieceKg(key), Method: method}
		s.SE, s.Low, s.High, s.HasInterval, s.Kind = 0, 0, upper, true, IntervalNoneFound
		if method == BoundWholeBale {
			s.Kind = IntervalExact
		}
		return s
	}
	if lr.exact {
		s.SE, s.Low, s.High, s.HasInterval, s.Kind = 0, f, f, true, IntervalExact
		return s
	}
	if df == 0 {
		return s
	}
	v := 0.0
	for _, t := range terms {
		x := 0.0
		for _, j := range members {
			x += t[j]
		}
		v += x * x
	}
	s.SE = math.Sqrt(v)
	s.Low = math.Max(0, f-lr.T*s.SE)
	s.High = math.Min(1, f+lr.T*s.SE)
	s.HasInterval, s.Kind = true, IntervalT
	if s.SE == 0 {
		s.Kind = IntervalExact
	}
	return s
}

// loadTerms builds the linearised terms of v(ȳ_R) (see AssessLoad and
// Spread): one between-bale term per audited bale and the within-bale
// terms of each bale scaled by √f₁·M_i/(n·M̄). It returns the degrees of
// freedom (0: no interval), whether some bale borrowed the pooled
// within-bale spread, and whether no within-bale spread was known.
func (lr *LoadResult) loadTerms(l Load) (terms [][]float64, df int, pooled, none bool) {
	n := len(l.Audited)
	nc := len(catalogue)
	mbar := lr.MeanBaleKg
	f1 := lr.F1
	var load []float64 // ȳ_R by category
	load = make([]float64, nc)
	for i, r := range lr.PerBale {
		w := l.Audited[i].Audit.BaleKg / (mbar * float64(n))
		for j, s := range r.Categories {
			load[j] += w * s.Fraction
		}
	}
	if n >= 2 && f1 < 1 {
		k := math.Sqrt((1 - f1) / float64(n*(n-1)))
		for i, r := range lr.PerBale {
			mi := l.Audited[i].Audit.BaleKg
			t := make([]float64, nc)
			for j, s := range r.Categories {
				t[j] = k * mi * (s.Fraction - load[j]) / mbar
			}
			terms = append(terms, t)
		}
		df = n - 1
	}
	// Pooled within-bale residuals, each scaled so that their squares add
	// up to the pooled per-pull covariance: e/√Σ(m_k − 1).
	var poolRes [][]float64
	poolDF := 0
	minDF := 0
	for _, r := range lr.PerBale {
		if r.Pulls < 2 || !r.Spread.Varies() {
			continue
		}
		// Terms of a bale are √((1−f₂)/(m(m−1)))·e; undo that factor.
		back := 1 / math.Sqrt((1-r.SampledShare)/float64(r.Pulls*(r.Pulls-1)))
		for _, t := range r.Spread.Terms {
			e := make([]float64, nc)
			for j := range t {
				e[j] = t[j] * back
			}
			poolRes = append(poolRes, e)
		}
		poolDF += r.Pulls - 1
		if minDF == 0 || r.Pulls-1 < minDF {
			minDF = r.Pulls - 1
		}
	}
	for i, r := range lr.PerBale {
		scale := math.Sqrt(f1) * l.Audited[i].Audit.BaleKg / (float64(n) * mbar)
		switch {
		case r.SampledShare >= 1:
			// The whole bale was sorted: its share is known.
		case r.Spread.Varies():
			for _, t := range r.Spread.Terms {
				u := make([]float64, nc)
				for j := range t {
					u[j] = scale * t[j]
				}
				terms = append(terms, u)
			}
		case poolDF > 0:
			pooled = true
			k := scale * math.Sqrt((1-r.SampledShare)/(float64(r.Pulls)*float64(poolDF)))
			for _, e := range poolRes {
				u := make([]float64, nc)
				for j := range e {
					u[j] = k * e[j]
				}
				terms = append(terms, u)
			}
		default:
			none = true
		}
	}
	if f1 >= 1 {
		df = minDF
		if n == 1 && lr.PerBale[0].SampledShare >= 1 {
			df = 0
		}
	}
	return terms, df, pooled, none
}

// components estimates Cochran's variance components of every item for
// projections: S₂² is the pooled per-pull variance within bales, S₁² the
// size-weighted variance of the bales' shares less the part of it that
// is within-bale error, s₁² − (1 − f₂)·S₂²/m̄ (Cochran ch. 10,
// estimating S₁² from s₁²), never below 0.
func (lr *LoadResult) components(l Load) map[string]VarianceComponents {
	n := len(l.Audited)
	wbar := lr.SampledKg / float64(lr.Pulls)
	lr.PullShare = wbar / lr.MeanBaleKg
	f2 := math.Min(1, lr.MeanPulls*lr.PullShare)
	out := map[string]VarianceComponents{}
	one := func(key string, pick func(Result) Share, load Share) {
		var within float64
		df := 0
		for _, r := range lr.PerBale {
			if s := pick(r); r.Pulls >= 2 && !math.IsNaN(s.SD) {
				within += float64(r.Pulls-1) * s.SD * s.SD
				df += r.Pulls - 1
			}
		}
		if df > 0 {
			within /= float64(df)
		}
		between := 0.0
		if n >= 2 {
			s1 := 0.0
			for i, r := range lr.PerBale {
				d := l.Audited[i].Audit.BaleKg * (pick(r).Fraction - load.Fraction) / lr.MeanBaleKg
				s1 += d * d
			}
			s1 /= float64(n - 1)
			between = math.Max(0, s1-(1-f2)*within/lr.MeanPulls)
		}
		out[key] = VarianceComponents{Between: between, Within: within}
	}
	for j, c := range catalogue {
		one(c.Key, func(r Result) Share { return r.Categories[j] }, lr.Categories[j])
	}
	for k, g := range Groups() {
		one(g.Key(), func(r Result) Share { return r.Groups[k] }, lr.Groups[k])
	}
	one(AttachedKey, func(r Result) Share { return r.TargetAttached }, lr.TargetAttached)
	return out
}

// LoadVariance projects the variance of a load's share to n bales of N
// with m pulls each from the components (Cochran, Sampling Techniques,
// 3rd ed., Theorem 10.1):
//
//	V = (1 − n/N)·S₁²/n + (1 − f₂)·S₂²/(n·m)
//
// with f₂ the sorted share of a bale at m pulls.
func LoadVariance(c VarianceComponents, n, N int, m float64, pullShare float64) float64 {
	f2 := math.Min(1, m*pullShare)
	return (1-float64(n)/float64(N))*c.Between/float64(n) + (1-f2)*c.Within/(float64(n)*m)
}

// Known reports whether every bale of the load was sorted whole, so its
// composition is known.
func (lr LoadResult) Known() bool { return lr.exact }
