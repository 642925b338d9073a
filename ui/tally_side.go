package ui

import (
	"fmt"

	"gioui.org/layout"
	"gioui.org/unit"

	"baleassay/assess"
	"baleassay/data/desk"
	"baleassay/data/record"
	"baleassay/ui/kit"
	"baleassay/ui/theme"
)

// side shows the pull's fractions with undo, save and discard, what the
// last save said, and the bale's saved pulls, each correctable.
func (s *tallyScreen) side(gtx layout.Context, a *App, p record.PullRecord) layout.Dimensions {
	th := a.th
	u := a.cfg.Unit
	rows := a.m.pulls.Value
	var problem string
	var checks []desk.Check
	if err := a.m.savePull.Err; err != nil && !a.m.savePull.Busy {
		if ce, ok := isConfirm(err); ok {
			checks = ce.Checks
		} else {
			problem = errText(err)
		}
	}
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
		layout.Rigid(heading(th, "This pull ("+s.label+")")),
		vgap(4),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			if len(s.entries) == 0 {
				return muted(th, "No fractions yet.")(gtx)
			}
			var kids []layout.FlexChild
			for i := len(s.entries) - 1; i >= 0 && i >= len(s.entries)-6; i-- {
				e := s.entries[i]
				kids = append(kids, layout.Rigid(kit.Text{Th: th, Text: fmt.Sprintf("%s  %s", mass(u, e.kg, 2), tallyName(assess.CategoryAt(e.cat))), Color: th.Pal.Text, MaxLines: 1}.Layout))
			}
			if len(s.entries) > 6 {
				kids = append(kids, layout.Rigid(muted(th, fmt.Sprintf("… and %d earlier", len(s.entries)-6))))
			}
			return layout.Flex{Axis: layout.Vertical}.Layout(gtx, kids...)
		}),
		vgap(8),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			ready := s.step == stepPick && len(s.entries) > 0
			save := "Save pull " + s.label
			if !s.corrects.IsZero() {
				save = "Save correction"
			}
			saveW := kit.Button{Th: th, Click: &s.saveBtn, Text: save, Hint: "Enter", Role: kit.RolePrimary, Disabled: !ready}.Layout
			undo := kit.Button{Th: th, Click: &s.undoBtn, Text: "Undo", Disabled: len(s.entries) == 0}.Layout
			drop := kit.Button{Th: th, Click: &s.dropBtn, Text: "Discard", Disabled: len(s.entries) == 0 && p.StatedKg == 0}.Layout
			if gtx.Constraints.Max.X < gtx.Dp(unit.Dp(360*th.Scale)) {
				// narrow: the save button on a row of its own
				return layout.Flex{Axis: layout.Vertical}.Layout(gtx, layout.Rigid(saveW), vgap(8),
					layout.Rigid(func(gtx layout.Context) layout.Dimensions {
						return layout.Flex{}.Layout(gtx, layout.Rigid(undo), layout.Rigid(kit.Gap(kit.SpacingDp)), layout.Rigid(drop))
					}))
			}
			return layout.Flex{}.Layout(gtx, layout.Rigid(saveW), layout.Rigid(kit.Gap(kit.SpacingDp)),
				layout.Rigid(undo), layout.Rigid(kit.Gap(kit.SpacingDp)), layout.Rigid(drop))
		}),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			var kids []layout.FlexChild
			if problem != "" {
				kids = append(kids, vgap(6), layout.Rigid(kit.Problem{Th: th, Text: problem}.Layout))
			}
			for _, c := range checks {
				kids = append(kids, vgap(6), layout.Rigid(kit.Problem{Th: th, Text: c.Message}.Layout))
			}
			if len(checks) > 0 {
				kids = append(kids, vgap(6), layout.Rigid(kit.Button{Th: th, Click: &s.anywayBtn, Text: "The figures are right: save anyway"}.Layout))
			}
			if a.m.note != "" {
				kids = append(kids, vgap(6), layout.Rigid(kit.Text{Th: th, Text: a.m.note, Bold: true, Color: th.Pal.Text}.Layout))
			}
			return layout.Flex{Axis: layout.Vertical}.Layout(gtx, kids...)
		}),
		vgap(12),
		layout.Rigid(heading(th, fmt.Sprintf("Saved pulls of this bale (%d)", len(rows)))),
		vgap(4),
		layout.Flexed(1, func(gtx layout.Context) layout.Dimensions {
			return s.list.Layout(gtx, len(rows), func(gtx layout.Context, i int) layout.Dimensions {
				r := rows[len(rows)-1-i]
				txt := fmt.Sprintf("%s  %s sorted", r.Pull.Label, mass(u, r.PartsKg(), 2))
				if r.Pull.StatedKg > 0 {
					txt = fmt.Sprintf("%s  %s of %s sorted", r.Pull.Label, mass(u, r.PartsKg(), 2), mass(u, r.Pull.StatedKg, 2))
				}
				c := s.correct.of(r.ID)
				return layout.Inset{Bottom: 6}.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
					return layout.Flex{Alignment: layout.Middle}.Layout(gtx,
						layout.Flexed(1, kit.Text{Th: th, Text: txt, Color: th.Pal.Text, Size: theme.SizeSmall + 1, MaxLines: 2}.Layout),
						layout.Rigid(kit.Button{Th: th, Click: c, Text: "Correct " + r.Pull.Label}.Layout))
				})
			})
		}),
	)
}
