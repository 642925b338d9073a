package report

import (
	"fmt"
	"math"

	"baleassay/data/desk"
	"baleassay/yield"
)

// flowChart draws the bale's mass through the line and the reactor:
// boxes and bands of heights in proportion to mass (bale → clean flake
// and reject streams; flake + glycol → glycolysate), every box labelled
// with its mass and, for flake and glycolysate, the P10–P90 of the draws.
func flowChart(id string, run desk.YieldRun) string {
	bal, gly, mc := run.Report.Balance, run.Report.Glycolysate, run.MC
	rejects := 0.0
	for _, st := range bal.Streams {
		rejects += st.Kg
	}
	const top0, avail = 78.0, 210.0
	k := avail / math.Max(bal.BaleKg+bal.ProcessWaterKg, gly.GlycolysateKg)
	bH, fH, gH := bal.BaleKg*k, bal.FlakeKg*k, gly.GlycolysateKg*k
	fromBale := math.Max(1, (bal.FlakeKg-bal.ProcessWaterKg)*k)
	glyH := math.Max(2, math.Min(gH-1, gly.GlycolKg*k))
	below := top0 + fH + 34 // reject streams and glycol sit under the flake's band
	rH := math.Max(2, rejects*k)
	listEnd := below + rH + 16 + 13*float64(len(bal.Streams))
	h := math.Max(math.Max(top0+gH, below+glyH+20), listEnd) + 24
	s := newSVG(id, chartW, h, "Mass flow: bale to clean flake to glycolysate",
		fmt.Sprintf("Bale %s through the wash line gives %s of clean flake and %s of reject streams; with %s of %s the reactor gives %s of glycolysate.",
			kg(bal.BaleKg), kg(bal.FlakeKg), kg(rejects), kg(gly.GlycolKg), gly.Glycol.Key, kg(gly.GlycolysateKg)))
	// Bands first, boxes over them.
	band := func(x0, y0a, y0b, x1, y1a, y1b float64) {
		m := (x0 + x1) / 2
		s.path(fmt.Sprintf("M%s %s C%s %s %s %s %s %s L%s %s C%s %s %s %s %s %s Z",
			n(x0), n(y0a), n(m), n(y0a), n(m), n(y1a), n(x1), n(y1a),
			n(x1), n(y1b), n(m), n(y1b), n(m), n(y0b), n(x0), n(y0b)), "flow")
	}
	band(140, top0, top0+fromBale, 300, top0, top0+fH)
	band(140, top0+fromBale, top0+bH, 300, below, below+rH)
	band(420, top0, top0+fH, 590, top0, top0+gH-glyH)
	band(530, below, below+glyH, 590, top0+gH-glyH, top0+gH)
	s.rect(20, top0, 120, bH, "box")
	s.rect(300, top0, 120, fH, "box")
	s.rect(300, below, 120, rH, "reject")
	s.rect(590, top0, 120, gH, "box")
	s.rect(450, below, 80, glyH, "box")
	// Labels.
	s.text(80, 18, "middle", "bold", "Bale")
	s.text(80, 34, "middle", "", kg(bal.BaleKg)+" gross")
	s.text(360, 18, "middle", "bold", "Clean flake")
	s.text(360, 34, "middle", "", kg(bal.FlakeKg)+" ("+pct(bal.FlakeShare)+" of the bale)")
	s.text(360, 50, "middle", "small", "P10–P90 "+massNum(mc.FlakeKg.P10)+"–"+massNum(mc.FlakeKg.P90)+nbsp+"kg")
	s.text(650, 18, "middle", "bold", "Glycolysate")
	s.text(650, 34, "middle", "", kg(gly.GlycolysateKg))
	s.text(650, 50, "middle", "small", "P10–P90 "+massNum(mc.GlycolysateKg.P10)+"–"+massNum(mc.GlycolysateKg.P90)+nbsp+"kg")
	s.text(650, 64, "middle", "small", "OH value "+num(gly.HydroxylValue, 1)+nbsp+"mg"+nbsp+"KOH/g")
	s.text(220, top0-8, "middle", "small mute", "wash line")
	s.text(505, top0-8, "middle", "small mute", "reactor")
	s.text(490, below+glyH+14, "middle", "small", gly.Glycol.Key+" added "+kg(gly.GlycolKg))
	s.text(300, below+rH+14, "start", "small bold", "Reject streams "+kg(rejects))
	for i, st := range bal.Streams {
		s.text(300, below+rH+28+13*float64(i), "start", "small", streamName(st)+" "+kg(st.Kg))
	}
	notes := fmt.Sprintf("Process water left in the flake %s; solids filtered off %s.", kg(bal.ProcessWaterKg), kg(gly.InertSolidsKg+gly.UndissolvedPETKg))
	s.text(20, h-8, "start", "small mute", notes)
	return s.String()
}

// streamName writes a reject stream's key for people.
func streamName(st yield.Stream) string {
	b := []byte(st.Name)
	for i, c := range b {
		if c == '_' {
			b[i] = ' '
		}
	}
	return string(b)
}

// spreadRow is one output of the Monte Carlo on its own scale.
type spreadRow struct {
	label  string
	point  float64
	s      yield.Summary
	digits int
}

// spreadChart draws, for each output, the P10–P90 band of the draws, the
// P50 as a tick and the point estimate as a ring, with the figures.
func spreadChart(id string, rows []spreadRow, draws int) string {
	const rh, top = 40.0, 6.0
	h := top + float64(len(rows))*rh + 6
	s := newSVG(id, chartW, h, "Spread of the yield over the draws",
		fmt.Sprintf("P10 to P90 of %s for each output, with the median and the point estimate.", desk.Plural(draws, "draw", "draws")))
	for i, r := range rows {
		y := top + float64(i)*rh
		lo := math.Min(r.s.P10, r.point)
		hi := math.Max(r.s.P90, r.point)
		pad := math.Max((hi-lo)*0.6, math.Abs(r.point)*0.004+1e-9)
		a, b := lo-pad, hi+pad
		x := func(v float64) float64 { return plotX0 + (plotX1-plotX0)*(v-a)/(b-a) }
		s.text(labelX, y+16, "end", "", r.label)
		s.line(plotX0, y+24, plotX1, y+24, "axis")
		s.text(plotX0, y+36, "start", "small mute", num(a, r.digits))
		s.text(plotX1, y+36, "end", "small mute", num(b, r.digits))
		s.rect(x(r.s.P10), y+6, math.Max(1.5, x(r.s.P90)-x(r.s.P10)), 16, "band")
		s.line(x(r.s.P50), y+4, x(r.s.P50), y+24, "whisk")
		s.circle(x(r.point), y+14, 4, "est")
		s.text(textX, y+13, "start", "", "P10–P90 "+fixed(r.s.P10, r.digits)+"–"+fixed(r.s.P90, r.digits))
		s.text(textX, y+28, "start", "small mute", "P50 "+fixed(r.s.P50, r.digits)+" · point "+fixed(r.point, r.digits))
	}
	return s.String()
}
