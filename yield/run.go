package yield

import (
	"context"
	"math"

	"baleassay/assess"
)

// progressEvery is how many draws Run makes between looks at its context
// and calls of its progress function.
const progressEvery = 1000

// Run evaluates the plan once at the point estimate and then simulates it
// as Simulate does (same draws for the same seed), in one pass: the
// report and the spread come from one evaluation. Every 1,000 draws it
// reports progress (when progress is not nil) and stops with ctx.Err()
// once ctx is done.
func Run(ctx context.Context, pulls []assess.Pull, baleKg float64, plan Plan, opt MCOptions, progress func(done, of int)) (Report, MCResult, error) {
	rep, err := Evaluate(pulls, baleKg, plan)
	if err != nil {
		return Report{}, MCResult{}, err
	}
	draws := opt.Draws
	if draws == 0 {
		draws = DefaultDraws
	}
	if draws < 1 || draws > MaxDraws {
		return rep, MCResult{}, fieldErr("monte carlo", "draws", ErrOutOfRange, "%d draws: give 1 to %d", draws, MaxDraws)
	}
	s := newSimulator(pulls, baleKg, plan, opt)
	flake := make([]float64, draws)
	product := make([]float64, draws)
	ohv := make([]float64, 0, draws)
	for d := range draws {
		if d%progressEvery == 0 && d > 0 {
			if err := ctx.Err(); err != nil {
				return rep, MCResult{}, err
			}
			if progress != nil {
				progress(d, draws)
			}
		}
		f, p, h := s.draw()
		flake[d], product[d] = f, p
		if !math.IsNaN(h) {
			ohv = append(ohv, h)
		}
	}
	if progress != nil {
		progress(draws, draws)
	}
	res := MCResult{Draws: draws, Seed: opt.Seed,
		FlakeKg: summarize(flake), GlycolysateKg: summarize(product), HydroxylValue: summarize(ohv)}
	for it, l := range s.limits {
		res.SpecPass[it] = math.NaN()
		if l != nil {
			res.SpecPass[it] = float64(s.pass[it]) / float64(draws)
		}
	}
	return rep, res, nil
}
