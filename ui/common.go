package ui

import (
	"fmt"
	"math"
	"time"
	"unicode"

	"gioui.org/layout"
	"gioui.org/widget"

	"baleassay/assess"
	"baleassay/data/desk"
	"baleassay/data/record"
	"baleassay/ui/kit"
	"baleassay/ui/theme"
)

// clicks keeps one Clickable per record, for lists of rows.
type clicks map[record.EntityID]*widget.Clickable

func (c clicks) of(id record.EntityID) *widget.Clickable {
	b, ok := c[id]
	if !ok {
		b = new(widget.Clickable)
		c[id] = b
	}
	return b
}

// title is a screen's heading.
func title(th *theme.Theme, s string) layout.Widget {
	return kit.Text{Th: th, Text: s, Size: theme.SizeTitle, Bold: true, Color: th.Pal.Text}.Layout
}

// heading is a section's heading.
func heading(th *theme.Theme, s string) layout.Widget {
	return kit.Text{Th: th, Text: s, Size: theme.SizeBody + 3, Bold: true, Color: th.Pal.Text}.Layout
}

// muted is secondary text.
func muted(th *theme.Theme, s string) layout.Widget {
	return kit.Text{Th: th, Text: s, Color: th.Pal.Muted}.Layout
}

// body is body text.
func body(th *theme.Theme, s string) layout.Widget {
	return kit.Text{Th: th, Text: s, Color: th.Pal.Text}.Layout
}

// vgap is vertical space.
func vgap(dp float32) layout.FlexChild {
	return layout.Rigid(layout.Spacer{Height: unitDp(dp)}.Layout)
}

// badgeOf turns a verdict into a badge kind.
func badgeOf(v assess.Verdict) kit.BadgeKind {
	switch v {
	case assess.Pass:
		return kit.BadgePass
	case assess.Fail:
		return kit.BadgeFail
	}
	return kit.BadgeUndecided
}

// verdictWord is the badge's word for a spec verdict.
func verdictWord(v assess.Verdict) string {
	switch v {
	case assess.Pass:
		return "MEETS SPEC"
	case assess.Fail:
		return "FAILS SPEC"
	}
	return "NOT DECIDED YET"
}

// pct writes a fraction as a percentage ("82.4 %").
func pct(f float64, decimals int) string {
	if math.IsNaN(f) {
		return "–"
	}
	return fmt.Sprintf("%.*f %%", decimals, 100*f)
}

// pctDecimals picks decimals for a share: small shares get more.
func pctDecimals(f float64) int {
	switch {
	case f < 0.01:
		return 2
	case f < 0.1:
		return 1
	}
	return 1
}

// mass writes kg in the chosen unit with its symbol.
func mass(u desk.Unit, kg float64, decimals int) string {
	return fmt.Sprintf("%.*f %s", decimals, u.FromKg(kg), u)
}

// day writes a Unix-ms time as a date and time in UTC.
func day(ms int64) string {
	if ms == 0 {
		return ""
	}
	return time.UnixMilli(ms).UTC().Format("2 Jan 2006 15:04 UTC")
}

// errText is an error as a sentence for the screen: first letter
// capitalised.
func errText(err error) string {
	if err == nil {
		return ""
	}
	r := []rune(err.Error())
	if len(r) > 0 {
		r[0] = unicode.ToUpper(r[0])
	}
	return string(r)
}

// submitted drains the fields' editor events and reports whether Enter
// was pressed in any of them.
func submitted(gtx layout.Context, fields ...*kit.Field) bool {
	sub := false
	for _, f := range fields {
		for {
			e, ok := f.Editor.Update(gtx)
			if !ok {
				break
			}
			if _, ok := e.(widget.SubmitEvent); ok {
				sub = true
			}
		}
	}
	return sub
}
