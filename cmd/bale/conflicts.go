package main

import (
	"baleassay/data/record"
	"fmt"
	"io"
	"strings"
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
	Heads []eventJSON `json:"heads"`
}

func runConflicts(args []string, stdout, stderr io.Writer) error {
	if len(args) > 0 && args[0] == "resolve" {
		return conflictsResolve(args[1:], stdout)
	}
	fs := newFlags("conflicts")
	dir := storeFlag(fs)
	asJSON := fs.Bool("json", false, "print JSON")
	_, s, err := openForArgs(fs, dir, args, 0, " (did you mean 'conflicts resolve ID EVENT'?)")
	if err != nil {
		return err
	}
	defer s.Close()
	cs, err := s.Conflicts()
	if err != nil {
		return err
	}
	out := make([]conflictJSON, len(cs))
	for i, c := range cs {
		out[i] = conflictJSON{ID: c.ID.String(), Kind: c.Kind.String()}
		for _, h := range c.Heads {
			out[i].Heads = append(out[i].Heads, eventOut(h))
		}
	}
	if *asJSON {
		return recJSON(stdout, out)
	}
	if len(out) == 0 {
		fmt.Fprintln(stdout, "no conflicts")
		return nil
	}
	for _, c := range cs {
		fmt.Fprintf(stdout, "%s %s has %d concurrent values:\n", c.Kind, c.ID, len(c.Heads))
		for _, h := range c.Heads {
			fmt.Fprintf(stdout, "  event %s  device %s  %s\n    %s\n", h.ID, h.Device.String()[:8], h.Clock, summarize(h.Event))
		}
		fmt.Fprintf(stdout, "  keep one: bale conflicts resolve %s EVENT\n", c.ID)
	}
	fmt.Fprintf(stdout, "%d conflicts\n", len(out))
	return nil
}

func conflictsResolve(args []string, stdout io.Writer) error {
	fs := newFlags("conflicts resolve")
	dir := storeFlag(fs)
	pos, s, err := openForArgs(fs, dir, args, 2, "give the entity id and the id of the event whose value to keep")
	if err != nil {
		return err
	}
	defer s.Close()
	id, err := s.FindEntity(pos[0])
	if err != nil {
		return err
	}
	st, err := s.Entity(id)
	if err != nil {
		return err
	}
	if !st.Conflicted() {
		return fmt.Errorf("%s %s has no conflict", st.Kind, id)
	}
	var keep record.EventID
	found := 0
	want := strings.ToLower(pos[1])
	for _, h := range st.Heads {
		if len(want) >= 6 && strings.HasPrefix(h.ID.String(), want) {
			keep = h.ID
			found++
		}
	}
	if found != 1 {
		return fmt.Errorf("event %q is not one of the %d current values of %s (see 'bale conflicts'); give at least 6 hex digits", pos[1], len(st.Heads), id)
	}
	if _, err := s.Resolve(id, keep); err != nil {
		return recSaveError(err)
	}
	fmt.Fprintf(stdout, "resolved %s %s: kept the value of event %s\n", st.Kind, id, keep.Short())
	return nil
}
