package main

import (
	"context"
	"fmt"
	"io"

	"baleassay/data/desk"
	"baleassay/data/report"
	"baleassay/yield"
)

func init() {
	register(command{
		name: "report",
		usage: "bale BALE --html FILE [--spec NAME|FILE] [--line NAME|FILE] [--flake-spec FILE|none] [--draws N] [--seed S] [--force] | " +
			"site SITE|--within LAT LON KM --html FILE [--from DATE] [--to DATE] [--line NAME|FILE] [--force]  [--store DIR|--demo]",
		summary: "write a self-contained HTML report of a bale, a site or a region (charts, verdicts, yields, methods, cautions)",
		run: func(args []string, stdout, _ io.Writer) error {
			return dispatch(args, stdout, sub("bale", runReportBale), sub("site", runReportSite))
		},
	})
}

func runReportBale(args []string, stdout io.Writer) error {
	fs := newFlags("report bale")
	dir := storeFlag(fs)
	out := fs.String("html", "", "the report `FILE` to write")
	force := fs.Bool("force", false, "replace FILE if it is there")
	spec := fs.String("spec", "", "spec name or file (default: the bale's own, or "+desk.DefaultSpec+")")
	line := fs.String("line", "", "line profile: a stored or built-in name, or a JSON file (default: the built-in line)")
	flakeSpec := fs.String("flake-spec", "", "flake spec JSON file, or 'none' (default: the built-in one)")
	draws := fs.Int("draws", yield.DefaultDraws, "Monte Carlo draws")
	seed := fs.Uint64("seed", 1, "random seed; the same seed gives the same numbers")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("give one bale (id, prefix, suffix or tag)")
	}
	if *out == "" {
		return usagef("give --html FILE")
	}
	if *draws < 1 || *draws > yield.MaxDraws {
		return usagef("--draws %d: give 1 to %d", *draws, yield.MaxDraws)
	}
	opt := desk.BaleReportOptions{Audit: desk.AuditOptions{Spec: *spec},
		Line: *line, FlakeSpec: *flakeSpec, Yield: desk.YieldOptions{MC: yield.MCOptions{Draws: *draws, Seed: *seed}}}
	return writeOut(*dir, *out, *force, stdout, func(d *desk.Desk, w io.Writer) (string, error) {
		rep, err := d.ReportBale(context.Background(), pos[0], opt, nil)
		if err != nil {
			return "", err
		}
		return "bale " + rep.Record.Tag, report.WriteBale(w, rep)
	})
}

func runReportSite(args []string, stdout io.Writer) error {
	fs := newFlags("report site")
	dir := storeFlag(fs)
	out := fs.String("html", "", "the report `FILE` to write")
	force := fs.Bool("force", false, "replace FILE if it is there")
	within := fs.Bool("within", false, "a region: the sites within KM of LAT LON (three numbers)")
	from := fs.String("from", "", "first day received (2026-03-02)")
	to := fs.String("to", "", "last day received, inclusive")
	line := fs.String("line", "", "line profile for the per-tonne figures (default: the built-in line)")
	flakeSpec := fs.String("flake-spec", "", "flake spec JSON file, or 'none'")
	pos, err := parseWithNumbers(fs, args)
	if err != nil {
		return err
	}
	var scope desk.SiteScope
	switch {
	case *within:
		q, rest, err := withinArgs(pos)
		if err != nil {
			return err
		}
		if len(rest) > 0 {
			return usagef("give a site or --within LAT LON KM, not both (%q)", rest[0])
		}
		scope.Within = q
	case len(pos) == 1:
		scope.Site = pos[0]
	default:
		return usagef("give one site (id, prefix, suffix or name), or --within LAT LON KM")
	}
	if *out == "" {
		return usagef("give --html FILE")
	}
	r, err := desk.ParseDateRange(*from, *to)
	if err != nil {
		return err
	}
	return writeOut(*dir, *out, *force, stdout, func(d *desk.Desk, w io.Writer) (string, error) {
		rep, err := d.ReportSites(scope, r, desk.SiteReportOptions{Line: *line, FlakeSpec: *flakeSpec})
		if err != nil {
			return "", err
		}
		return fmt.Sprintf("%s, %s", desk.Plural(len(rep.Sites), "site", "sites"), desk.Plural(rep.All.Bales, "bale", "bales")), report.WriteSites(w, rep)
	})
}
