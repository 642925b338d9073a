package kit

import (
	"image"
	"math"

	"gioui.org/f32"
	"gioui.org/layout"
	"gioui.org/op"
	"gioui.org/unit"

	"baleassay/ui/theme"
)

// ValueBar is one row of a composition chart: the name, a bar to the
// estimate with a whisker over its interval, an optional limit mark, and
// the value written out ("82.4 % (78.1–86.7)"). The written value carries
// the meaning; the bar only helps the eye.
type ValueBar struct {
	Th      *theme.Theme
	Name    string
	Est     float64 // on the axis 0…Max
	Lo, Hi  float64 // the interval; ignored unless HasCI
	HasCI   bool
	Max     float64 // the axis end; 0 = 1
	Limit   float64 // a spec limit on the same axis; NaN = none
	Value   string  // the written value, with its unit
	NameW   unit.Dp // width of the name column; 0 = 220
	ValueW  unit.Dp // width of the value column; 0 = 260
	Emphase bool    // bold name and value (a limiting item)
}

// Layout draws the row, at least 32 dp high.
func (v ValueBar) Layout(gtx layout.Context) layout.Dimensions {
	th := v.Th
	nw, vw := v.NameW, v.ValueW
	if nw == 0 {
		nw = 220
	}
	if vw == 0 {
		vw = 260
	}
	return layout.Flex{Alignment: layout.Middle}.Layout(gtx,
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			gtx.Constraints = layout.Exact(image.Pt(gtx.Dp(nw), gtx.Dp(32)))
			return layout.W.Layout(gtx, Text{Th: th, Text: v.Name, Color: th.Pal.Text, Bold: v.Emphase, MaxLines: 1}.Layout)
		}),
		layout.Flexed(1, func(gtx layout.Context) layout.Dimensions {
			sz := image.Pt(gtx.Constraints.Max.X, gtx.Dp(32))
			v.track(gtx, sz)
			return layout.Dimensions{Size: sz}
		}),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			gtx.Constraints.Min = image.Pt(gtx.Dp(vw), gtx.Dp(32))
			gtx.Constraints.Max.X = gtx.Dp(vw)
			return layout.Inset{Left: 10}.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
				return layout.W.Layout(gtx, Text{Th: th, Text: v.Value, Color: th.Pal.Text, Bold: v.Emphase, MaxLines: 2}.Layout)
			})
		}),
	)
}

func (v ValueBar) track(gtx layout.Context, sz image.Point) {
	th := v.Th
	max := v.Max
	if max <= 0 {
		max = 1
	}
	x := func(f float64) float32 {
		if math.IsNaN(f) {
			f = 0
		}
		f = math.Max(0, math.Min(f, max))
		return float32(f / max * float64(sz.X-gtx.Dp(8)))
	}
	mid := float32(sz.Y) / 2
	// baseline: the axis from 0 to Max
	base := float32(gtx.Dp(1))
	stroke(gtx, th.Pal.Border, base, f32.Pt(0, float32(sz.Y)-base), f32.Pt(float32(sz.X), float32(sz.Y)-base))
	stroke(gtx, th.Pal.Border, base*2, f32.Pt(base, mid-float32(gtx.Dp(10))), f32.Pt(base, float32(sz.Y)))
	// the bar
	bh := gtx.Dp(16)
	if w := int(x(v.Est) + 0.5); w > 0 {
		off := op.Offset(image.Pt(0, int(mid)-bh/2)).Push(gtx.Ops)
		Fill(gtx, th.Pal.Bar, image.Pt(w, bh), 0)
		off.Pop()
	}
	// the whisker
	if v.HasCI {
		lo, hi := x(v.Lo), x(v.Hi)
		lw := float32(gtx.Dp(2.5))
		cap := float32(gtx.Dp(11))
		stroke(gtx, th.Pal.Whisker, lw, f32.Pt(lo, mid), f32.Pt(hi, mid))
		stroke(gtx, th.Pal.Whisker, lw, f32.Pt(lo+lw/2, mid-cap), f32.Pt(lo+lw/2, mid+cap))
		stroke(gtx, th.Pal.Whisker, lw, f32.Pt(hi, mid-cap), f32.Pt(hi, mid+cap))
	}
	// the limit: a dashed vertical line in the text colour
	if !math.IsNaN(v.Limit) {
		lx := x(v.Limit)
		dash := float32(gtx.Dp(4))
		for y := float32(0); y < float32(sz.Y); y += 2 * dash {
			stroke(gtx, th.Pal.Text, float32(gtx.Dp(2)), f32.Pt(lx, y), f32.Pt(lx, y+dash))
		}
	}
}

// Progress is a progress bar with its share written beside it.
type Progress struct {
	Th    *theme.Theme
	Share float64 // 0…1
	Text  string  // e.g. "3 of 7 files"
}

// Layout draws the bar across the available width.
func (p Progress) Layout(gtx layout.Context) layout.Dimensions {
	th := p.Th
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			sz := image.Pt(gtx.Constraints.Max.X, gtx.Dp(24))
			Fill(gtx, th.Pal.Surface, sz, 4)
			w := int(math.Max(0, math.Min(1, p.Share)) * float64(sz.X))
			Fill(gtx, th.Pal.Bar, image.Pt(w, sz.Y), 4)
			Outline(gtx, th.Pal.Border, sz, 4, gtx.Dp(1.5))
			return layout.Dimensions{Size: sz}
		}),
		layout.Rigid(layout.Spacer{Height: 4}.Layout),
		layout.Rigid(Text{Th: th, Text: p.Text, Color: th.Pal.Text}.Layout),
	)
}
