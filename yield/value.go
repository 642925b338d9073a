package yield

import (
	"context"
	"math"

	"baleassay/assess"
)

// Breakdown is the value of a bale on one route, per tonne of bale, in
// the sheet's currency: what the products fetch, less what goes into
// making them. Net = Revenue − Deductions − Glycol − Wash − Glycolysis −
// Disposal.
type Breakdown struct {
	Revenue, Deductions, Glycol, Wash, Glycolysis, Disposal, Net float64
	// Deducted says a deduction applied.
	Deducted bool
}

// Worth prices one outcome on a route. With B the bale, F the flake as
// delivered, F_d the dry flake, R the solid rejects (Outcome.RejectKg),
// G the glycolysate and Gl the glycol charged, all in tonnes, and the
// sheet's figures per tonne:
//
//	flake:        Revenue = F·p_flake,   Deductions = F·Σ d_item over the flake-spec limits broken
//	glycolysate:  Revenue = G·p_glycolysate,  Deductions = G·d_OHV if the OHV is outside the window,
//	              Glycol = Gl·p_glycol,  Glycolysis = (F_d + Gl)·c_glycolysis
//	both:         Wash = B·c_wash,       Disposal = R·c_disposal
//
// each divided by B. It is the margin a bale leaves over the costs the
// sheet names (a contribution margin, Horngren et al., Cost Accounting,
// ch. 3), the most a buyer could pay for it before overheads and
// transport; it is not a price forecast.
func (p *PriceSheet) Worth(o *Outcome, r Route) Breakdown {
	var b Breakdown
	baleT := o.BaleKg / 1000
	if !(baleT > 0) {
		return b
	}
	b.Wash = baleT * p.WashCostPerT
	b.Disposal = o.RejectKg() / 1000 * p.DisposalPerT
	switch r {
	case RouteFlake:
		ft := o.FlakeKg / 1000
		b.Revenue = ft * p.FlakePerT
		for it, d := range p.deduct {
			if d > 0 && o.fails[it] {
				b.Deductions += ft * d
				b.Deducted = true
			}
		}
	case RouteGlycolysate:
		gt, glt := o.GlycolysateKg/1000, o.GlycolKg/1000
		b.Revenue = gt * p.GlycolysatePerT
		if h := p.Hydroxyl; h != nil && gt > 0 && !(o.HydroxylValue >= h.Min && o.HydroxylValue <= h.Max) {
			b.Deductions = gt * h.DeductionPerT
			b.Deducted = h.DeductionPerT > 0
		}
		b.Glycol = glt * p.GlycolPerT
		if gt > 0 {
			b.Glycolysis = (o.FlakeDryKg/1000 + glt) * p.GlycolysisCostPerT
		}
	}
	b.Net = b.Revenue - b.Deductions - b.Glycol - b.Wash - b.Glycolysis - b.Disposal
	for _, v := range []*float64{&b.Revenue, &b.Deductions, &b.Glycol, &b.Wash, &b.Glycolysis, &b.Disposal, &b.Net} {
		*v /= baleT
	}
	return b
}

// RouteValue is a bale's value on one route.
type RouteValue struct {
	Route Route
	// PerT is the net value per tonne of bale over the draws (P10, P50,
	// P90, mean); PerBale the same for the whole bale.
	PerT, PerBale Summary
	// Mean is the breakdown averaged over the draws (each term's mean, so
	// the terms still add up to the mean net value).
	Mean Breakdown
	// Point is the breakdown at the point estimate (the deterministic
	// yield figures).
	Point Breakdown
	// DeductedShare is the share of draws in which a deduction applied.
	DeductedShare float64
}

// ValueResult is a bale's value by a price sheet.
type ValueResult struct {
	Sheet  PriceSheet
	BaleKg float64
	Draws  int
	Seed   uint64
	// Headline is the sheet's route; Routes holds both, flake first.
	Headline Route
	Routes   [2]RouteValue
	Report   Report // the deterministic yield
}

// Of returns the value on route r.
func (v ValueResult) Of(r Route) RouteValue {
	if r == RouteGlycolysate {
		return v.Routes[1]
	}
	return v.Routes[0]
}

// Value prices every Monte Carlo draw of the bale through the plan (the
// draws of Run, RunOutcomes) by the sheet, on both routes, and summarises
// the value per tonne of bale: P10, P50, P90 and the mean. Percentiles of
// the value are taken over the draws of the value itself, not computed
// from the yield's percentiles, because deductions make the value a
// non-monotone function of the yield.
func Value(ctx context.Context, pulls []assess.Pull, baleKg float64, plan Plan, sheet PriceSheet, opt MCOptions, progress func(done, of int)) (ValueResult, error) {
	if err := sheet.Validate(); err != nil {
		return ValueResult{}, err
	}
	draws := opt.Draws
	if draws == 0 {
		draws = DefaultDraws
	}
	res := ValueResult{Sheet: sheet, BaleKg: baleKg, Draws: draws, Seed: opt.Seed, Headline: sheet.Route}
	var nets [2][]float64
	var sums [2]Breakdown
	var deducted [2]int
	if draws >= 1 && draws <= MaxDraws {
		nets = [2][]float64{make([]float64, draws), make([]float64, draws)}
	}
	rep, err := RunOutcomes(ctx, pulls, baleKg, plan, opt, progress, func(d int, o *Outcome) {
		for i, r := range [2]Route{RouteFlake, RouteGlycolysate} {
			b := sheet.Worth(o, r)
			nets[i][d] = b.Net
			sums[i].add(b)
			if b.Deducted {
				deducted[i]++
			}
		}
	})
	if err != nil {
		return ValueResult{}, err
	}
	res.Report = rep
	point := reportOutcome(rep)
	for i, r := range [2]Route{RouteFlake, RouteGlycolysate} {
		rv := RouteValue{Route: r, Point: sheet.Worth(&point, r), DeductedShare: float64(deducted[i]) / float64(draws)}
		rv.Mean = sums[i].scaled(1 / float64(draws))
		perBale := make([]float64, draws)
		for d, v := range nets[i] {
			perBale[d] = v * baleKg / 1000
		}
		rv.PerT, rv.PerBale = summarize(nets[i]), summarize(perBale)
		res.Routes[i] = rv
	}
	return res, nil
}

func (b *Breakdown) add(x Breakdown) {
	b.Revenue += x.Revenue
	b.Deductions += x.Deductions
	b.Glycol += x.Glycol
	b.Wash += x.Wash
	b.Glycolysis += x.Glycolysis
	b.Disposal += x.Disposal
	b.Net += x.Net
}

func (b Breakdown) scaled(k float64) Breakdown {
	return Breakdown{Revenue: b.Revenue * k, Deductions: b.Deductions * k, Glycol: b.Glycol * k, Wash: b.Wash * k,
		Glycolysis: b.Glycolysis * k, Disposal: b.Disposal * k, Net: b.Net * k}
}

// reportOutcome is the point estimate as an Outcome.
func reportOutcome(rep Report) Outcome {
	liquid, _ := assess.CategoryIndex("liquid")
	b := rep.Balance
	o := Outcome{BaleKg: rep.BaleKg, LiquidKg: rep.BaleComposition[liquid], FlakeKg: b.FlakeKg, FlakeDryKg: b.FlakeDryKg,
		PETKg: b.PETKg, GlycolKg: rep.Glycolysate.GlycolKg, GlycolysateKg: rep.Glycolysate.GlycolysateKg,
		HydroxylValue: rep.Glycolysate.HydroxylValue}
	if b.PETKg <= 0 {
		o.HydroxylValue = math.NaN()
	}
	for _, c := range rep.Checks {
		o.fails[c.Item] = !c.Pass
	}
	return o
}
