package assess

import "math"

// Report is the stable, documented form of an assessment for JSON output
// and for screens. Shares are mass fractions in [0, 1]; Low and High are
// null when there is no interval (one pull), MorePulls is null when it
// cannot be said.
type Report struct {
	Pulls        int           `json:"pulls"`
	SampledKg    float64       `json:"sampled_kg"`
	BaleKg       float64       `json:"bale_kg"`
	SampledShare float64       `json:"sampled_share"`
	Confidence   float64       `json:"confidence"`
	Method       string        `json:"method"`
	Categories   []ShareReport `json:"categories"`
	Groups       []ShareReport `json:"groups"`
	Pieces       []PieceReport `json:"pieces"`
	Hazards      HazardReport  `json:"hazards"`
	Spec         *SpecReport   `json:"spec,omitempty"`
	Advice       AdviceReport  `json:"advice"`
	Notes        []string      `json:"notes"`
}

// ShareReport is one category or group.
type ShareReport struct {
	Key      string   `json:"key"`
	Name     string   `json:"name"`
	Code     *int     `json:"code,omitempty"` // categories only; 0 when none
	Kg       float64  `json:"kg"`
	Fraction float64  `json:"fraction"`
	Low      *float64 `json:"low"`
	High     *float64 `json:"high"`
}

// PieceReport is the piece-count share of one counted category.
type PieceReport struct {
	Key            string     `json:"key"`
	Pieces         int        `json:"pieces"`
	Total          int        `json:"total"`
	Fraction       float64    `json:"fraction"`
	Wilson         [2]float64 `json:"wilson"`
	ClopperPearson [2]float64 `json:"clopper_pearson"`
}

// HazardReport flags zero-tolerance items.
type HazardReport struct {
	Found  bool     `json:"found"`
	Kg     float64  `json:"kg"`
	Pieces int      `json:"pieces"`
	Pulls  []string `json:"pulls"`
}

// SpecReport is a spec's verdict.
type SpecReport struct {
	Name      string        `json:"name"`
	Verdict   string        `json:"verdict"`
	Grade     string        `json:"grade,omitempty"`
	GradeSure bool          `json:"grade_sure"`
	Limits    []LimitReport `json:"limits"`
}

// LimitReport is one bound's verdict.
type LimitReport struct {
	Item      string   `json:"item"`
	Bound     string   `json:"bound"` // min, max or zero
	Limit     float64  `json:"limit"`
	Fraction  float64  `json:"fraction"`
	Low       *float64 `json:"low"`
	High      *float64 `json:"high"`
	Verdict   string   `json:"verdict"`
	MorePulls *int     `json:"more_pulls"`
	Note      string   `json:"note,omitempty"`
}

// AdviceReport is the sample-size advice.
type AdviceReport struct {
	Item         string  `json:"item"`
	RelPrecision float64 `json:"rel_precision"`
	PullsNeeded  *int    `json:"pulls_needed"`
	MorePulls    *int    `json:"more_pulls"`
	Why          string  `json:"why"`
}

// NewReport gathers an assessment, its spec verdict (nil for none) and
// advice into a Report.
func NewReport(r Result, sv *SpecVerdict, adv Advice) Report {
	rep := Report{
		Pulls: r.Pulls, SampledKg: r.SampledKg, BaleKg: r.BaleKg, SampledShare: r.SampledShare,
		Confidence: r.Confidence, Method: r.Method.String(),
		Categories: make([]ShareReport, len(r.Categories)),
		Pieces:     []PieceReport{},
		Notes:      []string{},
	}
	for i, s := range r.Categories {
		code := s.Code
		rep.Categories[i] = shareReport(s, catalogue[i].Name)
		rep.Categories[i].Code = &code
	}
	for _, s := range r.Groups {
		g, _ := LookupGroup(s.Key)
		rep.Groups = append(rep.Groups, shareReport(s, g.String()))
	}
	for _, p := range r.Pieces {
		rep.Pieces = append(rep.Pieces, PieceReport{Key: p.Key, Pieces: p.Pieces, Total: p.Total, Fraction: p.Fraction,
			Wilson: [2]float64{p.Wilson.Low, p.Wilson.High}, ClopperPearson: [2]float64{p.ClopperPearson.Low, p.ClopperPearson.High}})
	}
	hz := r.Group(GroupHazards)
	rep.Hazards = HazardReport{Found: len(r.HazardPulls) > 0, Kg: hz.Kg, Pieces: r.HazardPieces, Pulls: append([]string{}, r.HazardPulls...)}
	if sv != nil {
		sr := &SpecReport{Name: sv.Spec, Verdict: sv.Verdict.String(), Grade: sv.Grade, GradeSure: sv.GradeSure, Limits: []LimitReport{}}
		for _, lv := range sv.Limits {
			lr := LimitReport{Item: lv.Item, Bound: lv.Bound.String(), Limit: lv.Limit, Fraction: lv.Share.Fraction,
				Verdict: lv.Verdict.String(), Note: lv.Note}
			lr.Low, lr.High = interval(lv.Share)
			if lv.MoreKnown {
				m := lv.MorePulls
				lr.MorePulls = &m
			}
			sr.Limits = append(sr.Limits, lr)
		}
		rep.Spec = sr
	}
	rep.Advice = AdviceReport{Item: adv.Item, RelPrecision: adv.RelPrecision, Why: adv.Why}
	if adv.Known {
		n, m := adv.Needed, adv.More
		rep.Advice.PullsNeeded, rep.Advice.MorePulls = &n, &m
	}
	if r.Pulls == 1 && r.SampledShare < 1 {
		rep.Notes = append(rep.Notes, "One pull gives an estimate but no confidence interval; take at least one more pull.")
	}
	if len(r.Pieces) > 0 {
		rep.Notes = append(rep.Notes, "Piece-count intervals treat pieces as independent; pieces come clustered in pulls, so the true uncertainty is larger.")
	}
	if r.BaleKg <= 0 {
		rep.Notes = append(rep.Notes, "Bale mass unknown: no finite-population correction (intervals are a little wider than they need be).")
	}
	return rep
}

func shareReport(s Share, name string) ShareReport {
	sr := ShareReport{Key: s.Key, Name: name, Kg: round(s.Kg, 6), Fraction: s.Fraction}
	sr.Low, sr.High = interval(s)
	return sr
}

func interval(s Share) (*float64, *float64) {
	if !s.HasInterval {
		return nil, nil
	}
	lo, hi := s.Low, s.High
	return &lo, &hi
}

// round keeps sums of decimal masses from printing as 2.1999999999999997.
func round(x float64, digits int) float64 {
	p := math.Pow(10, float64(digits))
	return math.Round(x*p) / p
}
