package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"

	"baleassay/assess"
	"baleassay/data/desk"
	"baleassay/yield"
)

func init() {
	register(command{
		name: "load",
		usage: "BALE|PULLS.csv:KG ... --bales N [--load-kg K] [--spec NAME|FILE] [--confidence C] [--bale-cost C] " +
			"[--yield [--line FILE] [--flake-spec FILE|none] [--draws N] [--seed S]] [--json] [--store DIR|--demo]",
		summary: "audit a load (a delivery of bales, some audited) by two-stage sampling: composition, verdict, more bales or more pulls, and its flake and polyol",
		run:     runLoad,
	})
}

func runLoad(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("load")
	bales := fs.Int("bales", 0, "bales delivered in the load (default: only the audited ones)")
	loadKg := fs.Float64("load-kg", 0, "the load's mass in kg (default: bales × the mean audited bale)")
	specName := fs.String("spec", desk.DefaultSpec, "built-in spec name or spec JSON file; 'none' for no verdict")
	conf := fs.Float64("confidence", assess.DefaultConfidence, "two-sided confidence level, e.g. 0.90")
	baleCost := fs.Float64("bale-cost", assess.DefaultBaleCost, "effort of auditing one more bale besides its pulls, in pulls' worth")
	withYield := fs.Bool("yield", false, "also put the load through the wash line and the glycolysis reactor")
	line := fs.String("line", "", "line profile JSON file or stored line (default: the built-in line)")
	flakeSpec := fs.String("flake-spec", "", "flake spec JSON file, or 'none'")
	draws := fs.Int("draws", yield.DefaultDraws, "Monte Carlo draws")
	seed := fs.Uint64("seed", 1, "random seed; the same seed gives the same numbers")
	asJSON := fs.Bool("json", false, "print JSON")
	dir := storeFlag(fs)
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 {
		return usagef("name the audited bales: stored bales (tag or id), or pulls files as FILE:KG")
	}
	if !(*conf > 0 && *conf < 1) {
		return usagef("--confidence %s: give a level between 0 and 1, e.g. 0.90", assess.Plain(*conf))
	}
	if *bales < 0 || math.IsNaN(*loadKg) || *loadKg < 0 || !(*baleCost > 0) {
		return usagef("--bales, --load-kg and --bale-cost take numbers of 0 or more (--bale-cost above 0)")
	}
	var ins []desk.LoadBaleInput
	stored := false
	for _, p := range pos {
		in, err := desk.ParseLoadBale(p)
		if err != nil {
			return err
		}
		stored = stored || in.File == ""
		ins = append(ins, in)
	}
	var d *desk.Desk // files only: no store needed
	if stored {
		if d, err = openDesk(*dir, false); err != nil {
			return err
		}
		defer d.Close()
	}
	opt := desk.LoadOptions{Bales: *bales, LoadKg: *loadKg, Spec: *specName, Confidence: *conf, BaleCost: *baleCost,
		MC: yield.MCOptions{Draws: *draws, Seed: *seed}}
	if *withYield {
		plan, err := d.Plan(*line, *flakeSpec)
		if err != nil {
			return err
		}
		opt.Yield = &plan
	}
	la, err := d.AuditLoad(context.Background(), ins, opt)
	if err != nil {
		return err
	}
	if *asJSON {
		return writeJSON(stdout, loadJSON{LoadReport: la.Report, Yield: loadYieldJSON(la)})
	}
	printLoad(stdout, la)
	return nil
}

// loadJSON is the stable JSON output of bale load (see README): the
// load report, and with --yield the object of bale yield for the load.
type loadJSON struct {
	assess.LoadReport
	Yield *yieldJSON `json:"yield,omitempty"`
}

func loadYieldJSON(la desk.LoadAudit) *yieldJSON {
	if la.Yield == nil {
		return nil
	}
	y := buildYieldJSON(la.Yield.Report, la.Yield.MC, la.Yield.Plan, false)
	addSpread(&y, la.Yield.MC, la.Drivers, la.Yield.Plan)
	return &y
}

func printLoad(w io.Writer, la desk.LoadAudit) {
	r := la.Report
	fmt.Fprintf(w, "Load audit: %d of %s audited (%.0f %%), %s, %.1f kg sorted; load %.0f kg\n",
		r.Audited, desk.Plural(r.Bales, "bale", "bales"), 100*r.AuditedShare, desk.Plural(r.Pulls, "pull", "pulls"), r.SampledKg, r.LoadKg)
	fmt.Fprintf(w, "Two-stage ratio-to-size estimate, %.0f %% confidence\n", 100*r.Confidence)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "\nbale\tkg\tpulls\tsorted kg\ttarget PET\tinterval\t\n")
	for _, b := range r.PerBale {
		fmt.Fprintf(tw, "%s\t%.0f\t%d\t%.1f\t%s\t%s\t\n", b.Label, b.BaleKg, b.Pulls, b.SampledKg, pct(b.TargetPET), intervalText(b.Low, b.High))
	}
	tw.Flush()
	printBody(w, r.Groups, r.Categories, r.Confidence, r.Pieces, r.Hazards, r.SampledKg)
	if s := r.Spec; s != nil {
		limits := make([]limitRow, len(s.Limits))
		for i, l := range s.Limits {
			limits[i] = limitRow{l.LimitCore, l.MoreBales, l.BalesNeeded}
		}
		printSpec(w, s.Name, s.Verdict, s.Grade, s.GradeState, s.CountAttached, limits, "bales", noneTexts(r.Groups, r.Categories))
	}
	a := r.Advice
	fmt.Fprintf(w, "\nNext: %s.\n", a.Why)
	if a.CostBales != nil || a.CostPulls != nil {
		var parts []string
		if a.CostBales != nil {
			parts = append(parts, fmt.Sprintf("%s more ≈ %.0f pulls' worth", desk.Plural(*a.MoreBales, "bale", "bales"), *a.CostBales))
		}
		if a.CostPulls != nil {
			parts = append(parts, fmt.Sprintf("%d more %s (%d per bale)", *a.MorePulls, plural(*a.MorePulls, "pull", "pulls"), *a.PullsPerBale))
		}
		fmt.Fprintf(w, "  Effort, with a bale counted as %s pulls besides its own: %s.\n", assess.Plain(a.BaleCost), strings.Join(parts, "; "))
	}
	for _, n := range r.Notes {
		fmt.Fprintf(w, "Note: %s\n", n)
	}
	if y := la.Yield; y != nil {
		o := loadYieldJSON(la)
		fmt.Fprintf(w, "\nThe load through %s (%s, seed %d):\n", y.Plan.Line, desk.Plural(o.Draws, "draw", "draws"), o.Seed)
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintf(tw, "\tpoint\tP10\tP50\tP90\t\n")
		fmt.Fprintf(tw, "clean flake, kg\t%.0f\t%s\t%s\t%s\t\n", o.Point.FlakeKg, kgOf(o.FlakeKg.P10), kgOf(o.FlakeKg.P50), kgOf(o.FlakeKg.P90))
		fmt.Fprintf(tw, "glycolysate, kg\t%.0f\t%s\t%s\t%s\t\n", o.Point.GlycolysateKg, kgOf(o.GlycolysateKg.P10), kgOf(o.GlycolysateKg.P50), kgOf(o.GlycolysateKg.P90))
		fmt.Fprintf(tw, "hydroxyl value, mg KOH/g\t%.1f\t%s\t%s\t%s\t\n", o.Point.HydroxylValue, ohvOf(o.HydroxylValue.P10), ohvOf(o.HydroxylValue.P50), ohvOf(o.HydroxylValue.P90))
		tw.Flush()
		printSpread(w, *o, "audited bale")
		printNotes(w, o.Warnings, o.Cautions)
	}
	fmt.Fprintln(w, "\nSafety: bale ties are under tension and bales spring apart when cut: cut from the side, wear eye protection,")
	fmt.Fprintln(w, "never stand under a lifted bale. Hazardous containers, sharps and lithium batteries may be inside. Local codes rule.")
}

func kgOf(x *float64) string {
	if x == nil {
		return "–"
	}
	return fmt.Sprintf("%.0f", *x)
}

func ohvOf(x *float64) string {
	if x == nil {
		return "–"
	}
	return fmt.Sprintf("%.1f", *x)
}
