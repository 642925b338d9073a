package theme

import (
	"fmt"

	"gioui.org/font/gofont"
	"gioui.org/text"
	"gioui.org/unit"
	"gioui.org/widget/material"
)

// Type sizes at text scale 1, in sp. Body text is larger than a desktop
// default: the screen is read at arm's length, often in glare.
const (
	SizeSmall  = 15
	SizeBody   = 18
	SizeLabel  = 17
	SizeTitle  = 26
	SizeFigure = 30
)

// Scales offered by the text-scale setting.
var Scales = []float32{1, 1.25, 1.5}

// Theme is everything a widget needs to draw: palette, shaper, scale.
type Theme struct {
	Mode   Mode
	Pal    Palette
	Scale  float32 // text scale, 1 = the sizes above
	Shaper *text.Shaper
	mat    *material.Theme
}

// NewShaper returns a shaper over the embedded Go fonts only, so text
// looks the same on every machine and in reference images.
func NewShaper() *text.Shaper {
	return text.NewShaper(text.NoSystemFonts(), text.WithCollection(gofont.Collection()))
}

// New builds a theme. A nil shaper gets NewShaper; a scale ≤ 0 means 1.
func New(m Mode, scale float32, sh *text.Shaper) *Theme {
	if sh == nil {
		sh = NewShaper()
	}
	if scale <= 0 {
		scale = 1
	}
	t := &Theme{Mode: m, Pal: PaletteOf(m), Scale: scale, Shaper: sh}
	t.mat = material.NewTheme()
	t.mat.Shaper = sh
	t.mat.Palette = material.Palette{Bg: t.Pal.Surface, Fg: t.Pal.Text, ContrastBg: t.Pal.Primary, ContrastFg: t.Pal.OnPrimary}
	t.mat.TextSize = t.Sp(SizeBody)
	return t
}

// With returns a copy of the theme in another mode and scale, sharing the
// shaper.
func (t *Theme) With(m Mode, scale float32) *Theme { return New(m, scale, t.Shaper) }

// Sp scales a size in sp by the text scale.
func (t *Theme) Sp(v float32) unit.Sp { return unit.Sp(v * t.Scale) }

// Material is the Gio material theme with this palette, for Gio widgets
// we style no further (the editor's caret and selection).
func (t *Theme) Material() *material.Theme { return t.mat }

// ScaleLabel names a text scale for the settings ("125 %").
func ScaleLabel(s float32) string { return fmt.Sprintf("%.0f %%", s*100) }
