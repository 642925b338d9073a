package report

import (
	"fmt"
	"math"
	"time"

	"baleassay/data/desk"
	"baleassay/yield"
)

// baleYield writes the wash line and glycolysis sections.
func baleYield(p *page, r desk.BaleReport) {
	run := r.Yield
	rep, mc, gly := run.Report, run.MC, run.Report.Glycolysate
	p.h(`<section id="yield"><h2>What the line and the reactor make of it</h2>`)
	how := "composition drawn from the audit's estimator, line efficiencies from their ranges"
	switch mc.Spread {
	case yield.SpreadNone:
		how = "one pull shows no spread: the composition is held at its estimate and the P10–P90 carry only the line's and the recipe's ranges"
	case yield.SpreadKnown:
		how = "the whole bale was sorted: the composition is known and the P10–P90 carry only the line's and the recipe's ranges"
	}
	p.h("<p>Line <strong>%s</strong>; %s, seed %d (%s).%s</p>", esc(run.Plan.Line.Line().Name), esc(desk.Plural(mc.Draws, "draw", "draws")), mc.Seed, how, p.notes.refs(mLine, mBootstrap))
	p.figure("flow", flowChart(p.id("flow"), run),
		"Heights in proportion to mass. The flake includes the process water the dryer leaves in it; the glycolysate includes the glycol added.")
	p.figure("spread", spreadChart(p.id("spread"), []spreadRow{
		{"clean flake, kg", rep.Balance.FlakeKg, mc.FlakeKg, 1},
		{"glycolysate, kg", gly.GlycolysateKg, mc.GlycolysateKg, 1},
		{"hydroxyl value, mg KOH/g", gly.HydroxylValue, mc.HydroxylValue, 1},
	}, mc.Draws), "The band runs from P10 to P90 of the draws, the tick is the median (P50), the ring the point estimate.")
	if len(run.Drivers) > 0 {
		p.figure("drivers", driverChart(p.id("drivers"), run.Drivers),
			"Each input varied alone, the others held at their estimate or midpoint; its share of the flake's variance. Measure the top ones better first."+p.notes.ref(mSensitivity))
	}
	if len(rep.Checks) > 0 {
		verdict := "pass"
		if !run.FlakePass {
			verdict = "fail"
		}
		p.h("<h3>Flake against spec %s: %s at the point estimate</h3>", esc(run.Plan.Spec.Name), badge(verdict))
		p.h(`<table><thead><tr><th>item</th><th class="n">limit</th><th class="n">point</th><th>verdict</th><th class="n">draws meeting it</th></tr></thead><tbody>`)
		for _, c := range rep.Checks {
			v := "fail"
			if c.Pass {
				v = "pass"
			}
			share := "–"
			if s := mc.SpecPass[c.Item]; !math.IsNaN(s) {
				share = pct(s)
			}
			p.h(`<tr><td>%s</td><td class="n">%s</td><td class="n">%s</td><td>%s</td><td class="n">%s</td></tr>`,
				esc(c.Item.String()), num(c.Limit, 3), num(c.Value, 3), badge(v), share)
		}
		p.h("</tbody></table>")
	}
	glycolysis(p, gly, run.Plan.Recipe)
	var warns []string
	warns = append(warns, rep.Warnings...)
	warns = append(warns, gly.Warnings...)
	if len(warns) > 0 {
		p.h("<h3>Warnings</h3><ul>")
		for _, w := range warns {
			p.h("<li>%s</li>", esc(capital(w)))
		}
		p.h("</ul>")
	}
	p.h("</section>\n")
}

// glycolysis writes the reactor's figures and the chain-length chart.
func glycolysis(p *page, g yield.Glycolysate, rc yield.Recipe) {
	p.h("<h3>Glycolysis%s</h3>", p.notes.ref(mGlycolysis))
	ratio := fmt.Sprintf("%s kg per kg of dry flake", num(rc.Ratio, 3))
	if rc.Molar {
		ratio = fmt.Sprintf("%s mol per mol of PET repeat unit", num(rc.Ratio, 3))
	}
	rows := [][2]string{
		{"glycol", fmt.Sprintf("%s (%s), %s, %s", esc(g.Glycol.Name), esc(g.Glycol.Key), kg(g.GlycolKg), ratio)},
		{"catalyst", fmt.Sprintf("%s, %s (%s ppm metal in the product)", esc(g.Catalyst.Name), kg(g.CatalystKg), num(g.MetalPPM, 0))},
		{"PET charged / converted", kg(g.PETKg) + " / " + kg(g.ConvertedPETKg)},
		{"glycolysate", kg(g.GlycolysateKg)},
		{"hydroxyl value", num(g.HydroxylValue, 1) + nbsp + "mg KOH/g"},
		{"equivalent weight", num(g.EquivalentWeight, 1) + nbsp + "g/eq"},
		{"number-average molar mass", num(g.Mn, 1) + nbsp + "g/mol"},
		{"recycled-PET share of the product", pct(g.RecycledPETShare())},
	}
	if g.StrippedEGKg > 0 {
		rows = append(rows, [2]string{"ethylene glycol stripped", kg(g.StrippedEGKg)})
	}
	if g.HClKg > 0 {
		rows = append(rows, [2]string{"HCl residual PVC can release", fmt.Sprintf("%s (acid value up to +%s mg KOH/g)", kg(g.HClKg), num(g.AcidValuePVC, 2))})
	}
	if len(g.Dist.Weight) > 0 {
		d := g.Dist
		rows = append(rows,
			[2]string{"free glycol", pct(d.FreeGlycolWt) + " by weight"},
			[2]string{"monomer (1 unit)", pct(d.MonomerWt) + " by weight; holds " + pct(d.MonomerYield) + " of the terephthalate"},
			[2]string{fmt.Sprintf("%d or more units", yield.LongOligomerUnits), pct(d.LongOligomerWt) + " by weight"})
	}
	p.h("<table><tbody>")
	for _, r := range rows {
		p.h("<tr><th>%s</th><td>%s</td></tr>", esc(r[0]), r[1])
	}
	p.h("</tbody></table>")
	if len(g.Dist.Weight) == 0 {
		p.h("<p>%s is branched: only the hydroxyl arithmetic is given, no chain-length distribution.</p>", esc(g.Glycol.Name))
		return
	}
	var cols []column
	for k, w := range g.Dist.Weight {
		label := fmt.Sprint(k)
		if k > yield.DistMaxK {
			label = fmt.Sprintf(">%d", yield.DistMaxK)
		}
		cols = append(cols, column{label: label, value: 100 * w, text: num(100*w, 1)})
	}
	p.figure("chains", columnChart{id: p.id("chains"), title: "Chain lengths of the glycolysate",
		desc: fmt.Sprintf("Weight share of molecules with k terephthalate units, Flory distribution with p = %s.", num(g.Dist.P, 4)),
		cols: cols, tick: func(v float64) string { return num(v, 1) }, axis: "weight %", xaxis: "terephthalate units per molecule, k (0 is free glycol)"}.svg(),
		fmt.Sprintf("Weight %% by chain length (most-probable distribution, p = %s); %s of the product has %d or more units.", num(g.Dist.P, 4), pct(g.Dist.LongOligomerWt), yield.LongOligomerUnits))
}

// driverChart ranks what drives the spread of the flake: for the inputs
// with the largest shares, the share of the flake's variance as a bar
// with the input's name above it and its standard deviation beside it.
func driverChart(id string, ds []yield.Driver) string {
	const rh, top, shown = 34.0, 4.0, 6
	ds = ds[:min(len(ds), shown)]
	h := top + float64(len(ds))*rh + 40
	s := newSVG(id, chartW, h, "What drives the spread of the flake",
		fmt.Sprintf("The %s with the largest share of the variance of the flake mass, each varied alone.", desk.Plural(len(ds), "input", "inputs")))
	x := func(v float64) float64 { return 20 + (plotX1-20)*math.Max(0, math.Min(v, 1)) }
	for i, d := range ds {
		y := top + float64(i)*rh
		s.text(20, y+11, "start", "small", d.Name)
		s.rect(20, y+15, math.Max(1, x(d.FlakeShare)-20), 12, "bar")
		s.text(chartW-10, y+25, "end", "", fmt.Sprintf("%s · SD %s kg", pct(d.FlakeShare), num(d.FlakeSD, 2)))
	}
	yAxis := top + float64(len(ds))*rh + 2
	s.line(20, yAxis, plotX1, yAxis, "axis")
	for _, v := range []float64{0, 0.25, 0.5, 0.75, 1} {
		s.line(x(v), yAxis, x(v), yAxis+4, "axis")
		s.text(x(v), yAxis+16, "middle", "small", num(100*v, 0))
	}
	s.text((20+plotX1)/2, yAxis+30, "middle", "small mute", "share of the flake's variance, % (SD: the flake's standard deviation from this input alone)")
	return s.String()
}

func received(ms int64) time.Time { return time.UnixMilli(ms).UTC() }

// shortID is the last 8 hex digits of an id, as listings print them.
func shortID(id string) string {
	if len(id) > 8 {
		return id[len(id)-8:]
	}
	return id
}
