package kit

import (
	"gioui.org/io/semantic"
	"gioui.org/layout"
	"gioui.org/op"

	"baleassay/ui/theme"
)

// Row is a wide clickable list row: a bordered card at least 48 dp high
// with a focus ring. The caller wraps it in its Clickable.
type Row struct {
	Th      *theme.Theme
	Focused bool
	Label   string // what a screen reader and the tests read
}

// Layout draws the card around w.
func (r Row) Layout(gtx layout.Context, w layout.Widget) layout.Dimensions {
	semantic.Button.Add(gtx.Ops)
	semantic.LabelOp(r.Label).Add(gtx.Ops)
	if gtx.Constraints.Min.Y < gtx.Dp(TargetDp) {
		gtx.Constraints.Min.Y = gtx.Dp(TargetDp)
	}
	m := op.Record(gtx.Ops)
	dims := layout.Inset{Left: 12, Right: 12, Top: 6, Bottom: 6}.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
		return layout.W.Layout(gtx, w)
	})
	call := m.Stop()
	rad := gtx.Dp(6)
	Fill(gtx, r.Th.Pal.Surface, dims.Size, rad)
	Outline(gtx, r.Th.Pal.Border, dims.Size, rad, gtx.Dp(1.5))
	if r.Focused {
		FocusRing(gtx, r.Th, dims.Size, rad)
	}
	call.Add(gtx.Ops)
	return dims
}
