package ui

import (
	"fmt"
	"image"
	"strings"

	"gioui.org/layout"
	"gioui.org/widget"

	"baleassay/data/desk"
	"baleassay/data/record"
	"baleassay/ui/kit"
	"baleassay/ui/theme"
)

// sitesScreen: the searchable list of sites, the nearest ones to a point
// typed or pasted, and a site's recent bales with their verdicts.
type sitesScreen struct {
	search  *kit.Field
	coords  *kit.Field
	findBtn widget.Clickable
	recvBtn widget.Clickable
	newBtn  widget.Clickable
	fixBtn  widget.Clickable
	form    *newSiteForm
	rows    clicks
	near    clicks
	bales   clicks
	list    widget.List
	bList   widget.List
}

func newSitesScreen() *sitesScreen {
	s := &sitesScreen{search: kit.NewField(), coords: kit.NewField(), rows: clicks{}, near: clicks{}, bales: clicks{}, form: newNewSiteForm()}
	s.list.Axis = layout.Vertical
	s.bList.Axis = layout.Vertical
	return s
}

// Layout draws the screen and returns the user's actions.
func (s *sitesScreen) Layout(gtx layout.Context, a *App) ([]Action, layout.Dimensions) {
	th := a.th
	var acts []Action
	if submitted(gtx, s.coords) || s.findBtn.Clicked(gtx) {
		acts = append(acts, s.find()...)
	}
	if s.newBtn.Clicked(gtx) {
		where := ""
		if _, _, err := desk.ParseCoords(s.coords.Text()); err == nil {
			where = s.coords.Text()
		}
		s.form.start(where)
	}
	if s.fixBtn.Clicked(gtx) {
		for _, r := range a.m.sites.Value {
			if r.ID == a.m.site {
				s.form.correct(r)
			}
		}
	}
	if s.form.open {
		acts = append(acts, s.form.update(gtx, a)...)
	}
	if s.recvBtn.Clicked(gtx) && !a.m.site.IsZero() {
		acts = append(acts, ReceiveAt{Site: a.m.site})
	}
	for _, cs := range []clicks{s.rows, s.near} {
		for id, c := range cs {
			if c.Clicked(gtx) {
				s.form.open = false
				acts = append(acts, SelectSite{ID: id})
			}
		}
	}
	for id, c := range s.bales {
		if c.Clicked(gtx) {
			acts = append(acts, OpenBale{ID: id, Screen: ScreenOutcome})
		}
	}
	left := func(gtx layout.Context) layout.Dimensions { return s.layoutSites(gtx, a) }
	right := func(gtx layout.Context) layout.Dimensions {
		if s.form.open {
			return s.form.Layout(gtx, th)
		}
		return s.layoutBales(gtx, a)
	}
	return acts, columns(gtx, th, left, right)
}

// columns lays two panes side by side, or one above the other when the
// window is narrow (portrait).
func columns(gtx layout.Context, th *theme.Theme, left, right layout.Widget) layout.Dimensions {
	return columnsW(gtx, 0.45, left, right)
}

// columnsW is columns with the left pane's share of the width.
func columnsW(gtx layout.Context, share float32, left, right layout.Widget) layout.Dimensions {
	natural := func(w layout.Widget) layout.Widget {
		return func(gtx layout.Context) layout.Dimensions {
			gtx.Constraints.Min = image.Point{}
			return w(gtx)
		}
	}
	left, right = natural(left), natural(right)
	if gtx.Constraints.Max.X < gtx.Dp(1000) {
		return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
			layout.Flexed(1, left), vgap(12), layout.Flexed(1, right))
	}
	return layout.Flex{}.Layout(gtx,
		layout.Flexed(share, left),
		layout.Rigid(layout.Spacer{Width: 16}.Layout),
		layout.Flexed(1-share, right))
}

func (s *sitesScreen) find() []Action {
	lat, lon, err := desk.ParseCoords(s.coords.Text())
	if err != nil {
		s.coords.Problem = errText(err)
		return nil
	}
	s.coords.Problem = ""
	return []Action{FindNear{Lat: lat, Lon: lon}}
}

func (s *sitesScreen) layoutSites(gtx layout.Context, a *App) layout.Dimensions {
	th := a.th
	q := strings.ToLower(strings.TrimSpace(s.search.Text()))
	var shown []desk.SiteRow
	for _, r := range a.m.sites.Value {
		if q == "" || strings.Contains(strings.ToLower(r.Site.Name), q) {
			shown = append(shown, r)
		}
	}
	hits := a.m.near.Value
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			return layout.Flex{Alignment: layout.Middle}.Layout(gtx,
				layout.Flexed(1, title(th, "Pickup sites")),
				layout.Rigid(kit.Button{Th: th, Click: &s.newBtn, Text: "New site"}.Layout))
		}),
		vgap(8),
		layout.Rigid(kit.FieldStyle{Th: th, F: s.search, Label: "Find a site by name", Hint: "part of the name", Width: 300}.Layout),
		vgap(8),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			return layout.Flex{Alignment: layout.End}.Layout(gtx,
				layout.Rigid(kit.FieldStyle{Th: th, F: s.coords, Label: "Nearest to (latitude, longitude in degrees)", Hint: "e.g. 45.07, 4.71", Width: 240}.Layout),
				layout.Rigid(layout.Spacer{Width: 8}.Layout),
				layout.Rigid(func(gtx layout.Context) layout.Dimensions {
					if s.coords.Problem != "" {
						return layout.Dimensions{}
					}
					return kit.Button{Th: th, Click: &s.findBtn, Text: "Find nearest"}.Layout(gtx)
				}),
			)
		}),
		vgap(8),
		layout.Flexed(1, func(gtx layout.Context) layout.Dimensions {
			n := len(hits) + len(shown) + 1
			return s.list.Layout(gtx, n, func(gtx layout.Context, i int) layout.Dimensions {
				if i < len(hits) {
					h := hits[i]
					return s.siteRow(gtx, a, s.near.of(h.ID), h.ID, h.Name, fmt.Sprintf("%.1f km away", h.Km), true)
				}
				i -= len(hits)
				if i == 0 {
					label := fmt.Sprintf("All sites (%d)", len(shown))
					if q != "" {
						label = fmt.Sprintf("Sites matching “%s” (%d)", s.search.Text(), len(shown))
					}
					return layout.Inset{Top: 6, Bottom: 4}.Layout(gtx, heading(th, label))
				}
				r := shown[i-1]
				return s.siteRow(gtx, a, s.rows.of(r.ID), r.ID, r.Site.Name, fmt.Sprintf("%s · %.4f, %.4f", r.Site.Kind, r.Site.Lat, r.Site.Lon), false)
			})
		}),
	)
}

func (s *sitesScreen) siteRow(gtx layout.Context, a *App, c *widget.Clickable, id record.EntityID, name, sub string, nearHit bool) layout.Dimensions {
	role := kit.RoleNormal
	if id == a.m.site {
		role = kit.RoleSelected
	}
	if nearHit {
		name = "Near: " + name
	}
	return layout.Inset{Bottom: 8}.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
		gtx.Constraints.Min.X = gtx.Constraints.Max.X
		return kit.Button{Th: a.th, Click: c, Text: name, Sub: sub, Role: role}.Layout(gtx)
	})
}

func (s *sitesScreen) layoutBales(gtx layout.Context, a *App) layout.Dimensions {
	th := a.th
	if a.m.site.IsZero() {
		return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
			layout.Rigid(heading(th, "Recent bales")),
			vgap(8),
			layout.Rigid(body(th, "Choose a site on the left to see its recent bales and receive a new one; a site not listed yet: New site.")))
	}
	rows := a.m.bales.Value
	name := a.m.siteName(a.m.site)
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			return layout.Flex{Alignment: layout.Middle}.Layout(gtx,
				layout.Flexed(1, heading(th, "Recent bales from "+name)),
				layout.Rigid(kit.Button{Th: th, Click: &s.fixBtn, Text: "Correct site"}.Layout),
				layout.Rigid(kit.Gap(kit.SpacingDp)),
				layout.Rigid(kit.Button{Th: th, Click: &s.recvBtn, Text: "Receive a bale here", Role: kit.RolePrimary}.Layout),
			)
		}),
		vgap(8),
		layout.Flexed(1, func(gtx layout.Context) layout.Dimensions {
			if len(rows) == 0 {
				return body(th, "No bales from this site yet.")(gtx)
			}
			return s.bList.Layout(gtx, len(rows), func(gtx layout.Context, i int) layout.Dimensions {
				r := rows[len(rows)-1-i] // newest first
				return layout.Inset{Bottom: 8}.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
					return baleRowButton(gtx, a, s.bales.of(r.ID), r)
				})
			})
		}),
	)
}

// baleRowButton is a bale as a wide button: tag, date, mass, pulls, the
// target-PET estimate and the verdict badge.
func baleRowButton(gtx layout.Context, a *App, c *widget.Clickable, r desk.BaleRow) layout.Dimensions {
	th := a.th
	tag := r.Bale.Tag
	if tag == "" {
		tag = "bale " + r.ID.String()[len(r.ID.String())-8:]
	}
	sub := fmt.Sprintf("%s · %s gross · %s", day(r.Bale.ReceivedMs), mass(a.cfg.Unit, r.Bale.GrossKg, 0), desk.Plural(r.Pulls, "pull", "pulls"))
	if r.Audit.State == desk.AuditDone {
		sub += " · PET " + pct(r.Audit.TargetPET.Fraction, 1) + " of the bale"
	}
	return c.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
		gtx.Constraints.Min.X = gtx.Constraints.Max.X
		return kit.Row{Th: th, Focused: gtx.Focused(c), Label: tag}.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
			return layout.Flex{Alignment: layout.Middle}.Layout(gtx,
				layout.Flexed(1, func(gtx layout.Context) layout.Dimensions {
					return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
						layout.Rigid(kit.Text{Th: th, Text: tag, Bold: true, Color: th.Pal.Text}.Layout),
						layout.Rigid(muted(th, sub)))
				}),
				layout.Rigid(func(gtx layout.Context) layout.Dimensions {
					switch {
					case r.Audit.HasVerdict:
						return kit.Badge{Th: th, Kind: badgeOf(r.Audit.Verdict), Word: verdictWord(r.Audit.Verdict), Size: theme.SizeSmall}.Layout(gtx)
					case r.Audit.State == desk.AuditNoPulls:
						return muted(th, "no pulls yet")(gtx)
					}
					return muted(th, "no verdict")(gtx)
				}),
			)
		})
	})
}
