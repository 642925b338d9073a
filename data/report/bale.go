package report

import (
	"fmt"
	"io"
	"strings"

	"baleassay/assess"
	"baleassay/data/desk"
)

// WriteBale writes a bale report as one self-contained HTML page.
func WriteBale(w io.Writer, r desk.BaleReport) error {
	p := &page{}
	rec := r.Record
	name := rec.Tag
	if name == "" {
		name = shortID(r.Bale.String())
	}
	p.title = "Bale " + name + " — baleassay report"
	p.h("<header><h1>Bale %s</h1>", esc(name))
	sub := []string{}
	if r.Site.ID.IsZero() {
		sub = append(sub, "site not in this store")
	} else {
		sub = append(sub, esc(r.Site.Site.Name)+" ("+esc(r.Site.Site.Kind.String())+")")
	}
	sub = append(sub, "received "+stamp(received(rec.ReceivedMs)), esc(kg(rec.GrossKg))+" gross")
	p.h(`<p class="sub">%s</p></header>`+"\n", strings.Join(sub, " · "))
	baleFacts(p, r)
	baleVerdict(p, r)
	baleComposition(p, r.Audit)
	baleYield(p, r)

	return p.write(w, r.Generated, r.Demo, r.Cautions)
}

func baleFacts(p *page, r desk.BaleReport) {
	rec, a := r.Record, r.Audit.Report
	p.h(`<dl class="facts">`)
	fact := func(k, v string) { p.h("<dt>%s</dt><dd>%s</dd>", esc(k), v) }
	fact("Bale id", "<code>"+esc(r.Bale.String())+"</code>")
	if !r.Site.ID.IsZero() {
		s := r.Site.Site
		fact("Site", fmt.Sprintf("%s, %s; %s, %s (WGS 84)", esc(s.Name), esc(s.Kind.String()), num(s.Lat, 5)+"°", num(s.Lon, 5)+"°"))
	}
	fact("Received", stamp(received(rec.ReceivedMs)))
	fact("Gross mass", esc(kg(rec.GrossKg)))
	if v := rec.VolumeM3(); v > 0 {
		fact("Size", fmt.Sprintf("%s × %s × %s m (%s m³), %s kg/m³", num(rec.LengthM, 2), num(rec.WidthM, 2), num(rec.HeightM, 2), num(v, 2), num(rec.DensityKgM3(), 0)))
	}
	if rec.Grader != "" {
		fact("Grader", esc(rec.Grader))
	}
	fact("Sample", fmt.Sprintf("%s, %s sorted (%s of the bale)", esc(desk.Plural(a.Pulls, "pull", "pulls")), esc(kg(a.SampledKg)), pct(a.SampledShare)))
	est := "Cochran's ratio estimator"
	if estimatorNote(a.Method) == mMeanOfFractions {
		est = "mean of per-pull fractions"
	}
	fact("Estimator", fmt.Sprintf("%s, %s intervals%s", est, level(a.Confidence), p.notes.refs(estimatorNote(a.Method), mInterval)))
	if len(r.Audit.LabelClash) > 0 {
		fact("Conflict", "pull labels used twice (two devices): "+esc(strings.Join(r.Audit.LabelClash, ", "))+"; both pulls are counted until the conflict is resolved")
	}
	p.h("</dl>\n")
}

func estimatorNote(m string) method {
	if m == assess.MethodMean.String() {
		return mMeanOfFractions
	}
	return mRatio
}

func baleVerdict(p *page, r desk.BaleReport) {
	a := r.Audit.Report
	p.h(`<section id="verdict"><h2>Verdict</h2>`)
	if a.Spec == nil {
		p.h("<p>No spec: no verdict asked for.</p></section>\n")
		return
	}
	grade := ""
	if a.Spec.Grade != "" {
		sure := "sure"
		if !a.Spec.GradeSure {
			sure = "not yet sure: the interval spans a grade boundary"
		}
		grade = fmt.Sprintf("; grade <strong>%s</strong> (%s)", esc(a.Spec.Grade), sure)
	}
	p.h(`<p class="verdict">%s against spec <strong>%s</strong>%s%s</p>`, badge(a.Spec.Verdict), esc(a.Spec.Name), grade, p.notes.ref(mVerdict))
	if a.Hazards.Found {
		p.h("<p><strong>Hazards found</strong> in %s (%s, %s): zero tolerance. Keep them apart and follow the site's hazardous-waste procedure.</p>",
			esc(strings.Join(a.Hazards.Pulls, ", ")), esc(kg(a.Hazards.Kg)), esc(desk.Plural(a.Hazards.Pieces, "piece", "pieces")))
	}
	if len(r.Limiting) == 0 {
		p.h("<p>No limit fails or is undecided.</p>")
	} else {
		p.h("<h3>Limiting items</h3><ul>")
		for _, l := range r.Limiting {
			more := ""
			if l.Verdict == "undecided" {
				if l.MorePulls != nil {
					more = fmt.Sprintf("; about %s more to decide at the current spread", esc(desk.Plural(*l.MorePulls, "pull", "pulls")))
				} else {
					more = "; more pulls cannot be counted from this spread"
				}
			}
			iv := ""
			if l.Low != nil && l.High != nil {
				iv = " (" + pctRange(*l.Low, *l.High) + ")"
			}
			p.h("<li>%s <strong>%s</strong>: estimate %s%s against %s%s%s</li>", badge(l.Verdict), esc(l.Item), pct(l.Fraction), iv, boundText(l), more, noteText(l.Note))
		}
		p.h("</ul>")
	}
	if adv := a.Advice; adv.Why != "" {
		need := ""
		if adv.PullsNeeded != nil {
			need = fmt.Sprintf(" %s in all (%d taken) for ±%s relative precision on %s.", esc(desk.Plural(*adv.PullsNeeded, "pull", "pulls")), a.Pulls, level(adv.RelPrecision), esc(adv.Item))
		}
		p.h("<p><strong>Sample:</strong>%s %s.%s</p>", need, esc(capital(strings.TrimSuffix(adv.Why, "."))), p.notes.ref(mSampleSize))
	}
	id := p.id("limits")
	p.figure("limits", limitChart(id, a.Spec.Limits, a.Confidence),
		fmt.Sprintf("Each limit of spec %s on its own scale: the band is the %s interval, the ring the estimate, the dashed line the limit.", esc(a.Spec.Name), level(a.Confidence)))
	p.h("</section>\n")
}

func noteText(s string) string {
	if s == "" {
		return ""
	}
	return ` <span class="sub">(` + esc(s) + ")</span>"
}

func baleComposition(p *page, au desk.Audit) {
	a := au.Report
	p.h(`<section id="composition"><h2>Composition</h2>`)
	cite := p.notes.refs(estimatorNote(a.Method), mInterval, mCodes)
	var groups []bar
	for _, g := range a.Groups {
		groups = append(groups, shareBar(g.Name, g))
	}
	p.figure("groups", barChart{id: p.id("groups"), title: "Composition by group", desc: "Mass share of the bale by group with intervals.",
		bars: groups, max: 1, tick: tickPct, axis: "share of the bale's mass, %"}.svg(),
		fmt.Sprintf("Mass share of each group, estimate and %s interval (whisker).%s", level(a.Confidence), cite))
	var pet, other []bar
	var none []string
	for _, c := range a.Categories {
		if c.Kg == 0 {
			none = append(none, noneFound(c))
			continue
		}
		label := shortName(c.Name)
		if c.Code != nil && *c.Code > 0 {
			label += fmt.Sprintf(" (%d)", *c.Code)
		}
		b := shareBar(label, c)
		if cat, ok := assess.LookupCategory(c.Key); ok && cat.IsTargetPET() {
			pet = append(pet, b)
		} else {
			other = append(other, b)
		}
	}
	if len(pet) > 0 {
		p.figure("target-pet", barChart{id: p.id("target-pet"), title: "Target PET by kind", desc: "Mass share of the bale of each kind of target PET found, with intervals.",
			bars: pet, tick: tickPct, axis: "share of the bale's mass, %"}.svg(), "Target PET categories found, with resin code in brackets.")
	}
	if len(other) > 0 {
		p.figure("contaminants", barChart{id: p.id("contaminants"), title: "Everything else found", desc: "Mass share of the bale of each non-target category found, with intervals.",
			bars: other, tick: tickPct, axis: "share of the bale's mass, % (scale fitted to these items)"}.svg(),
			"Other categories found in the pulls, on a scale of their own.")
	}
	if len(none) > 0 {
		p.h("<p><strong>Found in no pull:</strong> %s.%s</p>", strings.Join(none, "; "), p.notes.ref(mNoneFound))
	}
	p.h("</section>\n")
}

// shareBar is a share with its interval as a bar.
func shareBar(label string, s assess.ShareReport) bar {
	b := bar{label: label, value: s.Fraction, text: pct(s.Fraction)}
	if s.Low != nil && s.High != nil {
		b.lo, b.hi, b.interval = *s.Low, *s.High, true
		b.text += " (" + pctRange(*s.Low, *s.High) + ")"
	} else {
		b.text += " (no interval)"
	}
	return b
}

func tickPct(v float64) string { return num(100*v, 3) }

// noneFound writes a category that no pull held.
func noneFound(c assess.ShareReport) string {
	return esc(shortName(c.Name))
}
