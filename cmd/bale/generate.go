package main

import (
	"baleassay/data/desk"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"slices"
	"strings"
	"time"
)

// bale demo --events N: a generated season of any size (data/demo,
// generate*.go), into a store or as the signed bundles its devices would
// send. runDemo hands over to runGenerate when --events is given.

const generateUsage = "--events N (--store DIR | --bundles DIR) [--devices D] [--seed S] [--weeks W] [--end YYYY-MM-DD] [--per-bundle N] [--force]"

// wantsGenerate reports whether a demo command line asks for a generated
// season.
func wantsGenerate(args []string) bool {
	return slices.ContainsFunc(args, func(a string) bool {
		return a == "--events" || a == "-events" || strings.HasPrefix(a, "--events=") || strings.HasPrefix(a, "-events=")
	})
}

func runGenerate(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("demo")
	events := fs.Int("events", 0, "about this many events")
	dir := fs.String("store", "", "write the season into this store folder")
	bundles := fs.String("bundles", "", "write the season as signed bundle files into this folder")
	devices := fs.Int("devices", 6, "devices: the office and the grading tablets")
	seed := fs.Uint64("seed", 1, "random seed: the same seed gives the same events")
	weeks := fs.Int("weeks", 52, "length of the season in weeks")
	end := fs.String("end", desk.GenDefaultEnd.Format("2006-01-02"), "last day of the season (a day in the past)")
	per := fs.Int("per-bundle", 5000, "a device exports when it holds this many events")
	force := fs.Bool("force", false, "replace an existing demo store")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	switch {
	case len(pos) != 0:
		return usagef("unexpected argument %q", pos[0])
	case *events < 1 || *events > 50_000_000:
		return usagef("--events %d: give 1 to 50,000,000", *events)
	case (*dir == "") == (*bundles == ""):
		return usagef("give --store DIR or --bundles DIR (one of them)")
	}
	last, err := time.Parse("2006-01-02", *end)
	if err != nil {
		return usagef("--end %q: give a date as 2025-11-28", *end)
	}
	if !last.Before(time.Now().UTC().Truncate(24 * time.Hour)) {
		return usagef("--end %s: the season must end before today", *end)
	}
	o := desk.GenerateOptions{Events: *events, Devices: *devices, Seed: *seed, Weeks: *weeks, End: last, PerBundle: *per, Dir: *dir, Bundles: *bundles, Force: *force}
	start := time.Now()
	sum, err := desk.Generate(o)
	switch {
	case errors.Is(err, desk.ErrDemoExists):
		return fmt.Errorf("a demo store already exists at %s; give --force to make it again", *dir)
	case errors.Is(err, desk.ErrRealStore):
		return fmt.Errorf("%s holds real records, not a demo store: the demo is never mixed into real data; choose another --store", *dir)
	case err != nil:
		return fmt.Errorf("season not written: %w", err)
	}
	if o.Seed == 0 {
		o.Seed = 1
	}
	fmt.Fprintf(stdout, "generated season (seed %d): %d events from %s to %s in %s\n", o.Seed, sum.Events,
		sum.From.Format("2006-01-02"), sum.To.Format("2006-01-02"), time.Since(start).Round(time.Millisecond))
	fmt.Fprintf(stdout, "  %d sites, %d bales, %d pulls; %d corrections, %d deletions, %d conflicts (%d resolved)\n",
		sum.Sites, sum.Bales, sum.Pulls, sum.Edits, sum.Deletions, sum.Conflicts, sum.Resolved)
	names := make([]string, len(sum.Devices))
	for i, d := range sum.Devices {
		names[i] = d.Name
	}
	fmt.Fprintf(stdout, "  %d devices: %s\n", len(names), strings.Join(names, ", "))
	if *bundles != "" {
		b, n := sum.LargestBundle()
		fmt.Fprintf(stdout, "  %d bundles in %s (largest %.1f MB, %d events); the devices' public keys are in %s\n",
			sum.Bundles, *bundles, float64(b)/1e6, n, filepath.Join(*bundles, desk.BundleKeysDir))
		fmt.Fprintf(stdout, "to merge them as the lab would (they are demo records):\n  for k in %s/*.pem; do bale trust add \"$k\" --name \"$(basename \"$k\" .pem)\" --yes --store LAB; done\n  bale import %s --store LAB --allow-demo\n",
			filepath.Join(*bundles, desk.BundleKeysDir), *bundles)
	} else {
		fmt.Fprintf(stdout, "  in the store %s; try: bale sites list --store %s\n", *dir, *dir)
	}
	return nil
}
