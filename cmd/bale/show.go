package main

import (
	"fmt"
	"io"
	"strings"

	"baleassay/data/desk"
	"baleassay/data/record"
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
	// A bale's audit: state (no_pulls, assessed, failed), its spec and
	// verdict, hazards, labels used twice, or why there is no audit.
	Audit          string   `json:"audit,omitempty"`
	Spec           string   `json:"spec,omitempty"`
	Verdict        string   `json:"verdict,omitempty"`
	Hazard         bool     `json:"hazard,omitempty"`
	LabelConflicts []string `json:"label_conflicts,omitempty"`
	NoAudit        string   `json:"no_audit,omitempty"`
}

func eventOut(e record.Stamped) eventJSON {
	out := eventJSON{Event: e.ID.String(), Device: e.Device.String(), Clock: e.Clock.String(), Supersedes: []string{},
		Deleted: e.Deleted, Summary: desk.Describe(e.Event)}
	for _, s := range e.Supersedes {
		out.Supersedes = append(out.Supersedes, s.String())
	}
	return out
}

func runShow(args []string, stdout, stderr io.Writer) error {
	fs := newFlags("show")
	dir := storeFlag(fs)
	asJSON := fs.Bool("json", false, "print JSON")
	pos, d, err := openForArgs(fs, dir, args, 1, "give one id (a record's id, a unique prefix or suffix of it, a bale tag, a site name, or an event id)")
	if err != nil {
		return err
	}
	defer d.Close()
	det, err := d.Show(pos[0])
	if err != nil {
		return err
	}
	st, hist, id := det.State, det.History, det.State.ID
	out := showJSON{ID: id.String(), Kind: st.Kind.String(), Deleted: st.Deleted(), Conflicted: st.Conflicted(), Events: st.Events,
		Heads: []eventJSON{}, History: []eventJSON{}}
	for _, h := range st.Heads {
		out.Heads = append(out.Heads, eventOut(h))
	}
	for _, h := range hist {
		out.History = append(out.History, eventOut(h))
	}
	a := det.Audit
	if a != nil {
		out.Pulls = a.Pulls
		out.Audit = a.State.String()
		out.LabelConflicts = a.LabelClash
		if a.State == desk.AuditDone {
			f := a.TargetPET.Fraction
			out.TargetPET = &f
			out.Hazard = a.Hazard
			if a.HasVerdict {
				out.Spec, out.Verdict = a.Spec, a.Verdict.String()
			}
		}
		if a.Err != nil {
			out.NoAudit = a.Err.Error()
		}
	}
	if *asJSON {
		return recJSON(stdout, out)
	}
	state := "current"
	switch {
	case out.Deleted:
		state = "removed (kept in the history)"
	case out.Conflicted:
		state = fmt.Sprintf("CONFLICT: %d concurrent values; resolve with 'bale conflicts resolve %s EVENT'", len(out.Heads), id)
	}
	fmt.Fprintf(stdout, "%s %s: %s, %s\n", out.Kind, out.ID, state, desk.Plural(out.Events, "event", "events"))
	for _, h := range st.Heads {
		if !h.Deleted || out.Deleted {
			fmt.Fprintf(stdout, "  value  %s\n         event %s by device %s at %s\n", desk.Describe(h.Event), h.ID.Short(), h.Device.String()[:8], h.Clock)
		}
	}
	if a != nil && !out.Deleted {
		printAuditLine(stdout, id.String(), *a)
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
		fmt.Fprintf(stdout, "  %s  %s  dev %s%s\n      %s\n", h.Clock, h.ID.Short(), h.Device.String()[:8], sup, desk.Describe(h.Event))
	}
	return nil
}

// printAuditLine says a bale's audit in a line or two, or why it has none.
func printAuditLine(w io.Writer, id string, a desk.AuditSummary) {
	switch a.State {
	case desk.AuditNoPulls:
		fmt.Fprintf(w, "  audit  none: no pulls yet ('bale pulls add %s PULLS.csv')\n", id)
		return
	case desk.AuditFailed:
		fmt.Fprintf(w, "  audit  none: the %s could not be assessed: %v\n", desk.Plural(a.Pulls, "pull", "pulls"), a.Err)
		return
	}
	g := a.TargetPET
	fmt.Fprintf(w, "  audit  %s, target PET %.2f %%", desk.Plural(a.Pulls, "pull", "pulls"), 100*g.Fraction)
	if g.HasInterval {
		fmt.Fprintf(w, " (interval %.2f–%.2f %%)", 100*g.Low, 100*g.High)
	}
	switch {
	case a.HasVerdict:
		fmt.Fprintf(w, "; spec %s: %s", a.Spec, strings.ToUpper(a.Verdict.String()))
	case a.SpecMissing:
		fmt.Fprint(w, "; no verdict: the bale's spec is neither stored nor built in")
	}
	fmt.Fprintln(w)
	if a.Hazard {
		fmt.Fprintln(w, "  HAZARD found: keep the bale apart and handle it per local rules (bale assess BALE names the pulls)")
	}
	if len(a.LabelClash) > 0 {
		fmt.Fprintf(w, "  CONFLICT: pull labels %s were used by two pulls each (two devices); both are counted; see bale conflicts\n", strings.Join(a.LabelClash, ", "))
	}
}
