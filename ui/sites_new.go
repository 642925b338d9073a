package ui

import (
	"strconv"
	"strings"

	"gioui.org/layout"
	"gioui.org/widget"

	"baleassay/data/desk"
	"baleassay/data/record"
	"baleassay/ui/kit"
	"baleassay/ui/theme"
)

// newSiteForm: a pickup site the store does not know yet, made where the
// grader stands — its name, its position typed or pasted as "latitude,
// longitude", and what kind of place it is — or a correction of a known
// one (a new value that supersedes it; the old stays in its history). A
// site close to another, or of another's name, asks to be confirmed, as
// a light bale does.
type newSiteForm struct {
	open        bool
	editing     record.EntityID // the site corrected; zero for a new one
	name, where *kit.Field
	kind        record.SiteKind
	kindBtns    [len(siteKinds)]widget.Clickable
	saveBtn     widget.Clickable
	anywayBtn   widget.Clickable
	cancelBtn   widget.Clickable
	checks      []desk.Check // a save asked to confirm these
	problem     string       // a save was refused: why
	waiting     bool         // a save was asked for; its answer is not read yet
}

// siteKinds are the kinds offered, in the order shown.
var siteKinds = [...]record.SiteKind{record.SiteYard, record.SiteMRF, record.SiteDepot, record.SiteSupplier, record.SiteOther}

// siteKindWords names a kind on its button.
var siteKindWords = map[record.SiteKind]string{
	record.SiteYard: "Yard", record.SiteMRF: "Sorting plant (MRF)", record.SiteDepot: "Depot",
	record.SiteSupplier: "Supplier", record.SiteOther: "Other",
}

func newNewSiteForm() *newSiteForm {
	return &newSiteForm{name: kit.NewField(), where: kit.NewField(), kind: record.SiteYard}
}

// start opens the form, with the position of the nearest-site search
// when one was typed.
func (f *newSiteForm) start(where string) {
	if !f.editing.IsZero() { // leaving a correction: start afresh
		f.saved()
	}
	f.open, f.checks, f.problem, f.waiting = true, nil, "", false
	if strings.TrimSpace(f.where.Text()) == "" {
		f.where.SetText(where)
	}
}

// correct opens the form on a known site's current value.
func (f *newSiteForm) correct(r desk.SiteRow) {
	f.saved()
	f.open, f.editing, f.kind = true, r.ID, r.Site.Kind
	f.name.SetText(r.Site.Name)
	f.where.SetText(coordsText(r.Site.Lat, r.Site.Lon))
}

// saved closes and clears the form after the site was saved.
func (f *newSiteForm) saved() {
	for _, x := range []*kit.Field{f.name, f.where} {
		x.SetText("")
		x.Problem = ""
	}
	f.open, f.checks, f.problem, f.kind, f.editing, f.waiting = false, nil, "", record.SiteYard, record.EntityID{}, false
}

// read turns the form into a site, setting each bad field's sentence.
func (f *newSiteForm) read() (record.SiteRecord, bool) {
	s := record.SiteRecord{Name: strings.TrimSpace(f.name.Text()), Kind: f.kind}
	f.name.Problem = ""
	if s.Name == "" {
		f.name.Problem = "Give the site a name, as people there call it."
	}
	lat, lon, err := desk.ParseCoords(f.where.Text())
	f.where.Problem = errText(err)
	s.Lat, s.Lon = lat, lon
	return s, s.Name != "" && err == nil
}

// update handles the form's input and returns its actions.
func (f *newSiteForm) update(gtx layout.Context, a *App) []Action {
	var acts []Action
	save := func(confirm bool) {
		s, ok := f.read()
		switch {
		case !ok:
		case f.editing.IsZero():
			acts, f.waiting = append(acts, AddSite{Site: s, Confirm: confirm}), true
		default:
			acts, f.waiting = append(acts, CorrectSite{ID: f.editing, Site: s, Confirm: confirm}), true
		}
	}
	if submitted(gtx, f.name, f.where) || f.saveBtn.Clicked(gtx) {
		save(false)
	}
	if f.anywayBtn.Clicked(gtx) {
		save(true)
	}
	if f.cancelBtn.Clicked(gtx) {
		f.open = false
	}
	for i := range f.kindBtns {
		if f.kindBtns[i].Clicked(gtx) {
			f.kind = siteKinds[i]
		}
	}
	if f.waiting && !a.m.saveSite.Busy && a.m.saveSite.Has { // this form's save answered
		f.waiting, f.checks, f.problem = false, nil, ""
		if ce, ok := isConfirm(a.m.saveSite.Err); ok {
			f.checks = ce.Checks
		} else if a.m.saveSite.Err != nil {
			f.problem = errText(a.m.saveSite.Err)
		}
	}
	return acts
}

// Layout draws the form.
func (f *newSiteForm) Layout(gtx layout.Context, th *theme.Theme) layout.Dimensions {
	head, help := "New pickup site", "Type each value, Tab to the next; Enter saves the site."
	if !f.editing.IsZero() {
		head, help = "Correct this site", "Change what is wrong; Enter saves the correction. The earlier value stays in the site's history."
	}
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
		layout.Rigid(heading(th, head)),
		vgap(4),
		layout.Rigid(muted(th, help)),
		vgap(10),
		layout.Rigid(kit.FieldStyle{Th: th, F: f.name, Label: "Name of the site", Hint: "e.g. Furze Hill Yard", Width: 320}.Layout),
		vgap(10),
		layout.Rigid(kit.FieldStyle{Th: th, F: f.where, Label: "Position (latitude, longitude in degrees)", Hint: "e.g. 45.07, 4.71", Width: 240}.Layout),
		vgap(10),
		layout.Rigid(body(th, "Kind of place:")),
		vgap(4),
		layout.Rigid(f.kindRow(th)),
		vgap(12),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions { return f.saveRow(gtx, th) }),
	)
}

func (f *newSiteForm) kindRow(th *theme.Theme) layout.Widget {
	return func(gtx layout.Context) layout.Dimensions {
		var kids []layout.FlexChild
		for i, k := range siteKinds {
			role := kit.RoleNormal
			if k == f.kind {
				role = kit.RoleSelected
			}
			kids = append(kids, layout.Rigid(kit.Button{Th: th, Click: &f.kindBtns[i], Text: siteKindWords[k], Role: role}.Layout), layout.Rigid(kit.Gap(kit.SpacingDp)))
		}
		return layout.Flex{}.Layout(gtx, kids...)
	}
}

func (f *newSiteForm) saveRow(gtx layout.Context, th *theme.Theme) layout.Dimensions {
	var rows []layout.FlexChild
	if f.problem != "" {
		rows = append(rows, layout.Rigid(kit.Problem{Th: th, Text: f.problem}.Layout), vgap(6))
	}
	for _, c := range f.checks {
		rows = append(rows, layout.Rigid(kit.Problem{Th: th, Text: c.Message}.Layout), vgap(4))
	}
	if len(f.checks) > 0 {
		rows = append(rows, layout.Rigid(kit.Button{Th: th, Click: &f.anywayBtn, Text: "The values are right: save the site anyway"}.Layout), vgap(8))
	}
	rows = append(rows, layout.Rigid(func(gtx layout.Context) layout.Dimensions {
		return layout.Flex{Alignment: layout.Middle}.Layout(gtx,
			layout.Rigid(kit.Button{Th: th, Click: &f.saveBtn, Text: f.saveWord(), Hint: "Enter", Role: kit.RolePrimary}.Layout),
			layout.Rigid(kit.Gap(kit.SpacingDp)),
			layout.Rigid(kit.Button{Th: th, Click: &f.cancelBtn, Text: "Cancel"}.Layout))
	}))
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx, rows...)
}

func (f *newSiteForm) saveWord() string {
	if f.editing.IsZero() {
		return "Save site"
	}
	return "Save correction"
}

// coordsText writes a position as the form reads it, digits enough to
// read back the same numbers (a correction that leaves the position
// alone does not move the site).
func coordsText(lat, lon float64) string {
	return strconv.FormatFloat(lat, 'f', -1, 64) + ", " + strconv.FormatFloat(lon, 'f', -1, 64)
}
