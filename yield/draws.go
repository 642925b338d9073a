package yield

import (
	"context"
	"math"

	"baleassay/assess"
)

// Outcome is one Monte Carlo draw of a bale through a plan, with what the
// value arithmetic needs besides the three figures Run summarises. Masses
// are kg of this bale.
type Outcome struct {
	// BaleKg is the bale's gross mass; LiquidKg the free liquid of the
	// draw's composition (it evaporates or drains, nobody disposes of it).
	BaleKg, LiquidKg float64
	// FlakeKg is the clean flake as delivered (moisture included),
	// FlakeDryKg without its moisture, PETKg the target PET in it.
	FlakeKg, FlakeDryKg, PETKg float64
	// GlycolKg is the glycol the plan's recipe charges with the dry
	// flake; GlycolysateKg the product. Both are 0 when no PET reaches
	// the flake.
	GlycolKg, GlycolysateKg float64
	// HydroxylValue of the glycolysate in mg KOH/g; NaN when the draw
	// holds no PET.
	HydroxylValue float64
	// fails holds, per flake-spec item, whether the draw's flake broke
	// its limit (false where the spec sets none).
	fails [numFlakeItems]bool
}

// RejectKg is the solid rejects of the draw: the bale less its free
// liquid less the dry flake. Process water the rejects carry is not
// counted.
func (o *Outcome) RejectKg() float64 { return max(0, o.BaleKg-o.LiquidKg-o.FlakeDryKg) }

// Failed reports whether the draw's flake broke the spec's limit on it.
func (o *Outcome) Failed(it FlakeItem) bool { return it >= 0 && it < numFlakeItems && o.fails[it] }

// RunOutcomes makes the same draws as Run (same seed, same numbers: the
// flake, glycolysate and hydroxyl value of draw i are Run's) and hands
// each to visit, which must not keep the pointer. It evaluates the plan
// once first, so bad input fails before any draw. Every 1,000 draws it
// reports progress (when progress is not nil) and stops with ctx.Err()
// once ctx is done.
func RunOutcomes(ctx context.Context, pulls []assess.Pull, baleKg float64, plan Plan, opt MCOptions,
	progress func(done, of int), visit func(d int, o *Outcome)) (Report, error) {
	rep, err := Evaluate(pulls, baleKg, plan)
	if err != nil {
		return Report{}, err
	}
	draws := opt.Draws
	if draws == 0 {
		draws = DefaultDraws
	}
	if draws < 1 || draws > MaxDraws {
		return rep, fieldErr("monte carlo", "draws", ErrOutOfRange, "%d draws: give 1 to %d", draws, MaxDraws)
	}
	est, err := assess.Assess(assess.Audit{Pulls: pulls, BaleKg: baleKg}, assess.Options{Method: assess.MethodRatio})
	if err != nil {
		return rep, err
	}
	s := newSimulator(est.Spread, baleKg, plan, opt)
	var o Outcome
	for d := range draws {
		if d%progressEvery == 0 && d > 0 {
			if err := ctx.Err(); err != nil {
				return rep, err
			}
			if progress != nil {
				progress(d, draws)
			}
		}
		flake, product, ohv := s.draw()
		s.outcome(&o, flake, product, ohv)
		visit(d, &o)
	}
	if progress != nil {
		progress(draws, draws)
	}
	return rep, nil
}

// outcome fills o from the simulator's state after a draw.
func (s *simulator) outcome(o *Outcome, flake, product, ohv float64) {
	dry, pet := s.m.dryAndPET(s.st)
	*o = Outcome{BaleKg: s.massKg, LiquidKg: s.comp[s.m.liquid], FlakeKg: flake, FlakeDryKg: dry, PETKg: pet,
		GlycolysateKg: product, HydroxylValue: ohv}
	if pet > 0 {
		o.GlycolKg = s.plan.recipeFor(pet, dry, s.glycol).GlycolKg
	} else {
		o.HydroxylValue = math.NaN()
	}
	for it, l := range s.limits {
		o.fails[it] = l != nil && !(s.vals[it] <= *l)
	}
}
