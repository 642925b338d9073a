package report

import (
	"bytes"
	"context"
	"sync"
	"testing"

	"baleassay/data/desk"
	"baleassay/yield"
)

// rendered holds the demo's reports, made once for all tests.
type rendered struct {
	bale, region, site []byte
	// empty: a site with no bales in the range; nowhere: a region with
	// no site.
	empty, nowhere []byte
	err            error
}

var (
	demoOnce sync.Once
	demo     rendered
)

// demoReports renders a bale report, a region report and a one-site
// report of the demo scenario.
func demoReports(t *testing.T) rendered {
	t.Helper()
	demoOnce.Do(func() {
		dir, err := tempDir()
		if err != nil {
			demo.err = err
			return
		}
		if _, _, err := desk.MakeDemo(desk.DemoOptions{Dir: dir, Weeks: 6, Seed: 1}); err != nil {
			demo.err = err
			return
		}
		d, err := desk.Open(desk.Location{Dir: dir}, desk.Options{})
		if err != nil {
			demo.err = err
			return
		}
		defer d.Close()
		br, err := d.ReportBale(context.Background(), "VO-04106", desk.BaleReportOptions{Yield: desk.YieldOptions{MC: yield.MCOptions{Draws: 2000, Seed: 1}}}, nil)
		if err != nil {
			demo.err = err
			return
		}
		var b bytes.Buffer
		if demo.err = WriteBale(&b, br); demo.err != nil {
			return
		}
		demo.bale = b.Bytes()
		q := desk.Query{Kind: desk.QueryWithin, Lat: 45, Lon: 4.7, Km: 25}
		rr, err := d.ReportSites(desk.SiteScope{Within: &q}, desk.DateRange{}, desk.SiteReportOptions{})
		if err != nil {
			demo.err = err
			return
		}
		var r bytes.Buffer
		if demo.err = WriteSites(&r, rr); demo.err != nil {
			return
		}
		demo.region = r.Bytes()
		sr, err := d.ReportSites(desk.SiteScope{Site: "Kettleby Yard"}, desk.DateRange{}, desk.SiteReportOptions{})
		if err != nil {
			demo.err = err
			return
		}
		var s bytes.Buffer
		if demo.err = WriteSites(&s, sr); demo.err != nil {
			return
		}
		demo.site = s.Bytes()
		later, _ := desk.ParseDateRange("2030-01-01", "")
		er, err := d.ReportSites(desk.SiteScope{Site: "Kettleby Yard"}, later, desk.SiteReportOptions{})
		if err != nil {
			demo.err = err
			return
		}
		var e bytes.Buffer
		if demo.err = WriteSites(&e, er); demo.err != nil {
			return
		}
		demo.empty = e.Bytes()
		far := desk.Query{Kind: desk.QueryWithin, Lat: -33.9, Lon: 18.4, Km: 10}
		nr, err := d.ReportSites(desk.SiteScope{Within: &far}, desk.DateRange{}, desk.SiteReportOptions{})
		if err != nil {
			demo.err = err
			return
		}
		var nw bytes.Buffer
		demo.err = WriteSites(&nw, nr)
		demo.nowhere = nw.Bytes()
	})
	if demo.err != nil {
		t.Fatal(demo.err)
	}
	return demo
}

// The charts each report must hold (data-figure names).
var (
	baleCharts = []string{"limits", "groups", "target-pet", "contaminants", "flow", "spread", "drivers", "chains"}
	siteCharts = []string{"verdicts", "trend-pet", "trend-other_plastics", "trend-non_plastics", "trend-moisture_fines", "trend-hazards", "per-tonne", "map"}
)
