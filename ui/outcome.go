package ui

import (
	"fmt"
	"math"

	"gioui.org/layout"
	"gioui.org/widget"

	"baleassay/assess"
	"baleassay/data/desk"
	"baleassay/ui/kit"
	"baleassay/ui/theme"
)

// outcomeScreen: what the bale is (composition with intervals), whether
// it meets its spec and how many more pulls would decide it, and what it
// makes: flake and glycolysate in kg with their P10–P90 band, the
// glycolysis figures and the cautions.
type outcomeScreen struct {
	list   widget.List
	side   widget.List
	tally  widget.Clickable
	toSite widget.Clickable
}

func newOutcomeScreen() *outcomeScreen {
	s := &outcomeScreen{}
	s.list.Axis = layout.Vertical
	s.side.Axis = layout.Vertical
	return s
}

// Layout draws the screen and returns the user's actions.
func (s *outcomeScreen) Layout(gtx layout.Context, a *App) ([]Action, layout.Dimensions) {
	th := a.th
	var acts []Action
	if s.tally.Clicked(gtx) {
		acts = append(acts, GoTo{Screen: ScreenTally})
	}
	if s.toSite.Clicked(gtx) {
		acts = append(acts, GoTo{Screen: ScreenSites})
	}
	o := a.m.result.Value
	if a.m.bale.IsZero() {
		return acts, layout.Flex{Axis: layout.Vertical}.Layout(gtx, layout.Rigid(title(th, "Outcome")), vgap(12),
			layout.Rigid(body(th, "No bale chosen: open one from its site (Ctrl+1) or receive one (Ctrl+2).")))
	}
	if !a.m.result.Has || o.Bale != a.m.bale {
		return acts, layout.Flex{Axis: layout.Vertical}.Layout(gtx, layout.Rigid(title(th, "Outcome")), vgap(12),
			layout.Rigid(body(th, "Working out the bale's composition and yield …")))
	}
	row, _ := a.m.baleRow()
	head := "Outcome of bale " + row.Bale.Tag
	if row.SiteName != "" {
		head += " from " + row.SiteName
	}
	if o.AuditErr != nil {
		return acts, layout.Flex{Axis: layout.Vertical}.Layout(gtx, layout.Rigid(title(th, head)), vgap(12),
			layout.Rigid(kit.Problem{Th: th, Text: errText(o.AuditErr)}.Layout), vgap(12),
			layout.Rigid(kit.Button{Th: th, Click: &s.tally, Text: "Tally its pulls", Hint: "Ctrl+3", Role: kit.RolePrimary}.Layout))
	}
	left := func(gtx layout.Context) layout.Dimensions {
		return s.list.Layout(gtx, 1, func(gtx layout.Context, _ int) layout.Dimensions {
			return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
				layout.Rigid(title(th, head)),
				vgap(2),
				layout.Rigid(muted(th, auditLine(a, o))),
				vgap(10),
				layout.Rigid(func(gtx layout.Context) layout.Dimensions { return verdictCard(gtx, a, o) }),
				vgap(12),
				layout.Rigid(func(gtx layout.Context) layout.Dimensions { return composition(gtx, a, o) }),
			)
		})
	}
	right := func(gtx layout.Context) layout.Dimensions {
		return s.side.Layout(gtx, 1, func(gtx layout.Context, _ int) layout.Dimensions { return yieldCard(gtx, a, o) })
	}
	return acts, columnsW(gtx, 0.55, left, right)
}

// auditLine says what the figures rest on.
func auditLine(a *App, o outcome) string {
	r := o.Audit.Result
	u := a.cfg.Unit
	line := fmt.Sprintf("%s, %s sorted of the %s bale (%s of it) · intervals at %s confidence · %s",
		desk.Plural(r.Pulls, "pull", "pulls"), mass(u, r.SampledKg, 1), mass(u, r.BaleKg, 0), pct(r.SampledShare, 1), pct(r.Confidence, 0), methodName(r.Method))
	if a.m.result.Busy {
		line += " · updating …"
	}
	return line
}

func methodName(m assess.Method) string {
	if m == assess.MethodMean {
		return "mean of per-pull fractions (ASTM D5231)"
	}
	return "ratio estimate (Cochran)"
}

// verdictCard: the badge, the limits that decide it, and the advice.
func verdictCard(gtx layout.Context, a *App, o outcome) layout.Dimensions {
	th := a.th
	v := o.Audit.Verdict
	if v == nil {
		return body(th, "No spec chosen for this bale: composition only.")(gtx)
	}
	var kids []layout.FlexChild
	kids = append(kids, layout.Rigid(func(gtx layout.Context) layout.Dimensions {
		return layout.Flex{Alignment: layout.Middle}.Layout(gtx,
			layout.Rigid(kit.Badge{Th: th, Kind: badgeOf(v.Verdict), Word: verdictWord(v.Verdict), Size: theme.SizeTitle - 4}.Layout),
			layout.Rigid(layout.Spacer{Width: 12}.Layout),
			layout.Flexed(1, body(th, gradeLine(v))))
	}))
	for _, l := range v.Limits {
		if l.Verdict == assess.Pass {
			continue
		}
		kids = append(kids, vgap(4), layout.Rigid(kit.Text{Th: th, Text: limitLine(l), Color: th.Pal.Text, Bold: l.Verdict == assess.Fail}.Layout))
	}
	adv := o.Audit.Advice
	var next string
	switch adv.Kind {
	case assess.AdviceDecide:
		if adv.Need.State == assess.SizePulls && adv.Need.More > 0 {
			next = fmt.Sprintf("Take %s more to decide (%s decides it).", desk.Plural(adv.Need.More, "pull", "pulls"), itemName(adv.Item))
		} else {
			next = "To decide: " + adv.Need.Text() + " (" + itemName(adv.Item) + " decides it)."
		}
	case assess.AdviceAnotherPull:
		next = "Take another pull: one pull shows no spread, so nothing can be decided yet."
	case assess.AdvicePassed:
		next = "Every limit is met: no more pulls are needed."
	case assess.AdviceFailed:
		next = "A limit fails whatever more pulls show: no more pulls are needed."
	case assess.AdviceWholeBale:
		next = "The whole bale was sorted: nothing is left to sample."
	case assess.AdvicePrecision:
		next = "For ±10 % on the PET share: " + adv.Need.Text() + "."
	}
	if next != "" {
		kids = append(kids, vgap(6), layout.Rigid(kit.Text{Th: th, Text: next, Bold: true, Color: th.Pal.Text, Size: theme.SizeBody + 2}.Layout))
	}
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx, kids...)
}

func gradeLine(v *assess.SpecVerdict) string {
	s := "against spec " + v.Spec
	if v.Grade != "" {
		if v.GradeState == assess.GradeSure {
			s += " · grade " + v.Grade
		} else {
			s += " · grade " + v.Grade + " (not yet sure)"
		}
	}
	return s
}

// limitLine is one limit that did not pass, in words.
func limitLine(l assess.LimitVerdict) string {
	bound := map[assess.Bound]string{assess.AtLeast: "at least", assess.AtMost: "at most", assess.Zero: "none allowed"}[l.Bound]
	lim := ""
	if l.Bound != assess.Zero {
		lim = " " + pct(l.Limit, pctDecimals(l.Limit))
	}
	state := map[assess.Verdict]string{assess.Fail: "FAILS", assess.Undecided: "not decided"}[l.Verdict]
	est := shareText(l.Share)
	more := ""
	if l.Verdict == assess.Undecided {
		more = "; to decide: " + l.Need.Text()
	}
	return fmt.Sprintf("%s: %s%s of the bale — found %s: %s%s", itemName(l.Item), bound, lim, est, state, more)
}

// shareText writes a share with its interval, or its none-found bound.
func shareText(s assess.Share) string {
	d := pctDecimals(s.High)
	switch {
	case s.Absent() && s.Kind == assess.IntervalNoneFound:
		return "none found, at most " + s.None.UpperText() + " %"
	case s.HasInterval:
		return fmt.Sprintf("%s (%.*f–%.*f)", pct(s.Fraction, d), d, 100*s.Low, d, 100*s.High)
	}
	return pct(s.Fraction, d) + " (one pull: no interval)"
}

// itemName is a category's or group's display name.
func itemName(key string) string {
	if i, ok := assess.CategoryIndex(key); ok {
		return shortName(assess.CategoryAt(i))
	}
	if g, ok := assess.LookupGroup(key); ok {
		return g.String()
	}
	return key
}

// composition: the groups on a 0–100 % axis, then the categories found on
// an axis sized to them, then the categories found in no pull.
func composition(gtx layout.Context, a *App, o outcome) layout.Dimensions {
	th := a.th
	r := o.Audit.Result
	limits := map[string]float64{}
	if v := o.Audit.Verdict; v != nil {
		for _, l := range v.Limits {
			if l.Bound != assess.Zero {
				limits[l.Item] = l.Limit
			}
		}
	}
	bar := func(name, key string, s assess.Share, max float64) layout.FlexChild {
		lim, ok := limits[key]
		if !ok {
			lim = math.NaN()
		}
		return layout.Rigid(kit.ValueBar{Th: th, Name: name, Est: s.Fraction, Lo: s.Low, Hi: s.High, HasCI: s.HasInterval,
			Max: max, Limit: lim, Value: shareText(s), NameW: 190, ValueW: 230}.Layout)
	}
	kids := []layout.FlexChild{layout.Rigid(heading(th, "What the bale holds — % of the bale by mass, axis 0–100 %"))}
	for i, g := range assess.Groups() {
		kids = append(kids, bar(g.String(), g.Key(), r.Groups[i], 1))
	}
	var found, absent []int
	top := 0.0
	for i, c := range r.Categories {
		if assess.CategoryAt(i).Group == assess.GroupPET && c.Kg > 0 {
			continue // PET is shown as its group above
		}
		if c.Absent() {
			absent = append(absent, i)
			continue
		}
		found = append(found, i)
		top = math.Max(top, c.High)
	}
	axis := niceAxis(top)
	kids = append(kids, vgap(10), layout.Rigid(heading(th, fmt.Sprintf("Contaminants found — %% of the bale by mass, axis 0–%s", pct(axis, 0)))))
	for _, i := range found {
		c := r.Categories[i]
		kids = append(kids, bar(shortName(assess.CategoryAt(i)), c.Key, c, axis))
	}
	if len(absent) > 0 {
		b := r.Categories[absent[0]].None
		kids = append(kids, vgap(10), layout.Rigid(heading(th, "Found in no pull")),
			layout.Rigid(muted(th, fmt.Sprintf("Upper bounds at %s confidence from %s (%s sorted):", pct(b.Level, 0), desk.Plural(b.Pulls, "pull", "pulls"), mass(a.cfg.Unit, b.Kg, 1)))))
		for _, i := range absent {
			c := r.Categories[i]
			kids = append(kids, bar(shortName(assess.CategoryAt(i)), c.Key, c, axis))
		}
	}
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx, kids...)
}

// niceAxis rounds an axis end up to 1, 2 or 5 times a power of ten.
func niceAxis(x float64) float64 {
	if x <= 0 {
		return 0.01
	}
	p := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= x {
			return math.Min(1, m*p)
		}
	}
	return 1
}
