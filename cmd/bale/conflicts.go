package main

import (
	"baleassay/data/desk"
	"fmt"
	"io"
)

func init() {
	register(command{
		name:    "conflicts",
		usage:   "[--json] | resolve ID EVENT  [--store DIR|--demo]",
		summary: "list entities edited concurrently on two devices, or resolve one by keeping a value",
		run:     runConflicts,
	})
}

// conflictJSON is one entry of 'conflicts --json'.
type conflictJSON struct {
	ID    string      `json:"id"`
	Kind  string      `json:"kind"`
	Heads []eventJSON `json:"heads,omitempty"`
	// A label used by more than one pull of a bale (kind "label").
	Label string   `json:"label,omitempty"`
	Pulls []string `json:"pulls,omitempty"`
}

func runConflicts(args []string, stdout, stderr io.Writer) error {
	if len(args) > 0 && args[0] == "resolve" {
		return conflictsResolve(args[1:], stdout)
	}
	fs := newFlags("conflicts")
	dir := storeFlag(fs)
	asJSON := fs.Bool("json", false, "print JSON")
	_, d, err := openForArgs(fs, dir, args, 0, " (did you mean 'conflicts resolve ID EVENT'?)")
	if err != nil {
		return err
	}
	defer d.Close()
	cs, err := d.Conflicts()
	if err != nil {
		return err
	}
	out := []conflictJSON{}
	for _, c := range cs {
		if c.Label != "" {
			j := conflictJSON{ID: c.Bale.String(), Kind: "label", Label: c.Label}
			for _, p := range c.Pulls {
				j.Pulls = append(j.Pulls, p.String())
			}
			out = append(out, j)
			continue
		}
		j := conflictJSON{ID: c.State.ID.String(), Kind: c.State.Kind.String()}
		for _, h := range c.State.Heads {
			j.Heads = append(j.Heads, eventOut(h))
		}
		out = append(out, j)
	}
	if *asJSON {
		return recJSON(stdout, out)
	}
	if len(out) == 0 {
		fmt.Fprintln(stdout, "no conflicts")
		return nil
	}
	for _, c := range cs {
		if c.Label != "" {
			fmt.Fprintf(stdout, "bale %s has %s labelled %q (added on two devices):\n", c.Bale, desk.Plural(len(c.Pulls), "pull", "pulls"), c.Label)
			for _, p := range c.Pulls {
				fmt.Fprintf(stdout, "  pull %s\n", p)
			}
			fmt.Fprintln(stdout, "  both are counted in the audit; relabel one (bale pulls edit PULL FILE) or remove it (bale pulls remove PULL)")
			continue
		}
		st := c.State
		fmt.Fprintf(stdout, "%s %s has %d concurrent values:\n", st.Kind, st.ID, len(st.Heads))
		for _, h := range st.Heads {
			fmt.Fprintf(stdout, "  event %s  device %s  %s\n    %s\n", h.ID, h.Device.String()[:8], h.Clock, desk.Describe(h.Event))
		}
		fmt.Fprintf(stdout, "  keep one: bale conflicts resolve %s EVENT\n", st.ID)
	}
	fmt.Fprintln(stdout, desk.Plural(len(out), "conflict", "conflicts"))
	return nil
}

func conflictsResolve(args []string, stdout io.Writer) error {
	fs := newFlags("conflicts resolve")
	dir := storeFlag(fs)
	pos, d, err := openForArgs(fs, dir, args, 2, "give the record's id and the id of the event whose value to keep")
	if err != nil {
		return err
	}
	defer d.Close()
	st, keep, err := d.ResolveConflict(pos[0], pos[1])
	if err != nil {
		return withHint(err)
	}
	fmt.Fprintf(stdout, "resolved %s %s: kept the value of event %s\n", st.Kind, st.ID, keep.Short())
	return nil
}
