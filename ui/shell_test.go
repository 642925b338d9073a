package ui

import (
	"image"
	"testing"

	"gioui.org/io/key"

	"baleassay/ui/theme"
)

func TestGlobalKeysNavigate(t *testing.T) {
	a := New(Config{})
	defer a.Close()
	d := newDriver(t, a, image.Pt(1280, 800))
	for _, s := range Screens() {
		acts := d.press(screenKey(s), key.ModShortcut)
		if !hasAction(acts, GoTo{Screen: s}) {
			t.Errorf("Ctrl+%s returned %v, want GoTo %v", screenKey(s), acts, s)
		}
		if a.Screen() != s {
			t.Errorf("after Ctrl+%s the screen is %v, want %v", screenKey(s), a.Screen(), s)
		}
	}
	if acts := d.press(key.NameF1, 0); !hasAction(acts, ToggleHelp{}) || !a.HelpOpen() {
		t.Fatalf("F1 returned %v, help open %v", acts, a.HelpOpen())
	}
	if acts := d.press(key.NameEscape, 0); !hasAction(acts, CloseHelp{}) || a.HelpOpen() {
		t.Fatalf("Esc returned %v, help open %v", acts, a.HelpOpen())
	}
	if acts := d.press("H", key.ModShortcut); !hasAction(acts, SetMode{Mode: theme.HighContrast}) || a.Theme().Mode != theme.HighContrast {
		t.Fatalf("Ctrl+H returned %v, mode %v", acts, a.Theme().Mode)
	}
	d.press("=", key.ModShortcut)
	if a.Theme().Scale != 1.25 {
		t.Fatalf("Ctrl+= gave text scale %v, want 1.25", a.Theme().Scale)
	}
	d.press("-", key.ModShortcut)
	d.press("-", key.ModShortcut)
	if a.Theme().Scale != 1 {
		t.Fatalf("Ctrl+- twice gave text scale %v, want 1 (the smallest)", a.Theme().Scale)
	}
}

func TestTabsClickAndHelpBlocksPointer(t *testing.T) {
	a := New(Config{})
	defer a.Close()
	d := newDriver(t, a, image.Pt(1280, 800))
	if acts := d.click("Outcome"); !hasAction(acts, GoTo{Screen: ScreenOutcome}) {
		t.Fatalf("clicking the Outcome tab returned %v", acts)
	}
	d.click("Keys")
	if !a.HelpOpen() {
		t.Fatal("the Keys button did not open the list of keys")
	}
	// the tabs are under the overlay's scrim: a click there does nothing
	b := d.find("Transfer")
	_ = b
	d.click("Transfer")
	if a.Screen() != ScreenOutcome {
		t.Fatalf("a click through the open help overlay changed the screen to %v", a.Screen())
	}
	d.click("Close")
	if a.HelpOpen() {
		t.Fatal("Close did not close the list of keys")
	}
}

// Tab reaches every tab button in order, and Enter on a focused one opens
// its screen.
func TestTabOrderAndEnter(t *testing.T) {
	a := New(Config{})
	defer a.Close()
	d := newDriver(t, a, image.Pt(1280, 800))
	d.tab(false) // Sites
	d.tab(false) // Receive bale
	d.tab(false) // Tally pulls
	acts := d.press(key.NameReturn, 0)
	if !hasAction(acts, GoTo{Screen: ScreenTally}) {
		t.Fatalf("Tab Tab Tab Enter returned %v, want GoTo tally", acts)
	}
}
