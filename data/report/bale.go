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

	return p.write(w, r.Generated, r.Demo, r.CautionTexts)
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
		grade = fmt.Sprintf("; grade <strong>%s</strong> (%s)", esc(a.Spec.Grade), gradeState(a.Spec.GradeState))
	} else if a.Spec.GradeState == "withheld" {
		grade = "; no grade (a failing bale gets none)"
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
			iv := ""
			if l.Low != nil && l.High != nil {
				iv = " (" + pctRange(*l.Low, *l.High) + ")"
			}
			p.h("<li>%s <strong>%s</strong>: estimate %s%s against %s%s%s</li>", badge(l.Verdict), esc(l.Item), pct(l.Fraction), iv, boundText(l), needText(l), noteText(l.Note))
		}
		p.h("</ul>")
	}
	adviceText(p, a)
	id := p.id("limits")
	p.figure("limits", limitChart(id, a.Spec.Limits, a.Confidence),
		fmt.Sprintf("Each limit of spec %s on its own scale: the band is the %s interval, the ring the estimate, the dashed line the limit.", esc(a.Spec.Name), level(a.Confidence)))
	p.h("</section>\n")
}

// gradeState says how sure a grade is.
func gradeState(s string) string {
	switch s {
	case "sure":
		return "sure: the whole interval lies in the band"
	case "spans":
		return "not yet sure: the interval reaches into another band"
	case "no_interval":
		return "from the estimate only: one pull gives no interval"
	}
	return esc(s)
}

// needText says what would decide an undecided limit.
func needText(l assess.LimitReport) string {
	if l.Verdict != "undecided" {
		return ""
	}
	switch l.Need {
	case "pulls":
		if l.MorePulls != nil {
			return fmt.Sprintf("; about %s more to decide at the current spread", esc(desk.Plural(*l.MorePulls, "pull", "pulls")))
		}
	case "whole_bale":
		return "; only a sort of the whole bale can decide it"
	case "beyond_reach":
		return "; more pulls cannot decide it in reason"
	}
	return "; how many more pulls decide it cannot be said from this spread"
}

// adviceText writes the advice on the sample.
func adviceText(p *page, a assess.Report) {
	adv := a.Advice
	if adv.Why == "" {
		return
	}
	var b strings.Builder
	if adv.MorePulls != nil && *adv.MorePulls > 0 && adv.PullsNeeded != nil {
		fmt.Fprintf(&b, " About %s more (%d in all, %d taken).", esc(desk.Plural(*adv.MorePulls, "pull", "pulls")), *adv.PullsNeeded, a.Pulls)
	}
	if adv.SortWholeBale {
		b.WriteString(" Only a sort of the whole bale decides.")
	}
	fmt.Fprintf(&b, " %s.", esc(capital(strings.TrimSuffix(adv.Why, "."))))
	p.h("<p><strong>Sample:</strong>%s%s</p>", b.String(), p.notes.ref(mSampleSize))
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
		if c.NoneFound != nil {
			none = append(none, "<li>"+esc(shortName(c.Name))+": "+esc(c.NoneFound.Text)+"</li>")
		}
		if c.Kg == 0 && c.NoneFound == nil {
			none = append(none, "<li>"+esc(shortName(c.Name))+": none found</li>")
		}
		if c.Kg == 0 {
			if cat, ok := assess.LookupCategory(c.Key); ok && !cat.IsTargetPET() && c.NoneFound != nil {
				other = append(other, shareBar(shortName(c.Name), c))
			}
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
	absent := ""
	for _, c := range a.Categories {
		if c.Kg == 0 && c.NoneFound != nil {
			absent = " A row without a bar was found in no pull: its whisker runs from 0 to the upper bound." + p.notes.ref(mNoneFound)
			break
		}
	}
	if len(other) > 0 {
		p.figure("contaminants", barChart{id: p.id("contaminants"), title: "Everything else", desc: "Mass share of the bale of each category that is not target PET, with intervals; for one found in no pull, its upper bound.",
			bars: other, tick: tickPct, axis: "share of the bale's mass, % (scale fitted to these items)"}.svg(),
			"Categories other than target PET, on a scale of their own."+absent)
	}
	if len(none) > 0 {
		p.h("<p><strong>Found in no pull</strong> (bounded, not proven absent):%s</p><ul>%s</ul>", p.notes.ref(mNoneFound), strings.Join(none, ""))
	}
	p.h("</section>\n")
}

// shareBar is a share with its interval as a bar; a category found in no
// pull shows its upper bound.
func shareBar(label string, s assess.ShareReport) bar {
	b := bar{label: label, value: s.Fraction, text: pct(s.Fraction)}
	if s.NoneFound != nil {
		b.lo, b.hi, b.interval = 0, s.NoneFound.Upper, true
		b.text = "none found · ≤ " + pctUp(s.NoneFound.Upper)
		return b
	}
	if s.Low != nil && s.High != nil {
		b.lo, b.hi, b.interval = *s.Low, *s.High, true
		b.text += " (" + pctRange(*s.Low, *s.High) + ")"
	} else {
		b.text += " (no interval)"
	}
	return b
}

func tickPct(v float64) string { return num(100*v, 3) }
