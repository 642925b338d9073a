package report

import (
	"math"
	"strings"
)

// Chart widths in viewBox units; charts scale to the page.
const (
	chartW = 720.0
	labelX = 228.0 // right edge of row labels
	plotX0 = 236.0
	plotX1 = 540.0
	textX  = 550.0 // values printed right of the plot
	rowH   = 24.0
)

// bar is one row of a horizontal bar chart.
type bar struct {
	label  string
	value  float64
	lo, hi float64 // the interval, when interval
	// interval: draw a whisker from lo to hi.
	interval bool
	text     string // the value in words, right of the plot
	sub      string // a second, smaller line under text
	fill     string // a pattern url; "" for the plain bar
	class    string // "" for "bar"
}

// mark is a vertical reference line across a chart (a spec limit).
type mark struct {
	at    float64
	label string
}

// barChart draws rows of bars on one scale, each with its value written
// beside it, optional intervals and reference lines.
type barChart struct {
	id, title, desc string
	bars            []bar
	max             float64                // axis maximum; 0: rounded up from the data
	tick            func(v float64) string // tick label
	axis            string                 // axis title (with unit)
	marks           []mark
	defs            string
	counts          bool // whole numbers: ticks at whole steps, axis to at least 5
}

func (c barChart) svg() string {
	rowH := rowH
	for _, b := range c.bars {
		if b.sub != "" {
			rowH = 36
		}
	}
	top := 8.0
	if len(c.marks) > 0 {
		top = 22
	}
	h := top + float64(len(c.bars))*rowH + 40
	s := newSVG(c.id, chartW, h, c.title, c.desc)
	s.raw(c.defs)
	hi := c.max
	step := 0.0
	if hi <= 0 {
		for _, b := range c.bars {
			hi = math.Max(hi, math.Max(b.value, b.hi))
		}
		for _, m := range c.marks {
			hi = math.Max(hi, m.at)
		}
		hi *= 1.05
	}
	hi, step = niceMax(hi)
	if c.counts {
		hi, step = niceMax(math.Max(hi, 5))
		step = math.Max(1, math.Round(step))
	}
	x := func(v float64) float64 { return plotX0 + (plotX1-plotX0)*math.Max(0, math.Min(v, hi))/hi }
	yAxis := top + float64(len(c.bars))*rowH + 4
	for v := 0.0; v <= hi*(1+1e-9); v += step {
		s.line(x(v), top-2, x(v), yAxis, "grid")
		s.text(x(v), yAxis+14, "middle", "small", c.tick(v))
	}
	s.line(plotX0, yAxis, plotX1, yAxis, "axis")
	s.line(plotX0, top-2, plotX0, yAxis, "axis")
	s.text((plotX0+plotX1)/2, yAxis+30, "middle", "small mute", c.axis)
	for i, b := range c.bars {
		y := top + float64(i)*rowH
		s.text(labelX, y+rowH/2+4, "end", "", b.label)
		cls := b.class
		if cls == "" {
			cls = "bar"
		}
		bh := math.Min(rowH-10, 14)
		by := y + (rowH-bh)/2
		if b.fill != "" {
			s.rectFill(plotX0, by, x(b.value)-plotX0, bh, "pat", b.fill)
		} else {
			s.rect(plotX0, by, x(b.value)-plotX0, bh, cls)
		}
		if b.interval {
			ym := y + rowH/2
			s.line(x(b.lo), ym, x(b.hi), ym, "whisk")
			s.line(x(b.lo), ym-5, x(b.lo), ym+5, "whisk")
			s.line(x(b.hi), ym-5, x(b.hi), ym+5, "whisk")
		}
		if b.sub == "" {
			s.text(textX, y+rowH/2+4, "start", "", b.text)
		} else {
			s.text(textX, y+rowH/2-2, "start", "", b.text)
			s.text(textX, y+rowH/2+12, "start", "small mute", b.sub)
		}
	}
	for _, m := range c.marks {
		s.line(x(m.at), top-6, x(m.at), yAxis, "limit")
		s.text(x(m.at), top-9, "middle", "small limit-t", m.label)
	}
	return s.String()
}

// column is one bar of a column chart.
type column struct {
	label, text string
	value       float64
}

// columnChart draws vertical bars with their values above them.
type columnChart struct {
	id, title, desc string
	cols            []column
	tick            func(v float64) string
	axis, xaxis     string
}

func (c columnChart) svg() string {
	const h, top, bottom, left, right = 230.0, 18.0, 186.0, 70.0, 700.0
	s := newSVG(c.id, chartW, h, c.title, c.desc)
	hi := 0.0
	for _, col := range c.cols {
		hi = math.Max(hi, col.value)
	}
	hi, step := niceMax(hi * 1.08)
	y := func(v float64) float64 { return bottom - (bottom-top)*v/hi }
	for v := 0.0; v <= hi*(1+1e-9); v += step {
		s.line(left, y(v), right, y(v), "grid")
		s.text(left-6, y(v)+4, "end", "small", c.tick(v))
	}
	s.line(left, bottom, right, bottom, "axis")
	s.line(left, top, left, bottom, "axis")
	s.textRot(16, (top+bottom)/2, "middle", "small mute", c.axis)
	slot := (right - left) / float64(len(c.cols))
	for i, col := range c.cols {
		x0 := left + float64(i)*slot
		s.rect(x0+slot*0.18, y(col.value), slot*0.64, bottom-y(col.value), "bar")
		s.text(x0+slot/2, y(col.value)-4, "middle", "small", col.text)
		s.text(x0+slot/2, bottom+15, "middle", "small", col.label)
	}
	s.text((left+right)/2, bottom+36, "middle", "small mute", c.xaxis)
	return s.String()
}

// shortName cuts a category's display name at its parenthesis.
func shortName(name string) string {
	if i := strings.Index(name, " ("); i > 0 {
		return name[:i]
	}
	return name
}
