package desk

import (
	"context"
	"time"

	"baleassay/assess"
	"baleassay/data/record"
)

// BaleReportOptions choose the spec, the line and the draws of a bale
// report; zero values take the defaults of AuditBale and YieldBale.
type BaleReportOptions struct {
	Audit AuditOptions
	// Line and FlakeSpec as Plan takes them.
	Line, FlakeSpec string
	Yield           YieldOptions
}

// BaleReport is everything the bale report shows: the bale and its site,
// the audit (composition with intervals, verdict, advice), the limits
// that decide the verdict, and the bale through the wash line and the
// reactor with the spread of the draws.
type BaleReport struct {
	Generated time.Time
	Demo      bool // the demo store: invented records
	Bale      record.EntityID
	Record    record.BaleRecord
	Site      SiteRow // zero ID when the bale's site is not (or no longer) in the store
	Audit     Audit
	// Limiting are the spec's limits that fail or are undecided, worst
	// first (fail before undecided), in spec order otherwise.
	Limiting []assess.LimitReport
	Yield    YieldRun
	Cautions []Caution // the bale caution, then the yield's
	// CautionTexts are the cautions as they apply (the hot-glycol one
	// names the glycol charged).
	CautionTexts []string
}

// ReportBale gathers a stored bale's report: AuditBale and YieldBale on
// the same pulls, with the ranking of what drives the spread, cancellable
// through ctx (the draws), with progress (may be nil).
func (d *Desk) ReportBale(ctx context.Context, text string, opt BaleReportOptions, progress func(Progress)) (BaleReport, error) {
	a, err := d.AuditBale(text, opt.Audit)
	if err != nil {
		return BaleReport{}, err
	}
	plan, err := d.Plan(opt.Line, opt.FlakeSpec)
	if err != nil {
		return BaleReport{}, err
	}
	yo := opt.Yield
	yo.Sensitivity = true
	run, err := d.YieldPulls(ctx, a.Input.Pulls, a.Record.GrossKg, plan, yo, progress)
	if err != nil {
		return BaleReport{}, err
	}
	rep := BaleReport{Generated: d.now().UTC(), Demo: d.holdsDemo(), Bale: a.Bale, Record: a.Record, Audit: a,
		Yield: run, Cautions: append([]Caution{CautionBale}, run.Cautions...)}
	if site, ok, err := d.siteRow(a.Record.Site); err != nil {
		return rep, err
	} else if ok {
		rep.Site = site
	}
	rep.Limiting = limiting(a.Report.Spec)
	for _, c := range rep.Cautions {
		rep.CautionTexts = append(rep.CautionTexts, run.CautionText(c))
	}
	return rep, nil
}

// limiting picks the limits that fail, then those undecided.
func limiting(s *assess.SpecReport) []assess.LimitReport {
	if s == nil {
		return nil
	}
	var out []assess.LimitReport
	for _, want := range []assess.Verdict{assess.Fail, assess.Undecided} {
		for _, l := range s.Limits {
			if l.Verdict == want.String() {
				out = append(out, l)
			}
		}
	}
	return out
}

// siteRow finds a visible site by id.
func (d *Desk) siteRow(id record.EntityID) (SiteRow, bool, error) {
	sites, err := d.Sites()
	if err != nil {
		return SiteRow{}, false, err
	}
	for _, s := range sites {
		if s.ID == id {
			return s, true, nil
		}
	}
	return SiteRow{}, false, nil
}

// holdsDemo reports whether the store is a demo store now (the demo may
// have been written after it was opened).
func (d *Desk) holdsDemo() bool {
	v, err := d.st.IsDemo()
	return d.demo || (err == nil && v)
}
