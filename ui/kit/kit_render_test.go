package kit

import (
	"image"
	"math"
	"testing"

	"gioui.org/io/input"
	"gioui.org/layout"
	"gioui.org/widget"

	"baleassay/ui/theme"
	"baleassay/ui/uitest"
)

// A sheet of every widget in both palettes, as the reference for how the
// widgets look (the screens' own images are in ui/testdata).
func TestWidgetSheet(t *testing.T) {
	for _, m := range []theme.Mode{theme.Normal, theme.HighContrast} {
		t.Run(m.String(), func(t *testing.T) {
			th := theme.New(m, 1, nil)
			var b1, b2, b3 widget.Clickable
			f1, f2 := NewField(), NewField()
			f1.SetText("12.4")
			f2.SetText("-3")
			f2.Problem = "Mass must be above 0 kg: type the pull's weight as read on the scale."
			r := new(input.Router)
			img := uitest.Render(t, 900, 620, r, func(gtx layout.Context) {
				Fill(gtx, th.Pal.Bg, gtx.Constraints.Max, 0)
				layout.UniformInset(12).Layout(gtx, func(gtx layout.Context) layout.Dimensions {
					return layout.Flex{Axis: layout.Vertical}.Layout(gtx,
						layout.Rigid(func(gtx layout.Context) layout.Dimensions {
							return Banner{Th: th, Title: "DEMO DATA", Text: "Invented yards and bales."}.Layout(gtx, nil)
						}),
						layout.Rigid(Gap(SpacingDp)),
						layout.Rigid(func(gtx layout.Context) layout.Dimensions {
							return layout.Flex{}.Layout(gtx,
								layout.Rigid(Button{Th: th, Click: &b1, Text: "PET clear", Sub: "3.20 kg", Hint: "1"}.Layout),
								layout.Rigid(Gap(SpacingDp)),
								layout.Rigid(Button{Th: th, Click: &b2, Text: "Save pull", Role: RolePrimary, Hint: "Enter"}.Layout),
								layout.Rigid(Gap(SpacingDp)),
								layout.Rigid(Button{Th: th, Click: &b3, Text: "PVC", Role: RoleSelected, Hint: "3"}.Layout),
							)
						}),
						layout.Rigid(Gap(SpacingDp)),
						layout.Rigid(FieldStyle{Th: th, F: f1, Label: "Pull mass", Unit: "kg"}.Layout),
						layout.Rigid(Gap(SpacingDp)),
						layout.Rigid(FieldStyle{Th: th, F: f2, Label: "Pull mass", Unit: "kg"}.Layout),
						layout.Rigid(Gap(SpacingDp)),
						layout.Rigid(ValueBar{Th: th, Name: "PET", Est: 0.82, Lo: 0.78, Hi: 0.87, HasCI: true, Limit: 0.80, Value: "82.0 % (78.0–87.0)"}.Layout),
						layout.Rigid(ValueBar{Th: th, Name: "PVC", Est: 0, Lo: 0, Hi: 0.004, HasCI: true, Max: 0.05, Limit: math.NaN(), Value: "none found, at most 0.4 %"}.Layout),
						layout.Rigid(Gap(SpacingDp)),
						layout.Rigid(func(gtx layout.Context) layout.Dimensions {
							return layout.Flex{}.Layout(gtx,
								layout.Rigid(Badge{Th: th, Kind: BadgePass, Word: "MEETS SPEC"}.Layout),
								layout.Rigid(Gap(SpacingDp)),
								layout.Rigid(Badge{Th: th, Kind: BadgeUndecided}.Layout),
								layout.Rigid(Gap(SpacingDp)),
								layout.Rigid(Badge{Th: th, Kind: BadgeFail}.Layout),
							)
						}),
						layout.Rigid(Gap(SpacingDp)),
						layout.Rigid(Progress{Th: th, Share: 0.4, Text: "2 of 5 files"}.Layout),
					)
				})
			})
			uitest.Match(t, "widgets-"+m.String(), img)
		})
	}
}

var _ = image.Point{}
