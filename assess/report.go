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
	// Interval is the kind of interval: "t", "none_found", "exact" or
	// "none" (one pull).
	Interval  string           `json:"interval"`
	NoneFound *NoneFoundReport `json:"none_found,omitempty"`
}

// NoneFoundReport is the bound of an item found in no pull.
type NoneFoundReport struct {
	Pulls   int     `json:"pulls"`
	Kg      float64 `json:"kg"`
	Level   float64 `json:"level"`
	Upper   float64 `json:"upper"`
	PieceKg float64 `json:"piece_kg"`
	Method  string  `json:"method"`
	Text    string  `json:"text"`
}

// PieceReport is what the piece counts of one counted category say.
// Total, Fraction and the intervals are null unless the pulls gave the
// pieces examined (basis "examined").
type PieceReport struct {
	Key            string      `json:"key"`
	Pieces         int         `json:"pieces"`
	Pulls          int         `json:"pulls"`
	Kg             float64     `json:"kg"`
	PerPull        float64     `json:"per_pull"`
	Per100Kg       float64     `json:"per_100kg"`
	Basis          string      `json:"basis"`
	Total          *int        `json:"total"`
	Fraction       *float64    `json:"fraction"`
	Wilson         *[2]float64 `json:"wilson"`
	ClopperPearson *[2]float64 `json:"clopper_pearson"`
	NoneText       string      `json:"none_text,omitempty"`
}

// HazardReport flags zero-tolerance items.
type HazardReport struct {
	Found  bool     `json:"found"`
	Kg     float64  `json:"kg"`
	Pieces int      `json:"pieces"`
	Pulls  []string `json:"pulls"`
}

// SpecReportOf is a spec's verdict with limits of type L: a bale's
// (LimitReport, in pulls) or a load's (LoadLimitReport, in bales).
type SpecReportOf[L any] struct {
	Name          string `json:"name"`
	Verdict       string `json:"verdict"`
	Grade         string `json:"grade,omitempty"`
	GradeSure     bool   `json:"grade_sure"`
	GradeState    string `json:"grade_state"`
	CountAttached bool   `json:"count_attached"`
	Limits        []L    `json:"limits"`
}

// SpecReport is a spec's verdict on a bale.
type SpecReport = SpecReportOf[LimitReport]

// specReport gathers a verdict; limit turns each limit into its report.
func specReport[L any](sv SpecVerdict, limit func(LimitCore, SampleSize) L) *SpecReportOf[L] {
	sr := &SpecReportOf[L]{Name: sv.Spec, Verdict: sv.Verdict.String(), Grade: sv.Grade, GradeSure: sv.GradeState == GradeSure,
		GradeState: sv.GradeState.String(), CountAttached: sv.CountAttached, Limits: []L{}}
	for _, lv := range sv.Limits {
		sr.Limits = append(sr.Limits, limit(limitCore(lv), lv.Need))
	}
	return sr
}

// LimitCore is what a bale's and a load's limit report share.
type LimitCore struct {
	Item     string   `json:"item"`
	Bound    string   `json:"bound"` // min, max or zero
	Limit    float64  `json:"limit"`
	Fraction float64  `json:"fraction"`
	Low      *float64 `json:"low"`
	High     *float64 `json:"high"`
	Verdict  string   `json:"verdict"`
	// Need is "pulls" (a number follows), "whole_bale" (only a sort of
	// the whole bale, or for a load every bale, decides), "beyond_reach"
	// or "unknown".
	Need string `json:"need"`
	Note string `json:"note,omitempty"`
}

func limitCore(lv LimitVerdict) LimitCore {
	c := LimitCore{Item: lv.Item, Bound: lv.Bound.String(), Limit: lv.Limit, Fraction: lv.Share.Fraction,
		Verdict: lv.Verdict.String(), Need: lv.Need.State.String(), Note: lv.Note}
	c.Low, c.High = interval(lv.Share)
	return c
}

// LimitReport is one bound's verdict. MorePulls and PullsNeeded are null
// when no number can be given (Need says why).
type LimitReport struct {
	LimitCore
	MorePulls   *int `json:"more_pulls"`
	PullsNeeded *int `json:"pulls_needed"`
}

// AdviceReport is the advice on the sample.
type AdviceReport struct {
	Kind          string   `json:"kind"`
	Item          string   `json:"item"`
	RelPrecision  float64  `json:"rel_precision"`
	PullsNeeded   *int     `json:"pulls_needed"`
	MorePulls     *int     `json:"more_pulls"`
	SortWholeBale bool     `json:"sort_whole_bale"`
	Failing       []string `json:"failing"`
	Why           string   `json:"why"`
}

// sizeFields gives a SampleSize's pulls in all and more, null unless
// it is a number of pulls.
func sizeFields(s SampleSize) (total, more *int) {
	if s.State != SizePulls {
		return nil, nil
	}
	t, m := s.Total, s.More
	return &t, &m
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
		pr := PieceReport{Key: p.Key, Pieces: p.Pieces, Pulls: p.Pulls, Kg: round(p.Kg, 6), PerPull: p.PerPull, Per100Kg: p.Per100Kg,
			Basis: p.Basis.String(), NoneText: p.NoneText()}
		if p.Basis == BasisExamined {
			total, f := p.Examined, p.Fraction
			w, cp := [2]float64{p.Wilson.Low, p.Wilson.High}, [2]float64{p.ClopperPearson.Low, p.ClopperPearson.High}
			pr.Total, pr.Fraction, pr.Wilson, pr.ClopperPearson = &total, &f, &w, &cp
		}
		rep.Pieces = append(rep.Pieces, pr)
	}
	hz := r.Group(GroupHazards)
	rep.Hazards = HazardReport{Found: len(r.HazardPulls) > 0, Kg: hz.Kg, Pieces: r.HazardPieces, Pulls: append([]string{}, r.HazardPulls...)}
	if sv != nil {
		rep.Spec = specReport(*sv, func(c LimitCore, need SampleSize) LimitReport {
			lr := LimitReport{LimitCore: c}
			lr.PullsNeeded, lr.MorePulls = sizeFields(need)
			return lr
		})
	}
	rep.Advice = AdviceReport{Kind: adv.Kind.String(), Item: adv.Item, RelPrecision: adv.RelPrecision, Why: adv.Why, Failing: []string{},
		SortWholeBale: adv.Need.State == SizeWholeBale || adv.Need.State == SizeBeyondReach}
	rep.Advice.PullsNeeded, rep.Advice.MorePulls = sizeFields(adv.Need)
	for _, l := range adv.Failing {
		rep.Advice.Failing = append(rep.Advice.Failing, l.Text())
	}
	if r.Pulls == 1 && r.SampledShare < 1 {
		rep.Notes = append(rep.Notes, "One pull gives an estimate but no confidence interval; take at least one more pull.")
	}
	if len(r.Pieces) > 0 {
		rep.Notes = append(rep.Notes, "Piece-count intervals treat pieces as independent; pieces come clustered in pulls, so the true uncertainty is larger.")
	}
	for _, c := range r.Categories {
		if c.Kind == IntervalNoneFound {
			rep.Notes = append(rep.Notes, "A category found in no pull is bounded, not proven absent: its upper bound counts the sorted mass in typical pieces of that category and assumes they are spread through the bale independently.")
			break
		}
	}
	if r.BaleKg <= 0 {
		rep.Notes = append(rep.Notes, "Bale mass unknown: no finite-population correction (intervals are a little wider than they need be).")
	}
	return rep
}

func shareReport(s Share, name string) ShareReport {
	sr := ShareReport{Key: s.Key, Name: name, Kg: round(s.Kg, 6), Fraction: s.Fraction, Interval: s.Kind.String()}
	sr.Low, sr.High = interval(s)
	if s.Absent() {
		sr.NoneFound = &NoneFoundReport{Pulls: s.None.Pulls, Kg: round(s.None.Kg, 6), Level: s.None.Level, Upper: s.None.Upper,
			PieceKg: s.None.PieceKg, Method: s.None.Method.String(), Text: s.None.Text()}
	}
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
