package kit

import (
	"image"

	"gioui.org/io/semantic"
	"gioui.org/layout"
	"gioui.org/op"
	"gioui.org/op/clip"
	"gioui.org/unit"
	"gioui.org/widget"
	"gioui.org/widget/material"

	"baleassay/ui/theme"
)

// Field is the state of a labelled one-line input: its editor and the
// sentence about a bad value. Setting Problem never touches the text, so
// what the user typed stays for them to fix.
type Field struct {
	Editor  widget.Editor
	Problem string // "" when the value is fine
}

// NewField returns a one-line field that submits on Enter.
func NewField() *Field {
	f := &Field{}
	f.Editor.SingleLine = true
	f.Editor.Submit = true
	return f
}

// Text is the field's text.
func (f *Field) Text() string { return f.Editor.Text() }

// SetText replaces the text and moves the caret to its end.
func (f *Field) SetText(s string) {
	f.Editor.SetText(s)
	n := f.Editor.Len()
	f.Editor.SetCaret(n, n)
}

// FieldStyle draws a Field: the label above, the box (48 dp high), the
// unit after it and, when the value is bad, the sentence beside it (below
// it when the row is narrow), marked with a warning shape.
type FieldStyle struct {
	Th    *theme.Theme
	F     *Field
	Label string
	Unit  string // "kg", "m", "°"; shown right of the box
	Hint  string // grey text in an empty box
	Width unit.Dp
	// Active draws the focus ring although the editor is not focused: a
	// screen that types into the field itself (the tally) sets it.
	Active bool
}

// Layout draws the field.
func (s FieldStyle) Layout(gtx layout.Context) layout.Dimensions {
	th := s.Th
	w := s.Width
	if w == 0 {
		w = 180
	}
	width := gtx.Dp(w * unit.Dp(th.Scale)) // wider with larger text
	box := func(gtx layout.Context) layout.Dimensions {
		gtx.Constraints = layout.Exact(image.Pt(width, gtx.Dp(TargetDp)))
		sz := gtx.Constraints.Min
		r := gtx.Dp(4)
		defer clip.Rect{Max: sz}.Push(gtx.Ops).Pop()
		semantic.LabelOp(s.Label).Add(gtx.Ops)
		Fill(gtx, th.Pal.Surface, sz, r)
		border, bw := th.Pal.Border, gtx.Dp(1.5)
		if s.F.Problem != "" {
			border, bw = th.Pal.Error, gtx.Dp(3)
		}
		Outline(gtx, border, sz, r, bw)
		if s.Active || gtx.Focused(&s.F.Editor) {
			FocusRing(gtx, th, sz, r)
		}
		layout.Inset{Left: 10, Right: 10}.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
			return layout.W.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
				gtx.Constraints.Min = image.Point{}
				e := material.Editor(th.Material(), &s.F.Editor, s.Hint)
				e.TextSize = th.Sp(theme.SizeBody + 2)
				e.Color = th.Pal.Text
				e.HintColor = th.Pal.Muted
				e.SelectionColor = th.Pal.Bar
				return e.Layout(gtx)
			})
		})
		return layout.Dimensions{Size: sz}
	}
	row := func(gtx layout.Context) layout.Dimensions {
		children := []layout.FlexChild{layout.Rigid(box)}
		if s.Unit != "" {
			children = append(children, layout.Rigid(func(gtx layout.Context) layout.Dimensions {
				return layout.Inset{Left: 8}.Layout(gtx, Text{Th: th, Text: s.Unit, Color: th.Pal.Text, Bold: true}.Layout)
			}))
		}
		return layout.Flex{Alignment: layout.Middle}.Layout(gtx, children...)
	}
	problem := func(gtx layout.Context) layout.Dimensions {
		return Problem{Th: th, Text: s.F.Problem}.Layout(gtx)
	}
	return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
		layout.Rigid(Text{Th: th, Text: s.Label, Color: th.Pal.Text, Size: theme.SizeLabel}.Layout),
		layout.Rigid(layout.Spacer{Height: 4}.Layout),
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			if s.F.Problem == "" {
				return row(gtx)
			}
			// beside when there is room for a sentence, else below
			m := op.Record(gtx.Ops)
			rd := row(gtx)
			call := m.Stop()
			if gtx.Constraints.Max.X-rd.Size.X >= gtx.Dp(260) {
				call.Add(gtx.Ops)
				off := op.Offset(image.Pt(rd.Size.X+gtx.Dp(12), 0)).Push(gtx.Ops)
				g := gtx
				g.Constraints = layout.Constraints{Max: image.Pt(gtx.Constraints.Max.X-rd.Size.X-gtx.Dp(12), gtx.Constraints.Max.Y)}
				pd := layout.W.Layout(g, func(gtx layout.Context) layout.Dimensions {
					gtx.Constraints.Min.Y = rd.Size.Y
					return layout.W.Layout(gtx, problem)
				})
				off.Pop()
				h := rd.Size.Y
				if pd.Size.Y > h {
					h = pd.Size.Y
				}
				return layout.Dimensions{Size: image.Pt(rd.Size.X+gtx.Dp(12)+pd.Size.X, h)}
			}
			return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
				layout.Rigid(func(gtx layout.Context) layout.Dimensions { call.Add(gtx.Ops); return rd }),
				layout.Rigid(layout.Spacer{Height: 4}.Layout),
				layout.Rigid(problem))
		}),
	)
}

// Problem is a sentence about a bad value, in the error colour after a
// warning triangle (shape as well as colour).
type Problem struct {
	Th   *theme.Theme
	Text string
}

// Layout draws the sentence.
func (p Problem) Layout(gtx layout.Context) layout.Dimensions {
	return layout.Flex{Alignment: layout.Start}.Layout(gtx,
		layout.Rigid(func(gtx layout.Context) layout.Dimensions {
			s := gtx.Dp(20)
			return layout.Inset{Top: 1, Right: 6}.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
				warnTriangle(gtx, p.Th.Pal.Error, p.Th.Pal.Surface, s)
				return layout.Dimensions{Size: image.Pt(s, s)}
			})
		}),
		layout.Flexed(1, Text{Th: p.Th, Text: p.Text, Color: p.Th.Pal.Error, Size: theme.SizeBody, Bold: true}.Layout),
	)
}
