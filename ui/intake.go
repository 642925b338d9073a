package ui

import (
	"fmt"

	"gioui.org/layout"
	"gioui.org/widget"

	"baleassay/data/desk"
	"baleassay/data/record"
	"baleassay/ui/kit"
	"baleassay/ui/theme"
)

// intakeScreen: a new bale for a site — gross mass, sides with the
// density, tag, the grader and the spec to grade against.
type intakeScreen struct {
	site               record.EntityID
	siteName           string
	gross, l, w, h     *kit.Field
	tag, grader        *kit.Field
	spec               string
	specBtns           map[string]*widget.Clickable
	saveBtn, anywayBtn widget.Clickable
	chooseSite         widget.Clickable
	checks             []desk.Check // a save asked to confirm these
	problem            string       // a save was refused: why
}

func newIntakeScreen() *intakeScreen {
	s := &intakeScreen{gross: kit.NewField(), l: kit.NewField(), w: kit.NewField(), h: kit.NewField(),
		tag: kit.NewField(), grader: kit.NewField(), specBtns: map[string]*widget.Clickable{}, spec: desk.DefaultSpec}
	return s
}

func (s *intakeScreen) setSite(id record.EntityID, name string) {
	s.site, s.siteName = id, name
}

// saved clears the form after a bale was saved.
func (s *intakeScreen) saved() {
	for _, f := range []*kit.Field{s.gross, s.l, s.w, s.h, s.tag} {
		f.SetText("")
		f.Problem = ""
	}
	s.checks, s.problem = nil, ""
}

// read turns the form into a bale, setting each bad field's sentence.
func (s *intakeScreen) read(u desk.Unit) (desk.BaleInput, bool) {
	ok := true
	in := desk.BaleInput{Site: s.site.String()}
	m, err := desk.ParseMass(s.gross.Text(), u)
	s.gross.Problem = errText(err)
	ok = ok && err == nil
	in.GrossKg = m.Kg
	for _, x := range []struct {
		f   *kit.Field
		dst *float64
	}{{s.l, &in.LengthM}, {s.w, &in.WidthM}, {s.h, &in.HeightM}} {
		v, err := desk.ParseLength(x.f.Text())
		x.f.Problem = errText(err)
		ok = ok && err == nil
		*x.dst = v
	}
	in.Tag, in.Grader, in.Spec = s.tag.Text(), s.grader.Text(), s.spec
	return in, ok
}

// Layout draws the form and returns the user's actions.
func (s *intakeScreen) Layout(gtx layout.Context, a *App) ([]Action, layout.Dimensions) {
	th := a.th
	var acts []Action
	if submitted(gtx, s.gross, s.l, s.w, s.h, s.tag, s.grader) || s.saveBtn.Clicked(gtx) {
		if in, ok := s.read(a.cfg.Unit); ok && !s.site.IsZero() {
			acts = append(acts, SaveBale{In: in})
		}
	}
	if s.anywayBtn.Clicked(gtx) {
		if in, ok := s.read(a.cfg.Unit); ok && !s.site.IsZero() {
			acts = append(acts, SaveBale{In: in, Confirm: true})
		}
	}
	if s.chooseSite.Clicked(gtx) {
		acts = append(acts, GoTo{Screen: ScreenSites})
	}
	for name, b := range s.specBtns {
		if b.Clicked(gtx) {
			s.spec = name
		}
	}
	if err := a.m.saveBale.Err; err != nil && !a.m.saveBale.Busy {
		s.checks, s.problem = nil, ""
		if ce, ok := isConfirm(err); ok {
			s.checks = ce.Checks
		} else {
			s.problem = errText(err)
		}
	}
	// the live density, from the desk
	var prev desk.BalePreview
	if in, _ := s.peek(a.cfg.Unit); in.GrossKg > 0 {
		prev = desk.PreviewBale(in.BaleRecord)
	}
	if s.site.IsZero() {
		return acts, layout.Flex{Axis: layout.Vertical}.Layout(gtx,
			layout.Rigid(title(th, "Receive a bale")),
			vgap(12),
			layout.Rigid(body(th, "First choose the site the bale comes from.")),
			vgap(8),
			layout.Rigid(kit.Button{Th: th, Click: &s.chooseSite, Text: "Choose a site", Hint: "Ctrl+1", Role: kit.RolePrimary}.Layout))
	}
	u := a.cfg.Unit.String()
	return acts, layout.Flex{Axis: layout.Vertical}.Layout(gtx,
		layout.Rigid(title(th, "Receive a bale from "+s.siteName)),
		vgap(4),
		layout.Rigid(muted(th, "Type each value, Tab to the next; Enter receives the bale.")),
		vgap(12),
		layout.Rigid(kit.FieldStyle{Th: th, F: s.gross, Label: "Gross mass of the bale, as weighed (" + u + ")", Unit: u, Width: 200}.Layout),
		vgap(10),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			return layout.Flex{}.Layout(gtx,
				layout.Rigid(kit.FieldStyle{Th: th, F: s.l, Label: "Length (m)", Unit: "m", Width: 120}.Layout),
				layout.Rigid(layout.Spacer{Width: 16}.Layout),
				layout.Rigid(kit.FieldStyle{Th: th, F: s.w, Label: "Width (m)", Unit: "m", Width: 120}.Layout),
				layout.Rigid(layout.Spacer{Width: 16}.Layout),
				layout.Rigid(kit.FieldStyle{Th: th, F: s.h, Label: "Height (m)", Unit: "m", Width: 120}.Layout),
			)
		}),
		vgap(6),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions { return densityLine(gtx, th, prev) }),
		vgap(10),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			return layout.Flex{}.Layout(gtx,
				layout.Rigid(kit.FieldStyle{Th: th, F: s.tag, Label: "Bale tag", Hint: "as written on the bale", Width: 220}.Layout),
				layout.Rigid(layout.Spacer{Width: 16}.Layout),
				layout.Rigid(kit.FieldStyle{Th: th, F: s.grader, Label: "Grader", Hint: "your name", Width: 220}.Layout),
			)
		}),
		vgap(10),
		layout.Rigid(body(th, "Grade against the spec:")),
		vgap(4),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions { return s.specRow(gtx, th, a.m.specs) }),
		vgap(12),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions { return s.saveRow(gtx, th) }),
	)
}

// peek reads the form without marking problems (for the live density).
func (s *intakeScreen) peek(u desk.Unit) (desk.BaleInput, bool) {
	var in desk.BaleInput
	m, err := desk.ParseMass(s.gross.Text(), u)
	in.GrossKg = m.Kg
	l, e1 := desk.ParseLength(s.l.Text())
	w, e2 := desk.ParseLength(s.w.Text())
	h, e3 := desk.ParseLength(s.h.Text())
	in.LengthM, in.WidthM, in.HeightM = l, w, h
	return in, err == nil && e1 == nil && e2 == nil && e3 == nil
}

func densityLine(gtx layout.Context, th *theme.Theme, p desk.BalePreview) layout.Dimensions {
	if p.DensityKgM3 <= 0 {
		return muted(th, "Density: give the mass and all three sides.")(gtx)
	}
	line := fmt.Sprintf("Density %.0f kg/m³ (volume %.2f m³)", p.DensityKgM3, p.VolumeM3)
	if len(p.Checks) == 0 {
		return kit.Text{Th: th, Text: line, Bold: true, Color: th.Pal.Text}.Layout(gtx)
	}
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
		layout.Rigid(kit.Text{Th: th, Text: line, Bold: true, Color: th.Pal.Text}.Layout),
		layout.Rigid(kit.Problem{Th: th, Text: p.Checks[0].Message}.Layout))
}

func (s *intakeScreen) specRow(gtx layout.Context, th *theme.Theme, specs []string) layout.Dimensions {
	var kids []layout.FlexChild
	for _, name := range specs {
		b, ok := s.specBtns[name]
		if !ok {
			b = new(widget.Clickable)
			s.specBtns[name] = b
		}
		role := kit.RoleNormal
		if name == s.spec {
			role = kit.RoleSelected
		}
		kids = append(kids, layout.Rigid(kit.Button{Th: th, Click: b, Text: name, Role: role}.Layout), layout.Rigid(kit.Gap(kit.SpacingDp)))
	}
	return layout.Flex{}.Layout(gtx, kids...)
}

func (s *intakeScreen) saveRow(gtx layout.Context, th *theme.Theme) layout.Dimensions {
	kids := []layout.FlexChild{layout.Rigid(kit.Button{Th: th, Click: &s.saveBtn, Text: "Receive bale", Hint: "Enter", Role: kit.RolePrimary}.Layout)}
	if s.problem != "" {
		kids = append(kids, layout.Rigid(layout.Spacer{Width: 12}.Layout), layout.Flexed(1, kit.Problem{Th: th, Text: s.problem}.Layout))
	}
	row := layout.Flex{Alignment: layout.Middle}
	if len(s.checks) == 0 {
		return row.Layout(gtx, kids...)
	}
	var msgs []layout.FlexChild
	for _, c := range s.checks {
		msgs = append(msgs, layout.Rigid(kit.Problem{Th: th, Text: c.Message}.Layout), vgap(4))
	}
	msgs = append(msgs, layout.Rigid(kit.Button{Th: th, Click: &s.anywayBtn, Text: "The values are right: receive it anyway"}.Layout))
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx, msgs...)
}
