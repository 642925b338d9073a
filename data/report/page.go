package report

import (
	"fmt"
	"io"
	"strings"
	"time"
)

// CSP is the page's Content-Security-Policy: nothing may be fetched, no
// script may run; only the page's own inline style applies. A report
// opened anywhere makes no network request.
const CSP = "default-src 'none'; style-src 'unsafe-inline'"

// page collects a report's body, its numbered notes and its cautions,
// then writes the whole document.
type page struct {
	title string
	body  strings.Builder
	notes notes
	ids   int
}

// id gives a document-unique id for a chart.
func (p *page) id(stem string) string {
	p.ids++
	return fmt.Sprintf("%s-%d", stem, p.ids)
}

func (p *page) h(format string, args ...any) { fmt.Fprintf(&p.body, format, args...) }

// figure wraps a chart with its caption; name is the chart's kind, which
// the Chromium test looks for.
func (p *page) figure(name, chart, caption string) {
	p.h(`<figure class="chart" data-figure="%s">%s<figcaption>%s</figcaption></figure>`, esc(name), chart, caption)
}

// write writes the document: head with the policy and the style, the
// body, then the notes, the cautions and when it was made.
func (p *page) write(w io.Writer, generated time.Time, demo bool, cautions []string) error {
	var b strings.Builder
	fmt.Fprintf(&b, `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="%s">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="generator" content="baleassay">
<title>%s</title>
<style>%s</style>
</head>
<body>
`, CSP, esc(p.title), css)
	if demo {
		b.WriteString(`<p class="demo" role="note"><strong>Demo data.</strong> Every site, bale and person in this report is invented (the built-in demo scenario).</p>` + "\n")
	}
	b.WriteString(p.body.String())
	if len(cautions) > 0 {
		b.WriteString(`<section class="cautions" id="cautions"><h2>Cautions</h2><ul>`)
		for _, c := range cautions {
			fmt.Fprintf(&b, "<li>%s</li>", esc(c))
		}
		b.WriteString(`</ul><p>These figures do not make a yard, a wash line or a reactor safe: local codes, the site's safety rules and licensed practice come first.</p></section>` + "\n")
	}
	b.WriteString(p.notes.html())
	fmt.Fprintf(&b, `<footer><p>Made by baleassay on %s from the records store as it stood then. Shares are mass fractions of the bale unless a figure says otherwise.</p></footer>
</body>
</html>
`, stamp(generated))
	_, err := io.WriteString(w, b.String())
	return err
}

// css keeps the page readable on screen and on paper: system fonts,
// figures that do not break across pages, and verdict fills that survive
// a black-and-white printer (patterns, not only colours).
const css = `
:root{--ink:#1a1a1a;--mute:#555;--rule:#c8c8c8;--bar:#3f5f8f;--bar-lt:#b9c8df;--limit:#a1261b;--pass:#1b6e37;--undecided:#8a5a00;--fail:#a1261b;--none:#666}
*{box-sizing:border-box}
body{font:15px/1.45 system-ui,-apple-system,"Segoe UI",Roboto,"Noto Sans","DejaVu Sans",sans-serif;color:var(--ink);max-width:62rem;margin:1.5rem auto;padding:0 1rem;background:#fff}
h1{font-size:1.6rem;margin:.2rem 0 .4rem}
h2{font-size:1.2rem;margin:1.6rem 0 .5rem;border-bottom:1px solid var(--rule);padding-bottom:.2rem}
h3{font-size:1rem;margin:1rem 0 .3rem}
p{margin:.4rem 0}
.sub{color:var(--mute)}
.demo{background:#fff4d6;border:1px solid #c99a2e;padding:.4rem .7rem}
table{border-collapse:collapse;margin:.4rem 0;font-variant-numeric:tabular-nums}
th,td{border-bottom:1px solid var(--rule);padding:.2rem .6rem .2rem 0;text-align:left;vertical-align:top}
td.n,th.n{text-align:right}
dl.facts{display:grid;grid-template-columns:max-content 1fr;gap:.1rem 1rem;margin:.4rem 0}
dl.facts dt{color:var(--mute)}
dl.facts dd{margin:0}
figure.chart{margin:1rem 0;padding:.4rem .2rem;break-inside:avoid;page-break-inside:avoid}
figure.chart svg{width:100%;height:auto;display:block}
figcaption{font-size:.85rem;color:var(--mute);margin-top:.2rem}
.badge{display:inline-block;white-space:nowrap;border:2px solid currentColor;border-radius:.3rem;padding:.05rem .5rem;font-weight:700}
.badge.pass{color:var(--pass)}
.badge.fail{color:var(--fail)}
.badge.undecided{color:var(--undecided)}
.badge.none{color:var(--none)}
.verdict{font-size:1.25rem;margin:.6rem 0}
.cautions{border:2px solid #a1261b;padding:.2rem .8rem;margin-top:1.4rem;break-inside:avoid}
.cautions h2{border:0;color:#a1261b}
.notes{font-size:.85rem}
.notes li{margin:.2rem 0}
footer{margin-top:1.5rem;color:var(--mute);font-size:.8rem}
sup a{text-decoration:none}
svg text{font-size:12px;fill:var(--ink)}
svg .small{font-size:10.5px}
svg .mute{fill:var(--mute)}
svg .bold{font-weight:700}
svg .axis{stroke:var(--ink);stroke-width:1}
svg .grid{stroke:#e3e3e3;stroke-width:1}
svg .bar{fill:var(--bar)}
svg .bar-lt{fill:var(--bar-lt)}
svg .whisk{stroke:var(--ink);stroke-width:1.5;fill:none}
svg .band{fill:var(--bar-lt);opacity:.55}
svg .limit{stroke:var(--limit);stroke-width:1.5;stroke-dasharray:5 3}
svg .limit-t{fill:var(--limit)}
svg .est{fill:#fff;stroke:var(--ink);stroke-width:1.5}
svg .pt{fill:#9aa7b8}
svg .series{stroke:var(--bar);stroke-width:2;fill:none}
svg .mark{fill:var(--bar);stroke:#fff;stroke-width:1}
svg .flow{fill:var(--bar-lt);opacity:.7}
svg .box{fill:#f4f6fa;stroke:var(--bar);stroke-width:1.5}
svg .reject{fill:#f3eeee;stroke:#8c6d6d;stroke-width:1}
svg .land{fill:#f6f6f2;stroke:var(--rule)}
svg .legend{fill:#fff;fill-opacity:.85;stroke:var(--rule)}
svg .area{fill:#3f5f8f;fill-opacity:.07;stroke:var(--bar);stroke-dasharray:4 3}
svg .site{fill:var(--bar);stroke:#fff;stroke-width:1.5}
svg .other{fill:#fff;stroke:#888;stroke-width:1.2}
svg .v-pass{fill:var(--pass)}
svg .v-undecided-bg{fill:#f3e3bf}
svg .v-undecided-ln{stroke:var(--undecided);stroke-width:2}
svg .v-fail-bg{fill:#f2cfcb}
svg .v-fail-ln{stroke:var(--fail);stroke-width:1.5}
svg .v-none-bg{fill:#eee}
svg .v-none-ln{fill:var(--none)}
svg .outline{fill:none;stroke:var(--ink);stroke-width:1}
svg .pat{stroke:var(--ink);stroke-width:1}
svg .halo{paint-order:stroke;stroke:#fff;stroke-width:3px;stroke-linejoin:round}
@media print{
 @page{size:A4;margin:14mm}
 body{max-width:none;margin:0;padding:0;font-size:10pt}
 h2{break-after:avoid;page-break-after:avoid}
 .demo{border-width:2px}
 a{color:inherit;text-decoration:none}
 table{break-inside:auto}
 tr{break-inside:avoid}
}
`
