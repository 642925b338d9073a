package desk

// Source: the demo scenario and invented bales; expected figures are
// hand sums or come from other desk calls (SummarizeRegion, AuditBale).

import (
	"context"
	"math"
	"testing"
	"time"

	"baleassay/assess"
	"baleassay/yield"
)

func TestQuantileDefinition7(t *testing.T) {
	x := []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10}
	// Source: Hyndman and Fan (1996) definition 7 by hand:
	// h = (n − 1)·q; q = 0.1 → h = 0.9 → 1 + 0.9·(2 − 1) = 1.9;
	// q = 0.5 → 5.5; q = 0.9 → h = 8.1 → 9.1. R's quantile(1:10, c(.1,.5,.9))
	// gives the same (from memory).
	for _, c := range []struct{ q, want float64 }{{0, 1}, {0.1, 1.9}, {0.5, 5.5}, {0.9, 9.1}, {1, 10}} {
		if got := Quantile(x, c.q); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("Quantile(1..10, %v) = %v, want %v", c.q, got, c.want)
		}
	}
	if !math.IsNaN(Quantile(nil, 0.5)) || Quantile([]float64{7}, 0.9) != 7 {
		t.Error("empty or single data")
	}
}

func TestTrendWeeksAndMonths(t *testing.T) {
	// 2026-11-02 is a Monday (ISO week 45); 2026-11-08 a Sunday.
	mon := time.Date(2026, 11, 2, 0, 0, 0, 0, time.UTC)
	if got := TrendWeek.start(mon.Add(6*24*time.Hour + 23*time.Hour)); !got.Equal(mon) {
		t.Errorf("Sunday 23:00 starts its week at %v", got)
	}
	if got := TrendWeek.Label(mon); got != "2026-W45" {
		t.Errorf("label %s", got)
	}
	// ISO 8601: 2027-01-01 (a Friday) belongs to 2026-W53.
	if got := TrendWeek.Label(TrendWeek.start(time.Date(2027, 1, 1, 12, 0, 0, 0, time.UTC))); got != "2026-W53" {
		t.Errorf("2027-01-01 in %s, want 2026-W53", got)
	}
	point := func(at time.Time, pet float64) BalePoint {
		var p BalePoint
		p.Bale.ReceivedMs = at.UnixMilli()
		p.Audit.State = AuditDone
		p.Result.Groups = make([]assess.Share, len(assess.Groups()))
		p.Result.Groups[0].Fraction = pet
		return p
	}
	pts := []BalePoint{point(mon, 0.8), point(mon.Add(3*24*time.Hour), 0.9), point(mon.AddDate(0, 0, 15), 0.7)}
	tr := trendOf(pts)
	if tr.Unit != TrendWeek || len(tr.Buckets) != 3 {
		t.Fatalf("trend %v with %d buckets, want weeks and 3 (one empty)", tr.Unit, len(tr.Buckets))
	}
	if b := tr.Buckets; b[0].TargetPET.N != 2 || math.Abs(b[0].TargetPET.Mean-0.85) > 1e-12 || b[1].TargetPET.N != 0 || b[2].TargetPET.Mean != 0.7 {
		t.Errorf("buckets %+v", b)
	}
	pts = append(pts, point(mon.AddDate(0, 5, 0), 0.6))
	if tr := trendOf(pts); tr.Unit != TrendMonth || len(tr.Buckets) != 6 || tr.Buckets[0].TargetPET.N != 3 {
		t.Errorf("20 weeks: %v, %d buckets", tr.Unit, len(tr.Buckets))
	}
}

func TestPerTonneIsMassWeighted(t *testing.T) {
	pt := func(kg, flake, gly float64) BalePoint {
		var p BalePoint
		p.Bale.GrossKg = kg
		p.Yield = PointYield{Has: true, FlakeKg: flake, GlycolysateKg: gly, HydroxylValue: 500}
		return p
	}
	// Source: hand sums. Bales of 400 and 600 kg giving 300 and 480 kg of
	// flake: (300 + 480) / 1 t = 780 kg/t, not the mean of 750 and 800.
	p := perTonne([]BalePoint{pt(400, 300, 600), pt(600, 480, 950), {}})
	if p.Bales != 2 || p.BaleKg != 1000 || math.Abs(p.Flake.KgPerTonne-780) > 1e-9 || math.Abs(p.Glycolysate.KgPerTonne-1550) > 1e-9 {
		t.Fatalf("per tonne %+v", p)
	}
	if math.Abs(p.Flake.P10-755) > 1e-9 || math.Abs(p.Flake.P90-795) > 1e-9 {
		t.Errorf("bale spread P10 %v P90 %v, want 755 and 795", p.Flake.P10, p.Flake.P90)
	}
}

// TestReportSitesAgreesWithSummaries builds a region report of the demo
// and checks it against the region summary and the listing.
func TestReportSitesAgreesWithSummaries(t *testing.T) {
	d := demoScenario(t)
	q := Query{Kind: QueryWithin, Lat: 45, Lon: 4.7, Km: 25}
	r := DateRange{From: time.Date(2026, 11, 1, 0, 0, 0, 0, time.UTC)}
	rep, err := d.ReportSites(SiteScope{Within: &q}, r, SiteReportOptions{})
	if err != nil {
		t.Fatal(err)
	}
	sum, err := d.SummarizeRegion(q, r)
	if err != nil {
		t.Fatal(err)
	}
	if rep.All.Bales != sum.Bales || rep.All.Audited != sum.Audited || len(rep.Sites) != sum.Sites ||
		math.Abs(rep.All.TargetPET.Mean-sum.TargetPET.Mean) > 1e-12 || math.Abs(rep.All.TargetPET.SD-sum.TargetPET.SD) > 1e-12 ||
		rep.All.Hazards != len(sum.Hazards) {
		t.Fatalf("report %d bales, %d audited, mean %v; summary %d, %d, %v", rep.All.Bales, rep.All.Audited, rep.All.TargetPET.Mean, sum.Bales, sum.Audited, sum.TargetPET.Mean)
	}
	n, bales := 0, 0
	for _, b := range rep.Trend.Buckets {
		n += b.TargetPET.N
	}
	for i, s := range rep.Sites {
		bales += s.Bales
		if s.Verdicts.Total() != s.Bales {
			t.Errorf("%s: verdicts %+v for %d bales", s.Site.Name, s.Verdicts, s.Bales)
		}
		if i > 0 && s.Km < rep.Sites[i-1].Km {
			t.Errorf("sites not nearest first")
		}
	}
	if n != rep.All.Audited || bales != rep.All.Bales || rep.PerTonne.Bales != rep.All.Audited {
		t.Errorf("trend holds %d bales, sites %d, per tonne %d; audited %d of %d", n, bales, rep.PerTonne.Bales, rep.All.Audited, rep.All.Bales)
	}
	if !rep.Reference.Has || rep.Reference.Spec != DefaultSpec || rep.Reference.Min != 0.72 {
		t.Errorf("reference %+v", rep.Reference)
	}
	if len(rep.Others) == 0 {
		t.Error("no neighbouring sites for the map")
	}
	for _, o := range rep.Others {
		for _, s := range rep.Sites {
			if o.ID == s.ID {
				t.Errorf("%s both in the report and beside it", o.Site.Name)
			}
		}
	}
	// One site by name; the same figures as its summary.
	one, err := d.ReportSites(SiteScope{Site: "Kettleby Yard"}, DateRange{}, SiteReportOptions{})
	if err != nil {
		t.Fatal(err)
	}
	_, ss, _ := d.SummarizeSite("Kettleby Yard", DateRange{})
	if len(one.Sites) != 1 || one.All.Bales != ss.Bales || one.All.Audited != ss.Audited {
		t.Errorf("one site: %d sites, %d bales; summary %d", len(one.Sites), one.All.Bales, ss.Bales)
	}
	if _, err := d.ReportSites(SiteScope{}, DateRange{}, SiteReportOptions{}); err == nil {
		t.Error("no scope accepted")
	}
}

// TestReportBale checks the bale report against AuditBale and YieldBale
// with the same seed.
func TestReportBale(t *testing.T) {
	d := demoScenario(t)
	opt := BaleReportOptions{Yield: YieldOptions{MC: yield.MCOptions{Draws: 2000, Seed: 7}}}
	rep, err := d.ReportBale(context.Background(), "VO-04106", opt, nil)
	if err != nil {
		t.Fatal(err)
	}
	a, err := d.AuditBale("VO-04106", AuditOptions{})
	if err != nil {
		t.Fatal(err)
	}
	plan, _ := d.Plan("", "")
	_, y, err := d.YieldBale(context.Background(), "VO-04106", plan, opt.Yield, nil)
	if err != nil {
		t.Fatal(err)
	}
	if rep.Audit.Report.Spec.Verdict != a.Report.Spec.Verdict || rep.Yield.MC.FlakeKg != y.MC.FlakeKg || rep.Site.Site.Name != "Kettleby Yard" || !rep.Demo {
		t.Fatalf("report %v / %v, audit %v / %v", rep.Audit.Report.Spec.Verdict, rep.Yield.MC.FlakeKg, a.Report.Spec.Verdict, y.MC.FlakeKg)
	}
	// VO-04106 has a hazard: the spec fails, and the failing limits come
	// before the undecided ones.
	if rep.Audit.Report.Spec.Verdict != "fail" || len(rep.Limiting) == 0 || rep.Limiting[0].Verdict != "fail" {
		t.Fatalf("limiting %+v", rep.Limiting)
	}
	seenUndecided := false
	for _, l := range rep.Limiting {
		if l.Verdict == "undecided" {
			seenUndecided = true
		} else if seenUndecided || l.Verdict != "fail" {
			t.Errorf("order or content of limiting items: %+v", rep.Limiting)
		}
	}
	if rep.Cautions[0] != CautionBale {
		t.Errorf("cautions %v", rep.Cautions)
	}
}
