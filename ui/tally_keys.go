package ui

import (
	"strings"

	"gioui.org/io/event"
	"gioui.org/io/key"

	"baleassay/assess"
)

// tallyKeys maps a key to a sorting category. Digits 1–7 are the resin
// identification codes' main categories (ASTM D7611: 1 PET, 2 HDPE, 3 PVC,
// 4 LDPE, 5 PP, 6 PS, 7 other); letters are the others, chosen to be
// guessable from the name. Every category has exactly one key
// (TestEveryCategoryHasOneKey).
var tallyKeys = []struct {
	Key key.Name
	Cat string
}{
	{"1", "pet_clear"}, {"2", "hdpe"}, {"3", "pvc"}, {"4", "ldpe"}, {"5", "pp"}, {"6", "ps"}, {"7", "other_resin"},
	{"T", "pet_tinted"}, {"G", "pet_green"}, {"A", "pet_amber"}, {"O", "pet_colour_other"}, {"W", "pet_opaque"},
	{"F", "pet_thermoform"}, {"P", "pla"}, {"C", "closures"}, {"L", "labels"}, {"B", "film"}, {"R", "paper"},
	{"U", "aluminium"}, {"S", "steel"}, {"V", "glass"}, {"M", "liquid"}, {"D", "fines"}, {"H", "hazard"},
}

// keyOfCategory is the key of a category key ("pet_clear" → "1").
func keyOfCategory(cat string) key.Name {
	for _, k := range tallyKeys {
		if k.Cat == cat {
			return k.Key
		}
	}
	return ""
}

// categoryOfKey is the category index of a key.
func categoryOfKey(n key.Name) (int, bool) {
	for _, k := range tallyKeys {
		if k.Key == n {
			return assess.CategoryIndex(k.Cat)
		}
	}
	return 0, false
}

// shortName is a category's name without its parenthesis, for buttons.
func shortName(c assess.Category) string {
	if i := strings.Index(c.Name, " ("); i > 0 {
		return c.Name[:i]
	}
	return c.Name
}

// tallyFilters are the keys the tally reads while it holds the focus.
func tallyFilters(tag event.Tag) []event.Filter {
	fs := []event.Filter{key.FocusFilter{Target: tag}}
	for _, n := range tallyKeyNames() {
		fs = append(fs, key.Filter{Focus: tag, Name: n, Optional: key.ModShift})
	}
	return fs
}

// tallyKeyNames are the names of every key the tally reads.
func tallyKeyNames() []key.Name {
	ns := []key.Name{key.NameReturn, key.NameEnter, key.NameDeleteBackward, "0", "8", "9", ".", ",", "+"}
	for _, k := range tallyKeys {
		ns = append(ns, k.Key)
	}
	return ns
}

// isTallyKey reports whether the tally reads a key.
func isTallyKey(n key.Name) bool {
	for _, k := range tallyKeyNames() {
		if k == n {
			return true
		}
	}
	return false
}

// tallyRootFilters are the tally's keys for the app's root handler.
func tallyRootFilters() []event.Filter {
	var fs []event.Filter
	for _, n := range tallyKeyNames() {
		fs = append(fs, key.Filter{Name: n, Optional: key.ModShift})
	}
	return fs
}

// tallyShortcuts are the tally's keys for the help overlay.
func tallyShortcuts() []Shortcut {
	out := []Shortcut{
		{"Enter", "pull mass typed: go on to the fractions; fraction typed: add it; choosing: save the pull", "Tally pulls"},
		{"Backspace", "undo the last fraction added (while choosing a category)", "Tally pulls"},
		{"Esc", "leave a fraction's field without adding it", "Tally pulls"},
		{"0.4+0.3+0.2", "in a fraction's field: pieces weighed one by one are added up", "Tally pulls"},
	}
	var codes, letters []string
	for _, k := range tallyKeys {
		i, _ := assess.CategoryIndex(k.Cat)
		s := string(k.Key) + " " + tallyName(assess.CategoryAt(i))
		if k.Key >= "1" && k.Key <= "7" {
			codes = append(codes, s)
		} else {
			letters = append(letters, s)
		}
	}
	out = append(out, Shortcut{"1 … 7", "resin codes: " + strings.Join(codes, ", "), "Tally pulls"})
	for i := 0; i < len(letters); i += 9 {
		j := min(i+9, len(letters))
		out = append(out, Shortcut{"letters", strings.Join(letters[i:j], ", "), "Tally pulls"})
	}
	return out
}
