package main

import (
	"baleassay/data/desk"
	"errors"
	"fmt"
	"io"
)

func init() {
	register(command{
		name:    "demo",
		usage:   "[--store DIR] [--weeks N] [--seed N] [--force]  |  " + generateUsage,
		summary: "create the demo store: an invented region of yards with weeks of bales and pulls",
		run:     runDemo,
	})
}

func runDemo(args []string, stdout, stderr io.Writer) error {
	if wantsGenerate(args) {
		return runGenerate(args, stdout, stderr)
	}
	fs := newFlags("demo")
	dirFlag := fs.String("store", "", "folder of the demo store (default: the demo folder beside the user store, see README)")
	weeks := fs.Int("weeks", 6, "weeks of bales")
	seed := fs.Uint64("seed", 1, "random seed of the scenario")
	force := fs.Bool("force", false, "replace an existing demo store")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return usagef("unexpected argument %q", pos[0])
	}
	if *weeks < 1 || *weeks > 52 {
		return usagef("--weeks %d: give 1 to 52", *weeks)
	}
	dir, sum, err := desk.MakeDemo(desk.DemoOptions{Dir: *dirFlag, Weeks: *weeks, Seed: *seed, Force: *force})
	switch {
	case errors.Is(err, desk.ErrDemoExists):
		return fmt.Errorf("a demo store already exists at %s; use it with --demo (e.g. 'bale sites list --demo'), or give --force to make it again", dir)
	case errors.Is(err, desk.ErrRealStore):
		return fmt.Errorf("%s holds real records, not a demo store: the demo is never mixed into real data; choose another --store", dir)
	case err != nil:
		return err
	}
	fmt.Fprintf(stdout, "demo store %s\n", dir)
	fmt.Fprintf(stdout, "  an invented region (the Vale of Orrin): %s, %s, %s, %s, %s to %s\n",
		desk.Plural(sum.Sites, "site", "sites"), desk.Plural(sum.Bales, "bale", "bales"), desk.Plural(sum.Pulls, "pull", "pulls"),
		desk.Plural(sum.Events, "event", "events"), sum.From.Format("2006-01-02"), sum.To.Format("2006-01-02"))
	fmt.Fprintf(stdout, "  two devices: yard tablet %s…, lab laptop %s…; one site edited on both: %s\n",
		sum.YardDevice.String()[:8], sum.LabDevice.String()[:8], sum.ConflictSite)
	demoFlag := "--demo"
	if *dirFlag != "" {
		demoFlag = "--store " + *dirFlag
	}
	fmt.Fprintf(stdout, "try:\n  bale sites list %[1]s\n  bale sites near 45.0 4.7 -k 3 %[1]s\n  bale sites summary within 45.0 4.7 25 %[1]s\n  bale conflicts %[1]s\n  bale show %[2]s %[1]s\n", demoFlag, sum.ConflictSite)
	return nil
}
