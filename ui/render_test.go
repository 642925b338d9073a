package ui

import (
	"fmt"
	"image"
	"path/filepath"
	"testing"
	"time"

	"gioui.org/io/key"

	"baleassay/data/desk"
	"baleassay/ui/kit"
	"baleassay/ui/theme"
	"baleassay/ui/uitest"
)

// demoEnd fixes the demo scenario's last day for the reference images.
var demoEnd = time.Date(2026, 11, 20, 0, 0, 0, 0, time.UTC)

// demoDesk is the demo scenario in a store of the test's own.
func demoDesk(t testing.TB) *desk.Desk {
	t.Helper()
	dir := filepath.Join(t.TempDir(), "demo")
	if _, _, err := desk.MakeDemo(desk.DemoOptions{Dir: dir, Weeks: 6, Seed: 1, End: demoEnd}); err != nil {
		t.Fatal(err)
	}
	d, err := desk.Open(desk.Location{Dir: dir}, desk.Options{Now: func() time.Time { return demoEnd.Add(18 * time.Hour) }})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { d.Close() })
	return d
}

// demoApp opens the app on the demo store at a window size and mode, with
// a site chosen and a pull half typed, as a grader would see it mid-work.
func demoApp(t *testing.T, d *desk.Desk, size image.Point, m theme.Mode) (*App, *driver) {
	a := New(Config{Desk: d, Demo: true, Mode: m, Now: func() time.Time { return demoEnd.Add(18 * time.Hour) }})
	t.Cleanup(a.Close)
	dr := newDriver(t, a, size)
	dr.settle()
	waitFor(t, dr, func() bool { return a.m.sites.Has && a.m.all.Has && a.m.result.Has && !a.m.result.Busy })
	row, _ := a.m.baleRow()
	dr.a.Apply([]Action{SelectSite{ID: row.Bale.Site}})
	waitFor(t, dr, func() bool { return a.m.bales.Has && !a.m.bales.Busy })
	return a, dr
}

// TestScreensRender draws every screen of the demo at the tablet and the
// laptop size in both palettes, and the tablet in portrait, against the
// reference images in testdata/ (-update rewrites them).
func TestScreensRender(t *testing.T) {
	d := demoDesk(t)
	sizes := []struct {
		name string
		size image.Point
	}{{"1280x800", image.Pt(1280, 800)}, {"1920x1080", image.Pt(1920, 1080)}, {"800x1280", image.Pt(800, 1280)}}
	for _, sz := range sizes {
		for _, m := range []theme.Mode{theme.Normal, theme.HighContrast} {
			if sz.name == "800x1280" && m == theme.HighContrast {
				continue // portrait once is enough to see the layout
			}
			t.Run(fmt.Sprintf("%s-%s", sz.name, m), func(t *testing.T) {
				a, dr := demoApp(t, d, sz.size, m)
				for _, s := range Screens() {
					dr.a.Apply([]Action{GoTo{Screen: s}})
					dr.frame()
					if s == ScreenIntake {
						// a loose bale typed in: the density and its warning
						for _, f := range []struct {
							f    *kit.Field
							text string
						}{{a.intake.gross, "150"}, {a.intake.l, "1.2"}, {a.intake.w, "0.8"}, {a.intake.h, "1.6"}, {a.intake.tag, "HM-0031"}} {
							dr.focus(&f.f.Editor)
							dr.typeText(f.text)
						}
					}
					if s == ScreenTally {
						// a pull half typed: its mass and one fraction
						for _, c := range "24.6" {
							dr.pressChar(key.Name(c))
						}
						dr.press(key.NameReturn, 0)
						dr.pressChar("1")
						for _, c := range "19.35" {
							dr.pressChar(key.Name(c))
						}
						dr.press(key.NameReturn, 0)
						dr.pressChar("3")
						dr.pressChar("0")
						dr.pressChar(".")
					}
					dr.settle()
					uitest.Match(t, fmt.Sprintf("%s-%s-%s", s, sz.name, m), dr.render())
					if s == ScreenTally {
						dr.a.Apply([]Action{DropDraft{Bale: a.m.bale}})
						dr.settle()
					}
				}
			})
		}
	}
}

// The list of keys over the Tally screen, where it has the most to say.
func TestHelpOverlayRender(t *testing.T) {
	d := demoDesk(t)
	_, dr := demoApp(t, d, image.Pt(1280, 800), theme.Normal)
	dr.a.Apply([]Action{GoTo{Screen: ScreenTally}, ToggleHelp{}})
	dr.settle()
	uitest.Match(t, "help-1280x800-normal", dr.render())
}

// The text at 150 % (the largest setting) on the tablet: the Tally and
// the Outcome must still show their controls.
func TestLargeTextRender(t *testing.T) {
	d := demoDesk(t)
	a, dr := demoApp(t, d, image.Pt(1280, 800), theme.HighContrast)
	a.Apply([]Action{SetScale{Scale: 1.5}})
	for _, s := range []Screen{ScreenTally, ScreenOutcome} {
		a.Apply([]Action{GoTo{Screen: s}})
		dr.settle()
		uitest.Match(t, fmt.Sprintf("%s-1280x800-high-contrast-text150", s), dr.render())
	}
}

// The new-site form on the tablet in both palettes, a name typed and the
// position of the nearest-site search carried over.
func TestNewSiteFormRender(t *testing.T) {
	d := demoDesk(t)
	for _, m := range []theme.Mode{theme.Normal, theme.HighContrast} {
		a, dr := demoApp(t, d, image.Pt(1280, 800), m)
		dr.a.Apply([]Action{GoTo{Screen: ScreenSites}})
		dr.frame()
		dr.focus(&a.sites.coords.Editor)
		dr.typeText("44.9031, 4.7702")
		dr.click("New site")
		dr.focus(&a.sites.form.name.Editor)
		dr.typeText("Furze Hill Yard")
		dr.settle()
		uitest.Match(t, fmt.Sprintf("sites-new-1280x800-%s", m), dr.render())
	}
}
