package ui

import (
	"gioui.org/io/event"
	"gioui.org/io/key"
)

// Shortcut is one documented key of the app. The help overlay lists this
// table; the handlers use the same key names, so the two cannot drift.
type Shortcut struct {
	Keys  string // as the user reads it: "Ctrl+1"
	What  string
	Where string // "everywhere" or a screen's title
}

// Global key names.
const (
	keyHelp     = key.NameF1
	keyContrast = "H" // with Ctrl
	keyBigger   = "=" // with Ctrl
	keySmaller  = "-" // with Ctrl
)

// globalShortcuts are the keys that work on every screen.
func globalShortcuts() []Shortcut {
	return []Shortcut{
		{"F1", "show or hide this list of keys", "everywhere"},
		{"Esc", "close this list", "everywhere"},
		{"Tab / Shift+Tab", "move to the next / previous control (the focused one has an orange ring)", "everywhere"},
		{"Enter or Space", "press the focused button", "everywhere"},
		{"Ctrl+1 … Ctrl+5", "go to Sites, Receive bale, Tally pulls, Outcome, Transfer", "everywhere"},
		{"Ctrl+H", "high-contrast colours for sunlight, on or off", "everywhere"},
		{"Ctrl+= / Ctrl+-", "larger / smaller text", "everywhere"},
	}
}

// globalFilters are the key filters of the app's root handler: they see
// a key only when no focused widget took it.
func globalFilters(tag event.Tag) []event.Filter {
	fs := []event.Filter{
		key.Filter{Name: keyHelp},
		key.Filter{Name: key.NameEscape},
		key.Filter{Name: keyContrast, Required: key.ModShortcut},
		key.Filter{Name: keyBigger, Required: key.ModShortcut, Optional: key.ModShift},
		key.Filter{Name: "+", Required: key.ModShortcut, Optional: key.ModShift},
		key.Filter{Name: keySmaller, Required: key.ModShortcut},
	}
	for _, s := range Screens() {
		fs = append(fs, key.Filter{Name: screenKey(s), Required: key.ModShortcut})
	}
	return fs
}

// screenKey is the digit that, with Ctrl, opens a screen.
func screenKey(s Screen) key.Name { return key.Name(rune('1' + int(s))) }
