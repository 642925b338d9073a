// Package kit holds the app's widgets: large buttons, labelled fields,
// value bars with interval whiskers, verdict badges, the demo banner and a
// progress bar. Each is a style value with a Layout method drawn through
// the theme; state (clicks, editors) lives in the caller's screen struct.
// Nothing here carries meaning by colour alone: every coloured thing has
// a word, a number or a shape beside it.
package kit

import (
	"image"
	"image/color"

	"gioui.org/font"
	"gioui.org/layout"
	"gioui.org/op"
	"gioui.org/op/clip"
	"gioui.org/op/paint"
	"gioui.org/text"
	"gioui.org/unit"
	"gioui.org/widget"

	"baleassay/ui/theme"
)

// Touch-target figures. Source: Material Design touch-target guidance
// (48 × 48 dp, 8 dp apart); WCAG 2.2 SC 2.5.5 asks 44 × 44 CSS px.
const (
	TargetDp  = unit.Dp(48)
	SpacingDp = unit.Dp(8)
)

// Fill paints a rectangle of size sz at the current offset.
func Fill(gtx layout.Context, c color.NRGBA, sz image.Point, radius int) {
	paint.FillShape(gtx.Ops, c, clip.UniformRRect(image.Rectangle{Max: sz}, radius).Op(gtx.Ops))
}

// Outline strokes the border of a rectangle of size sz, width w px,
// inside the rectangle.
func Outline(gtx layout.Context, c color.NRGBA, sz image.Point, radius, w int) {
	if w <= 0 {
		return
	}
	h := w / 2
	r := image.Rect(h, h, sz.X-(w-h), sz.Y-(w-h))
	paint.FillShape(gtx.Ops, c, clip.Stroke{Path: clip.UniformRRect(r, radius).Path(gtx.Ops), Width: float32(w)}.Op())
}

// FocusRing draws the keyboard-focus ring: a thick outline in the focus
// colour, inside sz so that nothing clips it.
func FocusRing(gtx layout.Context, th *theme.Theme, sz image.Point, radius int) {
	Outline(gtx, th.Pal.Focus, sz, radius, gtx.Dp(3))
}

func colorMat(gtx layout.Context, c color.NRGBA) op.CallOp {
	m := op.Record(gtx.Ops)
	paint.ColorOp{Color: c}.Add(gtx.Ops)
	return m.Stop()
}

// Text is a run of text in the theme's font.
type Text struct {
	Th        *theme.Theme
	Text      string
	Size      float32 // sp at scale 1; 0 = body
	Color     color.NRGBA
	Bold      bool
	Mono      bool // tabular figures: columns of numbers line up
	MaxLines  int
	Alignment text.Alignment
}

// Label returns body text in the theme's text colour.
func Label(th *theme.Theme, s string) Text {
	return Text{Th: th, Text: s, Color: th.Pal.Text}
}

// Layout draws the text.
func (t Text) Layout(gtx layout.Context) layout.Dimensions {
	size := t.Size
	if size == 0 {
		size = theme.SizeBody
	}
	f := font.Font{}
	if t.Bold {
		f.Weight = font.Bold
	}
	if t.Mono {
		f.Typeface = "Go Mono"
	}
	l := widget.Label{MaxLines: t.MaxLines, Alignment: t.Alignment}
	return l.Layout(gtx, t.Th.Shaper, f, t.Th.Sp(size), t.Text, colorMat(gtx, t.Color))
}

// Gap is empty space of v dp along both axes.
func Gap(v unit.Dp) layout.Widget {
	return layout.Spacer{Width: v, Height: v}.Layout
}
