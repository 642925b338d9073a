package main

import (
	"baleassay/data/desk"
	"errors"
	"fmt"
	"io"
	"sort"
	"strings"
)

// bale store check | rescue: examine a records store, and copy what still
// verifies of a damaged one into a new store (data/store check.go,
// rescue.go through the desk).

func init() {
	register(command{
		name:    "store",
		usage:   "check [--store DIR | --demo] [--json]  |  rescue NEW-FOLDER [--store DIR | --demo]",
		summary: "check the records store page by page and record by record, or rescue a damaged one",
		run: func(args []string, stdout, stderr io.Writer) error {
			return dispatch(args, stdout, sub("check", storeCheck), sub("rescue", storeRescue))
		},
	})
}

// errDamaged makes a finished check or rescue exit with status 1.
var errDamaged = errors.New("the store is damaged")

func storeCheck(args []string, stdout io.Writer) error {
	fs := newFlags("store check")
	dir := storeFlag(fs)
	asJSON := fs.Bool("json", false, "print the report as JSON")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return usagef("unexpected argument %q", pos[0])
	}
	r, where, err := desk.CheckStore(location(*dir))
	if err != nil {
		return err
	}
	if *asJSON {
		if err := recJSON(stdout, r); err != nil {
			return err
		}
	} else {
		kinds := make([]string, 0, len(r.Entities))
		for k, n := range r.Entities {
			kinds = append(kinds, desk.Plural(int(n), k, k+"s"))
		}
		sort.Strings(kinds)
		pages := make([]string, 0, len(r.Pages))
		for k, n := range r.Pages {
			pages = append(pages, fmt.Sprintf("%s %d", k, n))
		}
		sort.Strings(pages)
		fmt.Fprintf(stdout, "store %s (%.1f MB): %d events; %s; %d conflicts, %d sites in the site index, %d drafts, %d meta values\n",
			where, float64(r.FileBytes)/1e6, r.Events, strings.Join(kinds, ", "), r.Conflicts, r.Sites, r.Drafts, r.MetaKeys)
		fmt.Fprintf(stdout, "  pages: %s; checked in %s\n", strings.Join(pages, ", "), r.Took.Round(1e6))
		if r.OK() {
			fmt.Fprintln(stdout, "  every page, event and index holds together")
			return nil
		}
		fmt.Fprintf(stdout, "DAMAGED: %s found:\n", desk.Plural(len(r.Problems), "problem", "problems"))
		for _, p := range r.Problems {
			fmt.Fprintf(stdout, "  - %s\n", p)
		}
		fmt.Fprintf(stdout, "what to do: 'bale store rescue NEW-FOLDER --store %s' copies every record that still verifies into a new store; keep this folder until you have checked the new one\n", where)
	}
	if !r.OK() {
		return errDamaged
	}
	return nil
}

func storeRescue(args []string, stdout io.Writer) error {
	fs := newFlags("store rescue")
	dir := storeFlag(fs)
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("give the new folder to rescue the records into")
	}
	rep, from, err := desk.RescueStore(location(*dir), pos[0], nil)
	if err != nil {
		return err
	}
	expected := "an unknown number"
	if rep.Expected > 0 {
		expected = fmt.Sprint(rep.Expected)
	}
	fmt.Fprintf(stdout, "rescued %d events of %s from %s into %s in %s; %d meta values, %d drafts\n",
		rep.Events, expected, from, pos[0], rep.Took.Round(1e6), rep.Meta, rep.Drafts)
	lost := rep.Lost() > 0 || len(rep.Refused) > 0 || rep.MetaLost > 0 || rep.NewDevice
	if rep.Lost() > 0 {
		ranges := make([]string, 0, min(len(rep.Missing), 20))
		for _, m := range rep.Missing[:min(len(rep.Missing), 20)] {
			ranges = append(ranges, m.String())
		}
		fmt.Fprintf(stdout, "LOST: %d events (insertion numbers %s", rep.Lost(), strings.Join(ranges, ", "))
		if len(rep.Missing) > 20 {
			fmt.Fprint(stdout, ", …")
		}
		fmt.Fprintln(stdout, ")")
		for _, id := range rep.MissingID {
			fmt.Fprintf(stdout, "  lost event %s\n", id)
		}
		fmt.Fprintln(stdout, "  ask the devices that sent records to export everything again ('bale export --all') and import those files: merging restores what they still hold")
	}
	for _, r := range rep.Refused {
		fmt.Fprintf(stdout, "not taken: %s\n", r)
	}
	if rep.MetaLost > 0 {
		fmt.Fprintf(stdout, "LOST: %s (bundle records or export marks) did not verify\n", desk.Plural(rep.MetaLost, "meta value", "meta values"))
	}
	if rep.NewDevice {
		fmt.Fprintln(stdout, "LOST: the device id; the new store has a new one, so this device's next records carry another author")
	}
	for _, d := range rep.Dropped {
		fmt.Fprintf(stdout, "reset: %s\n", d)
	}
	fmt.Fprintf(stdout, "next: 'bale store check --store %s', then use that folder (move it in place of the old one, or give --store)\n", pos[0])
	if lost {
		return errDamaged
	}
	return nil
}
