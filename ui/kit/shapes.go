package kit

import (
	"image"
	"image/color"

	"gioui.org/f32"
	"gioui.org/layout"
	"gioui.org/op/clip"
	"gioui.org/op/paint"
)

// warnTriangle draws a filled triangle of side s with a "!" cut in the
// background colour.
func warnTriangle(gtx layout.Context, fg, bg color.NRGBA, s int) {
	fs := float32(s)
	var p clip.Path
	p.Begin(gtx.Ops)
	p.MoveTo(f32.Pt(fs/2, 0))
	p.LineTo(f32.Pt(fs, fs))
	p.LineTo(f32.Pt(0, fs))
	p.Close()
	paint.FillShape(gtx.Ops, fg, clip.Outline{Path: p.End()}.Op())
	w := fs / 8
	paint.FillShape(gtx.Ops, bg, clip.Rect(image.Rect(int(fs/2-w/2), int(fs*0.35), int(fs/2+w/2+0.5), int(fs*0.70))).Op())
	paint.FillShape(gtx.Ops, bg, clip.Rect(image.Rect(int(fs/2-w/2), int(fs*0.78), int(fs/2+w/2+0.5), int(fs*0.90))).Op())
}

// stroke draws a polyline of width w.
func stroke(gtx layout.Context, c color.NRGBA, w float32, pts ...f32.Point) {
	var p clip.Path
	p.Begin(gtx.Ops)
	p.MoveTo(pts[0])
	for _, q := range pts[1:] {
		p.LineTo(q)
	}
	paint.FillShape(gtx.Ops, c, clip.Stroke{Path: p.End(), Width: w}.Op())
}

// tick draws a check mark in a box of side s.
func tick(gtx layout.Context, c color.NRGBA, s int) {
	fs := float32(s)
	stroke(gtx, c, fs/6, f32.Pt(fs*0.15, fs*0.55), f32.Pt(fs*0.40, fs*0.80), f32.Pt(fs*0.85, fs*0.22))
}

// cross draws an X in a box of side s.
func cross(gtx layout.Context, c color.NRGBA, s int) {
	fs := float32(s)
	stroke(gtx, c, fs/6, f32.Pt(fs*0.2, fs*0.2), f32.Pt(fs*0.8, fs*0.8))
	stroke(gtx, c, fs/6, f32.Pt(fs*0.8, fs*0.2), f32.Pt(fs*0.2, fs*0.8))
}

// diamond draws a diamond outline with a dot in it: "not decided".
func diamond(gtx layout.Context, c color.NRGBA, s int) {
	fs := float32(s)
	stroke(gtx, c, fs/8, f32.Pt(fs/2, fs*0.08), f32.Pt(fs*0.92, fs/2), f32.Pt(fs/2, fs*0.92), f32.Pt(fs*0.08, fs/2), f32.Pt(fs/2, fs*0.08), f32.Pt(fs*0.92, fs/2))
	r := int(fs * 0.12)
	paint.FillShape(gtx.Ops, c, clip.Ellipse(image.Rect(s/2-r, s/2-r, s/2+r, s/2+r)).Op(gtx.Ops))
}
