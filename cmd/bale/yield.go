package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"strings"
	"text/tabwriter"

	"baleassay/assess"
	"baleassay/data/desk"
	"baleassay/yield"
)

func init() {
	register(command{
		name: "yield",
		usage: "PULLS.csv --bale-kg N | BALE [--line FILE] [--flake-spec FILE|none] [--glycol KEY --glycol-ratio R [--molar]] " +
			"[--strip-eg F|LO:HI] [--conversion X|LO:HI] [--catalyst-pct P] [--catalyst K] [--pet-mn MN] [--reactor-kg K] [--draws N] [--seed S] [--fixed-line] [--json]",
		summary: "put an audited bale through the wash line and the glycolysis reactor, with P10/P50/P90",
		run:     runYield,
	})
}

// yieldJSON is the stable JSON output of bale yield (see README).
type yieldJSON struct {
	BaleKg           float64            `json:"bale_kg"`
	Line             string             `json:"line"`
	Draws            int                `json:"draws"`
	Seed             uint64             `json:"seed"`
	FixedLine        bool               `json:"fixed_line"`
	FlakeKg          summaryJSON        `json:"flake_kg"`
	GlycolysateKg    summaryJSON        `json:"glycolysate_kg"`
	HydroxylValue    summaryJSON        `json:"hydroxyl_value"`
	Point            pointJSON          `json:"point"`
	FlakeComposition map[string]float64 `json:"flake_composition"`
	ResidualPPM      map[string]float64 `json:"residual_ppm"`
	Streams          map[string]float64 `json:"streams"`
	WithPET          []bathNoteJSON     `json:"with_pet"`
	ProcessWaterKg   float64            `json:"process_water_kg"`
	Closure          float64            `json:"closure"`
	FlakeSpec        *flakeSpecJSON     `json:"flake_spec"`
	Glycolysis       glycolysisJSON     `json:"glycolysis"`
	Warnings         []string           `json:"warnings"`
	Cautions         []string           `json:"cautions"`
	// How the audit's uncertainty was carried (yield_spread.go).
	Spread          string       `json:"spread"`
	TargetPET       summaryJSON  `json:"target_pet"`
	Sensitivity     []driverJSON `json:"sensitivity"`
	ConversionRange *[2]float64  `json:"conversion_range,omitempty"`
	StripEGRange    *[2]float64  `json:"strip_eg_range,omitempty"`
}

type summaryJSON struct {
	P5   *float64 `json:"p5"`
	P10  *float64 `json:"p10"`
	P50  *float64 `json:"p50"`
	P90  *float64 `json:"p90"`
	P95  *float64 `json:"p95"`
	Mean *float64 `json:"mean"`
}

// jnum is a JSON number, null for NaN or ±Inf.
func jnum(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}

func summaryOf(s yield.Summary) summaryJSON {
	return summaryJSON{jnum(s.P5), jnum(s.P10), jnum(s.P50), jnum(s.P90), jnum(s.P95), jnum(s.Mean)}
}

type pointJSON struct {
	FlakeKg       float64 `json:"flake_kg"`
	FlakeDryKg    float64 `json:"flake_dry_kg"`
	FlakeShare    float64 `json:"flake_share"`
	PETKg         float64 `json:"pet_kg"`
	MoistureKg    float64 `json:"moisture_kg"`
	GlycolysateKg float64 `json:"glycolysate_kg"`
	HydroxylValue float64 `json:"hydroxyl_value"`
	Batches       *int    `json:"batches"`
	ReactorKg     float64 `json:"reactor_kg"`
}

// bathNoteJSON lists what a sink–float stage leaves with the PET.
type bathNoteJSON struct {
	Stage       string             `json:"stage"`
	BathDensity float64            `json:"bath_density"`
	Keep        string             `json:"keep"`
	Shares      map[string]float64 `json:"shares"`
}

type flakeSpecJSON struct {
	Name   string           `json:"name"`
	Pass   bool             `json:"pass"`
	Checks []flakeCheckJSON `json:"checks"`
}

type flakeCheckJSON struct {
	Item      string   `json:"item"`
	Limit     float64  `json:"limit"`
	Value     float64  `json:"value"`
	Pass      bool     `json:"pass"`
	PassShare *float64 `json:"pass_share"`
}

func runYield(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("yield")
	baleKg := fs.Float64("bale-kg", 0, "gross mass of the bale in kg (required)")
	lineFile := fs.String("line", "", "line profile JSON file (default: the illustrative built-in line)")
	specFile := fs.String("flake-spec", "", "flake spec JSON file, or 'none' (default: the illustrative built-in spec)")
	rf := addRecipeFlags(fs, true)
	reactor := fs.Float64("reactor-kg", 0, "reactor charge per batch, kg of flake plus glycol (0: batches not counted)")
	draws := fs.Int("draws", yield.DefaultDraws, "Monte Carlo draws")
	seed := fs.Uint64("seed", 1, "random seed; the same seed gives the same numbers")
	fixed := fs.Bool("fixed-line", false, "hold the line's efficiencies at their midpoints (carry only the audit's uncertainty)")
	asJSON := fs.Bool("json", false, "print JSON")
	dir := storeFlag(fs)
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("give exactly one pulls CSV file, or a stored bale")
	}
	if _, err := os.Stat(pos[0]); err != nil && !strings.ContainsAny(pos[0], "/\\.") {
		return yieldBale(pos[0], *dir, fs, rf, *lineFile, *specFile, *reactor, yield.MCOptions{Draws: *draws, Seed: *seed, FixedLine: *fixed}, *asJSON, stdout)
	}
	if !flagSet(fs, "bale-kg") {
		return usagef("--bale-kg is required: the bale's gross mass in kg")
	}
	if !(*baleKg > 0) || math.IsInf(*baleKg, 0) {
		return fmt.Errorf("--bale-kg %s: give the bale's gross mass in kg, above 0", assess.Plain(*baleKg))
	}
	if *draws < 1 || *draws > yield.MaxDraws {
		return fmt.Errorf("--draws %d: give 1 to %d Monte Carlo draws", *draws, yield.MaxDraws)
	}
	plan := yield.DefaultPlan()
	if *lineFile != "" {
		l, err := yield.ReadLineFile(*lineFile)
		if err != nil {
			return err
		}
		if plan.Line, err = yield.Compile(l); err != nil {
			return err
		}
	}
	switch *specFile {
	case "":
	case "none":
		plan.Spec = nil
	default:
		s, err := yield.ReadFlakeSpecFile(*specFile)
		if err != nil {
			return err
		}
		plan.Spec = &s
	}
	recipe, err := rf.recipe(fs, 0)
	if err != nil {
		return err
	}
	plan.Recipe = recipe
	plan.ReactorKg = *reactor
	rf.ranges(&plan)
	pulls, err := desk.ReadPullsFile(pos[0], 0)
	if err != nil {
		return err
	}
	var d *desk.Desk // no store: built-in and file settings only
	run, err := d.YieldPulls(context.Background(), pulls, *baleKg, plan, desk.YieldOptions{MC: yield.MCOptions{Draws: *draws, Seed: *seed, FixedLine: *fixed}, Sensitivity: true}, nil)
	if err != nil {
		return fmt.Errorf("%s: %w", pos[0], err)
	}
	rep, mc := run.Report, run.MC
	out := buildYieldJSON(rep, mc, plan, *fixed)
	addSpread(&out, mc, run.Drivers, plan)
	if *asJSON {
		return writeJSON(stdout, out)
	}
	printYield(stdout, out, rep, plan)
	return nil
}

// yieldBale runs a stored bale (its pulls and gross mass) through the
// line, a stored line name winning over a built-in one.
func yieldBale(bale, dir string, fs *flag.FlagSet, rf *recipeFlags, line, flakeSpec string, reactor float64, mc yield.MCOptions, asJSON bool, stdout io.Writer) error {
	d, err := openDesk(dir, false)
	if err != nil {
		return err
	}
	defer d.Close()
	plan, err := d.Plan(line, flakeSpec)
	if err != nil {
		return err
	}
	if plan.Recipe, err = rf.recipe(fs, 0); err != nil {
		return err
	}
	plan.ReactorKg = reactor
	rf.ranges(&plan)
	id, run, err := d.YieldBale(context.Background(), bale, plan, desk.YieldOptions{MC: mc, Sensitivity: true}, nil)
	if err != nil {
		return err
	}
	out := buildYieldJSON(run.Report, run.MC, plan, mc.FixedLine)
	addSpread(&out, run.MC, run.Drivers, plan)
	if asJSON {
		return writeJSON(stdout, out)
	}
	fmt.Fprintf(stdout, "Stored bale %s\n", id)
	printYield(stdout, out, run.Report, plan)
	return nil
}

func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}

func buildYieldJSON(rep yield.Report, mc yield.MCResult, plan yield.Plan, fixed bool) yieldJSON {
	b, g := rep.Balance, rep.Glycolysate
	out := yieldJSON{
		BaleKg: rep.BaleKg, Line: plan.Line.Line().Name, Draws: mc.Draws, Seed: mc.Seed, FixedLine: fixed,
		FlakeKg: summaryOf(mc.FlakeKg), GlycolysateKg: summaryOf(mc.GlycolysateKg), HydroxylValue: summaryOf(mc.HydroxylValue),
		Point: pointJSON{FlakeKg: b.FlakeKg, FlakeDryKg: b.FlakeDryKg, FlakeShare: b.FlakeShare, PETKg: b.PETKg, MoistureKg: b.MoistureKg,
			GlycolysateKg: g.GlycolysateKg, HydroxylValue: g.HydroxylValue, ReactorKg: plan.ReactorKg},
		FlakeComposition: b.Composition(), ResidualPPM: b.ResidualPPM(), Streams: map[string]float64{},
		ProcessWaterKg: b.ProcessWaterKg, Closure: b.Closure,
		Glycolysis: glycolysisOut(g),
		Warnings:   append(append([]string{}, rep.Warnings...), g.Warnings...),
		Cautions:   []string{yield.CautionCaustic, yield.CautionHotGlycolFor(g.Glycol)},
	}
	if plan.ReactorKg > 0 {
		n := rep.Batches
		out.Point.Batches = &n
	}
	for _, s := range b.Streams {
		out.Streams[s.Name] = s.Kg
	}
	out.WithPET = []bathNoteJSON{}
	for _, n := range plan.Line.BathNotes(rep.Balance.Flake[:len(rep.BaleComposition)]) {
		j := bathNoteJSON{Stage: n.Stage, BathDensity: n.BathDensity, Keep: n.Keep.String(), Shares: map[string]float64{}}
		for _, s := range n.WithPET {
			j.Shares[s.Key] = s.Share
		}
		out.WithPET = append(out.WithPET, j)
	}
	if plan.Spec != nil {
		fsj := &flakeSpecJSON{Name: plan.Spec.Name, Pass: true}
		for _, c := range rep.Checks {
			fsj.Checks = append(fsj.Checks, flakeCheckJSON{Item: c.Item.String(), Limit: c.Limit, Value: c.Value, Pass: c.Pass, PassShare: jnum(mc.SpecPass[c.Item])})
			fsj.Pass = fsj.Pass && c.Pass
		}
		out.FlakeSpec = fsj
	}
	if g.HClKg > 0 {
		out.Cautions = append(out.Cautions, yield.CautionPVC)
	}
	return out
}

func printYield(w io.Writer, o yieldJSON, rep yield.Report, plan yield.Plan) {
	p := o.Point
	fmt.Fprintf(w, "Bale %.0f kg through %s\n", o.BaleKg, plan.Line)
	mode := "composition drawn from the audit's estimator, line efficiencies from their ranges"
	if o.FixedLine {
		mode = "composition drawn from the audit's estimator, line efficiencies fixed at their midpoints"
	}
	fmt.Fprintf(w, "%s, seed %d (%s)\n\n", desk.Plural(o.Draws, "draw", "draws"), o.Seed, mode)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintf(tw, "\tpoint\tP10\tP50\tP90\tmean\t\n")
	row := func(name, f string, point float64, s summaryJSON) {
		v := func(x *float64) string {
			if x == nil {
				return "–"
			}
			return fmt.Sprintf(f, *x)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t\n", name, fmt.Sprintf(f, point), v(s.P10), v(s.P50), v(s.P90), v(s.Mean))
	}
	row("clean flake, kg", "%.1f", p.FlakeKg, o.FlakeKg)
	row("glycolysate, kg", "%.1f", p.GlycolysateKg, o.GlycolysateKg)
	row("hydroxyl value, mg KOH/g", "%.1f", p.HydroxylValue, o.HydroxylValue)
	tw.Flush()
	printSpread(w, o, "pull")
	fmt.Fprintf(w, "\nFlake: %.1f %% of the bale; %.1f kg PET, %.2f kg moisture (%.2f %%)\n", 100*p.FlakeShare, p.PETKg, p.MoistureKg, 100*p.MoistureKg/p.FlakeKg)
	fmt.Fprintf(w, "Reject streams, kg:")
	for _, s := range rep.Balance.Streams {
		fmt.Fprintf(w, "  %s %.2f", s.Name, s.Kg)
	}
	fmt.Fprintf(w, "\nBalance: bale %.3f kg + process water %.3f kg = flake + streams (relative error %s)\n", o.BaleKg, o.ProcessWaterKg, closureText(o.Closure))
	printBathNotes(w, plan.Line.BathNotes(rep.Balance.Flake[:len(rep.BaleComposition)]))
	keys := make([]string, 0, len(o.ResidualPPM))
	for k, v := range o.ResidualPPM {
		if v > 0 {
			keys = append(keys, k)
		}
	}
	sort.Slice(keys, func(i, j int) bool { return o.ResidualPPM[keys[i]] > o.ResidualPPM[keys[j]] })
	fmt.Fprintf(w, "Residual contaminants, ppm of dry flake:")
	for _, k := range keys {
		fmt.Fprintf(w, "  %s %.1f", k, o.ResidualPPM[k])
	}
	fmt.Fprintln(w)
	if s := o.FlakeSpec; s != nil {
		verdict := "PASS"
		if !s.Pass {
			verdict = "FAIL"
		}
		fmt.Fprintf(w, "\nFlake spec %q: %s at the point estimate\n", s.Name, verdict)
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintf(tw, "  item\tlimit\tvalue\tverdict\tdraws meeting it\n")
		for _, c := range s.Checks {
			v := "fail"
			if c.Pass {
				v = "pass"
			}
			share := "–"
			if c.PassShare != nil {
				share = fmt.Sprintf("%.1f %%", 100**c.PassShare)
			}
			fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%s\n", c.Item, assess.Plain(c.Limit), assess.Sig(c.Value, 3), v, share)
		}
		tw.Flush()
	}
	g := rep.Glycolysate
	fmt.Fprintf(w, "\nGlycolysis: %s at %s, %s %% %s, conversion %s, EG stripped %s\n", g.Glycol.Name, ratioText(plan.Recipe), assess.Plain(g.Recipe.CatalystPct), g.Catalyst.Name, assess.Plain(g.Recipe.Conversion), assess.Plain(g.Recipe.StripEG))
	printGlycolysate(w, g)
	if p.Batches != nil {
		fmt.Fprintf(w, "  reactor batches of %s kg: %d\n", assess.Plain(p.ReactorKg), *p.Batches)
	}
	printNotes(w, o.Warnings, o.Cautions)
}

func ratioText(r yield.Recipe) string {
	if r.Molar {
		return fmt.Sprintf("%s mol per mol of PET repeat units of the dry flake", assess.Plain(r.Ratio))
	}
	return fmt.Sprintf("%s kg per kg of dry flake", assess.Plain(r.Ratio))
}

func printNotes(w io.Writer, warnings, cautions []string) {
	if len(warnings) > 0 {
		fmt.Fprintln(w)
	}
	for _, s := range warnings {
		fmt.Fprintf(w, "Warning: %s\n", s)
	}
	fmt.Fprintln(w)
	for _, c := range cautions {
		fmt.Fprintln(w, wrap(c, 100))
	}
}

// wrap breaks s into lines of at most width runes at spaces.
func wrap(s string, width int) string {
	var b strings.Builder
	n := 0
	for i, word := range strings.Fields(s) {
		l := len([]rune(word))
		if i > 0 {
			if n+1+l > width {
				b.WriteString("\n  ")
				n = 2
			} else {
				b.WriteByte(' ')
				n++
			}
		}
		b.WriteString(word)
		n += l
	}
	return b.String()
}

// printBathNotes says, once per bath density at which the PET sinks,
// which contaminants left in the flake sink with it.
func printBathNotes(w io.Writer, notes []yield.BathNote) {
	type group struct {
		stages []string
		parts  []string
	}
	var order []float64
	byBath := map[float64]*group{}
	for _, n := range notes {
		if n.Keep != yield.SideSink || len(n.WithPET) == 0 {
			continue
		}
		g, ok := byBath[n.BathDensity]
		if !ok {
			g = &group{}
			for _, s := range n.WithPET {
				if s.Share >= 1 {
					g.parts = append(g.parts, s.Key)
				} else {
					g.parts = append(g.parts, fmt.Sprintf("%s (%.0f %%)", s.Key, 100*s.Share))
				}
			}
			byBath[n.BathDensity] = g
			order = append(order, n.BathDensity)
		}
		g.stages = append(g.stages, fmt.Sprint(n.Index))
	}
	for _, d := range order {
		g := byBath[d]
		st := "stage "
		if len(g.stages) > 1 {
			st = "stages "
		}
		fmt.Fprintf(w, "Sink with the PET at %.2f g/cm³ (%s%s); the bath cannot separate them: %s\n", d, st, strings.Join(g.stages, ", "), strings.Join(g.parts, ", "))
	}
}

// closureText writes the mass balance's relative error without an
// exponent: rounding leaves about 10⁻¹⁶, and an evaluation fails above
// 10⁻⁹ (yield.Evaluate).
func closureText(c float64) string {
	switch {
	case c == 0:
		return "0"
	case c < 1e-12:
		return "below 10⁻¹²"
	}
	return assess.Sig(c, 2)
}
