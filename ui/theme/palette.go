// Package theme holds the app's colours, type sizes and the text scale:
// a normal palette and a high-contrast one for sunlight. Every pair of
// colours the app draws together is listed in Pairs and checked against
// the WCAG 2.2 contrast thresholds in contrast_test.go, so a palette edit
// that makes text or a bar hard to see fails a test instead of a grader.
package theme

import (
	"fmt"
	"image/color"
)

// Mode selects a palette.
type Mode int

// The palettes.
const (
	Normal Mode = iota
	HighContrast
)

func (m Mode) String() string {
	switch m {
	case Normal:
		return "normal"
	case HighContrast:
		return "high-contrast"
	}
	return fmt.Sprintf("Mode(%d)", int(m))
}

// Palette names colours by the role they play, never by hue: a screen
// asks for "the fail badge", not "red".
type Palette struct {
	Bg        color.NRGBA // the window
	Surface   color.NRGBA // cards, panels, fields
	Text      color.NRGBA // body text on Bg and Surface
	Muted     color.NRGBA // secondary text (units, hints) on Bg and Surface
	Border    color.NRGBA // field and card borders
	Focus     color.NRGBA // the keyboard-focus ring
	Primary   color.NRGBA // the main action's button
	OnPrimary color.NRGBA
	Button    color.NRGBA // other buttons
	OnButton  color.NRGBA
	Selected  color.NRGBA // the chosen category or tab
	OnSelect  color.NRGBA
	Bar       color.NRGBA // value bars; their labels sit beside them, never on them
	Whisker   color.NRGBA // interval whiskers, drawn over the bar and the surface
	Pass      color.NRGBA // verdict badges; each also has a word and a shape
	Fail      color.NRGBA
	Undecided color.NRGBA
	OnBadge   color.NRGBA
	Banner    color.NRGBA // the demo-data banner
	OnBanner  color.NRGBA
	Error     color.NRGBA // the sentence beside a bad value
	Caution   color.NRGBA // the border of a safety caution
}

func rgb(c uint32) color.NRGBA {
	return color.NRGBA{R: uint8(c >> 16), G: uint8(c >> 8), B: uint8(c), A: 0xff}
}

// NormalPalette is for indoor light.
func NormalPalette() Palette {
	return Palette{
		Bg:        rgb(0xE9ECEF),
		Surface:   rgb(0xFFFFFF),
		Text:      rgb(0x1B1F24),
		Muted:     rgb(0x454D57),
		Border:    rgb(0x68717C),
		Focus:     rgb(0xB4470A),
		Primary:   rgb(0x1F4E8C),
		OnPrimary: rgb(0xFFFFFF),
		Button:    rgb(0xD5DCE4),
		OnButton:  rgb(0x1B1F24),
		Selected:  rgb(0x1B1F24),
		OnSelect:  rgb(0xFFFFFF),
		Bar:       rgb(0x5A8AD0),
		Whisker:   rgb(0x1B1F24),
		Pass:      rgb(0x1E6B34),
		Fail:      rgb(0xA4161A),
		Undecided: rgb(0x7A4500),
		OnBadge:   rgb(0xFFFFFF),
		Banner:    rgb(0xFFD966),
		OnBanner:  rgb(0x1B1F24),
		Error:     rgb(0xA4161A),
		Caution:   rgb(0x7A4500),
	}
}

// HighContrastPalette is for sunlight: black on white, heavier outlines,
// the darkest badge colours that still read as their hue.
func HighContrastPalette() Palette {
	return Palette{
		Bg:        rgb(0xFFFFFF),
		Surface:   rgb(0xFFFFFF),
		Text:      rgb(0x000000),
		Muted:     rgb(0x1F1F1F),
		Border:    rgb(0x000000),
		Focus:     rgb(0xC2410C),
		Primary:   rgb(0x000000),
		OnPrimary: rgb(0xFFFFFF),
		Button:    rgb(0xFFFFFF),
		OnButton:  rgb(0x000000),
		Selected:  rgb(0x000000),
		OnSelect:  rgb(0xFFFFFF),
		Bar:       rgb(0x5A8AD0),
		Whisker:   rgb(0x000000),
		Pass:      rgb(0x0B4D1F),
		Fail:      rgb(0x8B0000),
		Undecided: rgb(0x5C3300),
		OnBadge:   rgb(0xFFFFFF),
		Banner:    rgb(0xFFE14D),
		OnBanner:  rgb(0x000000),
		Error:     rgb(0x8B0000),
		Caution:   rgb(0x000000),
	}
}

// PaletteOf returns the palette of a mode.
func PaletteOf(m Mode) Palette {
	if m == HighContrast {
		return HighContrastPalette()
	}
	return NormalPalette()
}

// PairKind says which WCAG threshold a colour pair must meet.
type PairKind int

// The kinds of pair.
const (
	TextPair    PairKind = iota // body text on its background: 1.4.3 / 1.4.6
	NonTextPair                 // bars, whiskers, borders, focus: 1.4.11
)

func (k PairKind) String() string {
	if k == NonTextPair {
		return "non-text"
	}
	return "text"
}

// Pair is two colours the app draws one on (or beside) the other.
type Pair struct {
	Name   string
	Kind   PairKind
	Fg, Bg color.NRGBA
}

// Pairs lists every foreground/background combination the app draws.
func (p Palette) Pairs() []Pair {
	t, n := TextPair, NonTextPair
	return []Pair{
		{"text on window", t, p.Text, p.Bg},
		{"text on surface", t, p.Text, p.Surface},
		{"muted on window", t, p.Muted, p.Bg},
		{"muted on surface", t, p.Muted, p.Surface},
		{"primary button label", t, p.OnPrimary, p.Primary},
		{"button label", t, p.OnButton, p.Button},
		{"selected label", t, p.OnSelect, p.Selected},
		{"pass badge word", t, p.OnBadge, p.Pass},
		{"fail badge word", t, p.OnBadge, p.Fail},
		{"undecided badge word", t, p.OnBadge, p.Undecided},
		{"banner text", t, p.OnBanner, p.Banner},
		{"error sentence on surface", t, p.Error, p.Surface},
		{"error sentence on window", t, p.Error, p.Bg},
		{"field border on surface", n, p.Border, p.Surface},
		{"field border on window", n, p.Border, p.Bg},
		{"focus ring on window", n, p.Focus, p.Bg},
		{"focus ring on surface", n, p.Focus, p.Surface},
		{"bar on surface", n, p.Bar, p.Surface},
		{"whisker on surface", n, p.Whisker, p.Surface},
		{"whisker on bar", n, p.Whisker, p.Bar},
		{"pass badge on surface", n, p.Pass, p.Surface},
		{"fail badge on surface", n, p.Fail, p.Surface},
		{"undecided badge on surface", n, p.Undecided, p.Surface},
		{"primary button on window", n, p.Primary, p.Bg},
		{"selected on surface", n, p.Selected, p.Surface},
		{"caution border on surface", n, p.Caution, p.Surface},
	}
}
