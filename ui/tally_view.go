package ui

import (
	"fmt"
	"strings"

	"gioui.org/layout"
	"gioui.org/unit"

	"baleassay/assess"
	"baleassay/data/desk"
	"baleassay/data/record"
	"baleassay/ui/kit"
	"baleassay/ui/theme"
)

// layout draws the tally: the guidance for the step, the two fields, the
// running sums, the category buttons by group; on the right the pull's
// fractions and the bale's saved pulls.
func (s *tallyScreen) layout(gtx layout.Context, a *App) layout.Dimensions {
	th := a.th
	u := a.cfg.Unit
	p := s.record(a, u)
	row, _ := a.m.baleRow()
	head := fmt.Sprintf("Tally pulls of bale %s", row.Bale.Tag)
	if row.SiteName != "" {
		head += " from " + row.SiteName
	}
	left := func(gtx layout.Context) layout.Dimensions {
		return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
			layout.Rigid(title(th, head)),
			vgap(4),
			layout.Rigid(func(gtx layout.Context) layout.Dimensions { return s.guide(gtx, a) }),
			vgap(8),
			layout.Rigid(func(gtx layout.Context) layout.Dimensions { return s.fields(gtx, a) }),
			vgap(6),
			layout.Rigid(func(gtx layout.Context) layout.Dimensions { return s.sums(gtx, a, p) }),
			vgap(8),
			layout.Flexed(1, func(gtx layout.Context) layout.Dimensions { return s.buttons(gtx, a, p) }),
		)
	}
	right := func(gtx layout.Context) layout.Dimensions { return s.side(gtx, a, p) }
	if gtx.Constraints.Max.X < gtx.Dp(1000) {
		return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
			layout.Flexed(0.7, left), vgap(8), layout.Flexed(0.3, right))
	}
	return layout.Flex{}.Layout(gtx,
		layout.Flexed(0.7, left), layout.Rigid(layout.Spacer{Width: 16}.Layout), layout.Flexed(0.3, right))
}

// guide says, in one sentence, what to do now.
func (s *tallyScreen) guide(gtx layout.Context, a *App) layout.Dimensions {
	th := a.th
	var txt string
	switch s.step {
	case stepPullMass:
		txt = fmt.Sprintf("Step 1 — pull %s: weigh the whole pull and type its mass in %s, then Enter.", s.label, a.cfg.Unit)
	case stepPick:
		txt = "Step 2 — press the key (or button) of the next fraction's category. Enter saves the pull; Backspace undoes the last fraction."
	case stepFraction:
		txt = fmt.Sprintf("Step 3 — type the mass of %s in %s, then Enter (pieces one by one: 0.4+0.3). Esc goes back.", shortName(assess.CategoryAt(s.cat)), a.cfg.Unit)
	}
	if !s.corrects.IsZero() {
		txt = "Correcting pull " + s.label + ": the saved value is kept in its history. " + txt
	}
	return kit.Text{Th: th, Text: txt, Bold: true, Color: th.Pal.Text, Size: theme.SizeBody + 1}.Layout(gtx)
}

func (s *tallyScreen) fields(gtx layout.Context, a *App) layout.Dimensions {
	th := a.th
	u := a.cfg.Unit.String()
	fracLabel := "Fraction mass (" + u + ")"
	if s.step == stepFraction {
		fracLabel = shortName(assess.CategoryAt(s.cat)) + ": mass (" + u + ")"
	}
	return layout.Flex{Alignment: layout.Start}.Layout(gtx,
		layout.Rigid(kit.FieldStyle{Th: th, F: s.pullMass, Label: "Pull " + s.label + ", weighed (" + u + ")", Unit: u, Width: 160,
			Active: s.step == stepPullMass && gtx.Focused(&s.keyTag)}.Layout),
		layout.Rigid(layout.Spacer{Width: 24}.Layout),
		layout.Flexed(1, func(gtx layout.Context) layout.Dimensions {
			if s.step != stepFraction {
				return layout.Dimensions{}
			}
			return kit.FieldStyle{Th: th, F: s.frac, Label: fracLabel, Unit: u, Width: 160, Active: s.step == stepFraction && gtx.Focused(&s.keyTag)}.Layout(gtx)
		}),
	)
}

// sums shows the sorted total and the unsorted remainder (from the desk).
func (s *tallyScreen) sums(gtx layout.Context, a *App, p record.PullRecord) layout.Dimensions {
	th := a.th
	u := a.cfg.Unit
	row := desk.PullRow{Pull: p}
	txt := fmt.Sprintf("Sorted so far: %s in %s", mass(u, row.PartsKg(), 2), desk.Plural(len(s.entries), "fraction", "fractions"))
	if p.StatedKg > 0 {
		txt += fmt.Sprintf(" · unsorted remainder: %s of the %s weighed", mass(u, row.RemainderKg(), 2), mass(u, p.StatedKg, 2))
	}
	return kit.Text{Th: th, Text: txt, Color: th.Pal.Text}.Layout(gtx)
}

// buttons are the categories, grouped, each with its key and its kg.
func (s *tallyScreen) buttons(gtx layout.Context, a *App, p record.PullRecord) layout.Dimensions {
	th := a.th
	var kids []layout.FlexChild
	// sections of buttons: each group, the last two (moisture and fines,
	// hazards: three buttons) sharing a row
	type section struct {
		name string
		idx  []int
	}
	var secs []section
	for _, g := range assess.Groups() {
		var idx []int
		for i := 0; i < assess.NumCategories(); i++ {
			if assess.CategoryAt(i).Group == g {
				idx = append(idx, i)
			}
		}
		if g == assess.GroupHazards && len(secs) > 0 {
			last := &secs[len(secs)-1]
			last.name += " · " + g.String()
			last.idx = append(last.idx, idx...)
			continue
		}
		secs = append(secs, section{g.String(), idx})
	}
	for _, sec := range secs {
		idx := sec.idx
		kids = append(kids,
			layout.Rigid(kit.Text{Th: th, Text: sec.name, Bold: true, Color: th.Pal.Muted, Size: theme.SizeSmall}.Layout),
			layout.Rigid(func(gtx layout.Context) layout.Dimensions {
				return grid(gtx, len(idx), unit.Dp(136*th.Scale), func(gtx layout.Context, j int) layout.Dimensions {
					i := idx[j]
					c := assess.CategoryAt(i)
					role := kit.RoleNormal
					if s.step == stepFraction && s.cat == i {
						role = kit.RoleSelected
					}
					sub := ""
					if kg := p.Kg[c.Key]; kg > 0 {
						sub = mass(a.cfg.Unit, kg, 2)
					}
					return kit.Button{Th: th, Click: &s.catBtns[i], Text: tallyName(c), Sub: sub, Hint: string(keyOfCategory(c.Key)), Role: role, TextSize: theme.SizeLabel - 1}.Layout(gtx)
				})
			}),
			vgap(4))
	}
	return s.btnList.Layout(gtx, 1, func(gtx layout.Context, _ int) layout.Dimensions {
		return layout.Flex{Axis: layout.Vertical}.Layout(gtx, kids...)
	})
}

// buttonNames are the short names of the tally's buttons, where the
// catalogue's name is too long for a button in gloves' reach.
var buttonNames = map[string]string{
	"pet_tinted": "PET tinted", "pet_colour_other": "PET other", "pet_opaque": "PET opaque",
	"pet_thermoform": "PET trays", "other_resin": "Code 7", "closures": "Closures",
	"labels": "Labels", "film": "Film, bags", "paper": "Paper", "liquid": "Liquid", "fines": "Fines, dirt",
}

// tallyName is a category's name on its button: "PET clear" rather than
// "PET bottles, clear".
func tallyName(c assess.Category) string {
	if n, ok := buttonNames[c.Key]; ok {
		return n
	}
	n := shortName(c)
	if rest, ok := strings.CutPrefix(n, "PET bottles, "); ok {
		return "PET " + rest
	}
	return n
}

// grid lays n cells in rows of as many columns of at least minDp as fit,
// 8 dp apart.
func grid(gtx layout.Context, n int, minDp unit.Dp, cell func(gtx layout.Context, i int) layout.Dimensions) layout.Dimensions {
	gap := gtx.Dp(kit.SpacingDp)
	cols := max(1, (gtx.Constraints.Max.X+gap)/(gtx.Dp(minDp)+gap))
	w := (gtx.Constraints.Max.X - (cols-1)*gap) / cols
	var rows []layout.FlexChild
	for r := 0; r*cols < n; r++ {
		r := r
		rows = append(rows, layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			var cs []layout.FlexChild
			for c := 0; c < cols && r*cols+c < n; c++ {
				i := r*cols + c
				if c > 0 {
					cs = append(cs, layout.Rigid(layout.Spacer{Width: kit.SpacingDp}.Layout))
				}
				cs = append(cs, layout.Rigid(func(gtx layout.Context) layout.Dimensions {
					gtx.Constraints.Min.X, gtx.Constraints.Max.X = w, w
					return cell(gtx, i)
				}))
			}
			return layout.Flex{}.Layout(gtx, cs...)
		}))
		if (r+1)*cols < n {
			rows = append(rows, layout.Rigid(layout.Spacer{Height: kit.SpacingDp}.Layout))
		}
	}
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx, rows...)
}
