package yield

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"baleassay/assess"
)

// DefaultDraws is the number of Monte Carlo draws unless another is given.
const DefaultDraws = 10000

// MaxDraws bounds the draws so that a typo cannot exhaust memory.
const MaxDraws = 10_000_000

// MCOptions tune a Monte Carlo run.
type MCOptions struct {
	Draws int    // 0 means DefaultDraws
	Seed  uint64 // the same seed gives the same numbers
	// FixedLine holds the stage efficiencies at their midpoints, so that
	// only the audit's sampling uncertainty (and any recipe range) is
	// carried.
	FixedLine bool
}

// SpreadState says where the audit's part of the spread comes from.
type SpreadState int

// The spread states.
const (
	// SpreadAudit: the composition is drawn from the audit's estimator.
	SpreadAudit SpreadState = iota + 1
	// SpreadNone: one pull (or one bale of a load) shows no spread, so
	// the composition is held at its estimate: the draws carry only the
	// line's and the recipe's ranges, and no spread of the audit can be
	// given.
	SpreadNone
	// SpreadKnown: the whole bale (or load) was sorted; the composition is
	// known.
	SpreadKnown
)

func (s SpreadState) String() string {
	switch s {
	case SpreadAudit:
		return "audit"
	case SpreadNone:
		return "none"
	case SpreadKnown:
		return "known"
	}
	return fmt.Sprintf("SpreadState(%d)", int(s))
}

// Summary is the spread of one output over the draws.
type Summary struct {
	P5, P10, P50, P90, P95, Mean float64
	// N is the number of draws that define the output.
	N int
}

// MCResult is what the Monte Carlo run reports.
type MCResult struct {
	Draws int
	Seed  uint64
	// Spread says whether the audit's sampling error is in the draws.
	Spread SpreadState
	// TargetPET is the drawn target-PET share of the bale (or load): its
	// P5–P95 is the audit's 90 % interval carried into the draws.
	TargetPET Summary
	// FlakeKg (as delivered), GlycolysateKg and HydroxylValue (mg KOH/g)
	// per bale (or load).
	FlakeKg, GlycolysateKg, HydroxylValue Summary
	// SpecPass is, for each flake-spec item with a limit, the share of
	// draws whose flake met it (NaN where the spec sets no limit).
	SpecPass [numFlakeItems]float64
}

// simulator holds every buffer of the Monte Carlo loop, so that a draw
// allocates nothing.
type simulator struct {
	m      *Model
	plan   Plan
	glycol Glycol
	cat    Catalyst
	limits [numFlakeItems]*float64
	nCat   int
	massKg float64
	frac   []float64 // the estimate, by category
	terms  []float64 // the spread's terms, terms × categories, row-major
	nTerms int
	df     int
	x      []float64 // drawn composition, fractions
	comp   []float64 // drawn composition, kg
	par    []float64
	vary   []int // indices of parameters drawn from a range
	// What varies: the audit, the conversion, the EG stripping.
	audit, conv, strip bool
	st                 []float64
	streams            []float64
	groups             [][]int   // catalogue indices by group, for the projection
	gtot, gx, buf      []float64 // scratch of the projection
	rng                *rand.Rand
	vals               [numFlakeItems]float64
	pass               [numFlakeItems]int
	pet                float64 // target-PET share of the last draw
}

func newSimulator(sp assess.Spread, massKg float64, plan Plan, opt MCOptions) *simulator {
	nc := assess.NumCategories()
	s := &simulator{
		m: plan.Line, plan: plan, nCat: nc, massKg: massKg,
		frac: append([]float64(nil), sp.Fractions...), x: make([]float64, nc), comp: make([]float64, nc),
		par: make([]float64, len(plan.Line.params)), st: make([]float64, NumComponents()),
		streams: make([]float64, len(plan.Line.streams)),
		rng:     rand.New(rand.NewPCG(opt.Seed, opt.Seed^0x9e3779b97f4a7c15)),
	}
	if sp.Varies() {
		s.audit, s.df, s.nTerms = true, sp.DF, len(sp.Terms)
		s.terms = make([]float64, 0, len(sp.Terms)*nc)
		for _, t := range sp.Terms {
			s.terms = append(s.terms, t...)
		}
	}
	for _, g := range assess.Groups() {
		var members []int
		for j := range nc {
			if assess.CategoryAt(j).Group == g {
				members = append(members, j)
			}
		}
		s.groups = append(s.groups, members)
	}
	s.gtot, s.gx, s.buf = make([]float64, len(s.groups)), make([]float64, nc), make([]float64, nc)
	s.glycol, _ = LookupGlycol(plan.Recipe.Glycol)
	s.cat, _ = LookupCatalyst(catalystKey(plan.Recipe.Catalyst))
	if plan.Spec != nil {
		s.limits = plan.Spec.limits()
	}
	for i, p := range plan.Line.params {
		s.par[i] = p.Mid()
		if !opt.FixedLine && p.Varies() {
			s.vary = append(s.vary, i)
		}
	}
	s.conv, s.strip = plan.Conversion.Varies(), plan.StripEG.Varies()
	return s
}

func catalystKey(k string) string {
	if k == "" {
		return DefaultCatalyst
	}
	return k
}

// drawComposition fills s.x with one draw of the composition from the
// audit's spread: the estimate plus √(df/χ²_df)·Σ g_k·term_k, the
// multivariate t whose covariance is the estimator's (see
// assess.Spread). Every term sums to 0, so the draw sums to 1, but a
// small share can fall below 0. Such a draw is brought back onto the
// simplex by Euclidean projection (Held, Wolfe & Crowder, Math.
// Programming 6 (1974) 62; Duchi et al., ICML 2008), first of the group
// totals, then of each group's members onto its total: a share that
// was not negative moves only by what the negatives of its own group
// (or a negative group) need, so the target-PET share keeps its drawn
// value unless a whole group fell below 0.
func (s *simulator) drawComposition() {
	copy(s.x, s.frac)
	if !s.audit {
		return
	}
	chi2 := 0.0
	for range s.df {
		z := s.rng.NormFloat64()
		chi2 += z * z
	}
	scale := math.Sqrt(float64(s.df) / chi2)
	nc := s.nCat
	for k := range s.nTerms {
		g := scale * s.rng.NormFloat64()
		row := s.terms[k*nc : (k+1)*nc]
		for j, v := range row {
			s.x[j] += g * v
		}
	}
	negative := false
	for _, v := range s.x {
		negative = negative || v < 0
	}
	if !negative {
		return
	}
	for gi, members := range s.groups {
		t := 0.0
		for _, j := range members {
			t += s.x[j]
		}
		s.gtot[gi] = t
	}
	projectSimplex(s.gtot, 1, s.buf)
	for gi, members := range s.groups {
		for k, j := range members {
			s.gx[k] = s.x[j]
		}
		part := s.gx[:len(members)]
		projectSimplex(part, s.gtot[gi], s.buf)
		for k, j := range members {
			s.x[j] = part[k]
		}
	}
}

// projectSimplex replaces v by its Euclidean projection onto
// {x ≥ 0, Σx = total}: x_j = max(0, v_j − τ) with τ chosen so that the
// sum is total (Duchi et al., ICML 2008, fig. 1). buf is scratch space of
// at least len(v); nothing is allocated.
func projectSimplex(v []float64, total float64, buf []float64) {
	if total <= 0 {
		for i := range v {
			v[i] = 0
		}
		return
	}
	u := buf[:len(v)]
	copy(u, v)
	// Insertion sort, descending: the vectors have at most a few dozen
	// entries.
	for i := 1; i < len(u); i++ {
		for j := i; j > 0 && u[j] > u[j-1]; j-- {
			u[j], u[j-1] = u[j-1], u[j]
		}
	}
	sum, tau := 0.0, 0.0
	for i, x := range u {
		sum += x
		if t := (sum - total) / float64(i+1); x-t > 0 {
			tau = t
		}
	}
	for i, x := range v {
		v[i] = math.Max(0, x-tau)
	}
}

// draw runs one draw: the composition from the audit's spread, the
// line's ranged parameters, the recipe's ranges, the line and the
// glycolysis. It returns flake kg, glycolysate kg and hydroxyl value
// (NaN when the draw holds no PET).
func (s *simulator) draw() (flake, product, ohv float64) {
	s.drawComposition()
	s.pet = 0
	for j, v := range s.x {
		s.comp[j] = v * s.massKg
		if isPETComp[j] {
			s.pet += v
		}
	}
	for _, i := range s.vary {
		p := s.m.params[i]
		s.par[i] = p.Lo + s.rng.Float64()*(p.Hi-p.Lo)
	}
	water, _ := s.m.eval(s.comp, s.par, s.st, s.streams)
	dry, pet := 0.0, 0.0
	for c, v := range s.st {
		if c == s.m.liquid {
			continue
		}
		dry += v
		if isPETComp[c] {
			pet += v
		}
	}
	moist := water + s.st[s.m.liquid]
	flake = dry + moist
	flakeValues(s.st, dry, moist, &s.vals)
	for it, l := range s.limits {
		if l != nil && s.vals[it] <= *l {
			s.pass[it]++
		}
	}
	if pet <= 0 {
		return flake, 0, math.NaN()
	}
	r := s.plan.recipeFor(pet, dry, s.glycol)
	if s.conv {
		r.Conversion = s.plan.Conversion.Lo + s.rng.Float64()*(s.plan.Conversion.Hi-s.plan.Conversion.Lo)
	}
	if s.strip {
		r.StripEG = s.plan.StripEG.Lo + s.rng.Float64()*(s.plan.StripEG.Hi-s.plan.StripEG.Lo)
	}
	c := newCharge(r, s.glycol, s.cat)
	if c.ok() != nil {
		return flake, c.productG / 1000, math.NaN()
	}
	return flake, c.productG / 1000, c.hydroxylValue()
}

// isPETComp caches isPET by component index.
var isPETComp = func() []bool {
	b := make([]bool, NumComponents())
	for i := range b {
		b[i] = isPET(i)
	}
	return b
}()

// Simulate carries the audit's sampling uncertainty, and unless
// opt.FixedLine the ranges of the line's efficiencies, and the recipe's
// conversion and EG-stripping ranges, through the line and the
// glycolysis. The composition is drawn from the audit's own estimator
// (assess.Spread: Cochran's ratio estimator with the finite-population
// correction), as a multivariate t on n − 1 degrees of freedom around
// the estimate with the estimator's covariance, so that the P5–P95 of
// any drawn share is the 90 % interval bale assess reports for it. This
// is the marginal posterior of a normal mean with unknown covariance
// under the usual non-informative prior (Gelman et al., Bayesian Data
// Analysis, 3rd ed., CRC 2013, §3.6), applied to the estimator's
// linearised residuals. With one pull no spread of the audit can be
// given (SpreadNone).
func Simulate(pulls []assess.Pull, baleKg float64, plan Plan, opt MCOptions) (MCResult, error) {
	_, res, err := Run(context.Background(), pulls, baleKg, plan, opt, nil)
	return res, err
}

// SimulateSpread runs the Monte Carlo for a composition given as an
// estimate with its spread and a mass (a bale's, or a load's): see
// Simulate. known says the composition is known exactly (a whole sort).
func SimulateSpread(sp assess.Spread, massKg float64, known bool, plan Plan, opt MCOptions) (MCResult, error) {
	return simulateSpread(context.Background(), sp, massKg, known, plan, opt, nil)
}

// progressEvery is how many draws a run makes between looks at its
// context and calls of its progress function.
const progressEvery = 1000

// simulateSpread is SimulateSpread that stops with ctx.Err() once ctx is
// done and reports progress every progressEvery draws (when progress is
// not nil).
func simulateSpread(ctx context.Context, sp assess.Spread, massKg float64, known bool, plan Plan, opt MCOptions, progress func(done, of int)) (MCResult, error) {
	if err := plan.validate(); err != nil {
		return MCResult{}, err
	}
	if !finite(massKg) || massKg <= 0 {
		return MCResult{}, fieldErr("audit", "bale_kg", ErrBadAudit, "%v: give the mass in kg, above 0", massKg)
	}
	if len(sp.Fractions) != assess.NumCategories() {
		return MCResult{}, fieldErr("audit", "composition", ErrBadAudit, "%d shares for %d categories", len(sp.Fractions), assess.NumCategories())
	}
	draws := opt.Draws
	if draws == 0 {
		draws = DefaultDraws
	}
	if draws < 1 || draws > MaxDraws {
		return MCResult{}, fieldErr("monte carlo", "draws", ErrOutOfRange, "%d draws: give 1 to %d", draws, MaxDraws)
	}
	s := newSimulator(sp, massKg, plan, opt)
	flake := make([]float64, draws)
	product := make([]float64, draws)
	pet := make([]float64, draws)
	ohv := make([]float64, 0, draws)
	for d := range draws {
		if d%progressEvery == 0 && d > 0 {
			if err := ctx.Err(); err != nil {
				return MCResult{}, err
			}
			if progress != nil {
				progress(d, draws)
			}
		}
		f, p, h := s.draw()
		flake[d], product[d], pet[d] = f, p, s.pet
		if !math.IsNaN(h) {
			ohv = append(ohv, h)
		}
	}
	if progress != nil {
		progress(draws, draws)
	}
	res := MCResult{Draws: draws, Seed: opt.Seed, Spread: SpreadAudit,
		TargetPET: summarize(pet), FlakeKg: summarize(flake), GlycolysateKg: summarize(product), HydroxylValue: summarize(ohv)}
	switch {
	case known:
		res.Spread = SpreadKnown
	case !sp.Varies():
		res.Spread = SpreadNone
	}
	for it, l := range s.limits {
		res.SpecPass[it] = math.NaN()
		if l != nil {
			res.SpecPass[it] = float64(s.pass[it]) / float64(draws)
		}
	}
	return res, nil
}

// summarize sorts x in place and returns its P5, P10, P50, P90, P95 and
// mean. Percentiles interpolate linearly between order statistics, the
// definition 7 of Hyndman & Fan, Am. Stat. 50 (1996) 361.
func summarize(x []float64) Summary {
	s := Summary{N: len(x)}
	if len(x) == 0 {
		nan := math.NaN()
		s.P5, s.P10, s.P50, s.P90, s.P95, s.Mean = nan, nan, nan, nan, nan, nan
		return s
	}
	slices.Sort(x)
	sum := 0.0
	for _, v := range x {
		sum += v
	}
	s.Mean = sum / float64(len(x))
	s.P5, s.P10, s.P50 = quantile(x, 0.05), quantile(x, 0.10), quantile(x, 0.50)
	s.P90, s.P95 = quantile(x, 0.90), quantile(x, 0.95)
	return s
}

// quantile of sorted x by Hyndman & Fan definition 7:
//
//	h = (n − 1)·q,  Q = x[⌊h⌋] + (h − ⌊h⌋)·(x[⌊h⌋+1] − x[⌊h⌋])
func quantile(sorted []float64, q float64) float64 {
	h := float64(len(sorted)-1) * q
	lo := int(math.Floor(h))
	if lo+1 >= len(sorted) {
		return sorted[len(sorted)-1]
	}
	return sorted[lo] + (h-float64(lo))*(sorted[lo+1]-sorted[lo])
}
