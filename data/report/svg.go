package report

import (
	"fmt"
	"html"
	"math"
	"strconv"
	"strings"
)

// svg builds one inline SVG chart. Coordinates are in the viewBox's
// units; the chart scales to the page width, its text with it.
type svg struct {
	b    strings.Builder
	w, h float64
}

// newSVG starts a chart with its accessible title and description (read
// out by screen readers, shown as a tooltip).
func newSVG(id string, w, h float64, title, desc string) *svg {
	s := &svg{w: w, h: h}
	fmt.Fprintf(&s.b, `<svg xmlns="http://www.w3.org/2000/svg" id="%s" viewBox="0 0 %s %s" role="img" aria-labelledby="%s-t %s-d" data-chart="%s">`,
		esc(id), n(w), n(h), esc(id), esc(id), esc(id))
	fmt.Fprintf(&s.b, `<title id="%s-t">%s</title><desc id="%s-d">%s</desc>`, esc(id), esc(title), esc(id), esc(desc))
	return s
}

func (s *svg) raw(x string) { s.b.WriteString(x) }

func (s *svg) rect(x, y, w, h float64, class string) {
	if w < 0 {
		x, w = x+w, -w
	}
	fmt.Fprintf(&s.b, `<rect x="%s" y="%s" width="%s" height="%s" class="%s"/>`, n(x), n(y), n(w), n(h), class)
}

// rectFill draws a rectangle with an explicit fill (a pattern).
func (s *svg) rectFill(x, y, w, h float64, class, fill string) {
	fmt.Fprintf(&s.b, `<rect x="%s" y="%s" width="%s" height="%s" class="%s" fill="%s"/>`, n(x), n(y), n(w), n(h), class, fill)
}

func (s *svg) line(x1, y1, x2, y2 float64, class string) {
	fmt.Fprintf(&s.b, `<line x1="%s" y1="%s" x2="%s" y2="%s" class="%s"/>`, n(x1), n(y1), n(x2), n(y2), class)
}

func (s *svg) circle(x, y, r float64, class string) {
	fmt.Fprintf(&s.b, `<circle cx="%s" cy="%s" r="%s" class="%s"/>`, n(x), n(y), n(r), class)
}

func (s *svg) path(d, class string) {
	fmt.Fprintf(&s.b, `<path d="%s" class="%s"/>`, d, class)
}

// text writes a label; anchor is start, middle or end.
func (s *svg) text(x, y float64, anchor, class, t string) {
	fmt.Fprintf(&s.b, `<text x="%s" y="%s" text-anchor="%s" class="%s">%s</text>`, n(x), n(y), anchor, class, esc(t))
}

// textRot writes a label turned 90° anticlockwise about its anchor.
func (s *svg) textRot(x, y float64, anchor, class, t string) {
	fmt.Fprintf(&s.b, `<text x="%s" y="%s" text-anchor="%s" class="%s" transform="rotate(-90 %s %s)">%s</text>`,
		n(x), n(y), anchor, class, n(x), n(y), esc(t))
}

func (s *svg) String() string { return s.b.String() + "</svg>" }

// n writes a coordinate with at most two decimals.
func n(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "0"
	}
	return strconv.FormatFloat(math.Round(x*100)/100, 'f', -1, 64)
}

func esc(s string) string { return html.EscapeString(s) }

// hatch defines the fill patterns that carry a verdict besides its
// colour (WCAG 2.2, 1.4.1: colour is never the only carrier): solid for
// pass, diagonal lines for undecided, crossed lines for fail, dots for
// no verdict. Ids are prefixed so that several charts can coexist.
func hatch(prefix string) string {
	return fmt.Sprintf(`<defs>`+
		`<pattern id="%[1]s-diag" width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)"><rect width="6" height="6" class="v-undecided-bg"/><line x1="0" y1="0" x2="0" y2="6" class="v-undecided-ln"/></pattern>`+
		`<pattern id="%[1]s-cross" width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)"><rect width="6" height="6" class="v-fail-bg"/><line x1="0" y1="0" x2="0" y2="6" class="v-fail-ln"/><line x1="0" y1="3" x2="6" y2="3" class="v-fail-ln"/></pattern>`+
		`<pattern id="%[1]s-dots" width="5" height="5" patternUnits="userSpaceOnUse"><rect width="5" height="5" class="v-none-bg"/><circle cx="2.5" cy="2.5" r="1" class="v-none-ln"/></pattern>`+
		`</defs>`, prefix)
}

// niceMax rounds an axis maximum up to 1, 2, 2.5 or 5 times a power of
// ten, and gives a tick step that divides it into 4 or 5 parts.
func niceMax(x float64) (max, step float64) {
	if !(x > 0) || math.IsInf(x, 0) {
		return 1, 0.25
	}
	p := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		if m*p >= x*(1-1e-12) {
			max = m * p
			break
		}
	}
	step = max / 5
	if math.Abs(max/p-2) < 1e-9 {
		step = max / 4
	}
	return max, step
}
