package ui

import (
	"fmt"

	"gioui.org/layout"

	"baleassay/data/desk"
	"baleassay/ui/kit"
	"baleassay/ui/theme"
	"baleassay/yield"
)

// yieldCard: bale → flake → glycolysate in kg with the P10–P90 band of
// the Monte Carlo, the glycolysis card and the cautions that apply.
func yieldCard(gtx layout.Context, a *App, o outcome) layout.Dimensions {
	th := a.th
	u := a.cfg.Unit
	if o.YieldErr != nil {
		return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
			layout.Rigid(heading(th, "What it makes")), vgap(6),
			layout.Rigid(kit.Problem{Th: th, Text: errText(o.YieldErr)}.Layout))
	}
	y := o.Yield
	rep, mc := y.Report, y.MC
	g := rep.Glycolysate
	band := func(s yield.Summary, dec int, unit string) string {
		return fmt.Sprintf("P10–P90 %.*f–%.*f %s", dec, s.P10, dec, s.P90, unit)
	}
	bandMass := func(s yield.Summary) string {
		return fmt.Sprintf("P10–P90 %s–%s", mass(u, s.P10, 0), mass(u, s.P90, 0))
	}
	flow := []struct{ name, value, spread string }{
		{"Bale, gross", mass(u, rep.Balance.BaleKg, 0), "as weighed"},
		{"Clean flake", mass(u, rep.Balance.FlakeKg, 0), bandMass(mc.FlakeKg) + fmt.Sprintf(" · %s of the bale", pct(rep.Balance.FlakeShare, 1))},
		{"Glycolysate", mass(u, g.GlycolysateKg, 0), bandMass(mc.GlycolysateKg) + fmt.Sprintf(" · with %s of %s", mass(u, g.GlycolKg, 0), g.Glycol.Key)},
	}
	var kids []layout.FlexChild
	kids = append(kids, layout.Rigid(heading(th, "What it makes (kg of product per bale)")), vgap(4))
	for i, f := range flow {
		if i > 0 {
			kids = append(kids, layout.Rigid(kit.Text{Th: th, Text: "↓", Size: theme.SizeBody, Color: th.Pal.Muted}.Layout))
		}
		f := f
		kids = append(kids, layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			return layout.Flex{Alignment: layout.Baseline}.Layout(gtx,
				layout.Rigid(func(gtx layout.Context) layout.Dimensions {
					gtx.Constraints.Min.X, gtx.Constraints.Max.X = gtx.Dp(130), gtx.Dp(130)
					return body(th, f.name)(gtx)
				}),
				layout.Rigid(func(gtx layout.Context) layout.Dimensions {
					gtx.Constraints.Min.X = gtx.Dp(100)
					return kit.Text{Th: th, Text: f.value, Bold: true, Size: theme.SizeBody + 4, Color: th.Pal.Text}.Layout(gtx)
				}),
				layout.Flexed(1, kit.Text{Th: th, Text: f.spread, Color: th.Pal.Muted, Size: theme.SizeSmall}.Layout))
		}))
	}
	kids = append(kids, vgap(4), layout.Rigid(muted(th, fmt.Sprintf("P10–P90: the middle 80 %% of %s Monte Carlo draws of the pulls and the wash line.", desk.Num(float64(mc.Draws), 0)))))
	if y.FlakePass {
		kids = append(kids, layout.Rigid(body(th, "The clean flake meets the flake spec at the estimate.")))
	} else {
		kids = append(kids, layout.Rigid(kit.Problem{Th: th, Text: "The clean flake misses the flake spec at the estimate."}.Layout))
	}
	// glycolysis card
	kids = append(kids, vgap(12), layout.Rigid(heading(th, fmt.Sprintf("Glycolysis with %s (%s)", g.Glycol.Name, g.Glycol.Key))))
	card := []struct{ name, value string }{
		{"Hydroxyl value", fmt.Sprintf("%.0f mg KOH/g  (%s)", g.HydroxylValue, band(mc.HydroxylValue, 0, "mg KOH/g"))},
		{"Mn of the oligomers", fmt.Sprintf("%.0f g/mol", g.Mn)},
		{"Free glycol", pct(g.Dist.FreeGlycolWt, 1) + " of the glycolysate by mass"},
		{fmt.Sprintf("Oligomers ≥ %d units", yield.LongOligomerUnits), pct(g.Dist.LongOligomerWt, 1) + " by mass"},
	}
	for _, c := range card {
		c := c
		kids = append(kids, layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			return layout.Flex{}.Layout(gtx,
				layout.Rigid(func(gtx layout.Context) layout.Dimensions {
					gtx.Constraints.Min.X, gtx.Constraints.Max.X = gtx.Dp(190), gtx.Dp(190)
					return body(th, c.name)(gtx)
				}),
				layout.Flexed(1, kit.Text{Th: th, Text: c.value, Bold: true, Color: th.Pal.Text}.Layout))
		}))
	}
	for _, w := range g.Warnings {
		kids = append(kids, vgap(4), layout.Rigid(kit.Problem{Th: th, Text: w}.Layout))
	}
	// cautions
	kids = append(kids, vgap(12), layout.Rigid(heading(th, "Cautions")))
	if h := o.Audit.Result.HazardPulls; len(h) > 0 {
		kids = append(kids, layout.Rigid(kit.Problem{Th: th, Text: fmt.Sprintf("Hazards found in pulls %v: keep them apart and follow the site's hazardous-waste procedure.", h)}.Layout), vgap(4))
	}
	for _, c := range y.Cautions {
		kids = append(kids, layout.Rigid(kit.Text{Th: th, Text: "• " + y.CautionText(c), Color: th.Pal.Text, Size: theme.SizeSmall + 1}.Layout), vgap(3))
	}
	kids = append(kids, layout.Rigid(kit.Text{Th: th, Text: "Local codes, the site's safety rules and licensed practice come first.", Color: th.Pal.Muted, Size: theme.SizeSmall}.Layout))
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx, kids...)
}
