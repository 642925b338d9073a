package ui

import (
	"testing"

	"gioui.org/io/key"

	"baleassay/data/desk"
	"baleassay/data/record"
	"baleassay/ui/kit"
)

// Source: invented test inputs.

// A bad coordinate keeps what was typed and says what to fix; a good one
// lists the nearest sites.
func TestSitesNearestAndBadValue(t *testing.T) {
	d, _ := testDesk(t)
	a, dr := newTestApp(t, d)
	dr.focus(&a.sites.coords.Editor)
	dr.typeText("95, 4")
	dr.press(key.NameReturn, 0)
	if a.sites.coords.Text() != "95, 4" || a.sites.coords.Problem == "" {
		t.Fatalf("bad point: text %q, problem %q; want the text kept and a sentence", a.sites.coords.Text(), a.sites.coords.Problem)
	}
	dr.focus(&a.sites.coords.Editor)
	for range "95, 4" {
		dr.press(key.NameDeleteBackward, 0)
	}
	dr.typeText("52.4, -1.5")
	acts := dr.press(key.NameReturn, 0)
	if !hasAction(acts, FindNear{Lat: 52.4, Lon: -1.5}) {
		t.Fatalf("Enter returned %v, want FindNear 52.4, -1.5", acts)
	}
	waitFor(t, dr, func() bool { return a.m.near.Has && !a.m.near.Busy })
	if h := a.m.near.Value; len(h) != 1 || h[0].Name != "Wrenfield Lane Yard" {
		t.Fatalf("nearest = %+v, want the one site", h)
	}
}

// A bale typed on the form: a light one asks to confirm its density, and
// is saved once confirmed; the app then opens the Tally on it.
func TestIntakeConfirmsLightBale(t *testing.T) {
	d, _ := testDesk(t)
	a, dr := newTestApp(t, d)
	dr.a.Apply([]Action{SelectSite{ID: a.m.sites.Value[0].ID}})
	dr.press("2", key.ModShortcut)
	if a.intake.site.IsZero() {
		t.Fatal("the bale form did not open on the chosen site")
	}
	for _, f := range []struct {
		f    *kit.Field
		text string
	}{{a.intake.gross, "150"}, {a.intake.l, "1.2"}, {a.intake.w, "0.8"}, {a.intake.h, "1.6"}, {a.intake.tag, "WL-2"}} {
		dr.focus(&f.f.Editor)
		dr.typeText(f.text)
	}
	acts := dr.press(key.NameReturn, 0)
	if len(acts) == 0 {
		t.Fatal("Enter on the form returned no action")
	}
	waitFor(t, dr, func() bool { return a.m.saveBale.Has && !a.m.saveBale.Busy })
	if _, ok := isConfirm(a.m.saveBale.Err); !ok || len(a.intake.checks) == 0 {
		t.Fatalf("a 98 kg/m³ bale: error %v, checks %v; want a confirmation asked", a.m.saveBale.Err, a.intake.checks)
	}
	if rows, _ := d.Bales(desk.BaleFilter{}); len(rows) != 1 {
		t.Fatalf("a bale awaiting confirmation was saved: %d bales", len(rows))
	}
	dr.click("The values are right: receive it anyway")
	waitFor(t, dr, func() bool { return a.m.saveBale.Has && !a.m.saveBale.Busy && a.m.saveBale.Err == nil })
	dr.settle()
	rows, err := d.Bales(desk.BaleFilter{})
	if err != nil || len(rows) != 2 {
		t.Fatalf("after confirming: %d bales (%v), want 2", len(rows), err)
	}
	if a.Screen() != ScreenTally || a.m.bale != a.m.saveBale.Value {
		t.Fatalf("after the save: screen %v, current bale %v; want the Tally on the new bale", a.Screen(), a.m.bale)
	}
}

// A new site typed on the Sites screen by keyboard: the form takes the
// position of the nearest-site search, Enter saves it, and the app lists
// and selects it. Empty or impossible values keep what was typed and say
// what to fix.
func TestNewSiteByKeyboard(t *testing.T) {
	d, _ := testDesk(t)
	a, dr := newTestApp(t, d)
	dr.focus(&a.sites.coords.Editor)
	dr.typeText("46.21, 5.13")
	dr.click("New site")
	if !a.sites.form.open || a.sites.form.where.Text() != "46.21, 5.13" {
		t.Fatalf("form open %v, position %q; want it open with the searched point", a.sites.form.open, a.sites.form.where.Text())
	}
	dr.focus(&a.sites.form.where.Editor)
	acts := dr.press(key.NameReturn, 0)
	if len(acts) != 0 || a.sites.form.name.Problem == "" {
		t.Fatalf("no name: actions %v, problem %q; want no save and a sentence", acts, a.sites.form.name.Problem)
	}
	dr.focus(&a.sites.form.name.Editor)
	dr.typeText("Furze Hill Yard")
	dr.click("Depot")
	acts = dr.press(key.NameReturn, 0)
	want := AddSite{Site: record.SiteRecord{Name: "Furze Hill Yard", Kind: record.SiteDepot, Lat: 46.21, Lon: 5.13}}
	if !hasAction(acts, want) {
		t.Fatalf("Enter returned %v, want %+v", acts, want)
	}
	waitFor(t, dr, func() bool { return a.m.saveSite.Has && !a.m.saveSite.Busy })
	dr.settle()
	rows, err := d.Sites()
	if err != nil || len(rows) != 2 {
		t.Fatalf("sites after the save: %d (%v), want 2", len(rows), err)
	}
	var made desk.SiteRow
	for _, r := range rows {
		if r.Site.Name == "Furze Hill Yard" {
			made = r
		}
	}
	if made.Site.Kind != record.SiteDepot || made.Site.Lat != 46.21 || made.Site.Lon != 5.13 {
		t.Fatalf("saved %+v", made.Site)
	}
	if a.m.site != made.ID || a.sites.form.open || len(a.m.sites.Value) != 2 {
		t.Fatalf("after the save: selected %v (want %v), form open %v, %d sites listed", a.m.site, made.ID, a.sites.form.open, len(a.m.sites.Value))
	}
}

// A new site 10 m from a known one asks whether it is the same place;
// nothing is saved until the grader confirms.
func TestNewSiteNearAnotherAsksToConfirm(t *testing.T) {
	d, _ := testDesk(t)
	a, dr := newTestApp(t, d)
	dr.click("New site")
	dr.focus(&a.sites.form.name.Editor)
	dr.typeText("Wrenfield Lane, back gate")
	dr.focus(&a.sites.form.where.Editor)
	dr.typeText("95, -1.52")
	if acts := dr.press(key.NameReturn, 0); len(acts) != 0 || a.sites.form.where.Text() != "95, -1.52" || a.sites.form.where.Problem == "" {
		t.Fatalf("latitude 95: actions %v, text %q, problem %q; want the text kept and a sentence", acts, a.sites.form.where.Text(), a.sites.form.where.Problem)
	}
	for range "95, -1.52" {
		dr.press(key.NameDeleteBackward, 0)
	}
	dr.typeText("52.41009, -1.52")
	dr.press(key.NameReturn, 0)
	waitFor(t, dr, func() bool { return a.m.saveSite.Has && !a.m.saveSite.Busy })
	dr.settle()
	if _, ok := isConfirm(a.m.saveSite.Err); !ok || len(a.sites.form.checks) == 0 {
		t.Fatalf("a site 10 m from another: error %v, checks %v; want a confirmation asked", a.m.saveSite.Err, a.sites.form.checks)
	}
	if rows, _ := d.Sites(); len(rows) != 1 {
		t.Fatalf("a site awaiting confirmation was saved: %d sites", len(rows))
	}
	dr.click("The values are right: save the site anyway")
	waitFor(t, dr, func() bool { return a.m.saveSite.Has && !a.m.saveSite.Busy && a.m.saveSite.Err == nil })
	if rows, _ := d.Sites(); len(rows) != 2 {
		t.Fatalf("after confirming: %d sites, want 2", len(rows))
	}
}

// A site's position typed wrong is corrected from the Sites screen: the
// form opens on the current value, the correction supersedes it, and the
// store keeps the first value in the site's history. A confirmation
// asked by an earlier new-site save does not come back on the form.
func TestCorrectSiteFromSitesScreen(t *testing.T) {
	d, _ := testDesk(t)
	a, dr := newTestApp(t, d)
	site := a.m.sites.Value[0]
	// an earlier new site near this one, asked to confirm, then dropped
	dr.click("New site")
	dr.focus(&a.sites.form.name.Editor)
	dr.typeText("Wrenfield Lane, back gate")
	dr.focus(&a.sites.form.where.Editor)
	dr.typeText("52.41, -1.52")
	dr.press(key.NameReturn, 0)
	waitFor(t, dr, func() bool { return a.m.saveSite.Has && !a.m.saveSite.Busy })
	dr.settle()
	if len(a.sites.form.checks) == 0 {
		t.Fatal("a site at the same place asked no confirmation")
	}
	dr.click("Cancel")

	dr.a.Apply([]Action{SelectSite{ID: site.ID}})
	dr.settle()
	dr.click("Correct site")
	f := a.sites.form
	if !f.open || f.editing != site.ID || f.name.Text() != site.Site.Name || f.where.Text() != "52.41, -1.52" || f.kind != site.Site.Kind {
		t.Fatalf("form on %v: name %q, position %q, kind %v", f.editing, f.name.Text(), f.where.Text(), f.kind)
	}
	if len(f.checks) != 0 || f.problem != "" {
		t.Fatalf("the correction form shows an earlier save's answer: checks %v, problem %q", f.checks, f.problem)
	}
	dr.focus(&f.where.Editor)
	for range "52.41, -1.52" {
		dr.press(key.NameDeleteBackward, 0)
	}
	dr.typeText("52.43, -1.52")
	acts := dr.press(key.NameReturn, 0)
	want := CorrectSite{ID: site.ID, Site: record.SiteRecord{Name: site.Site.Name, Kind: site.Site.Kind, Lat: 52.43, Lon: -1.52}}
	if !hasAction(acts, want) {
		t.Fatalf("Enter returned %v, want %+v", acts, want)
	}
	waitFor(t, dr, func() bool { return a.m.saveSite.Has && !a.m.saveSite.Busy && a.m.saveSite.Err == nil })
	dr.settle()
	rows, err := d.Sites()
	if err != nil || len(rows) != 1 || rows[0].ID != site.ID || rows[0].Site.Lat != 52.43 {
		t.Fatalf("sites after the correction: %+v (%v); want the one site at 52.43", rows, err)
	}
	det, err := d.Show(site.ID.String())
	if err != nil || len(det.History) != 2 {
		t.Fatalf("history of the site: %d events (%v), want the first value and the correction", len(det.History), err)
	}
	if f.open || a.m.site != site.ID {
		t.Fatalf("after the correction: form open %v, selected %v", f.open, a.m.site)
	}
}
