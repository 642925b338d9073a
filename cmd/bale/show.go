package main

import (
	"fmt"
	"io"
	"sort"
	"strings"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/data/store"
)

func init() {
	register(command{
		name:    "show",
		usage:   "ID [--json]  [--store DIR|--demo]",
		summary: "show one site, bale, pull or setting: its value, any conflict and its whole history",
		run:     runShow,
	})
}

// eventJSON is one event in 'show --json' and 'conflicts --json'.
type eventJSON struct {
	Event      string   `json:"event"`
	Device     string   `json:"device"`
	Clock      string   `json:"clock"`
	Supersedes []string `json:"supersedes"`
	Deleted    bool     `json:"deleted"`
	Summary    string   `json:"summary"`
}

// showJSON is the output of 'show --json'.
type showJSON struct {
	ID         string      `json:"id"`
	Kind       string      `json:"kind"`
	Deleted    bool        `json:"deleted"`
	Conflicted bool        `json:"conflicted"`
	Events     int         `json:"events"`
	Heads      []eventJSON `json:"heads"`
	History    []eventJSON `json:"history"`
	Pulls      int         `json:"pulls,omitempty"`
	TargetPET  *float64    `json:"target_pet,omitempty"` // bales with pulls: ratio estimate, fraction
}

func eventOut(e record.Stamped) eventJSON {
	out := eventJSON{Event: e.ID.String(), Device: e.Device.String(), Clock: e.Clock.String(), Supersedes: []string{},
		Deleted: e.Deleted, Summary: summarize(e.Event)}
	for _, s := range e.Supersedes {
		out.Supersedes = append(out.Supersedes, s.String())
	}
	return out
}

// summarize is a one-line text of an event's value.
func summarize(e record.Event) string {
	switch {
	case e.Deleted:
		return "deleted"
	case e.Site != nil:
		s := e.Site
		t := fmt.Sprintf("%s (%s) at %.5f, %.5f", s.Name, s.Kind, s.Lat, s.Lon)
		if s.Notes != "" {
			t += "; " + s.Notes
		}
		return t
	case e.Bale != nil:
		b := e.Bale
		t := fmt.Sprintf("bale %s from site %s, %.1f kg, received %s", b.Tag, b.Site, b.GrossKg, recTime(b.ReceivedMs))
		if d := b.DensityKgM3(); d > 0 {
			t += fmt.Sprintf(", %.2f×%.2f×%.2f m, %.0f kg/m³", b.LengthM, b.WidthM, b.HeightM, d)
		}
		return t
	case e.Pull != nil:
		p := e.Pull
		keys := make([]string, 0, len(p.Kg))
		for k := range p.Kg {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		parts := make([]string, len(keys))
		for i, k := range keys {
			parts[i] = fmt.Sprintf("%s %.2f", k, p.Kg[k])
		}
		return fmt.Sprintf("pull %s of bale %s, %.2f kg: %s", p.Label, p.Bale, p.PartsKg(), strings.Join(parts, ", "))
	case e.Setting != nil:
		return fmt.Sprintf("%s %q (%d bytes of JSON)", e.Setting.Kind, e.Setting.Name, len(e.Setting.Body))
	}
	return "(empty)"
}

func runShow(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("show")
	dir := storeFlag(fs)
	asJSON := fs.Bool("json", false, "print JSON")
	pos, s, err := openForArgs(fs, dir, args, 1, "give one id (an entity's UUID or its first hex digits, or an event id)")
	if err != nil {
		return err
	}
	defer s.Close()
	var id record.EntityID
	if evID, err := record.ParseEventID(pos[0]); err == nil {
		e, err := s.Event(evID)
		if err != nil {
			return err
		}
		id = e.Entity
	} else if id, err = s.FindEntity(pos[0]); err != nil {
		return err
	}
	st, err := s.Entity(id)
	if err != nil {
		return err
	}
	hist, err := s.History(id)
	if err != nil {
		return err
	}
	out := showJSON{ID: id.String(), Kind: st.Kind.String(), Deleted: st.Deleted(), Conflicted: st.Conflicted(), Events: st.Events,
		Heads: []eventJSON{}, History: []eventJSON{}}
	for _, h := range st.Heads {
		out.Heads = append(out.Heads, eventOut(h))
	}
	for _, h := range hist {
		out.History = append(out.History, eventOut(h))
	}
	var res *assess.Result
	if cur, ok := st.Current(); ok && cur.Bale != nil {
		pulls, err := s.Pulls(id)
		if err != nil {
			return err
		}
		out.Pulls = len(pulls)
		if a, err := store.AuditOf(*cur.Bale, pulls); err == nil && len(a.Pulls) > 0 {
			if r, err := assess.Assess(a, assess.Options{}); err == nil {
				res = &r
				f := r.Group(assess.GroupPET).Fraction
				out.TargetPET = &f
			}
		}
	}
	if *asJSON {
		return recJSON(stdout, out)
	}
	state := "current"
	switch {
	case out.Deleted:
		state = "deleted (kept in the history)"
	case out.Conflicted:
		state = fmt.Sprintf("CONFLICT: %d concurrent values; resolve with 'bale conflicts resolve %s EVENT'", len(out.Heads), id)
	}
	fmt.Fprintf(stdout, "%s %s: %s, %d events\n", out.Kind, out.ID, state, out.Events)
	for _, h := range st.Heads {
		if !h.Deleted || out.Deleted {
			fmt.Fprintf(stdout, "  value  %s\n         event %s by device %s at %s\n", summarize(h.Event), h.ID.Short(), h.Device.String()[:8], h.Clock)
		}
	}
	if res != nil {
		g := res.Group(assess.GroupPET)
		fmt.Fprintf(stdout, "  audit  %d pulls, %.1f kg sampled, target PET %.2f %%", res.Pulls, res.SampledKg, 100*g.Fraction)
		if g.HasInterval {
			fmt.Fprintf(stdout, " (%.0f %% interval %.2f–%.2f %%)", 100*res.Confidence, 100*g.Low, 100*g.High)
		}
		fmt.Fprintln(stdout)
		if len(res.HazardPulls) > 0 {
			fmt.Fprintf(stdout, "  HAZARD found in pulls %s: keep it apart and handle it per local rules\n", strings.Join(res.HazardPulls, ", "))
		}
	} else if out.Kind == "bale" && out.Pulls == 0 && !out.Deleted {
		fmt.Fprintf(stdout, "  no pulls yet: 'bale pulls add %s PULLS.csv'\n", id)
	}
	fmt.Fprintln(stdout, "history (oldest first):")
	for _, h := range hist {
		sup := ""
		if len(h.Supersedes) > 0 {
			ss := make([]string, len(h.Supersedes))
			for i, x := range h.Supersedes {
				ss[i] = x.Short()
			}
			sup = " supersedes " + strings.Join(ss, ",")
		}
		fmt.Fprintf(stdout, "  %s  %s  dev %s%s\n      %s\n", h.Clock, h.ID.Short(), h.Device.String()[:8], sup, summarize(h.Event))
	}
	return nil
}
