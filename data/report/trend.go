package report

import (
	"fmt"
	"math"
	"strings"
	"time"

	"baleassay/data/desk"
)

// trendChart draws one share over time: every bale as a grey dot, the
// mean of each week (or month) as a marked line with its value written
// above it and its bale count below the axis, and an optional reference
// line (a spec's minimum). An empty bucket breaks the line.
type trendChart struct {
	id, title, desc string
	trend           desk.Trend
	stat            func(b desk.TrendBucket) desk.Stat
	bales           []desk.BalePoint
	share           func(p desk.BalePoint) float64
	ref             *mark
	yMax            float64 // 0: fitted to the data
	height          float64
}

func (c trendChart) svg() string {
	const left, right, top = 64.0, 700.0, 16.0
	h := c.height
	bottom := h - 48
	s := newSVG(c.id, chartW, h, c.title, c.desc)
	bs := c.trend.Buckets
	if len(bs) == 0 {
		s.text(chartW/2, h/2, "middle", "mute", "no audited bales in this range")
		return s.String()
	}
	t0, t1 := bs[0].Start, bs[len(bs)-1].End
	x := func(t time.Time) float64 { return left + (right-left)*float64(t.Sub(t0))/float64(t1.Sub(t0)) }
	hi := c.yMax
	if hi <= 0 {
		for _, p := range c.bales {
			if p.Audit.State == desk.AuditDone {
				hi = math.Max(hi, c.share(p))
			}
		}
		if c.ref != nil {
			hi = math.Max(hi, c.ref.at)
		}
		hi = math.Max(hi*1.1, 0.001)
	}
	hi, step := niceMax(hi)
	y := func(v float64) float64 { return bottom - (bottom-top)*math.Min(v, hi)/hi }
	for v := 0.0; v <= hi*(1+1e-9); v += step {
		s.line(left, y(v), right, y(v), "grid")
		s.text(left-6, y(v)+4, "end", "small", num(100*v, 3))
	}
	s.line(left, bottom, right, bottom, "axis")
	s.line(left, top, left, bottom, "axis")
	s.textRot(16, (top+bottom)/2, "middle", "small mute", "% of bale mass")
	every := int(math.Ceil(float64(len(bs)) / 12))
	for i, b := range bs {
		s.line(x(b.Start), bottom, x(b.Start), bottom+4, "axis")
		if i%every == 0 {
			s.text(x(b.Start)+2, bottom+15, "start", "small", c.trend.Unit.Label(b.Start))
			s.text(x(b.Start)+2, bottom+28, "start", "small mute", fmt.Sprintf("n=%d", c.stat(b).N))
		}
	}
	dots := "dots: single bales"
	if audited(c.bales) <= MaxDots {
		for _, p := range c.bales {
			if p.Audit.State == desk.AuditDone && !p.Received().Before(t0) && p.Received().Before(t1) {
				s.circle(x(p.Received()), y(c.share(p)), 2.2, "pt")
			}
		}
	} else {
		dots = fmt.Sprintf("single bales not drawn above %d", MaxDots)
	}
	if c.ref != nil {
		s.line(left, y(c.ref.at), right, y(c.ref.at), "limit")
		s.text(right, y(c.ref.at)-5, "end", "small limit-t halo", c.ref.label)
	}
	var d strings.Builder
	pen := false
	for _, b := range bs {
		st := c.stat(b)
		if st.N == 0 {
			pen = false
			continue
		}
		mx := x(b.Start.Add(b.End.Sub(b.Start) / 2))
		if pen {
			fmt.Fprintf(&d, " L%s %s", n(mx), n(y(st.Mean)))
		} else {
			fmt.Fprintf(&d, " M%s %s", n(mx), n(y(st.Mean)))
		}
		pen = true
	}
	if d.Len() > 0 {
		s.path(strings.TrimSpace(d.String()), "series")
	}
	for _, b := range bs {
		st := c.stat(b)
		if st.N == 0 {
			continue
		}
		mx := x(b.Start.Add(b.End.Sub(b.Start) / 2))
		s.rect(mx-4, y(st.Mean)-4, 8, 8, "mark")
		s.text(mx, y(st.Mean)-8, "middle", "small bold halo", fixed(100*st.Mean, pctDigits(100*st.Mean)))
	}
	s.text((left+right)/2, h-6, "middle", "small mute",
		fmt.Sprintf("%s received (UTC); squares: mean of the %s, %s", capital(c.trend.Unit.String()), c.trend.Unit, dots))
	return s.String()
}

// capital upper-cases an ASCII word's first letter.
func capital(s string) string {
	if s == "" || s[0] < 'a' || s[0] > 'z' {
		return s
	}
	return string(s[0]-'a'+'A') + s[1:]
}

// MaxDots is the most bales a trend draws one by one; more would make the
// page heavy without showing more (the means and counts still show).
const MaxDots = 2000

func audited(ps []desk.BalePoint) int {
	n := 0
	for _, p := range ps {
		if p.Audit.State == desk.AuditDone {
			n++
		}
	}
	return n
}
