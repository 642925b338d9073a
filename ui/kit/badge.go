package kit

import (
	"fmt"
	"image"

	"gioui.org/layout"
	"gioui.org/op"

	"baleassay/ui/theme"
)

// BadgeKind is the meaning of a verdict badge.
type BadgeKind int

// The badge kinds, each with its own colour, shape and word.
const (
	BadgePass BadgeKind = iota
	BadgeUndecided
	BadgeFail
)

func (k BadgeKind) String() string {
	switch k {
	case BadgePass:
		return "pass"
	case BadgeUndecided:
		return "undecided"
	case BadgeFail:
		return "fail"
	}
	return fmt.Sprintf("BadgeKind(%d)", int(k))
}

// Badge is a verdict: a word and a shape (tick, diamond, cross) on a
// coloured pill, so that it reads without colour.
type Badge struct {
	Th   *theme.Theme
	Kind BadgeKind
	Word string  // "MEETS SPEC"; empty = the kind's name in capitals
	Size float32 // text size in sp; 0 = body
}

// Layout draws the badge.
func (b Badge) Layout(gtx layout.Context) layout.Dimensions {
	pal := b.Th.Pal
	bg := pal.Pass
	switch b.Kind {
	case BadgeFail:
		bg = pal.Fail
	case BadgeUndecided:
		bg = pal.Undecided
	}
	size := b.Size
	if size == 0 {
		size = theme.SizeBody
	}
	word := b.Word
	if word == "" {
		word = map[BadgeKind]string{BadgePass: "PASS", BadgeFail: "FAIL", BadgeUndecided: "UNDECIDED"}[b.Kind]
	}
	gtx.Constraints.Min = image.Point{}
	m := op.Record(gtx.Ops)
	dims := layout.Inset{Top: 6, Bottom: 6, Left: 10, Right: 14}.Layout(gtx, func(gtx layout.Context) layout.Dimensions {
		return layout.Flex{Alignment: layout.Middle}.Layout(gtx,
			layout.Rigid(func(gtx layout.Context) layout.Dimensions {
				s := gtx.Sp(b.Th.Sp(size * 1.2))
				switch b.Kind {
				case BadgePass:
					tick(gtx, pal.OnBadge, s)
				case BadgeFail:
					cross(gtx, pal.OnBadge, s)
				default:
					diamond(gtx, pal.OnBadge, s)
				}
				return layout.Dimensions{Size: image.Pt(s, s)}
			}),
			layout.Rigid(layout.Spacer{Width: 8}.Layout),
			layout.Rigid(Text{Th: b.Th, Text: word, Color: pal.OnBadge, Size: size, Bold: true}.Layout),
		)
	})
	call := m.Stop()
	Fill(gtx, bg, dims.Size, dims.Size.Y/2)
	call.Add(gtx.Ops)
	return dims
}
