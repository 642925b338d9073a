package main

import (
	"fmt"
	"io"
	"sort"
	"text/tabwriter"
	"time"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/data/store"
)

func init() {
	register(command{
		name:    "pulls",
		usage:   "add BALE PULLS.csv [--yes] | list BALE [--json]  [--store DIR|--demo]",
		summary: "record a bale's pulls from the pulls CSV, or list them",
		run:     runPulls,
	})
}

// pullJSON is one pull of 'pulls list --json': masses in kg and piece
// counts by category key (only the categories found or counted).
type pullJSON struct {
	ID         string             `json:"id"`
	Bale       string             `json:"bale"`
	Label      string             `json:"label"`
	Taken      string             `json:"taken,omitempty"`
	TotalKg    float64            `json:"total_kg"`
	Kg         map[string]float64 `json:"kg"`
	Pieces     map[string]int64   `json:"pieces,omitempty"`
	Conflicted bool               `json:"conflicted"`
}

func runPulls(args []string, stdout, stderr io.Writer) error {
	return dispatch(args, stdout, sub("add", pullsAdd), sub("list", pullsList))
}

// pullRecord converts a pull read from CSV to a record: categories with
// mass above 0 kg, and counted categories.
func pullRecord(bale record.EntityID, p assess.Pull, taken time.Time) record.PullRecord {
	r := record.PullRecord{Bale: bale, Label: p.Label, TakenMs: taken.UnixMilli(), Kg: map[string]float64{}}
	for i, m := range p.Kg {
		if m != 0 {
			r.Kg[assess.CategoryAt(i).Key] = m
		}
	}
	for i, n := range p.Pieces {
		if n != assess.NotCounted {
			if r.Pieces == nil {
				r.Pieces = map[string]int64{}
			}
			r.Pieces[assess.CategoryAt(i).Key] = int64(n)
		}
	}
	return r
}

func pullsAdd(args []string, stdout io.Writer) error {
	fs := newFlags("pulls add")
	dir := storeFlag(fs)
	yes := fs.Bool("yes", false, "save even when a value looks implausible")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 2 {
		return usagef("give the bale id and the pulls CSV file")
	}
	pulls, err := assess.ReadPullsFile(pos[1])
	if err != nil {
		return err
	}
	s, err := openExistingStore(*dir)
	if err != nil {
		return err
	}
	defer s.Close()
	bale, st, err := findEntity(s, pos[0], record.KindBale)
	if err != nil {
		return err
	}
	have, err := s.Pulls(bale)
	if err != nil {
		return err
	}
	used := map[string]bool{}
	for _, p := range have {
		used[p.Pull.Label] = true
	}
	now := time.Now()
	evs := make([]record.Event, len(pulls))
	for i, p := range pulls {
		if used[p.Label] {
			return fmt.Errorf("%s: bale %s already has a pull %q; nothing was saved: give the new pulls other labels", pos[1], bale, p.Label)
		}
		rec := pullRecord(bale, p, now)
		evs[i] = record.Event{Kind: record.KindPull, Pull: &rec}
	}
	if _, err := s.Save(evs, store.SaveOptions{Confirm: *yes}); err != nil {
		return fmt.Errorf("%s: %w", pos[1], recSaveError(err))
	}
	cur, _ := st.Current()
	var kg float64
	for _, p := range pulls {
		kg += p.TotalKg()
	}
	fmt.Fprintf(stdout, "saved %d pulls (%.2f kg) for bale %s %s\n", len(pulls), kg, bale, cur.Bale.Tag)
	return nil
}

func pullsList(args []string, stdout io.Writer) error {
	fs := newFlags("pulls list")
	dir := storeFlag(fs)
	asJSON := fs.Bool("json", false, "print JSON")
	pos, s, err := openForArgs(fs, dir, args, 1, "give the bale id")
	if err != nil {
		return err
	}
	defer s.Close()
	bale, _, err := findEntity(s, pos[0], record.KindBale)
	if err != nil {
		return err
	}
	pulls, err := s.Pulls(bale)
	if err != nil {
		return err
	}
	out := make([]pullJSON, len(pulls))
	for i, p := range pulls {
		out[i] = pullJSON{ID: p.ID.String(), Bale: bale.String(), Label: p.Pull.Label, Taken: recTime(p.Pull.TakenMs),
			TotalKg: p.Pull.PartsKg(), Kg: p.Pull.Kg, Pieces: p.Pull.Pieces, Conflicted: p.Conflicted}
	}
	if *asJSON {
		return recJSON(stdout, out)
	}
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "id\tlabel\tkg\tlargest parts")
	for _, p := range out {
		keys := make([]string, 0, len(p.Kg))
		for k := range p.Kg {
			keys = append(keys, k)
		}
		sort.Slice(keys, func(i, j int) bool {
			return p.Kg[keys[i]] > p.Kg[keys[j]] || (p.Kg[keys[i]] == p.Kg[keys[j]] && keys[i] < keys[j])
		})
		top := ""
		for i, k := range keys[:min(3, len(keys))] {
			if i > 0 {
				top += ", "
			}
			top += fmt.Sprintf("%s %.2f", k, p.Kg[k])
		}
		fmt.Fprintf(tw, "%s\t%s\t%.2f\t%s\n", p.ID, p.Label, p.TotalKg, top)
	}
	tw.Flush()
	fmt.Fprintf(stdout, "%d pulls\n", len(out))
	return nil
}
