package yield

import (
	"context"
	"fmt"
	"math"
	"strings"

	"baleassay/assess"
)

// DefaultGlycol and DefaultGlycolRatio are the glycolysis charge used
// for a bale unless another is given: DEG at 1:1 by mass, one of the
// charges in Hoang et al., Polymers 11 (2019) 236.
const (
	DefaultGlycol      = "DEG"
	DefaultGlycolRatio = 1.0
)

// Plan says what happens to a bale: the line, the flake spec to check
// (nil for none), the glycolysis recipe and the reactor's charge per
// batch in kg of flake plus glycol (0: batches not counted).
//
// The recipe's PETKg, PVCKg and InertKg are set from the flake. Its
// glycol must be a ratio, and for a bale the ratio applies to the dry
// flake as charged, contaminants included, because a plant weighs flake,
// not PET: glycol = R·m_flake (or, with Molar, R moles per 192.17 g of
// flake). The flake's purity therefore moves the hydroxyl value.
//
// Conversion and StripEG, when set, give the recipe's conversion and EG
// stripping as ranges: the deterministic figures use their midpoints
// (they override the recipe's own values) and the Monte Carlo draws them
// uniformly.
type Plan struct {
	Line       *Model
	Spec       *FlakeSpec
	Recipe     Recipe
	ReactorKg  float64
	Conversion Param
	StripEG    Param
}

// DefaultPlan is the built-in line and flake spec with DEG 1:1 w/w and
// 0.5 wt % zinc acetate.
func DefaultPlan() Plan {
	m, err := Compile(BuiltinLine())
	if err != nil {
		panic("built-in line does not compile: " + err.Error())
	}
	spec := BuiltinFlakeSpec()
	return Plan{Line: m, Spec: &spec, Recipe: DefaultRecipe(1, DefaultGlycol, DefaultGlycolRatio)}
}

// Report is the deterministic outcome for one bale: the audit's point
// estimate through the line (parameters at their midpoints), the flake
// checks and the glycolysis of the flake.
type Report struct {
	BaleKg float64
	// BaleComposition is the bale's kg by catalogue index, from Cochran's
	// ratio estimate of the pulls (assess.Assess, MethodRatio).
	BaleComposition []float64
	Balance         Balance
	Checks          []FlakeCheck // nil without a spec
	Glycolysate     Glycolysate
	// Batches is the number of reactor batches for the bale's flake, 0
	// when the plan states no reactor charge.
	Batches int
	// Warnings are about the bale and the line (hazards, aluminium in the
	// caustic wash); the glycolysate carries its own.
	Warnings []string
}

// Evaluate runs one bale through the plan at the point estimate.
func Evaluate(pulls []assess.Pull, baleKg float64, plan Plan) (Report, error) {
	if err := plan.validate(); err != nil {
		return Report{}, err
	}
	if !finite(baleKg) || baleKg <= 0 {
		return Report{}, fieldErr("audit", "bale_kg", ErrBadAudit, "%v: give the bale's gross mass in kg, above 0", baleKg)
	}
	est, err := assess.Assess(assess.Audit{Pulls: pulls, BaleKg: baleKg}, assess.Options{Method: assess.MethodRatio})
	if err != nil {
		return Report{}, err
	}
	return evaluateShares(est, baleKg, plan)
}

// EvaluateLoad runs a whole load through the plan at its point estimate
// (the two-stage ratio-to-size estimate of assess.AssessLoad) and its
// mass.
func EvaluateLoad(lr assess.LoadResult, plan Plan) (Report, error) {
	if err := plan.validate(); err != nil {
		return Report{}, err
	}
	return evaluateShares(lr.Result, lr.BaleKg, plan)
}

// SimulateLoad is Simulate for a load: the composition is drawn from
// the load's two-stage estimator (its between-bale and within-bale
// terms), the mass is the load's.
func SimulateLoad(lr assess.LoadResult, plan Plan, opt MCOptions) (MCResult, error) {
	_, res, err := RunLoad(context.Background(), lr, plan, opt, nil)
	return res, err
}

// evaluateShares runs a composition (shares of est.Categories) of
// massKg through the plan.
func evaluateShares(est assess.Result, massKg float64, plan Plan) (Report, error) {
	comp := make([]float64, assess.NumCategories())
	for j, sh := range est.Categories {
		comp[j] = sh.Fraction * massKg
	}
	bal, err := plan.Line.Run(comp)
	if err != nil {
		return Report{}, err
	}
	rep := Report{BaleKg: massKg, BaleComposition: comp, Balance: bal}
	rep.Warnings = lineWarnings(est.HazardPulls, comp, bal)
	if plan.Spec != nil {
		rep.Checks = plan.Spec.Check(bal)
	}
	if bal.PETKg <= 0 {
		return rep, fieldErr("audit", "pulls", ErrBadAudit, "no PET reaches the flake; nothing to glycolyse")
	}
	pvc, _ := assess.CategoryIndex("pvc")
	gly, _ := LookupGlycol(plan.Recipe.Glycol) // checked by validate
	r := plan.recipeFor(bal.PETKg, bal.FlakeDryKg, gly)
	r.PVCKg = bal.Flake[pvc]
	r.InertKg = max(0, bal.FlakeDryKg-bal.PETKg-r.PVCKg) // rounding can dip below 0
	g, err := Glycolyse(r)
	if err != nil {
		return rep, err
	}
	rep.Glycolysate = g
	if plan.ReactorKg > 0 {
		rep.Batches = int(math.Ceil((bal.FlakeDryKg + g.GlycolKg) / plan.ReactorKg))
	}
	return rep, nil
}

func (p Plan) validate() error {
	if p.Line == nil {
		return fieldErr("plan", "line", ErrBadLine, "no line profile")
	}
	if p.Spec != nil {
		if err := p.Spec.Validate(); err != nil {
			return err
		}
	}
	if p.Recipe.GlycolKg != 0 {
		return fieldErr("plan", "glycol_kg", ErrBadCharge, "for a bale give the glycol as a ratio to the PET, so it scales with the flake")
	}
	if p.Conversion.IsSet() {
		if err := checkParam("glycolysis", "conversion", p.Conversion); err != nil {
			return err
		}
		if p.Conversion.Lo == 0 {
			return fieldErr("glycolysis", "conversion", ErrOutOfRange, "a range starting at 0 dissolves no PET at its low end; give the dissolved share in (0, 1]")
		}
	}
	if p.StripEG.IsSet() {
		if err := checkParam("glycolysis", "strip_eg", p.StripEG); err != nil {
			return err
		}
	}
	probe := p.withRanges(p.Recipe)
	probe.PETKg = 1
	probe.PVCKg, probe.InertKg = 0, 0
	g, cat, err := probe.validate()
	if err != nil {
		return err
	}
	if err := newCharge(probe, g, cat).ok(); err != nil {
		return err
	}
	if p.StripEG.IsSet() {
		probe.StripEG = p.StripEG.Hi
		if err := newCharge(probe, g, cat).ok(); err != nil {
			return err
		}
	}
	if !finite(p.ReactorKg) || p.ReactorKg < 0 {
		return fieldErr("plan", "reactor_kg", ErrOutOfRange, "%v: give the reactor charge in kg, above 0", p.ReactorKg)
	}
	return nil
}

// recipeFor is the plan's recipe for a flake holding petKg of PET in
// dryKg of dry flake. It allocates nothing.
func (p Plan) recipeFor(petKg, dryKg float64, g Glycol) Recipe {
	r := p.withRanges(p.Recipe)
	r.PETKg = petKg
	if r.Molar {
		r.GlycolKg = r.Ratio * dryKg / MolarMassPETUnit * g.MolarMass
	} else {
		r.GlycolKg = r.Ratio * dryKg
	}
	r.Ratio, r.Molar = 0, false
	return r
}

// withRanges sets the recipe's conversion and EG stripping to the
// midpoints of the plan's ranges, where given.
func (p Plan) withRanges(r Recipe) Recipe {
	if p.Conversion.IsSet() {
		r.Conversion = p.Conversion.Mid()
	}
	if p.StripEG.IsSet() {
		r.StripEG = p.StripEG.Mid()
	}
	return r
}

// lineWarnings flags what the grader and the line crew must act on:
// hazards in the audit or, worse, in the flake, and aluminium reaching
// the caustic wash.
func lineWarnings(labels []string, comp []float64, bal Balance) []string {
	var w []string
	hz, _ := assess.CategoryIndex("hazard")
	if len(labels) > 0 {
		w = append(w, fmt.Sprintf("hazards were found in pulls %s: the bale must be sorted by hand before it goes on the line; the model assumes only what the line profile removes", strings.Join(labels, ", ")))
	}
	if bal.Flake[hz] > 0 {
		w = append(w, fmt.Sprintf("%s kg of hazard items reach the flake: this line profile does not remove them; add a sort stage with removal hazard = 1", assess.Sig(bal.Flake[hz], 3)))
	}
	al, _ := assess.CategoryIndex("aluminium")
	if comp[al] > 0 {
		w = append(w, "aluminium in the bale: what the sort misses releases hydrogen in the caustic wash; ventilate the wash tanks")
	}
	return w
}
