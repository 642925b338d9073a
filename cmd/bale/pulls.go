package main

import (
	"baleassay/assess"
	"fmt"
	"io"
	"os"
	"sort"
	"text/tabwriter"

	"baleassay/data/desk"
	"baleassay/data/record"
)

func init() {
	register(command{
		name:    "pulls",
		usage:   "add BALE PULLS.csv|- [--unit kg|lb] [--yes] | edit PULL FILE|- [--unit kg|lb] | remove PULL | list BALE [--json]  [--store DIR|--demo]",
		summary: "record a bale's pulls from the pulls CSV (or the input), correct or remove one, or list them",
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
	TotalCount int64              `json:"total_count,omitempty"` // pieces examined
	Conflicted bool               `json:"conflicted"`
	WeighedKg  *float64           `json:"weighed_kg,omitempty"`  // weighed before sorting
	UnsortedKg *float64           `json:"unsorted_kg,omitempty"` // weighed − sorted parts
}

func runPulls(args []string, stdout, stderr io.Writer) error {
	return dispatch(args, stdout, sub("add", pullsAdd), sub("list", pullsList), sub("edit", pullsEdit), sub("remove", pullsRemove))
}

// stdin is where "-" reads from; tests replace it.
var stdin io.Reader = os.Stdin

// readPullsArg reads the pulls CSV from a file or, for "-", from stdin.
func readPullsArg(arg, unitS string) ([]record.PullRecord, error) {
	var unit desk.Unit
	if unitS != "" {
		u, err := desk.ParseUnit(unitS)
		if err != nil {
			return nil, usagef("--unit %q: give kg or lb", unitS)
		}
		unit = u
	}
	if arg == "-" {
		return desk.ReadPulls(stdin, "stdin", unit)
	}
	f, _, err := assess.OpenRegular(arg) // a FIFO or folder is refused, not waited on
	if err != nil {
		return nil, fmt.Errorf("cannot read %s: %v", arg, err)
	}
	defer f.Close()
	return desk.ReadPulls(f, arg, unit)
}

func pullsAdd(args []string, stdout io.Writer) error {
	fs := newFlags("pulls add")
	dir := storeFlag(fs)
	unit := fs.String("unit", "", "unit of the masses in the file: kg (default) or lb")
	yes := fs.Bool("yes", false, "save even when a value looks implausible")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 2 {
		return usagef("give the bale and the pulls CSV file (- reads it from the input)")
	}
	pulls, err := readPullsArg(pos[1], *unit)
	if err != nil {
		return err
	}
	d, err := openDesk(*dir, false)
	if err != nil {
		return err
	}
	defer d.Close()
	bale, _, err := d.AddPulls(pos[0], pulls, desk.SaveOptions{Confirm: *yes})
	if err != nil {
		return fmt.Errorf("%s: %w", pos[1], withHint(err))
	}
	var kg float64
	for _, p := range pulls {
		kg += p.PartsKg()
	}
	fmt.Fprintf(stdout, "saved %s (%s kg) for bale %s\n", desk.Plural(len(pulls), "pull", "pulls"), desk.Num(kg, 3), bale)
	if n := desk.HazardNotice(pulls); n != "" {
		fmt.Fprintln(stdout, wrap(n, 100))
	}
	return nil
}

func pullsEdit(args []string, stdout io.Writer) error {
	fs := newFlags("pulls edit")
	dir := storeFlag(fs)
	unit := fs.String("unit", "", "unit of the masses in the file: kg (default) or lb")
	yes := fs.Bool("yes", false, "save even when a value looks implausible")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 2 {
		return usagef("give the pull and a pulls CSV file with its one corrected line (- reads it from the input)")
	}
	pulls, err := readPullsArg(pos[1], *unit)
	if err != nil {
		return err
	}
	if len(pulls) != 1 {
		return fmt.Errorf("%s holds %s: give exactly the one corrected pull", pos[1], desk.Plural(len(pulls), "pull", "pulls"))
	}
	d, err := openDesk(*dir, false)
	if err != nil {
		return err
	}
	defer d.Close()
	id, err := d.EditPull(pos[0], pulls[0], desk.SaveOptions{Confirm: *yes})
	if err != nil {
		return withHint(err)
	}
	fmt.Fprintf(stdout, "saved pull %s  %s, %s kg; the earlier value stays in its history\n", id, pulls[0].Label, desk.Num(pulls[0].PartsKg(), 3))
	if n := desk.HazardNotice(pulls); n != "" {
		fmt.Fprintln(stdout, wrap(n, 100))
	}
	return nil
}

func pullsRemove(args []string, stdout io.Writer) error {
	fs := newFlags("pulls remove")
	dir := storeFlag(fs)
	pos, d, err := openForArgs(fs, dir, args, 1, "give the pull (id, prefix or suffix)")
	if err != nil {
		return err
	}
	defer d.Close()
	id, err := d.RemovePull(pos[0])
	if err != nil {
		return withHint(err)
	}
	fmt.Fprintf(stdout, "removed pull %s (its history is kept; 'bale show %s' lists it)\n", id, id)
	return nil
}

func pullsList(args []string, stdout io.Writer) error {
	fs := newFlags("pulls list")
	dir := storeFlag(fs)
	asJSON := fs.Bool("json", false, "print JSON")
	pos, d, err := openForArgs(fs, dir, args, 1, "give the bale (id, prefix, suffix or tag)")
	if err != nil {
		return err
	}
	defer d.Close()
	bale, pulls, err := d.Pulls(pos[0])
	if err != nil {
		return err
	}
	out := make([]pullJSON, len(pulls))
	for i, p := range pulls {
		out[i] = pullJSON{ID: p.ID.String(), Bale: bale.String(), Label: p.Pull.Label, Taken: recTime(p.Pull.TakenMs),
			TotalKg: p.Pull.PartsKg(), Kg: p.Pull.Kg, Pieces: p.Pull.Pieces, TotalCount: p.Pull.TotalPieces, Conflicted: p.Conflicted}
		if p.Pull.StatedKg > 0 {
			w, rest := p.Pull.StatedKg, p.RemainderKg()
			out[i].WeighedKg, out[i].UnsortedKg = &w, &rest
		}
	}
	if *asJSON {
		return recJSON(stdout, out)
	}
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "id\tlabel\tkg\tunsorted kg\tlargest parts")
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
			top += k + " " + desk.Num(p.Kg[k], 3)
		}
		rest := "–"
		if p.UnsortedKg != nil {
			rest = desk.Num(*p.UnsortedKg, 3)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\n", p.ID, p.Label, desk.Num(p.TotalKg, 3), rest, top)
	}
	tw.Flush()
	fmt.Fprintln(stdout, desk.Plural(len(out), "pull", "pulls"))
	return nil
}
