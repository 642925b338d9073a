package report

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"html"
	"image"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"testing"
	"time"
)

// chromium finds Debian's chromium. Missing, the test fails under CI
// (env CI set: a browser test that skips there is a failure) and skips
// elsewhere with the command that installs it.
func chromium(t *testing.T) string {
	t.Helper()
	for _, c := range []string{"/usr/bin/chromium", "chromium", "chromium-browser"} {
		if p, err := exec.LookPath(c); err == nil {
			return p
		}
	}
	msg := "chromium is missing: install it with apt-get install chromium (or run scripts/deps.sh)"
	if os.Getenv("CI") != "" {
		t.Fatal(msg)
	}
	t.Skip(msg)
	return ""
}

// headless runs chromium on a file with the flags that work on a closed
// machine as root (see the project's notes on Chromium): no sandbox, no
// GPU, no background traffic, a fresh profile.
func headless(t *testing.T, bin string, args ...string) []byte {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
	defer cancel()
	base := []string{"--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
		"--disable-background-networking", "--disable-component-update", "--disable-sync", "--hide-scrollbars",
		"--user-data-dir=" + t.TempDir()}
	cmd := exec.CommandContext(ctx, bin, append(base, args...)...)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		t.Fatalf("chromium %v: %v\n%s", args, err, tail(errb.String(), 2000))
	}
	return out.Bytes()
}

func tail(s string, n int) string {
	if len(s) > n {
		return s[len(s)-n:]
	}
	return s
}

// probeScript runs first in the page (its nonce is the only script the
// test copy's policy allows) and, once the page has loaded, writes into
// the page what the browser fetched, what the policy blocked, what failed
// to load and how large each chart was drawn.
const probeScript = `<script nonce="probe">
(function () {
  var out = {violations: [], errors: [], resources: [], charts: {}};
  document.addEventListener('securitypolicyviolation', function (e) { out.violations.push(e.violatedDirective + ' ' + e.blockedURI); });
  window.addEventListener('error', function (e) { if (e.target && e.target !== window) out.errors.push(e.target.tagName); }, true);
  window.addEventListener('load', function () {
    out.resources = performance.getEntriesByType('resource').map(function (r) { return r.name; });
    document.querySelectorAll('figure[data-figure]').forEach(function (f) {
      var s = f.querySelector('svg'), r = s ? s.getBoundingClientRect() : {width: 0, height: 0};
      out.charts[f.dataset.figure] = {w: r.width, h: r.height, texts: s ? s.querySelectorAll('text').length : 0};
    });
    var pre = document.createElement('pre');
    pre.id = 'probe';
    pre.textContent = JSON.stringify(out);
    document.body.appendChild(pre);
  });
})();
</script>`

type probe struct {
	Violations []string
	Errors     []string
	Resources  []string
	Charts     map[string]struct {
		W, H  float64
		Texts int
	}
}

var probeRe = regexp.MustCompile(`(?s)<pre id="probe">(.*?)</pre>`)

// probed loads a copy of the page with the probe and returns its
// findings. The copy's policy is the page's own plus the probe's nonce.
func probed(t *testing.T, bin, dir, name string, page []byte) probe {
	t.Helper()
	meta := `content="` + CSP + `">`
	if !bytes.Contains(page, []byte(meta)) {
		t.Fatalf("%s: no policy to extend", name)
	}
	cp := bytes.Replace(page, []byte(meta), []byte(`content="`+CSP+`; script-src 'nonce-probe'">`+probeScript), 1)
	path := filepath.Join(dir, name+"-probe.html")
	if err := os.WriteFile(path, cp, 0o644); err != nil {
		t.Fatal(err)
	}
	dom := headless(t, bin, "--virtual-time-budget=15000", "--dump-dom", "file://"+path)
	m := probeRe.FindSubmatch(dom)
	if m == nil {
		t.Fatalf("%s: the probe wrote nothing; the page as rendered:\n%s", name, tail(string(dom), 1500))
	}
	var p probe
	if err := json.Unmarshal([]byte(html.UnescapeString(string(m[1]))), &p); err != nil {
		t.Fatalf("%s: probe output %s: %v", name, m[1], err)
	}
	return p
}

// TestReportsInChromium renders the demo's reports in headless Chromium:
// nothing is fetched or blocked, nothing fails to load, every chart is
// drawn at a real size, and the screenshots are not blank. A page that
// fetches an image is caught, so the check can fail. Screenshots go to
// $BALEASSAY_SHOTS when it is set (to look at them).
func TestReportsInChromium(t *testing.T) {
	bin := chromium(t)
	r := demoReports(t)
	dir := t.TempDir()
	pages := []struct {
		name   string
		page   []byte
		charts []string
		height int
	}{{"bale", r.bale, baleCharts, 6200}, {"region", r.region, siteCharts, 6000}, {"site", r.site, siteCharts, 5600}}
	for _, pg := range pages {
		p := probed(t, bin, dir, pg.name, pg.page)
		if len(p.Violations) > 0 || len(p.Errors) > 0 || len(p.Resources) > 0 {
			t.Errorf("%s: blocked %v, failed %v, fetched %v", pg.name, p.Violations, p.Errors, p.Resources)
		}
		for _, c := range pg.charts {
			ch, ok := p.Charts[c]
			if !ok || ch.W < 300 || ch.H < 40 || ch.Texts < 4 {
				t.Errorf("%s: chart %s drawn as %+v (present %v)", pg.name, c, ch, ok)
			}
		}
		if len(p.Charts) != len(pg.charts) {
			t.Errorf("%s: %d charts drawn, want %d", pg.name, len(p.Charts), len(pg.charts))
		}
		path := filepath.Join(dir, pg.name+".html")
		os.WriteFile(path, pg.page, 0o644)
		shot := filepath.Join(dir, pg.name+".png")
		headless(t, bin, fmt.Sprintf("--window-size=1100,%d", pg.height), "--screenshot="+shot, "file://"+path)
		checkShot(t, pg.name, shot, 1100, pg.height)
		if to := os.Getenv("BALEASSAY_SHOTS"); to != "" {
			b, _ := os.ReadFile(shot)
			if err := os.WriteFile(filepath.Join(to, "report-"+pg.name+".png"), b, 0o644); err != nil {
				t.Error(err)
			}
		}
	}
	// The negative control: an image from the network is blocked and seen.
	bad := bytes.Replace(r.bale, []byte("</body>"), []byte(`<img src="http://192.0.2.1/tile.png" alt=""></body>`), 1)
	if p := probed(t, bin, dir, "fetching", bad); len(p.Violations) == 0 && len(p.Errors) == 0 && len(p.Resources) == 0 {
		t.Error("a page that fetches an image passed the probe: the check cannot fail")
	}
}

// checkShot decodes a screenshot and checks its size and that it shows
// something: dark pixels (text, at least 0.5 %) and the charts' blue
// (at least 0.1 %); a blank or unstyled page has neither.
func checkShot(t *testing.T, name, path string, w, h int) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatalf("%s: no screenshot: %v", name, err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("%s: screenshot: %v", name, err)
	}
	if b := img.Bounds(); b != image.Rect(0, 0, w, h) {
		t.Fatalf("%s: screenshot %v, want %dx%d", name, b, w, h)
	}
	var dark, blue, total int
	for y := 0; y < h; y += 2 {
		for x := 0; x < w; x += 2 {
			r, g, b, _ := img.At(x, y).RGBA()
			r, g, b = r>>8, g>>8, b>>8
			total++
			if r+g+b < 200 {
				dark++
			}
			// The chart bars' blue (#3f5f8f) and its lighter band.
			if b > r+40 && b > g+20 {
				blue++
			}
		}
	}
	if dark < total/200 || blue < total/1000 {
		t.Errorf("%s: screenshot looks blank: %d dark and %d blue of %d pixels", name, dark, blue, total)
	}
	t.Logf("%s: %d×%d, %.1f %% dark, %.1f %% chart blue", name, w, h, 100*float64(dark)/float64(total), 100*float64(blue)/float64(total))
}
