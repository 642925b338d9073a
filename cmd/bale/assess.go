package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"strings"
	"text/tabwriter"

	"baleassay/assess"
	"baleassay/data/desk"
)

func init() {
	register(command{
		name:    "assess",
		usage:   "PULLS.csv|BALE [--bale-kg N] [--spec NAME|FILE] [--confidence C] [--method ratio|mean] [--precision E] [--json] [--store DIR|--demo]",
		summary: "estimate a bale's composition from its pulls (a file, or a stored bale with its spec) and judge it against a spec",
		run:     runAssess,
	})
	register(command{
		name:    "categories",
		usage:   "[--json]",
		summary: "list the sorting categories with resin code, group and density range",
		run:     runCategories,
	})
}

func runAssess(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("assess")
	baleKg := fs.Float64("bale-kg", 0, "gross mass of the bale in kg (enables the finite-population correction)")
	specName := fs.String("spec", "glycol-feed", "built-in spec name or spec JSON file; 'none' for no verdict")
	conf := fs.Float64("confidence", assess.DefaultConfidence, "two-sided confidence level, e.g. 0.90")
	method := fs.String("method", "ratio", "estimator: ratio (Cochran) or mean (ASTM D5231 mean of fractions)")
	prec := fs.Float64("precision", assess.DefaultRelPrecision, "relative precision for the sample-size advice, e.g. 0.10")
	asJSON := fs.Bool("json", false, "print the report as JSON")
	dir := storeFlag(fs)
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("give exactly one pulls CSV file, or a stored bale")
	}
	m, err := assess.ParseMethod(*method)
	if err != nil {
		return usagef("%v", err)
	}
	if !(*conf > 0 && *conf < 1) {
		return usagef("--confidence %s: give a level between 0 and 1, e.g. 0.90", assess.Plain(*conf))
	}
	if !(*prec > 0) || math.IsInf(*prec, 0) {
		return usagef("--precision %s: give a relative precision above 0, e.g. 0.10", assess.Plain(*prec))
	}
	if math.IsNaN(*baleKg) || math.IsInf(*baleKg, 0) || *baleKg < 0 {
		return usagef("--bale-kg %s: give the bale's gross mass in kg (0 or more)", assess.Plain(*baleKg))
	}
	if _, err := os.Stat(pos[0]); err != nil && !strings.ContainsAny(pos[0], "/\\.") {
		// Not a file: a stored bale, its pulls and its spec from the store.
		d, err := openDesk(*dir, false)
		if err != nil {
			return err
		}
		defer d.Close()
		opt := desk.AuditOptions{Confidence: *conf, Method: m, Precision: *prec}
		if flagSet(fs, "spec") {
			opt.Spec = *specName
		}
		a, err := d.AuditBale(pos[0], opt)
		if err != nil {
			return err
		}
		if *asJSON {
			return writeJSON(stdout, a.Report)
		}
		fmt.Fprintf(stdout, "Bale %s %s, %s kg, from the store\n", a.Bale, a.Record.Tag, desk.Num(a.Record.GrossKg, 1))
		if len(a.LabelClash) > 0 {
			fmt.Fprintf(stdout, "CONFLICT: pull labels %s were used twice (two devices); both pulls are counted, see bale conflicts\n", strings.Join(a.LabelClash, ", "))
		}
		printReport(stdout, a.Report, a.Result)
		return nil
	}
	pulls, err := desk.ReadPullsFile(pos[0], 0)
	if err != nil {
		return err
	}
	var d *desk.Desk // no store: built-in specs and files only
	a, err := d.AuditPulls(pulls, *baleKg, desk.AuditOptions{Spec: *specName, Confidence: *conf, Method: m, Precision: *prec})
	if err != nil {
		return fmt.Errorf("%s: %w", pos[0], err)
	}
	if *asJSON {
		return writeJSON(stdout, a.Report)
	}
	printReport(stdout, a.Report, a.Result)
	return nil
}

func runCategories(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("categories")
	asJSON := fs.Bool("json", false, "print JSON")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return usagef("takes no arguments")
	}
	type row struct {
		Key        string  `json:"key"`
		Name       string  `json:"name"`
		Code       int     `json:"code"`
		Group      string  `json:"group"`
		DensityMin float64 `json:"density_min"`
		DensityMax float64 `json:"density_max"`
		Source     string  `json:"density_source"`
	}
	var rows []row
	for _, c := range assess.Categories() {
		rows = append(rows, row{c.Key, c.Name, c.Code, c.Group.Key(), c.Density.Min, c.Density.Max, c.DensitySource})
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		return enc.Encode(rows)
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "key\tcode\tgroup\tdensity g/cm³\tname")
	for _, r := range rows {
		code, dens := "–", "–"
		if r.Code > 0 {
			code = fmt.Sprint(r.Code)
		}
		if r.DensityMax > 0 {
			dens = fmt.Sprintf("%.3f–%.3f", r.DensityMin, r.DensityMax)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\n", r.Key, code, r.Group, dens, r.Name)
	}
	return tw.Flush()
}
