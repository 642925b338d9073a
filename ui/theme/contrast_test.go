package theme

import (
	"image/color"
	"math"
	"testing"
)

// Thresholds of WCAG 2.2.
// Source: WCAG 2.2, SC 1.4.6 Contrast (Enhanced) 7:1, SC 1.4.3 Contrast
// (Minimum) 4.5:1, SC 1.4.11 Non-text Contrast 3:1.
const (
	aaaText = 7.0
	aaText  = 4.5
	nonText = 3.0
)

func TestContrastRatioKnownValues(t *testing.T) {
	for _, c := range []struct {
		a, b color.NRGBA
		want float64
		src  string
	}{
		// Source: WCAG 2.2 definition of contrast ratio: ratios range from 1:1 to 21:1 (black on white).
		{rgb(0x000000), rgb(0xFFFFFF), 21, "WCAG 2.2 definition"},
		{rgb(0x777777), rgb(0x777777), 1, "WCAG 2.2 definition"},
		// Source: WebAIM contrast checker, #767676 on #FFFFFF = 4.54:1 (the
		// lightest grey that passes AA on white), from memory.
		{rgb(0x767676), rgb(0xFFFFFF), 4.54, "from memory"},
		// Source: #595959 on white = 7.00:1, the lightest AAA grey, from memory.
		{rgb(0x595959), rgb(0xFFFFFF), 7.00, "from memory"},
	} {
		got := ContrastRatio(c.a, c.b)
		if math.Abs(got-c.want) > 0.01 {
			t.Errorf("ContrastRatio(%v, %v) = %.3f, want %.2f (%s)", c.a, c.b, got, c.want, c.src)
		}
		if rev := ContrastRatio(c.b, c.a); rev != got {
			t.Errorf("ContrastRatio is not symmetric: %.4f vs %.4f", got, rev)
		}
	}
}

func TestPalettesMeetWCAG(t *testing.T) {
	for _, m := range []Mode{Normal, HighContrast} {
		p := PaletteOf(m)
		textMin := aaText
		if m == HighContrast {
			textMin = aaaText
		}
		for _, pr := range p.Pairs() {
			min := nonText
			if pr.Kind == TextPair {
				min = textMin
			}
			r := ContrastRatio(pr.Fg, pr.Bg)
			t.Logf("%-13s %-28s %-8s %5.2f:1 (need %.1f)", m, pr.Name, pr.Kind, r, min)
			if r < min {
				t.Errorf("%s palette: %s is %.2f:1, below %.1f:1", m, pr.Name, r, min)
			}
		}
	}
}

// Every colour the palette names takes part in at least one checked pair,
// so a new role cannot slip in unchecked.
func TestEveryColourChecked(t *testing.T) {
	p := NormalPalette()
	seen := map[color.NRGBA]bool{}
	for _, pr := range p.Pairs() {
		seen[pr.Fg], seen[pr.Bg] = true, true
	}
	for name, c := range map[string]color.NRGBA{
		"Bg": p.Bg, "Surface": p.Surface, "Text": p.Text, "Muted": p.Muted, "Border": p.Border,
		"Focus": p.Focus, "Primary": p.Primary, "OnPrimary": p.OnPrimary, "Button": p.Button,
		"OnButton": p.OnButton, "Selected": p.Selected, "OnSelect": p.OnSelect, "Bar": p.Bar,
		"Whisker": p.Whisker, "Pass": p.Pass, "Fail": p.Fail, "Undecided": p.Undecided,
		"OnBadge": p.OnBadge, "Banner": p.Banner, "OnBanner": p.OnBanner, "Error": p.Error,
		"Caution": p.Caution,
	} {
		if !seen[c] {
			t.Errorf("colour %s (%v) is in no checked pair", name, c)
		}
	}
}
