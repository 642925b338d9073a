package desk

import (
	"time"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/yield"
)

// PointYield is a bale through a yield plan at its audit's point estimate
// (no draws): what site reports and exports sum per tonne.
type PointYield struct {
	Has                                   bool
	FlakeKg, GlycolysateKg, HydroxylValue float64
	Err                                   error // why there is none (Has false, pulls present)
}

// BalePoint is one bale of a site report or an export: the listing row
// (record, site name, audit summary), the audit's full result when it was
// assessed, and its point yield when a plan was given.
type BalePoint struct {
	BaleRow
	Input  assess.Audit  // the pulls as assessed, when Audit.State == AuditDone
	Result assess.Result // valid when Audit.State == AuditDone
	Yield  PointYield
}

// Received is the bale's received time, UTC.
func (p BalePoint) Received() time.Time { return time.UnixMilli(p.Bale.ReceivedMs).UTC() }

// VerdictCounts counts bales by the state of their audit.
type VerdictCounts struct {
	Pass, Undecided, Fail int
	NoVerdict             int // assessed, but the spec could not be found
	NoPulls               int // nothing to assess yet
	Unassessed            int // pulls that could not be assessed
}

func (v *VerdictCounts) add(a AuditSummary) {
	switch {
	case a.State == AuditNoPulls:
		v.NoPulls++
	case a.State == AuditFailed:
		v.Unassessed++
	case !a.HasVerdict:
		v.NoVerdict++
	case a.Verdict == assess.Pass:
		v.Pass++
	case a.Verdict == assess.Fail:
		v.Fail++
	default:
		v.Undecided++
	}
}

// Total is every bale counted.
func (v VerdictCounts) Total() int {
	return v.Pass + v.Undecided + v.Fail + v.NoVerdict + v.NoPulls + v.Unassessed
}

// SiteStat sums up one site's bales in a date range.
type SiteStat struct {
	SiteRow
	Km      float64 // from the centre of a region query; 0 otherwise
	Bales   int     // received in the range
	Audited int     // assessed
	// TargetPET and Groups (every group but target PET, report order) are
	// the spread of the per-bale shares across audited bales.
	TargetPET Stat
	Groups    []GroupStat
	Verdicts  VerdictCounts
	Hazards   int // audited bales with a hazard found
	// Latest is the most recently received bale with a verdict.
	Latest      *BalePoint
	Yielded     int     // bales put through the plan
	YieldBaleKg float64 // their gross mass
	FlakeKg     float64 // their flake, point estimates summed
	Glycolysate float64 // their glycolysate, kg
}

func newSiteStat(s SiteRow) SiteStat {
	st := SiteStat{SiteRow: s}
	for _, g := range assess.Groups() {
		if g != assess.GroupPET {
			st.Groups = append(st.Groups, GroupStat{Group: g})
		}
	}
	return st
}

// add counts one bale into the site's figures.
func (s *SiteStat) add(p *BalePoint) {
	s.Bales++
	s.Verdicts.add(p.Audit)
	if p.Audit.State == AuditDone {
		s.Audited++
		s.TargetPET.add(p.Result.Group(assess.GroupPET).Fraction)
		for i := range s.Groups {
			s.Groups[i].add(p.Result.Group(s.Groups[i].Group).Fraction)
		}
		if p.Audit.Hazard {
			s.Hazards++
		}
		if p.Audit.HasVerdict && (s.Latest == nil || p.Bale.ReceivedMs >= s.Latest.Bale.ReceivedMs) {
			s.Latest = p
		}
	}
	if p.Yield.Has {
		s.Yielded++
		s.YieldBaleKg += p.Bale.GrossKg
		s.FlakeKg += p.Yield.FlakeKg
		s.Glycolysate += p.Yield.GlycolysateKg
	}
}

// collect gathers the bales of the given sites received in r, with their
// audits and (when plan is not nil) their point yields, and sums them up
// per site. Sites keep the order given; bales come by received time.
func (d *Desk) collect(sites []SiteRow, r DateRange, plan *yield.Plan) ([]SiteStat, []BalePoint, error) {
	stats := make([]SiteStat, len(sites))
	at := make(map[record.EntityID]int, len(sites))
	for i, s := range sites {
		stats[i] = newSiteStat(s)
		at[s.ID] = i
	}
	rows, err := d.Bales(BaleFilter{Range: r})
	if err != nil {
		return nil, nil, err
	}
	pulls, err := d.st.PullsByBale()
	if err != nil {
		return nil, nil, err
	}
	var points []BalePoint
	for _, row := range rows {
		if _, ok := at[row.Bale.Site]; !ok {
			continue
		}
		p := BalePoint{BaleRow: row}
		if row.Audit.State == AuditDone {
			a, _, err := auditOf(row.Bale, pulls[row.ID])
			if err == nil {
				p.Result, err = assess.Assess(a, assess.Options{})
			}
			if err != nil { // the summary assessed it: cannot differ
				p.Audit.State, p.Audit.Err = AuditFailed, err
			} else {
				p.Input = a
			}
			if err == nil && plan != nil {
				p.Yield = pointYield(a, *plan)
			}
		}
		points = append(points, p)
	}
	for i := range points {
		stats[at[points[i].Bale.Site]].add(&points[i])
	}
	return stats, points, nil
}

// pointYield puts an audit through the plan at its point estimate.
func pointYield(a assess.Audit, plan yield.Plan) PointYield {
	rep, err := yield.Evaluate(a.Pulls, a.BaleKg, plan)
	if err != nil {
		return PointYield{Err: err}
	}
	return PointYield{Has: true, FlakeKg: rep.Balance.FlakeKg, GlycolysateKg: rep.Glycolysate.GlycolysateKg,
		HydroxylValue: rep.Glycolysate.HydroxylValue}
}
