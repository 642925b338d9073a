package kit

import (
	"image"
	"image/color"

	"gioui.org/io/semantic"
	"gioui.org/layout"
	"gioui.org/op"
	"gioui.org/op/clip"
	"gioui.org/text"
	"gioui.org/unit"
	"gioui.org/widget"

	"baleassay/ui/theme"
)

// Role picks a button's colours.
type Role int

// The roles.
const (
	RoleNormal   Role = iota
	RolePrimary       // the step the screen expects next
	RoleSelected      // the chosen category, tab or option
)

// Button is a large labelled button with an optional key hint in its
// corner ("3", "Ctrl+S"): at least 48 × 48 dp, a visible focus ring.
type Button struct {
	Th       *theme.Theme
	Click    *widget.Clickable
	Text     string
	Sub      string // second line, smaller (e.g. "12.40 kg so far")
	Hint     string // the keyboard shortcut, shown in the corner
	Role     Role
	MinWidth unit.Dp
	Disabled bool
	TextSize float32 // sp at scale 1; 0 = body
}

// Layout draws the button and handles its input; read clicks with
// Click.Clicked(gtx) before calling it.
func (b Button) Layout(gtx layout.Context) layout.Dimensions {
	if b.Disabled {
		gtx = gtx.Disabled()
	}
	min := gtx.Dp(TargetDp)
	if w := gtx.Dp(b.MinWidth); w > min {
		min = w
	}
	if gtx.Constraints.Min.X < min {
		gtx.Constraints.Min.X = min
	}
	if gtx.Constraints.Min.Y < gtx.Dp(TargetDp) {
		gtx.Constraints.Min.Y = gtx.Dp(TargetDp)
	}
	if gtx.Constraints.Max.X < gtx.Constraints.Min.X {
		gtx.Constraints.Max.X = gtx.Constraints.Min.X
	}
	pal := b.Th.Pal
	bg, fg := pal.Button, pal.OnButton
	switch b.Role {
	case RolePrimary:
		bg, fg = pal.Primary, pal.OnPrimary
	case RoleSelected:
		bg, fg = pal.Selected, pal.OnSelect
	}
	if b.Disabled {
		bg, fg = pal.Surface, pal.Muted
	}
	return b.Click.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
		semantic.Button.Add(gtx.Ops)
		semantic.LabelOp(b.Text).Add(gtx.Ops)
		m := op.Record(gtx.Ops)
		dims := layout.UniformInset(8).Layout(gtx, func(gtx layout.Context) layout.Dimensions {
			return layout.Center.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
				label := func(gtx layout.Context) layout.Dimensions {
					if b.Sub == "" {
						return Text{Th: b.Th, Text: b.Text, Color: fg, Bold: true, Alignment: text.Middle, Size: b.TextSize}.Layout(gtx)
					}
					return layout.Flex{Axis: layout.Vertical, Alignment: layout.Middle}.Layout(gtx,
						layout.Rigid(Text{Th: b.Th, Text: b.Text, Color: fg, Bold: true, Alignment: text.Middle, Size: b.TextSize}.Layout),
						layout.Rigid(Text{Th: b.Th, Text: b.Sub, Color: fg, Size: theme.SizeSmall, Alignment: text.Middle}.Layout),
					)
				}
				if b.Hint == "" {
					return label(gtx)
				}
				return layout.Flex{Alignment: layout.Middle}.Layout(gtx,
					layout.Rigid(func(gtx layout.Context) layout.Dimensions { return keyChip(gtx, b.Th, b.Hint, fg) }),
					layout.Rigid(layout.Spacer{Width: 8}.Layout),
					layout.Rigid(label),
				)
			})
		})
		call := m.Stop()
		r := gtx.Dp(6)
		Fill(gtx, bg, dims.Size, r)
		if b.Role == RoleNormal || b.Disabled {
			Outline(gtx, pal.Border, dims.Size, r, gtx.Dp(1.5))
		}
		call.Add(gtx.Ops)
		if gtx.Focused(b.Click) {
			FocusRing(gtx, b.Th, dims.Size, r)
			// a second, inner ring in the label colour so the focus shows on
			// a filled button whose fill is close to the ring's colour
			inner := gtx.Dp(4)
			off := op.Offset(image.Pt(inner, inner)).Push(gtx.Ops)
			Outline(gtx, fg, dims.Size.Sub(image.Pt(2*inner, 2*inner)), r, gtx.Dp(1.5))
			off.Pop()
		}
		defer clip.Rect{Max: dims.Size}.Push(gtx.Ops).Pop()
		return dims
	})
}

// keyChip draws a key name in an outlined box: the shortcut of a button.
func keyChip(gtx layout.Context, th *theme.Theme, name string, c color.NRGBA) layout.Dimensions {
	m := op.Record(gtx.Ops)
	dims := layout.Inset{Left: 5, Right: 5, Top: 1, Bottom: 1}.Layout(gtx,
		Text{Th: th, Text: name, Color: c, Size: theme.SizeSmall, Mono: true, Bold: true}.Layout)
	call := m.Stop()
	Outline(gtx, c, dims.Size, gtx.Dp(3), gtx.Dp(1.5))
	call.Add(gtx.Ops)
	return dims
}
