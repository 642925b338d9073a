package kit

import (
	"image"

	"gioui.org/f32"
	"gioui.org/layout"
	"gioui.org/op"
	"gioui.org/op/clip"

	"baleassay/ui/theme"
)

// Banner is a full-width notice: bold title, a sentence, and optional
// content on the right (a button). Its left edge is hatched so that it
// reads as a notice without its colour.
type Banner struct {
	Th    *theme.Theme
	Title string // "DEMO DATA"
	Text  string
}

// Layout draws the banner with w on its right (w may be nil).
func (b Banner) Layout(gtx layout.Context, w layout.Widget) layout.Dimensions {
	th := b.Th
	m := op.Record(gtx.Ops)
	gtx.Constraints.Min.X = gtx.Constraints.Max.X
	dims := layout.Inset{Left: 36, Right: 12, Top: 6, Bottom: 6}.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
		children := []layout.FlexChild{
			layout.Rigid(Text{Th: th, Text: b.Title, Color: th.Pal.OnBanner, Bold: true, Size: theme.SizeBody + 2}.Layout),
			layout.Rigid(layout.Spacer{Width: 16}.Layout),
			layout.Flexed(1, Text{Th: th, Text: b.Text, Color: th.Pal.OnBanner}.Layout),
		}
		if w != nil {
			children = append(children, layout.Rigid(w))
		}
		return layout.Flex{Alignment: layout.Middle}.Layout(gtx, children...)
	})
	call := m.Stop()
	Fill(gtx, th.Pal.Banner, dims.Size, 0)
	// hatching on the left edge
	hatch := gtx.Dp(24)
	cl := clip.Rect{Max: image.Pt(hatch, dims.Size.Y)}.Push(gtx.Ops)
	step := float32(gtx.Dp(8))
	for x := -float32(dims.Size.Y); x < float32(hatch); x += step {
		stroke(gtx, th.Pal.OnBanner, step/3, f32.Pt(x, float32(dims.Size.Y)), f32.Pt(x+float32(dims.Size.Y), 0))
	}
	cl.Pop()
	Outline(gtx, th.Pal.OnBanner, dims.Size, 0, gtx.Dp(2))
	call.Add(gtx.Ops)
	return dims
}
