package main

import (
	"fmt"
	"io"

	"baleassay/data/desk"
)

func init() {
	register(command{
		name:    "find",
		usage:   "TEXT [--store DIR|--demo]",
		summary: "look up sites by name and bales by tag",
		run:     runFind,
	})
}

func runFind(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("find")
	dir := storeFlag(fs)
	pos, d, err := openForArgs(fs, dir, args, 1, "give the text to look for")
	if err != nil {
		return err
	}
	defer d.Close()
	f, err := d.Find(pos[0])
	if err != nil {
		return err
	}
	for _, s := range f.Sites {
		fmt.Fprintf(stdout, "site  %s  %s (%s)\n", s.ID, s.Site.Name, s.Site.Kind)
	}
	for _, b := range f.Bales {
		fmt.Fprintf(stdout, "bale  %s  %s  %s kg, site %s\n", b.ID, b.Bale.Tag, desk.Num(b.Bale.GrossKg, 1), b.SiteName)
	}
	fmt.Fprintf(stdout, "%s, %s\n", desk.Plural(len(f.Sites), "site", "sites"), desk.Plural(len(f.Bales), "bale", "bales"))
	return nil
}
