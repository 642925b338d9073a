package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"strings"
	"text/tabwriter"

	"baleassay/data/desk"
	"baleassay/yield"
)

func init() {
	register(command{
		name: "value",
		usage: "BALE | PULLS.csv --bale-kg N | --site SITE [--from DATE --to DATE]  [--prices FILE] [--route flake|glycolysate] " +
			"[--line NAME|FILE] [--flake-spec FILE|none] [--glycol KEY --glycol-ratio R ...] [--draws N] [--seed S] [--fixed-line] [--show-prices] [--json]  [--store DIR|--demo]",
		summary: "what a bale (or a site's bales) is worth per tonne by a price sheet, with P10/P50/P90",
		run:     runValue,
	})
}

// valueJSON is the output of 'bale value --json' for one bale.
type valueJSON struct {
	Bale     string           `json:"bale,omitempty"`
	Tag      string           `json:"tag,omitempty"`
	Site     string           `json:"site,omitempty"`
	BaleKg   float64          `json:"bale_kg"`
	Prices   pricesJSON       `json:"prices"`
	Draws    int              `json:"draws"`
	Seed     uint64           `json:"seed"`
	Headline string           `json:"headline"`
	Routes   []routeValueJSON `json:"routes"`
	Cautions []string         `json:"cautions"`
}

type pricesJSON struct {
	Name         string `json:"name"`
	Currency     string `json:"currency"`
	Illustrative bool   `json:"illustrative"`
	Route        string `json:"route"`
}

type routeValueJSON struct {
	Route         string        `json:"route"`
	PerT          summaryJSON   `json:"per_t"`
	PerBale       summaryJSON   `json:"per_bale"`
	Mean          breakdownJSON `json:"mean"`
	Point         breakdownJSON `json:"point"`
	DeductedShare float64       `json:"deducted_share"`
}

type breakdownJSON struct {
	Revenue    float64 `json:"revenue"`
	Deductions float64 `json:"deductions"`
	Glycol     float64 `json:"glycol"`
	Wash       float64 `json:"wash"`
	Glycolysis float64 `json:"glycolysis"`
	Disposal   float64 `json:"disposal"`
	Net        float64 `json:"net"`
}

func breakdownOf(b yield.Breakdown) breakdownJSON {
	return breakdownJSON{b.Revenue, b.Deductions, b.Glycol, b.Wash, b.Glycolysis, b.Disposal, b.Net}
}

func pricesOf(p yield.PriceSheet) pricesJSON {
	return pricesJSON{Name: p.Name, Currency: p.Currency, Illustrative: p.Illustrative, Route: p.Route.String()}
}

func valueOut(v yield.ValueResult, cautions []desk.Caution) valueJSON {
	out := valueJSON{BaleKg: v.BaleKg, Prices: pricesOf(v.Sheet), Draws: v.Draws, Seed: v.Seed, Headline: v.Headline.String(), Cautions: []string{}}
	for _, r := range v.Routes {
		out.Routes = append(out.Routes, routeValueJSON{Route: r.Route.String(), PerT: summaryOf(r.PerT), PerBale: summaryOf(r.PerBale),
			Mean: breakdownOf(r.Mean), Point: breakdownOf(r.Point), DeductedShare: r.DeductedShare})
	}
	for _, c := range cautions {
		out.Cautions = append(out.Cautions, c.Text())
	}
	return out
}

type valueArgs struct {
	prices, route, line, flakeSpec, site, from, to string
	baleKg                                         float64
	mc                                             yield.MCOptions
	showPrices, asJSON                             bool
}

func runValue(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("value")
	var a valueArgs
	fs.StringVar(&a.prices, "prices", "", "price sheet JSON file (default: the illustrative built-in sheet)")
	fs.StringVar(&a.route, "route", "", "flake or glycolysate: the headline route (default: the sheet's)")
	fs.Float64Var(&a.baleKg, "bale-kg", 0, "gross mass of the bale in kg, for a pulls file")
	fs.StringVar(&a.line, "line", "", "line profile: a stored line's name or a JSON file (default: the illustrative built-in line)")
	fs.StringVar(&a.flakeSpec, "flake-spec", "", "flake spec JSON file, or 'none' (default: the illustrative built-in spec); its limits trigger the sheet's deductions")
	fs.StringVar(&a.site, "site", "", "value every bale of this site (id, prefix, suffix or name)")
	fs.StringVar(&a.from, "from", "", "with --site: bales received from this day (2026-03-02) or time")
	fs.StringVar(&a.to, "to", "", "with --site: bales received up to this day (inclusive) or time")
	rf := addRecipeFlags(fs, true)
	fs.IntVar(&a.mc.Draws, "draws", yield.DefaultDraws, "Monte Carlo draws per bale")
	fs.Uint64Var(&a.mc.Seed, "seed", 1, "random seed; the same seed gives the same numbers")
	fs.BoolVar(&a.mc.FixedLine, "fixed-line", false, "hold the line's efficiencies at their midpoints")
	fs.BoolVar(&a.showPrices, "show-prices", false, "print the price sheet in use as JSON (a file to start your own from) and stop")
	fs.BoolVar(&a.asJSON, "json", false, "print JSON")
	dir := storeFlag(fs)
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	sheet, err := desk.LoadPrices(a.prices)
	if err != nil {
		return err
	}
	if a.route != "" {
		if sheet.Route, err = yield.ParseRoute(a.route); err != nil {
			return usagef("--route %q: give flake or glycolysate", a.route)
		}
	}
	if a.showPrices {
		b, err := sheet.MarshalIndent()
		if err != nil {
			return err
		}
		_, err = stdout.Write(b)
		return err
	}
	if a.mc.Draws < 1 || a.mc.Draws > yield.MaxDraws {
		return fmt.Errorf("--draws %d: give 1 to %d Monte Carlo draws", a.mc.Draws, yield.MaxDraws)
	}
	opt := desk.ValueOptions{Prices: sheet, MC: a.mc}
	switch {
	case a.site != "" && len(pos) > 0:
		return usagef("give a bale or --site, not both")
	case a.site != "":
		return valueSite(a, *dir, fs, rf, opt, stdout)
	case len(pos) != 1:
		return usagef("give one stored bale, a pulls CSV file with --bale-kg, or --site SITE")
	case a.from != "" || a.to != "":
		return usagef("--from and --to go with --site")
	}
	if _, err := os.Stat(pos[0]); err != nil && !strings.ContainsAny(pos[0], "/\\.") {
		d, plan, err := openWithPlan(*dir, a, fs, rf)
		if err != nil {
			return err
		}
		defer d.Close()
		v, err := d.ValueBale(context.Background(), pos[0], plan, opt, nil)
		if err != nil {
			return err
		}
		out := valueOut(v.Value, v.Cautions)
		out.Bale, out.Tag, out.Site = v.Bale.String(), v.Record.Tag, v.SiteName
		if a.asJSON {
			return writeJSON(stdout, out)
		}
		label := v.Record.Tag
		if label == "" {
			label = v.Bale.String()
		}
		fmt.Fprintf(stdout, "Stored bale %s (%s), %s kg\n", label, v.SiteName, desk.Num(v.Record.GrossKg, 1))
		printValue(stdout, v.Value, v.Cautions)
		return nil
	}
	if !flagSet(fs, "bale-kg") || !(a.baleKg > 0) || math.IsInf(a.baleKg, 0) {
		return usagef("--bale-kg is required with a pulls file: the bale's gross mass in kg, above 0")
	}
	pulls, err := desk.ReadPullsFile(pos[0], 0)
	if err != nil {
		return err
	}
	var d *desk.Desk // no store: built-in and file settings only
	plan, err := valuePlan(d, a, fs, rf)
	if err != nil {
		return err
	}
	v, err := d.ValuePulls(context.Background(), pulls, a.baleKg, plan, opt, nil)
	if err != nil {
		return fmt.Errorf("%s: %w", pos[0], err)
	}
	if a.asJSON {
		return writeJSON(stdout, valueOut(v.Value, v.Cautions))
	}
	fmt.Fprintf(stdout, "Bale of %s kg, pulls %s\n", desk.Num(a.baleKg, 1), pos[0])
	printValue(stdout, v.Value, v.Cautions)
	return nil
}

// valuePlan is the yield plan the value is computed on: line and flake
// spec (stored, built in or files), the glycolysis recipe of the flags.
func valuePlan(d *desk.Desk, a valueArgs, fs *flag.FlagSet, rf *recipeFlags) (yield.Plan, error) {
	plan, err := d.Plan(a.line, a.flakeSpec)
	if err != nil {
		return plan, err
	}
	if plan.Recipe, err = rf.recipe(fs, 0); err != nil {
		return plan, err
	}
	rf.ranges(&plan)
	return plan, nil
}

// openWithPlan opens the store and builds the value's plan with its
// stored lines; the caller closes the desk.
func openWithPlan(dir string, a valueArgs, fs *flag.FlagSet, rf *recipeFlags) (*desk.Desk, yield.Plan, error) {
	d, err := openDesk(dir, false)
	if err != nil {
		return nil, yield.Plan{}, err
	}
	plan, err := valuePlan(d, a, fs, rf)
	if err != nil {
		d.Close()
		return nil, plan, err
	}
	return d, plan, nil
}

func sheetLine(p yield.PriceSheet) string {
	s := fmt.Sprintf("Prices: %s (%s per tonne)", p.Name, p.Currency)
	if p.Illustrative {
		s += ": ILLUSTRATIVE figures, not market prices; give your own with --prices FILE"
	}
	return s
}

func money(x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "–"
	}
	return fmt.Sprintf("%.2f", x)
}

func printValue(w io.Writer, v yield.ValueResult, cautions []desk.Caution) {
	fmt.Fprintln(w, sheetLine(v.Sheet))
	fmt.Fprintf(w, "Value per tonne of bale (%s), over %s draws:\n", v.Sheet.Currency, desk.Num(float64(v.Draws), 0))
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "route\tP10\tP50\tP90\tmean\tdeducted in\t")
	for _, r := range []yield.Route{v.Headline, otherRoute(v.Headline)} {
		rv := v.Of(r)
		mark := ""
		if r == v.Headline {
			mark = " (sheet)"
		}
		fmt.Fprintf(tw, "%s%s\t%s\t%s\t%s\t%s\t%s %%\t\n", r, mark, money(rv.PerT.P10), money(rv.PerT.P50), money(rv.PerT.P90), money(rv.PerT.Mean), desk.Num(100*rv.DeductedShare, 1))
	}
	tw.Flush()
	h := v.Of(v.Headline)
	m := h.Mean
	fmt.Fprintf(w, "Mean per tonne, %s: revenue %s − deductions %s − glycol %s − wash %s − glycolysis %s − disposal %s = %s\n",
		v.Headline, money(m.Revenue), money(m.Deductions), money(m.Glycol), money(m.Wash), money(m.Glycolysis), money(m.Disposal), money(m.Net))
	fmt.Fprintf(w, "Whole bale (%s kg), %s: P10 %s, P50 %s, P90 %s %s\n", desk.Num(v.BaleKg, 1), v.Headline,
		money(h.PerBale.P10), money(h.PerBale.P50), money(h.PerBale.P90), v.Sheet.Currency)
	fmt.Fprintln(w, "The value is the margin over the costs the sheet names (no overheads, freight or financing); the P10–P90 carries the audit's and the line's uncertainty, not the market's.")
	for _, c := range cautions {
		fmt.Fprintln(w, c.Text())
	}
}

func otherRoute(r yield.Route) yield.Route {
	if r == yield.RouteFlake {
		return yield.RouteGlycolysate
	}
	return yield.RouteFlake
}

// siteValueJSON is the output of 'bale value --site --json'.
type siteValueJSON struct {
	Site     string          `json:"site"`
	SiteName string          `json:"site_name"`
	From     string          `json:"from,omitempty"`
	To       string          `json:"to,omitempty"`
	Prices   pricesJSON      `json:"prices"`
	Bales    []siteValueBale `json:"bales"`
	Valued   int             `json:"valued"`
	Tonnes   float64         `json:"tonnes"`
	MeanPerT *float64        `json:"mean_per_t"`
	LowP50   *float64        `json:"low_p50"`
	HighP50  *float64        `json:"high_p50"`
	Cautions []string        `json:"cautions"`
}

type siteValueBale struct {
	ID       string     `json:"id"`
	Tag      string     `json:"tag"`
	Received string     `json:"received"`
	GrossKg  float64    `json:"gross_kg"`
	Value    *valueJSON `json:"value"`
	Why      string     `json:"why,omitempty"`
}

func valueSite(a valueArgs, dir string, fs *flag.FlagSet, rf *recipeFlags, opt desk.ValueOptions, stdout io.Writer) error {
	r, err := desk.ParseDateRange(a.from, a.to)
	if err != nil {
		return usagef("%v", err)
	}
	d, plan, err := openWithPlan(dir, a, fs, rf)
	if err != nil {
		return err
	}
	defer d.Close()
	sv, err := d.ValueSite(context.Background(), a.site, r, plan, opt, nil)
	if err != nil {
		return err
	}
	if a.asJSON {
		out := siteValueJSON{Site: sv.Site.ID.String(), SiteName: sv.Site.Site.Name, From: a.from, To: a.to, Prices: pricesOf(sv.Prices),
			Bales: []siteValueBale{}, Valued: sv.Valued, Tonnes: sv.Tonnes, Cautions: []string{}}
		if sv.Valued > 0 {
			out.MeanPerT, out.LowP50, out.HighP50 = jnum(sv.MeanPerT), jnum(sv.LowP50), jnum(sv.HighP50)
		}
		for _, row := range sv.Rows {
			b := siteValueBale{ID: row.ID.String(), Tag: row.Record.Tag, Received: recTime(row.Record.ReceivedMs), GrossKg: row.Record.GrossKg, Why: row.Why}
			if row.Value != nil {
				v := valueOut(*row.Value, nil)
				b.Value = &v
			}
			out.Bales = append(out.Bales, b)
		}
		for _, c := range sv.Cautions {
			out.Cautions = append(out.Cautions, c.Text())
		}
		return writeJSON(stdout, out)
	}
	fmt.Fprintf(stdout, "Site %s: %s, %s valued (%s t)\n", sv.Site.Site.Name, desk.Plural(len(sv.Rows), "bale", "bales"), desk.Num(float64(sv.Valued), 0), desk.Num(sv.Tonnes, 3))
	fmt.Fprintln(stdout, sheetLine(sv.Prices))
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "bale\treceived\tkg\tP10\tP50\tP90\t(%s per t of bale, %s)\n", sv.Prices.Currency, sv.Prices.Route)
	for _, row := range sv.Rows {
		label := row.Record.Tag
		if label == "" {
			label = row.ID.String()
		}
		rx := desk.TimeText(row.Record.ReceivedMs)
		if len(rx) >= 10 {
			rx = rx[:10]
		}
		if row.Value == nil {
			fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t\t\t\n", label, rx, desk.Num(row.Record.GrossKg, 1), row.Why)
			continue
		}
		s := row.Value.Of(row.Value.Headline).PerT
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t\n", label, rx, desk.Num(row.Record.GrossKg, 1), money(s.P10), money(s.P50), money(s.P90))
	}
	tw.Flush()
	if sv.Valued > 0 {
		fmt.Fprintf(stdout, "Expected value of the valued bales together: %s %s per tonne (%s t); the bales' P50 run from %s to %s.\n",
			money(sv.MeanPerT), sv.Prices.Currency, desk.Num(sv.Tonnes, 3), money(sv.LowP50), money(sv.HighP50))
	}
	for _, c := range sv.Cautions {
		fmt.Fprintln(stdout, c.Text())
	}
	return nil
}
