package report

import (
	"fmt"
	"math"

	"baleassay/assess"
)

// glyph is the shape that goes with a verdict's word, so that neither
// colour nor the word alone carries it.
func glyph(verdict string) string {
	switch verdict {
	case "pass":
		return "✔"
	case "fail":
		return "✖"
	case "undecided":
		return "?"
	}
	return "–"
}

// badge is a verdict as HTML: shape, word, and a coloured frame.
func badge(verdict string) string {
	cls := verdict
	switch verdict {
	case "pass", "fail", "undecided":
	default:
		cls, verdict = "none", "no verdict"
	}
	return fmt.Sprintf(`<span class="badge %s">%s %s</span>`, cls, glyph(verdict), esc(verdict))
}

// fillOf is the fill of a verdict in a chart: solid, hatched, crossed,
// dotted.
func fillOf(prefix, verdict string) (fill, class string) {
	switch verdict {
	case "pass":
		return "", "v-pass"
	case "undecided":
		return "url(#" + prefix + "-diag)", ""
	case "fail":
		return "url(#" + prefix + "-cross)", ""
	}
	return "url(#" + prefix + "-dots)", ""
}

// boundText writes a limit as "≥ 72 %", "≤ 1 %" or "none".
func boundText(l assess.LimitReport) string {
	switch l.Bound {
	case "min":
		return "≥ " + pct(l.Limit)
	case "max":
		return "≤ " + pct(l.Limit)
	}
	return "none allowed"
}

// limitChart draws each limit of a spec on its own scale: the interval
// as a band, the estimate as a ring, the limit as a dashed line, and the
// verdict as shape and word.
func limitChart(id string, limits []assess.LimitReport, confidence float64) string {
	const rowH, top = 34.0, 6.0
	h := top + float64(len(limits))*rowH + 10
	s := newSVG(id, chartW, h, "Spec limits against the estimates",
		fmt.Sprintf("Each row: the item's estimate and its %s interval against the spec's limit, with the verdict.", level(confidence)))
	for i, l := range limits {
		y := top + float64(i)*rowH
		lo, hi := l.Fraction, l.Fraction
		if l.Low != nil && l.High != nil {
			lo, hi = *l.Low, *l.High
		}
		top := math.Max(math.Max(hi, l.Limit), l.Fraction) * 1.25
		if l.Bound == "zero" {
			top = math.Max(top, 0.01)
		}
		top, _ = niceMax(top)
		top = math.Min(top, 1)
		x := func(v float64) float64 { return plotX0 + (plotX1-plotX0)*math.Max(0, math.Min(v, top))/top }
		s.text(labelX, y+15, "end", "", l.Item+" "+boundText(l))
		s.line(plotX0, y+22, plotX1, y+22, "axis")
		s.text(plotX0, y+33, "start", "small mute", "0")
		s.text(plotX1, y+33, "end", "small mute", pct(top))
		s.rect(x(lo), y+6, math.Max(1.5, x(hi)-x(lo)), 14, "band")
		s.line(x(lo), y+13, x(hi), y+13, "whisk")
		if l.Bound != "zero" {
			s.line(x(l.Limit), y+2, x(l.Limit), y+24, "limit")
		}
		s.circle(x(l.Fraction), y+13, 4, "est")
		txt := pct(l.Fraction)
		if l.Low != nil && l.High != nil {
			txt += " (" + pctRange(*l.Low, *l.High) + ")"
		}
		s.text(textX, y+12, "start", "", txt)
		s.text(textX, y+27, "start", "small bold", glyph(l.Verdict)+" "+l.Verdict)
	}
	return s.String()
}
