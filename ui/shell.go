package ui

import (
	"image"
	"image/color"

	"gioui.org/io/event"
	"gioui.org/io/pointer"
	"gioui.org/layout"
	"gioui.org/op"
	"gioui.org/op/clip"
	"gioui.org/widget/material"

	"baleassay/data/desk"
	"baleassay/ui/kit"
	"baleassay/ui/theme"
)

// layoutBar draws the screen tabs and the settings on the right.
func (a *App) layoutBar(gtx layout.Context) (layout.Dimensions, []Action) {
	th := a.th
	var acts []Action
	for _, s := range Screens() {
		if a.tabs[s].Clicked(gtx) {
			acts = append(acts, GoTo{Screen: s})
		}
	}
	if a.helpBtn.Clicked(gtx) {
		acts = append(acts, ToggleHelp{})
	}
	if a.modeBtn.Clicked(gtx) || a.modeBtn2.Clicked(gtx) {
		acts = append(acts, SetMode{Mode: otherMode(th.Mode)})
	}
	if a.scaleBtn.Clicked(gtx) {
		next := nextScale(th.Scale, +1)
		if next == th.Scale {
			next = theme.Scales[0]
		}
		acts = append(acts, SetScale{Scale: next})
	}
	if a.unitBtn.Clicked(gtx) {
		u := desk.UnitLb
		if a.cfg.Unit == desk.UnitLb {
			u = desk.UnitKg
		}
		acts = append(acts, SetMassUnit{Unit: u})
	}
	wide := gtx.Constraints.Max.X >= gtx.Dp(1500)
	m := op.Record(gtx.Ops)
	dims := layout.Inset{Left: 12, Right: 12, Top: 8, Bottom: 8}.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
		var kids []layout.FlexChild
		for _, s := range Screens() {
			role := kit.RoleNormal
			if s == a.screen {
				role = kit.RoleSelected
			}
			hint := ""
			if wide {
				hint = "Ctrl+" + string(screenKey(s))
			}
			kids = append(kids, layout.Rigid(kit.Button{Th: th, Click: &a.tabs[s], Text: s.Title(), Hint: hint, Role: role}.Layout),
				layout.Rigid(kit.Gap(kit.SpacingDp)))
		}
		kids = append(kids, layout.Flexed(1, func(gtx layout.Context) layout.Dimensions {
			return layout.Dimensions{Size: image.Pt(gtx.Constraints.Min.X, 0)}
		}))
		contrast := "Sunlight: off"
		if th.Mode == theme.HighContrast {
			contrast = "Sunlight: on"
		}
		kids = append(kids,
			layout.Rigid(kit.Button{Th: th, Click: &a.modeBtn, Text: contrast, Hint: hintIf(wide, "Ctrl+H")}.Layout),
			layout.Rigid(kit.Gap(kit.SpacingDp)),
			layout.Rigid(kit.Button{Th: th, Click: &a.helpBtn, Text: "Keys, settings", Hint: "F1"}.Layout))
		return layout.Flex{Alignment: layout.Middle}.Layout(gtx, kids...)
	})
	call := m.Stop()
	kit.Fill(gtx, th.Pal.Surface, dims.Size, 0)
	kit.Fill(gtx, th.Pal.Border, image.Pt(dims.Size.X, gtx.Dp(1)), 0)
	off := op.Offset(image.Pt(0, dims.Size.Y-gtx.Dp(2))).Push(gtx.Ops)
	kit.Fill(gtx, th.Pal.Border, image.Pt(dims.Size.X, gtx.Dp(2)), 0)
	off.Pop()
	call.Add(gtx.Ops)
	return dims, acts
}

// settingsRow is the settings in the help overlay: mass unit, sunlight
// colours, text size, and where the records are.
func (a *App) settingsRow(gtx layout.Context) layout.Dimensions {
	th := a.th
	contrast := "Sunlight colours: off"
	if th.Mode == theme.HighContrast {
		contrast = "Sunlight colours: on"
	}
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
		layout.Rigid(kit.Text{Th: th, Text: "Settings", Size: theme.SizeTitle - 4, Bold: true, Color: th.Pal.Text}.Layout),
		vgap(6),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			return layout.Flex{Alignment: layout.Middle}.Layout(gtx,
				layout.Rigid(kit.Button{Th: th, Click: &a.unitBtn, Text: "Masses in " + a.cfg.Unit.String()}.Layout),
				layout.Rigid(kit.Gap(kit.SpacingDp)),
				layout.Rigid(kit.Button{Th: th, Click: &a.modeBtn2, Text: contrast, Hint: "Ctrl+H"}.Layout),
				layout.Rigid(kit.Gap(kit.SpacingDp)),
				layout.Rigid(kit.Button{Th: th, Click: &a.scaleBtn, Text: "Text size " + theme.ScaleLabel(th.Scale)}.Layout))
		}),
		vgap(6),
		layout.Rigid(kit.Text{Th: th, Text: a.storeNote(), Color: th.Pal.Muted, Size: theme.SizeSmall}.Layout),
		vgap(12),
	)
}

func hintIf(ok bool, h string) string {
	if ok {
		return h
	}
	return ""
}

// storeNote says which records the app shows.
func (a *App) storeNote() string {
	switch {
	case a.cfg.Desk == nil:
		return ""
	case a.cfg.Demo:
		return "Records: the demo store (invented data)."
	}
	return "Records: " + a.cfg.Desk.Dir()
}

// layoutHelp draws the list of keys over the screen.
func (a *App) layoutHelp(gtx layout.Context) []Action {
	th := a.th
	var acts []Action
	if a.closeHelp.Clicked(gtx) {
		acts = append(acts, CloseHelp{})
	}
	// dim the screen behind
	scrim := th.Pal.Text
	scrim.A = 0x99
	kit.Fill(gtx, color.NRGBA(scrim), gtx.Constraints.Max, 0)
	// swallow pointer presses so the screen behind cannot be clicked
	area := clip.Rect{Max: gtx.Constraints.Max}.Push(gtx.Ops)
	event.Op(gtx.Ops, &a.helpList)
	for {
		if _, ok := gtx.Event(pointer.Filter{Target: &a.helpList, Kinds: pointer.Press | pointer.Release}); !ok {
			break
		}
	}
	area.Pop()
	rows := append(globalShortcuts(), a.screenShortcuts()...)
	layout.Center.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
		w := gtx.Dp(820)
		if w > gtx.Constraints.Max.X-gtx.Dp(24) {
			w = gtx.Constraints.Max.X - gtx.Dp(24)
		}
		gtx.Constraints.Min.X, gtx.Constraints.Max.X = w, w
		gtx.Constraints.Max.Y -= gtx.Dp(24)
		m := op.Record(gtx.Ops)
		dims := layout.UniformInset(20).Layout(gtx, func(gtx layout.Context) layout.Dimensions {
			return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
				layout.Rigid(func(gtx layout.Context) layout.Dimensions {
					return layout.Flex{Alignment: layout.Middle}.Layout(gtx,
						layout.Flexed(1, kit.Text{Th: th, Text: "Keys and settings", Size: theme.SizeTitle, Bold: true, Color: th.Pal.Text}.Layout),
						layout.Rigid(kit.Button{Th: th, Click: &a.closeHelp, Text: "Close", Hint: "Esc"}.Layout),
					)
				}),
				layout.Rigid(kit.Gap(kit.SpacingDp)),
				layout.Flexed(1, func(gtx layout.Context) layout.Dimensions {
					return material.List(th.Material(), &a.helpList).Layout(gtx, len(rows)+1, func(gtx layout.Context, i int) layout.Dimensions {
						if i == 0 {
							return a.settingsRow(gtx)
						}
						r := rows[i-1]
						return layout.Inset{Bottom: 6}.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
							return layout.Flex{}.Layout(gtx,
								layout.Rigid(func(gtx layout.Context) layout.Dimensions {
									gtx.Constraints.Min.X = gtx.Dp(210)
									gtx.Constraints.Max.X = gtx.Dp(210)
									return kit.Text{Th: th, Text: r.Keys, Bold: true, Mono: true, Color: th.Pal.Text}.Layout(gtx)
								}),
								layout.Flexed(1, kit.Text{Th: th, Text: r.What + whereSuffix(r.Where), Color: th.Pal.Text}.Layout),
							)
						})
					})
				}),
			)
		})
		call := m.Stop()
		kit.Fill(gtx, th.Pal.Surface, dims.Size, gtx.Dp(8))
		kit.Outline(gtx, th.Pal.Border, dims.Size, gtx.Dp(8), gtx.Dp(2))
		call.Add(gtx.Ops)
		return dims
	})
	return acts
}

func whereSuffix(w string) string {
	if w == "" || w == "everywhere" {
		return ""
	}
	return " (" + w + ")"
}

// screenShortcuts are the keys of the screen shown.
func (a *App) screenShortcuts() []Shortcut {
	if a.screen == ScreenTally {
		return tallyShortcuts()
	}
	return nil
}
