package report

import (
	"fmt"
	"io"
	"math"
	"strings"

	"baleassay/assess"
	"baleassay/data/desk"
)

// WriteSites writes a site or region report as one self-contained HTML
// page.
func WriteSites(w io.Writer, r desk.SiteReport) error {
	p := &page{}
	title := ""
	switch {
	case r.Scope.Within != nil:
		q := r.Scope.Within
		title = fmt.Sprintf("Sites within %s km of %s, %s", num(q.Km, 3), num(q.Lat, 5), num(q.Lon, 5))
	case len(r.Sites) == 1:
		title = r.Sites[0].Site.Name
	}
	p.title = title + " — baleassay report"
	p.h("<header><h1>%s</h1>", esc(title))
	p.h(`<p class="sub">%s · %s · %s received, %s audited</p></header>`+"\n", esc(rangeText(r.Range)),
		esc(desk.Plural(len(r.Sites), "site", "sites")), esc(desk.Plural(r.All.Bales, "bale", "bales")), fmt.Sprint(r.All.Audited))
	siteFacts(p, r)
	siteVerdicts(p, r)
	siteTrends(p, r)
	sitePerTonne(p, r)
	p.h(`<section id="map"><h2>Where the bales come from</h2>`)
	cite := p.notes.ref(mProjection)
	if r.Scope.Within != nil {
		cite = p.notes.refs(mProjection, mHaversine)
	}
	p.figure("map", mapChart(p.id("map"), r), "Sites of this report and their neighbours."+cite)
	siteTable(p, r)
	p.h("</section>\n")
	flagged(p, r)
	return p.write(w, r.Generated, r.Demo, r.CautionTexts)
}

func rangeText(r desk.DateRange) string {
	switch {
	case r.From.IsZero() && r.Until.IsZero():
		return "all bales on record"
	case r.Until.IsZero():
		return "received from " + day(r.From)
	case r.From.IsZero():
		return "received before " + day(r.Until)
	}
	return "received " + day(r.From) + " to " + day(r.Until.AddDate(0, 0, -1)) + " (inclusive)"
}

func siteFacts(p *page, r desk.SiteReport) {
	a := r.All
	p.h(`<dl class="facts">`)
	fact := func(k, v string) { p.h("<dt>%s</dt><dd>%s</dd>", esc(k), v) }
	fact("Bales", fmt.Sprintf("%d received: %d audited, %d without pulls yet, %d whose pulls could not be assessed",
		a.Bales, a.Audited, a.Verdicts.NoPulls, a.Verdicts.Unassessed))
	if a.TargetPET.N > 0 {
		sd := ""
		if a.TargetPET.N > 1 {
			sd = ", SD " + pct(a.TargetPET.SD)
		}
		fact("Target PET", fmt.Sprintf("mean %s%s, lowest %s, highest %s across audited bales%s",
			pct(a.TargetPET.Mean), sd, pct(a.TargetPET.Min), pct(a.TargetPET.Max), p.notes.refs(mRatio, mWelford)))
	}
	for _, g := range a.Groups {
		if g.N > 0 {
			fact(g.Group.String()+" (mass)", fmt.Sprintf("mean %s, highest %s", pct(g.Mean), pct(g.Max)))
		}
	}
	fact("Bales with hazards", fmt.Sprintf("%s with a hazard found in a pull", esc(desk.Plural(a.Hazards, "bale", "bales"))))
	p.h("</dl>\n")
}

func siteVerdicts(p *page, r desk.SiteReport) {
	v := r.All.Verdicts
	p.h(`<section id="verdicts"><h2>Verdicts</h2>`)
	if v.Total() == 0 {
		p.h("<p>No bales were received in this range.</p></section>\n")
		return
	}
	id := p.id("verdicts")
	total := float64(max(1, v.Total()))
	row := func(word, verdict string, k int) bar {
		fill, cls := fillOf(id, verdict)
		return bar{label: glyph(verdict) + " " + word, value: float64(k), fill: fill, class: cls,
			text: fmt.Sprintf("%d (%s)", k, pct(float64(k)/total))}
	}
	bars := []bar{row("pass", "pass", v.Pass), row("undecided", "undecided", v.Undecided), row("fail", "fail", v.Fail),
		row("no verdict (spec missing)", "", v.NoVerdict), row("no pulls yet", "", v.NoPulls), row("not assessable", "", v.Unassessed)}
	p.figure("verdicts", barChart{id: id, title: "Bales by verdict", desc: "Number of bales by the verdict of their spec.",
		bars: bars, tick: func(x float64) string { return num(x, 0) }, axis: "bales", defs: hatch(id), counts: true}.svg(),
		"Each bale against its own spec (or "+desk.DefaultSpec+"). Fills: solid pass, hatched undecided, crossed fail, dotted none."+p.notes.ref(mVerdict))
	p.h("</section>\n")
}

func siteTrends(p *page, r desk.SiteReport) {
	p.h(`<section id="trends"><h2>Over time</h2>`)
	if r.All.Audited == 0 {
		p.h("<p>No audited bales in this range: nothing to draw over time.</p></section>\n")
		return
	}
	var ref *mark
	if r.Reference.Has {
		ref = &mark{at: r.Reference.Min, label: fmt.Sprintf("%s minimum %s", r.Reference.Spec, pct(r.Reference.Min))}
	}
	p.figure("trend-pet", trendChart{id: p.id("trend-pet"), title: "Target PET over time",
		desc: "Target-PET share of each audited bale and its weekly or monthly mean.", trend: r.Trend,
		stat:  func(b desk.TrendBucket) desk.Stat { return b.TargetPET },
		bales: r.Bales, share: func(b desk.BalePoint) float64 { return b.Result.Group(assess.GroupPET).Fraction },
		ref: ref, yMax: 1, height: 280}.svg(),
		"Share of target PET in the bale's mass, per bale and per "+r.Trend.Unit.String()+"."+p.notes.refs(mRatio, mWeeks))
	for i, g := range assess.Groups()[1:] {
		i, g := i, g
		p.figure("trend-"+g.Key(), trendChart{id: p.id("trend-" + g.Key()), title: g.String() + " over time",
			desc: "Share of " + strings.ToLower(g.String()) + " in each audited bale and its mean.", trend: r.Trend,
			stat:  func(b desk.TrendBucket) desk.Stat { return b.Groups[i].Stat },
			bales: r.Bales, share: func(b desk.BalePoint) float64 { return b.Result.Group(g).Fraction }, height: 200}.svg(),
			g.String()+": share of the bale's mass (scale fitted to this group).")
	}
	p.h("</section>\n")
}

func sitePerTonne(p *page, r desk.SiteReport) {
	pt := r.PerTonne
	p.h(`<section id="per-tonne"><h2>Expected flake and polyol per tonne</h2>`)
	if pt.Bales == 0 {
		p.h("<p>No audited bale could be put through the line.</p></section>\n")
		return
	}
	ratio := fmt.Sprintf("%s kg per kg of dry flake", num(pt.GlycolRatio, 3))
	if pt.Molar {
		ratio = fmt.Sprintf("%s mol per mol of PET repeat unit", num(pt.GlycolRatio, 3))
	}
	p.h("<p>%s (%s) through line <strong>%s</strong>, glycolysis with %s at %s.%s</p>",
		esc(desk.Plural(pt.Bales, "audited bale", "audited bales")), esc(tonnes(pt.BaleKg)), esc(pt.Line), esc(pt.Glycol), ratio, p.notes.refs(mLine, mGlycolysis, mPerTonne))
	row := func(label string, f desk.TonneFigure) bar {
		return bar{label: label, value: f.KgPerTonne, lo: f.P10, hi: f.P90, interval: !math.IsNaN(f.P10),
			text: num(f.KgPerTonne, 0) + nbsp + "kg/t", sub: fmt.Sprintf("bales P10–P90 %s–%s kg/t", num(f.P10, 0), num(f.P90, 0))}
	}
	p.figure("per-tonne", barChart{id: p.id("per-tonne"), title: "Per tonne of bales", desc: "Clean flake and glycolysate per tonne of bale, with the spread from bale to bale.",
		bars: []bar{row("clean flake", pt.Flake), row("glycolysate (polyol)", pt.Glycolysate)},
		tick: func(x float64) string { return num(x, 0) }, axis: "kg per tonne of bale (gross)"}.svg(),
		fmt.Sprintf("Bars: Σ product / Σ bale mass; whiskers: P10 to P90 of single bales. Mean hydroxyl value of the glycolysate %s mg KOH/g. The glycolysate includes the glycol added.", num(pt.HydroxylValue.Mean, 1)))
	p.h("</section>\n")
}

func siteTable(p *page, r desk.SiteReport) {
	region := r.Scope.Within != nil
	p.h(`<table><thead><tr><th>site</th><th>kind</th>`)
	if region {
		p.h(`<th class="n">km</th>`)
	}
	p.h(`<th class="n">bales</th><th class="n">audited</th><th class="n">mean target PET</th><th class="n">pass / undecided / fail</th><th class="n">hazard bales</th><th>latest verdict</th><th class="n">flake kg/t</th></tr></thead><tbody>`)
	for _, s := range r.Sites {
		p.h("<tr><td>%s</td><td>%s</td>", esc(s.Site.Name), esc(s.Site.Kind.String()))
		if region {
			p.h(`<td class="n">%s</td>`, num(s.Km, 1))
		}
		mean := "–"
		if s.TargetPET.N > 0 {
			mean = pct(s.TargetPET.Mean)
		}
		latest := "–"
		if v := s.LatestVerdict(); v != "" {
			latest = badge(v)
		}
		p.h(`<td class="n">%d</td><td class="n">%d</td><td class="n">%s</td><td class="n">%d / %d / %d</td><td class="n">%d</td><td>%s</td><td class="n">%s</td></tr>`,
			s.Bales, s.Audited, mean, s.Verdicts.Pass, s.Verdicts.Undecided, s.Verdicts.Fail, s.Hazards, latest, num(s.PerTonne(s.FlakeKg), 0))
	}
	p.h("</tbody></table>")
}

// flagged lists the bales that need a look.
func flagged(p *page, r desk.SiteReport) {
	var hz, un []desk.BalePoint
	for _, b := range r.Bales {
		if b.Audit.State == desk.AuditDone && b.Audit.Hazard {
			hz = append(hz, b)
		}
		if b.Audit.State == desk.AuditFailed {
			un = append(un, b)
		}
	}
	if len(hz)+len(un)+len(r.LabelClash) == 0 {
		return
	}
	p.h(`<section id="flagged"><h2>Bales that need a look</h2>`)
	list := func(title string, bs []desk.BalePoint) {
		if len(bs) == 0 {
			return
		}
		p.h("<h3>%s</h3><ul>", esc(title))
		for _, b := range bs {
			p.h("<li>%s (%s), %s, received %s</li>", esc(b.Bale.Tag), shortID(b.ID.String()), esc(b.SiteName), day(b.Received()))
		}
		p.h("</ul>")
	}
	list("Hazard found (zero tolerance)", hz)
	list("Pull labels used twice (two devices): resolve the conflict", r.LabelClash)
	list("Pulls that could not be assessed", un)
	p.h("</section>\n")
}
