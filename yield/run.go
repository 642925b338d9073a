package yield

import (
	"context"

	"baleassay/assess"
)

// Run evaluates the plan once at the point estimate and then simulates it
// as Simulate does (same draws for the same seed): the report and the
// spread come from one call. Every 1,000 draws it reports progress (when
// progress is not nil) and stops with ctx.Err() once ctx is done.
func Run(ctx context.Context, pulls []assess.Pull, baleKg float64, plan Plan, opt MCOptions, progress func(done, of int)) (Report, MCResult, error) {
	rep, err := Evaluate(pulls, baleKg, plan)
	if err != nil {
		return Report{}, MCResult{}, err
	}
	est, err := assess.Assess(assess.Audit{Pulls: pulls, BaleKg: baleKg}, assess.Options{Method: assess.MethodRatio})
	if err != nil {
		return rep, MCResult{}, err
	}
	res, err := simulateSpread(ctx, est.Spread, baleKg, est.SampledShare >= 1, plan, opt, progress)
	return rep, res, err
}

// RunLoad is Run for a load: EvaluateLoad, then the draws of
// SimulateLoad.
func RunLoad(ctx context.Context, lr assess.LoadResult, plan Plan, opt MCOptions, progress func(done, of int)) (Report, MCResult, error) {
	rep, err := EvaluateLoad(lr, plan)
	if err != nil {
		return Report{}, MCResult{}, err
	}
	res, err := simulateSpread(ctx, lr.Spread, lr.BaleKg, lr.Known(), plan, opt, progress)
	return rep, res, err
}
