package report

import (
	"bytes"
	"context"
	"fmt"
	"os"
	"regexp"
	"strings"
	"testing"

	"baleassay/data/desk"
	"baleassay/data/record"
)

var tempDirs []string

func tempDir() (string, error) {
	d, err := os.MkdirTemp("", "baleassay-report-")
	if err == nil {
		tempDirs = append(tempDirs, d)
	}
	return d, err
}

func TestMain(m *testing.M) {
	code := m.Run()
	for _, d := range tempDirs {
		os.RemoveAll(d)
	}
	os.Exit(code)
}

var (
	attrRef = regexp.MustCompile(`(?i)\s(href|src|srcset|action|data|poster|xlink:href)\s*=\s*"([^"]*)"`)
	cssURL  = regexp.MustCompile(`(?i)url\(\s*([^)]*)\)`)
	anyURL  = regexp.MustCompile(`(?i)[a-z][a-z0-9+.-]*://[^\s"'<>)]*`)
	idAttr  = regexp.MustCompile(`\sid="([^"]+)"`)
)

// selfContained checks that a page can fetch nothing: the policy is
// there, no element that loads anything is used, every link and every
// url() points inside the page to an id that exists, and the only URL
// written is the SVG namespace name (an identifier, never fetched).
func selfContained(page []byte) error {
	s := string(page)
	if !strings.Contains(s, `<meta http-equiv="Content-Security-Policy" content="`+CSP+`">`) {
		return fmt.Errorf("no Content-Security-Policy")
	}
	for _, tag := range []string{"<script", "<link", "<img", "<iframe", "<object", "<embed", "<video", "<audio", "<source", "<base", "@import", "<image", "<use", "<foreignobject"} {
		if strings.Contains(strings.ToLower(s), tag) {
			return fmt.Errorf("the page uses %s", tag)
		}
	}
	ids := map[string]bool{}
	for _, m := range idAttr.FindAllStringSubmatch(s, -1) {
		if ids[m[1]] {
			return fmt.Errorf("id %q twice", m[1])
		}
		ids[m[1]] = true
	}
	for _, m := range attrRef.FindAllStringSubmatch(s, -1) {
		if !strings.HasPrefix(m[2], "#") || !ids[m[2][1:]] {
			return fmt.Errorf("%s=%q points outside the page or nowhere", m[1], m[2])
		}
	}
	for _, m := range cssURL.FindAllStringSubmatch(s, -1) {
		if !strings.HasPrefix(m[1], "#") || !ids[m[1][1:]] {
			return fmt.Errorf("url(%s) points outside the page or nowhere", m[1])
		}
	}
	for _, u := range anyURL.FindAllString(s, -1) {
		if u != "http://www.w3.org/2000/svg" {
			return fmt.Errorf("the page names %s", u)
		}
	}
	return nil
}

func TestReportsAreSelfContained(t *testing.T) {
	r := demoReports(t)
	for name, page := range map[string][]byte{"bale": r.bale, "region": r.region, "site": r.site, "empty": r.empty, "nowhere": r.nowhere} {
		if len(page) == 0 {
			t.Fatalf("%s report is empty", name)
		}
		if err := selfContained(page); err != nil {
			t.Errorf("%s report: %v", name, err)
		}
		for _, bad := range []string{"NaN", "+Inf", "-Inf", "%!"} {
			if bytes.Contains(page, []byte(bad)) {
				i := bytes.Index(page, []byte(bad))
				t.Errorf("%s report writes %q: …%s…", name, bad, page[max(0, i-80):min(len(page), i+40)])
			}
		}
	}
	// The check itself: pages that fetch are caught.
	for _, bad := range []string{`<img src="https://tiles.example/1/2/3.png">`, `<link rel="stylesheet" href="x.css">`,
		`<a href="https://example.org/">x</a>`, `<style>body{background:url(https://example.org/a.png)}</style>`, `<rect fill="url(#nowhere)"/>`} {
		page := bytes.Replace(r.bale, []byte("</body>"), []byte(bad+"</body>"), 1)
		if selfContained(page) == nil {
			t.Errorf("the check let %s through", bad)
		}
	}
}

// figures lists a page's data-figure names with their SVG.
var figureRe = regexp.MustCompile(`(?s)<figure class="chart" data-figure="([^"]+)"><svg [^>]*role="img"[^>]*>(.*?)</svg><figcaption>`)

func TestEveryChartIsThere(t *testing.T) {
	r := demoReports(t)
	for _, c := range []struct {
		name   string
		page   []byte
		charts []string
	}{{"bale", r.bale, baleCharts}, {"region", r.region, siteCharts}, {"site", r.site, siteCharts}} {
		found := map[string]string{}
		for _, m := range figureRe.FindAllSubmatch(c.page, -1) {
			found[string(m[1])] = string(m[2])
		}
		for _, want := range c.charts {
			svg, ok := found[want]
			if !ok {
				t.Errorf("%s report: no %s chart (found %v)", c.name, want, keys(found))
				continue
			}
			// Accessible name and values written out, not colour alone.
			if !strings.Contains(svg, "<title") || !strings.Contains(svg, "<desc") || strings.Count(svg, "<text") < 4 {
				t.Errorf("%s report, %s chart: title, description or labels missing", c.name, want)
			}
		}
	}
	// Without bales the report says so instead of drawing empty charts;
	// the map is still drawn.
	for name, page := range map[string][]byte{"empty": r.empty, "nowhere": r.nowhere} {
		if !bytes.Contains(page, []byte("No bales were received in this range.")) || !bytes.Contains(page, []byte(`data-figure="map"`)) ||
			bytes.Contains(page, []byte(`data-figure="trend-pet"`)) {
			t.Errorf("%s report: no sentence for the empty range, or charts without data", name)
		}
	}
	// Words and shapes carry the verdicts besides colour.
	for _, w := range []string{"✔ pass", "✖ fail", "? undecided"} {
		if !bytes.Contains(r.region, []byte(w)) {
			t.Errorf("region report does not write %q", w)
		}
	}
	for _, s := range []string{"Methods and sources", "Cautions", "Cochran", "Flory", "Hyndman", "Snyder", "Demo data"} {
		if !bytes.Contains(r.region, []byte(s)) && !bytes.Contains(r.bale, []byte(s)) {
			t.Errorf("neither report mentions %q", s)
		}
	}
}

func keys(m map[string]string) []string {
	var out []string
	for k := range m {
		out = append(out, k)
	}
	return out
}

// TestReportEscapesText puts markup into every text a user types and
// checks that it comes out as text.
func TestReportEscapesText(t *testing.T) {
	dir := t.TempDir()
	d, err := desk.Open(desk.Location{Dir: dir}, desk.Options{Create: true})
	if err != nil {
		t.Fatal(err)
	}
	defer d.Close()
	evil := `<script>alert("x")</script> & <b>Yard</b>`
	site, err := d.AddSite(record.SiteRecord{Name: evil, Lat: 45, Lon: 4.7}, desk.SaveOptions{Confirm: true})
	if err != nil {
		t.Fatal(err)
	}
	bale, err := d.AddBale(desk.BaleInput{Site: site.String(), BaleRecord: record.BaleRecord{GrossKg: 500, Tag: `<i>T1</i>`, Grader: `"><svg onload=x>`}}, desk.SaveOptions{Confirm: true})
	if err != nil {
		t.Fatal(err)
	}
	pulls := []record.PullRecord{
		{Label: "<P1>", Kg: map[string]float64{"pet_clear": 20, "pvc": 0.1}},
		{Label: "P2", Kg: map[string]float64{"pet_clear": 22, "hdpe": 0.4}},
	}
	if _, _, err := d.AddPulls(bale.String(), pulls, desk.SaveOptions{}); err != nil {
		t.Fatal(err)
	}
	br, err := d.ReportBale(context.Background(), bale.String(), desk.BaleReportOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	sr, err := d.ReportSites(desk.SiteScope{Site: site.String()}, desk.DateRange{}, desk.SiteReportOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var b, s bytes.Buffer
	if err := WriteBale(&b, br); err != nil {
		t.Fatal(err)
	}
	if err := WriteSites(&s, sr); err != nil {
		t.Fatal(err)
	}
	for name, page := range map[string][]byte{"bale": b.Bytes(), "site": s.Bytes()} {
		if err := selfContained(page); err != nil {
			t.Errorf("%s: %v", name, err)
		}
		for _, raw := range []string{"<b>Yard", "<i>T1", "<svg onload", "<P1>"} {
			if bytes.Contains(page, []byte(raw)) {
				t.Errorf("%s report writes %q unescaped", name, raw)
			}
		}
		if !bytes.Contains(page, []byte("&lt;b&gt;Yard&lt;/b&gt;")) {
			t.Errorf("%s report lost the site's name", name)
		}
	}
	// One pull: no interval, no spread of the audit; the page says so and
	// draws no NaN.
	one, err := d.AddBale(desk.BaleInput{Site: site.String(), BaleRecord: record.BaleRecord{GrossKg: 480, Tag: "ONE"}}, desk.SaveOptions{Confirm: true})
	if err != nil {
		t.Fatal(err)
	}
	if _, _, err := d.AddPulls(one.String(), pulls[1:], desk.SaveOptions{}); err != nil {
		t.Fatal(err)
	}
	or, err := d.ReportBale(context.Background(), one.String(), desk.BaleReportOptions{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	var ob bytes.Buffer
	if err := WriteBale(&ob, or); err != nil {
		t.Fatal(err)
	}
	if err := selfContained(ob.Bytes()); err != nil || bytes.Contains(ob.Bytes(), []byte("NaN")) ||
		!bytes.Contains(ob.Bytes(), []byte("one pull shows no spread")) || !bytes.Contains(ob.Bytes(), []byte("(no interval)")) {
		t.Errorf("one-pull bale report: %v", err)
	}
	// What no pull held is bounded, in the chart and in the list, with
	// the audit's own words.
	glass, _ := br.Audit.Result.Category("glass")
	if !glass.Absent() || !bytes.Contains(b.Bytes(), []byte("none found · ≤ "+pctUp(glass.None.Upper))) ||
		!bytes.Contains(b.Bytes(), []byte("Glass: "+glass.None.Text())) {
		t.Errorf("the bound of glass (found in no pull) is missing: %s", glass.None.Text())
	}
}
