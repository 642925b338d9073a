package assess

// LoadReport is the stable JSON form of a load audit (see README). Shares
// are mass fractions of the load; the spec's limits count bales, not
// pulls.
type LoadReport struct {
	Bales        int              `json:"bales"`
	Audited      int              `json:"audited"`
	AuditedShare float64          `json:"audited_share"` // f₁ = audited / bales
	LoadKg       float64          `json:"load_kg"`
	MeanBaleKg   float64          `json:"mean_bale_kg"`
	MeanPulls    float64          `json:"mean_pulls"`
	Pulls        int              `json:"pulls"`
	SampledKg    float64          `json:"sampled_kg"`
	Confidence   float64          `json:"confidence"`
	Categories   []ShareReport    `json:"categories"`
	Groups       []ShareReport    `json:"groups"`
	Pieces       []PieceReport    `json:"pieces"`
	Hazards      HazardReport     `json:"hazards"`
	PerBale      []LoadBaleReport `json:"per_bale"`
	Spec         *LoadSpecReport  `json:"spec,omitempty"`
	Advice       LoadAdviceReport `json:"advice"`
	Notes        []string         `json:"notes"`
}

// LoadBaleReport is one audited bale's target-PET share.
type LoadBaleReport struct {
	Label     string   `json:"label"`
	BaleKg    float64  `json:"bale_kg"`
	Pulls     int      `json:"pulls"`
	SampledKg float64  `json:"sampled_kg"`
	TargetPET float64  `json:"target_pet"`
	Low       *float64 `json:"low"`
	High      *float64 `json:"high"`
}

// LoadSpecReport is a spec's verdict on a load.
type LoadSpecReport = SpecReportOf[LoadLimitReport]

// LoadLimitReport is one bound's verdict on a load: MoreBales and
// BalesNeeded are the bales to audit at the current pulls per bale, null
// when no number can be given ("need" says why).
type LoadLimitReport struct {
	LimitCore
	MoreBales   *int `json:"more_bales"`
	BalesNeeded *int `json:"bales_needed"`
}

// LoadAdviceReport is the load advice.
type LoadAdviceReport struct {
	Kind         string   `json:"kind"`
	Route        string   `json:"route"`
	Item         string   `json:"item"`
	MoreBales    *int     `json:"more_bales"`
	BalesNeeded  *int     `json:"bales_needed"`
	MorePulls    *int     `json:"more_pulls"`
	PullsPerBale *int     `json:"pulls_per_bale"`
	CostBales    *float64 `json:"cost_bales"`
	CostPulls    *float64 `json:"cost_pulls"`
	BaleCost     float64  `json:"bale_cost"`
	Failing      []string `json:"failing"`
	Why          string   `json:"why"`
}

func finiteOrNil(x float64) *float64 {
	if x != x {
		return nil
	}
	return &x
}

// NewLoadReport gathers a load audit, its verdict (nil for none) and its
// advice.
func NewLoadReport(lr LoadResult, sv *SpecVerdict, adv LoadAdvice) LoadReport {
	base := NewReport(lr.Result, nil, Advice{})
	rep := LoadReport{
		Bales: lr.Bales, Audited: lr.Audited, AuditedShare: lr.F1, LoadKg: lr.BaleKg, MeanBaleKg: lr.MeanBaleKg,
		MeanPulls: lr.MeanPulls, Pulls: lr.Pulls, SampledKg: round(lr.SampledKg, 6), Confidence: lr.Confidence,
		Categories: base.Categories, Groups: base.Groups, Pieces: base.Pieces, Hazards: base.Hazards, Notes: []string{},
	}
	for i, r := range lr.PerBale {
		pet := r.Group(GroupPET)
		b := LoadBaleReport{Label: lr.Labels[i], BaleKg: r.BaleKg, Pulls: r.Pulls, SampledKg: round(r.SampledKg, 6), TargetPET: pet.Fraction}
		b.Low, b.High = interval(pet)
		rep.PerBale = append(rep.PerBale, b)
	}
	if sv != nil {
		rep.Spec = specReport(*sv, func(c LimitCore, need SampleSize) LoadLimitReport {
			l := LoadLimitReport{LimitCore: c}
			l.BalesNeeded, l.MoreBales = sizeFields(need)
			return l
		})
	}
	rep.Advice = LoadAdviceReport{Kind: adv.Kind.String(), Route: adv.Route.String(), Item: adv.Item, BaleCost: adv.BaleCost,
		CostBales: finiteOrNil(adv.CostBales), CostPulls: finiteOrNil(adv.CostPulls), Failing: []string{}, Why: adv.Why}
	rep.Advice.BalesNeeded, rep.Advice.MoreBales = sizeFields(adv.Bales)
	rep.Advice.PullsPerBale, rep.Advice.MorePulls = sizeFields(adv.PullsPerBale)
	for _, l := range adv.Failing {
		rep.Advice.Failing = append(rep.Advice.Failing, l.Text())
	}
	if lr.Audited < 2 && lr.Bales > 1 {
		rep.Notes = append(rep.Notes, "One audited bale shows nothing of how the load's bales differ: the load gets estimates but no intervals; audit another bale.")
	}
	if lr.PooledWithin {
		rep.Notes = append(rep.Notes, "A bale with one pull borrows the within-bale spread of the bales with two or more.")
	}
	if lr.NoWithin {
		rep.Notes = append(rep.Notes, "No audited bale has two pulls, so the within-bale term of the load's variance is left out (it is multiplied by the audited share of the bales).")
	}
	for _, c := range lr.Categories {
		if c.Kind == IntervalNoneFound {
			rep.Notes = append(rep.Notes, "An item found in no pull of any audited bale is bounded as if the pulls were drawn from the whole load; a bale never audited may differ.")
			break
		}
	}
	return rep
}
