package main

import (
	"context"
	"fmt"
	"io"

	"baleassay/data/desk"
	"baleassay/yield"
)

// exportFormats are the sub-modes of bale export that write files for
// other tools (spreadsheets, GIS) rather than signed bundles.
var exportFormats = map[string]func(args []string, stdout io.Writer) error{
	"csv":     runExportCSV,
	"geojson": runExportGeoJSON,
}

const exportFormatsUsage = "csv bales|pulls|sites FILE [--from DATE] [--to DATE] [--line NAME|FILE] [--value [--prices FILE] [--draws N] [--seed S]] [--force] | " +
	"geojson sites FILE [--within LAT LON KM [--area]] [--from DATE] [--to DATE] [--force]"

func runExportCSV(args []string, stdout io.Writer) error {
	fs := newFlags("export csv")
	dir := storeFlag(fs)
	from := fs.String("from", "", "first day received (2026-03-02)")
	to := fs.String("to", "", "last day received, inclusive")
	line := fs.String("line", "", "line profile of the _point yield columns (default: the built-in line)")
	force := fs.Bool("force", false, "replace FILE if it is there")
	value := fs.Bool("value", false, "bales: add each bale's value per tonne (P10, P50, P90) under the price sheet")
	prices := fs.String("prices", "", "bales: price sheet JSON file for the value columns (implies --value; default: the illustrative built-in sheet)")
	draws := fs.Int("draws", 2000, "bales, with --value: Monte Carlo draws per bale")
	seed := fs.Uint64("seed", 1, "bales, with --value: random seed")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 2 {
		return usagef("give a table (bales, pulls or sites) and a FILE")
	}
	t, err := desk.ParseTable(pos[0])
	if err != nil {
		return err
	}
	opt := desk.ExportOptions{Line: *line}
	if *value || *prices != "" {
		if t != desk.TableBales {
			return usagef("--value and --prices go with the bales table")
		}
		if *draws < 1 || *draws > yield.MaxDraws {
			return usagef("--draws %d: give 1 to %d", *draws, yield.MaxDraws)
		}
		sheet, err := desk.LoadPrices(*prices)
		if err != nil {
			return err
		}
		opt.Value = &desk.ValueOptions{Prices: sheet, MC: yield.MCOptions{Draws: *draws, Seed: *seed}}
	}
	if opt.Range, err = desk.ParseDateRange(*from, *to); err != nil {
		return err
	}
	return writeOut(*dir, pos[1], *force, stdout, func(d *desk.Desk, w io.Writer) (string, error) {
		rows, err := d.ExportCSV(context.Background(), w, t, opt)
		return fmt.Sprintf("%s table, %s", t, desk.Plural(rows, "row", "rows")), err
	})
}

func runExportGeoJSON(args []string, stdout io.Writer) error {
	fs := newFlags("export geojson")
	dir := storeFlag(fs)
	within := fs.Bool("within", false, "only the sites within KM of LAT LON (three numbers)")
	area := fs.Bool("area", false, "with --within: add the region's circle as a polygon feature")
	from := fs.String("from", "", "first day received (2026-03-02): bale counts and verdicts of that range")
	to := fs.String("to", "", "last day received, inclusive")
	force := fs.Bool("force", false, "replace FILE if it is there")
	pos, err := parseWithNumbers(fs, args)
	if err != nil {
		return err
	}
	opt := desk.GeoJSONOptions{Area: *area}
	switch {
	case *within:
		q, rest, err := withinArgs(pos)
		if err != nil {
			return err
		}
		opt.Within, pos = q, rest
		if len(pos) != 2 {
			return usagef("give sites, a FILE and --within LAT LON KM")
		}
	case *area:
		return usagef("--area needs --within LAT LON KM")
	case len(pos) != 2:
		return usagef("give sites and a FILE")
	}
	if pos[0] != "sites" {
		return usagef("only sites can be written as GeoJSON (got %q)", pos[0])
	}
	if opt.Range, err = desk.ParseDateRange(*from, *to); err != nil {
		return err
	}
	return writeOut(*dir, pos[1], *force, stdout, func(d *desk.Desk, w io.Writer) (string, error) {
		n, err := d.ExportGeoJSON(w, opt)
		return desk.Plural(n, "site", "sites"), err
	})
}

// withinArgs takes the three numbers of --within LAT LON KM out of the
// positional arguments (they may come anywhere; the others are not
// numbers) and returns the region and the rest.
func withinArgs(pos []string) (*desk.Query, []string, error) {
	var nums, rest []string
	for _, a := range pos {
		if recIsNumber(a) {
			nums = append(nums, a)
		} else {
			rest = append(rest, a)
		}
	}
	if len(nums) != 3 {
		return nil, nil, usagef("--within takes three numbers: LAT LON KM")
	}
	v, err := recFloats([]string{"LAT", "LON", "KM"}, nums)
	if err != nil {
		return nil, nil, err
	}
	return &desk.Query{Kind: desk.QueryWithin, Lat: v[0], Lon: v[1], Km: v[2]}, rest, nil
}
