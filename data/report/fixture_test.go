package report

import (
	"bytes"
	"context"
	"sync"
	"testing"
	"time"

	scenario "baleassay/data/demo"
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
		d, err := desk.Open(desk.Location{Dir: dir}, desk.Options{Create: true})
		if err != nil {
			demo.err = err
			return
		}
		defer d.Close()
		// Six weeks ending on a fixed day, so the pages do not change with
		// the date the tests run.
		end := time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)
		if _, err := scenario.WriteDemo(d.Store(), scenario.DemoOptions{End: end, Weeks: 6, Seed: 1}); err != nil {
			demo.err = err
			return
		}
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
		far := desk.Query{Kind: desk.QueryWithin, Lat: -33.9, Lon: 18.4, Km: 10}
		later, _ := desk.ParseDateRange("2030-01-01", "")
		for _, c := range []struct {
			dst   *[]byte
			scope desk.SiteScope
			r     desk.DateRange
		}{
			{&demo.region, desk.SiteScope{Within: &q}, desk.DateRange{}},
			{&demo.site, desk.SiteScope{Site: "Kettleby Yard"}, desk.DateRange{}},
			{&demo.empty, desk.SiteScope{Site: "Kettleby Yard"}, later},
			{&demo.nowhere, desk.SiteScope{Within: &far}, desk.DateRange{}},
		} {
			rep, err := d.ReportSites(c.scope, c.r, desk.SiteReportOptions{})
			if err != nil {
				demo.err = err
				return
			}
			var buf bytes.Buffer
			if demo.err = WriteSites(&buf, rep); demo.err != nil {
				return
			}
			*c.dst = buf.Bytes()
		}
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
