package yield

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"baleassay/assess"
)

// ObsKind is a quantity a plant measures of a batch.
type ObsKind uint8

// The measured quantities.
const (
	ObsFlakeKg       ObsKind = iota + 1 // flake as weighed off the line, moisture included
	ObsFlakeDryKg                       // flake less its measured moisture
	ObsMoisturePct                      // moisture, % of the wet flake
	ObsStreamKg                         // one reject stream, weighed
	ObsGlycolysateKg                    // glycolysate of a reactor charge
	ObsHydroxylValue                    // its hydroxyl value, mg KOH/g
	ObsAcidValue                        // its acid value, mg KOH/g (predicted: from residual PVC only)
)

var obsKeys = [...]string{"", "flake_kg", "flake_dry_kg", "moisture_pct", "stream_kg", "glycolysate_kg", "hydroxyl_value", "acid_value"}

func (k ObsKind) String() string {
	if k >= ObsFlakeKg && k <= ObsAcidValue {
		return obsKeys[k]
	}
	return fmt.Sprintf("ObsKind(%d)", uint8(k))
}

// Observable is one measured quantity of a batch: its kind and, for a
// stream, the stream's name.
type Observable struct {
	Kind   ObsKind
	Stream string
}

func (o Observable) String() string {
	if o.Kind == ObsStreamKg {
		return "stream " + o.Stream + " kg"
	}
	return o.Kind.String()
}

// ReactorCharge is what went into a glycolysis reactor from a batch's
// flake: FlakeKg of flake as charged (taken as dry), GlycolKg of a
// glycol, and the share of liberated EG stripped. The rest of the recipe
// (conversion, catalyst) is the plan's.
type ReactorCharge struct {
	FlakeKg  float64
	Glycol   string
	GlycolKg float64
	StripEG  float64
}

// BatchBale is one bale of a batch: its pulls and gross mass.
type BatchBale struct {
	Pulls  []assess.Pull
	BaleKg float64
}

// Batch is what ran through the line together, and what of it was
// measured.
type Batch struct {
	Bales   []BatchBale
	Observe []Observable
	Reactor *ReactorCharge // nil when no glycolysis was measured
}

// BatchPrediction is what the model predicts for a batch.
type BatchPrediction struct {
	Observe []Observable
	// Point is the deterministic prediction: the bales' ratio estimates
	// summed, through the line at its midpoints.
	Point []float64
	// Full is the spread over the draws with the line's ranges drawn, as
	// bale yield reports it (P10–P90 for coverage).
	Full []Summary
	// AuditCov is the covariance of the observables over the draws with
	// the line held at its midpoints: the part of the prediction's error
	// that comes from the audits alone.
	AuditCov [][]float64
	// Composition is the batch's point composition, kg by catalogue
	// index (the sum of the bales' ratio estimates); ShareVar the
	// variance of each category's share of the batch over the draws (the
	// audits' sampling variance of the batch's composition).
	Composition []float64
	ShareVar    []float64
	Draws       int
}

// PredictBatch predicts the measured quantities of a batch of bales run
// together through one line. Each draw takes every bale's composition
// from its own audit (as Run does, independently per bale), sums them,
// and draws the line's ranged parameters once for the whole batch (the
// same line ran them all, so its efficiencies are shared, not
// independent per bale). The line model is linear in its input for
// fixed parameters, so the batch's flake is the line run on the summed
// composition. The reactor, when given, is charged with the batch's
// flake composition scaled to the charged mass.
func PredictBatch(ctx context.Context, b Batch, plan Plan, opt MCOptions) (BatchPrediction, error) {
	if len(b.Bales) == 0 {
		return BatchPrediction{}, fieldErr("batch", "bales", ErrBadAudit, "a batch needs at least one bale")
	}
	if err := plan.validate(); err != nil {
		return BatchPrediction{}, err
	}
	draws := opt.Draws
	if draws == 0 {
		draws = DefaultDraws
	}
	if draws < 2 || draws > MaxDraws {
		return BatchPrediction{}, fieldErr("monte carlo", "draws", ErrOutOfRange, "%d draws: give 2 to %d", draws, MaxDraws)
	}
	e, err := newBatchEval(b, plan)
	if err != nil {
		return BatchPrediction{}, err
	}
	nc := assess.NumCategories()
	sims := make([]*simulator, len(b.Bales))
	comp := make([]float64, nc)
	for i, bb := range b.Bales {
		est, err := assess.Assess(assess.Audit{Pulls: bb.Pulls, BaleKg: bb.BaleKg}, assess.Options{Method: assess.MethodRatio})
		if err != nil {
			return BatchPrediction{}, fmt.Errorf("bale %d of the batch: %w", i+1, err)
		}
		for j, sh := range est.Categories {
			comp[j] += sh.Fraction * bb.BaleKg
		}
		sims[i] = newSimulator(est.Spread, bb.BaleKg, plan, MCOptions{Seed: opt.Seed + uint64(i)*0x9e3779b97f4a7c15})
	}
	k := len(b.Observe)
	pred := BatchPrediction{Observe: b.Observe, Point: make([]float64, k), Full: make([]Summary, k), Draws: draws,
		Composition: append([]float64(nil), comp...)}
	mid := midParams(plan.Line)
	e.observe(comp, mid, pred.Point)
	full := make([][]float64, k)
	for i := range full {
		full[i] = make([]float64, 0, draws)
	}
	audit := newCovariance(k)
	shares := newVariances(nc)
	mass := 0.0
	for _, v := range comp {
		mass += v
	}
	rng := rand.New(rand.NewPCG(opt.Seed^0x5bd1e995, opt.Seed+1))
	par := slices.Clone(mid)
	var vary []int
	for i, p := range plan.Line.params {
		if !opt.FixedLine && p.Varies() {
			vary = append(vary, i)
		}
	}
	total := make([]float64, nc)
	yFull, yMid := make([]float64, k), make([]float64, k)
	for d := range draws {
		if d%progressEvery == 0 && d > 0 {
			if err := ctx.Err(); err != nil {
				return BatchPrediction{}, err
			}
		}
		clear(total)
		for _, s := range sims {
			s.batchDraw()
			for j, v := range s.comp {
				total[j] += v
			}
		}
		for _, i := range vary {
			p := plan.Line.params[i]
			par[i] = p.Lo + rng.Float64()*(p.Hi-p.Lo)
		}
		e.observe(total, par, yFull)
		e.observe(total, mid, yMid)
		for i, v := range yFull {
			if !math.IsNaN(v) {
				full[i] = append(full[i], v)
			}
		}
		audit.add(yMid)
		shares.add(total, 1/mass)
	}
	for i := range full {
		pred.Full[i] = summarize(full[i])
	}
	pred.AuditCov = audit.matrix()
	pred.ShareVar = shares.variances()
	return pred, nil
}

// batchDraw fills s.comp with one draw of the bale's composition in
// kg from its audit's spread, the composition step of draw.
func (s *simulator) batchDraw() {
	s.drawComposition()
	for j, v := range s.x {
		s.comp[j] = v * s.massKg
	}
}

func midParams(m *Model) []float64 {
	out := make([]float64, len(m.params))
	for i, p := range m.params {
		out[i] = p.Mid()
	}
	return out
}

// batchEval evaluates the observables of a batch for one composition
// and one set of line parameters, allocating nothing.
type batchEval struct {
	m       *Model
	plan    Plan
	obs     []Observable
	stream  []int // line stream index per observable (-1 when not a stream)
	st      []float64
	streams []float64
	reactor *ReactorCharge
	glycol  Glycol
	cat     Catalyst
	pvc     int
}

func newBatchEval(b Batch, plan Plan) (*batchEval, error) {
	e := &batchEval{m: plan.Line, plan: plan, obs: b.Observe, stream: make([]int, len(b.Observe)),
		st: make([]float64, NumComponents()), streams: make([]float64, len(plan.Line.streams)), reactor: b.Reactor}
	e.pvc, _ = assess.CategoryIndex("pvc")
	for i, o := range b.Observe {
		e.stream[i] = -1
		switch o.Kind {
		case ObsStreamKg:
			e.stream[i] = slices.Index(plan.Line.streams, o.Stream)
			if e.stream[i] < 0 {
				return nil, fieldErr("batch", "streams."+o.Stream, ErrUnknownKey, "line %q has no stream %q; its streams are %v", plan.Line.line.Name, o.Stream, plan.Line.streams)
			}
		case ObsGlycolysateKg, ObsHydroxylValue, ObsAcidValue:
			if b.Reactor == nil {
				return nil, fieldErr("batch", o.Kind.String(), ErrBadCharge, "a glycolysate was measured but no reactor charge was given")
			}
		case ObsFlakeKg, ObsFlakeDryKg, ObsMoisturePct:
		default:
			return nil, fieldErr("batch", "observe", ErrUnknownKey, "unknown quantity %v", o.Kind)
		}
	}
	if r := b.Reactor; r != nil {
		if err := checkPositive("reactor", "flake_kg", r.FlakeKg); err != nil {
			return nil, err
		}
		if err := checkPositive("reactor", "glycol_kg", r.GlycolKg); err != nil {
			return nil, err
		}
		if err := checkFraction("reactor", "strip_eg", r.StripEG); err != nil {
			return nil, err
		}
		g, err := LookupGlycol(r.Glycol)
		if err != nil {
			return nil, err
		}
		e.glycol = g
		e.cat, err = LookupCatalyst(catalystKey(plan.Recipe.Catalyst))
		if err != nil {
			return nil, err
		}
	}
	return e, nil
}

// observe runs the line on comp (kg by category) with parameters par and
// writes the observables into y (NaN where undefined).
func (e *batchEval) observe(comp, par, y []float64) {
	water, _ := e.m.eval(comp, par, e.st, e.streams)
	dry, pet := e.m.dryAndPET(e.st)
	moist := water + e.st[e.m.liquid]
	var product, ohv, av = math.NaN(), math.NaN(), math.NaN()
	if r := e.reactor; r != nil && pet > 0 && dry > 0 {
		k := r.FlakeKg / dry
		rec := e.plan.recipeFor(pet*k, r.FlakeKg, e.glycol)
		rec.Glycol, rec.GlycolKg, rec.StripEG = r.Glycol, r.GlycolKg, r.StripEG
		rec.PVCKg = e.st[e.pvc] * k
		c := newCharge(rec, e.glycol, e.cat)
		if c.ok() == nil {
			product = c.productG / 1000
			ohv = c.hydroxylValue()
			av = mgKOH * (rec.PVCKg * 1000 / MolarMassPVCUnit) / c.productG
		}
	}
	for i, o := range e.obs {
		switch o.Kind {
		case ObsFlakeKg:
			y[i] = dry + moist
		case ObsFlakeDryKg:
			y[i] = dry
		case ObsMoisturePct:
			y[i] = math.NaN()
			if dry+moist > 0 {
				y[i] = 100 * moist / (dry + moist)
			}
		case ObsStreamKg:
			y[i] = e.streams[e.stream[i]]
		case ObsGlycolysateKg:
			y[i] = product
		case ObsHydroxylValue:
			y[i] = ohv
		case ObsAcidValue:
			y[i] = av
		}
	}
}

// dryAndPET sums a flake's dry mass (every component but the free
// liquid) and its target PET (dust included), by component as eval
// leaves them in st.
func (m *Model) dryAndPET(st []float64) (dry, pet float64) {
	for c, v := range st {
		if c == m.liquid {
			continue
		}
		dry += v
		if isPETComp[c] {
			pet += v
		}
	}
	return dry, pet
}

// IsStreamName reports whether s can name a reject stream: lower-case
// letters, digits and _, starting with a letter, at most 64 bytes.
func IsStreamName(s string) bool { return len(s) <= 64 && streamName.MatchString(s) }
