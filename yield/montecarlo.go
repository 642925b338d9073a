package yield

import (
	"context"
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
	// only the audit's sampling uncertainty is carried.
	FixedLine bool
}

// Summary is the spread of one output over the draws.
type Summary struct {
	P10, P50, P90, Mean float64
	// N is the number of draws that define the output.
	N int
}

// MCResult is what the Monte Carlo run reports.
type MCResult struct {
	Draws int
	Seed  uint64
	// FlakeKg (as delivered), GlycolysateKg and HydroxylValue (mg KOH/g)
	// per bale.
	FlakeKg, GlycolysateKg, HydroxylValue Summary
	// SpecPass is, for each flake-spec item with a limit, the share of
	// draws whose flake met it (NaN where the spec sets no limit).
	SpecPass [numFlakeItems]float64
}

// simulator holds every buffer of the Monte Carlo loop, so that a draw
// allocates nothing.
type simulator struct {
	m       *Model
	plan    Plan
	glycol  Glycol
	cat     Catalyst
	limits  [numFlakeItems]*float64
	nPulls  int
	nCat    int
	kg      []float64 // pulls × categories, row-major
	w       []float64 // pull masses
	baleKg  float64
	sum     []float64 // resampled category sums
	comp    []float64 // bale composition of the draw, kg
	par     []float64
	vary    []int // indices of parameters drawn from a range
	st      []float64
	streams []float64
	rng     *rand.Rand
	vals    [numFlakeItems]float64
	pass    [numFlakeItems]int
}

func newSimulator(pulls []assess.Pull, baleKg float64, plan Plan, opt MCOptions) *simulator {
	n, nc := len(pulls), assess.NumCategories()
	s := &simulator{
		m: plan.Line, plan: plan, nPulls: n, nCat: nc, baleKg: baleKg,
		kg: make([]float64, n*nc), w: make([]float64, n),
		sum: make([]float64, nc), comp: make([]float64, nc),
		par: make([]float64, len(plan.Line.params)), st: make([]float64, NumComponents()),
		streams: make([]float64, len(plan.Line.streams)),
		rng:     rand.New(rand.NewPCG(opt.Seed, opt.Seed^0x9e3779b97f4a7c15)),
	}
	s.glycol, _ = LookupGlycol(plan.Recipe.Glycol)
	s.cat, _ = LookupCatalyst(catalystKey(plan.Recipe.Catalyst))
	if plan.Spec != nil {
		s.limits = plan.Spec.limits()
	}
	for i, p := range pulls {
		copy(s.kg[i*nc:(i+1)*nc], p.Kg)
		s.w[i] = p.TotalKg()
	}
	for i, p := range plan.Line.params {
		s.par[i] = p.Mid()
		if !opt.FixedLine && p.Varies() {
			s.vary = append(s.vary, i)
		}
	}
	return s
}

func catalystKey(k string) string {
	if k == "" {
		return DefaultCatalyst
	}
	return k
}

// draw runs one bootstrap draw: resample the pulls with replacement,
// take Cochran's ratio estimate Σc/Σw of every category of the
// resample, scale to the bale, draw the line's ranged parameters, run
// the line and the glycolysis. It returns flake kg, glycolysate kg and
// hydroxyl value (NaN when the draw holds no PET).
func (s *simulator) draw() (flake, product, ohv float64) {
	for j := range s.sum {
		s.sum[j] = 0
	}
	wsum := 0.0
	nc := s.nCat
	for range s.nPulls {
		i := s.rng.IntN(s.nPulls)
		row := s.kg[i*nc : (i+1)*nc]
		for j, v := range row {
			s.sum[j] += v
		}
		wsum += s.w[i]
	}
	scale := s.baleKg / wsum
	for j, v := range s.sum {
		s.comp[j] = v * scale
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
	c := newCharge(s.plan.recipeFor(pet, dry, s.glycol), s.glycol, s.cat)
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
// opt.FixedLine the ranges of the line's efficiencies, through the line
// and the glycolysis by a nonparametric bootstrap of the pulls (Efron &
// Tibshirani, An Introduction to the Bootstrap, Chapman & Hall 1993)
// with the ratio estimator of each resample. The finite-population
// correction is not applied to the resampling.
func Simulate(pulls []assess.Pull, baleKg float64, plan Plan, opt MCOptions) (MCResult, error) {
	_, res, err := Run(context.Background(), pulls, baleKg, plan, opt, nil)
	return res, err
}

// summarize sorts x in place and returns its P10, P50, P90 and mean.
// Percentiles interpolate linearly between order statistics, the
// definition 7 of Hyndman & Fan, Am. Stat. 50 (1996) 361.
func summarize(x []float64) Summary {
	s := Summary{N: len(x)}
	if len(x) == 0 {
		s.P10, s.P50, s.P90, s.Mean = math.NaN(), math.NaN(), math.NaN(), math.NaN()
		return s
	}
	slices.Sort(x)
	sum := 0.0
	for _, v := range x {
		sum += v
	}
	s.Mean = sum / float64(len(x))
	s.P10, s.P50, s.P90 = quantile(x, 0.10), quantile(x, 0.50), quantile(x, 0.90)
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
