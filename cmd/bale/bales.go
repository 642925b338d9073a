package main

import (
	"baleassay/assess"
	"baleassay/data/desk"
	"baleassay/data/record"
	"flag"
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"
)

func init() {
	register(command{
		name:    "bales",
		usage:   "add --site SITE --kg N [--received DATE] [--dims LxWxH] [--tag T] [--grader G] [--spec S] [--notes S] [--yes] | edit BALE [the same flags] | remove BALE | list [--site SITE] [--from DAY] [--to DAY] [--json]  [--store DIR|--demo]",
		summary: "record received bales, correct or remove them, and list them with their audit",
		run:     runBales,
	})
}

// baleJSON is one bale of 'bales list --json'. Dimensions and density are
// 0 when not measured.
type baleJSON struct {
	ID         string  `json:"id"`
	Site       string  `json:"site"`
	SiteName   string  `json:"site_name"`
	Received   string  `json:"received"`
	GrossKg    float64 `json:"gross_kg"`
	LengthM    float64 `json:"length_m"`
	WidthM     float64 `json:"width_m"`
	HeightM    float64 `json:"height_m"`
	DensityKg  float64 `json:"density_kg_m3"`
	Tag        string  `json:"tag,omitempty"`
	Grader     string  `json:"grader,omitempty"`
	Spec       string  `json:"spec,omitempty"`
	Pulls      int     `json:"pulls"`
	Conflicted bool    `json:"conflicted"`
	// The audit against the bale's spec (or the default): state
	// (no_pulls, assessed, failed), target-PET share, verdict, hazards.
	Audit          string   `json:"audit"`
	TargetPET      *float64 `json:"target_pet"`
	Verdict        string   `json:"verdict,omitempty"`
	Hazard         bool     `json:"hazard"`
	LabelConflicts []string `json:"label_conflicts,omitempty"`
}

func runBales(args []string, stdout, stderr io.Writer) error {
	return dispatch(args, stdout, sub("add", balesAdd), sub("list", balesList), sub("edit", balesEdit), sub("remove", balesRemove))
}

func parseDims(s string) (l, w, h float64, err error) {
	if s == "" {
		return 0, 0, 0, nil
	}
	parts := strings.Split(strings.ToLower(s), "x")
	if len(parts) != 3 {
		return 0, 0, 0, usagef("--dims %q: give length x width x height in metres, e.g. 1.22x0.76x1.52", s)
	}
	var v [3]float64
	for i, p := range parts {
		x, err := assess.ParseDecimal(strings.TrimSpace(p))
		if err != nil {
			return 0, 0, 0, usagef("--dims %q: %q is not a number of metres", s, p)
		}
		v[i] = x
	}
	return v[0], v[1], v[2], nil
}

// baleFlags are the fields bales add and bales edit share.
type baleFlags struct {
	site, rx, dims, tag, grader, spec, notes *string
	kg                                       *float64
}

func addBaleFlags(fs *flag.FlagSet) baleFlags {
	return baleFlags{
		site:   fs.String("site", "", "site (id, prefix, suffix or name)"),
		kg:     fs.Float64("kg", math.NaN(), "gross mass of the bale in kg"),
		rx:     fs.String("received", "", "when the bale arrived (2026-03-02 or RFC 3339; default now)"),
		dims:   fs.String("dims", "", "length x width x height in metres, e.g. 1.22x0.76x1.52"),
		tag:    fs.String("tag", "", "bale tag number"),
		grader: fs.String("grader", "", "who graded it"),
		spec:   fs.String("spec", "", "spec the bale is bought against (stored or built in)"),
		notes:  fs.String("notes", "", "notes"),
	}
}

func balesAdd(args []string, stdout io.Writer) error {
	fs := newFlags("bales add")
	dir := storeFlag(fs)
	bf := addBaleFlags(fs)
	yes := fs.Bool("yes", false, "save even when a value looks implausible")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return usagef("unexpected argument %q", pos[0])
	}
	if *bf.site == "" || math.IsNaN(*bf.kg) {
		return usagef("give --site and --kg")
	}
	when, err := desk.ParseWhen("--received", *bf.rx)
	if err != nil {
		return usagef("%s", strings.TrimPrefix(err.Error(), "wrong input: "))
	}
	l, w, h, err := parseDims(*bf.dims)
	if err != nil {
		return err
	}
	d, err := openDesk(*dir, false)
	if err != nil {
		return err
	}
	defer d.Close()
	rec := record.BaleRecord{ReceivedMs: when.UnixMilli(), GrossKg: *bf.kg, LengthM: l, WidthM: w, HeightM: h,
		Tag: *bf.tag, Grader: *bf.grader, Spec: *bf.spec, Notes: *bf.notes}
	if when.IsZero() {
		rec.ReceivedMs = 0
	}
	id, err := d.AddBale(desk.BaleInput{Site: *bf.site, BaleRecord: rec}, desk.SaveOptions{Confirm: *yes})
	if err != nil {
		return withHint(err)
	}
	fmt.Fprintf(stdout, "saved bale %s  %s kg", id, desk.Num(*bf.kg, 1))
	if dd := rec.DensityKgM3(); dd > 0 {
		fmt.Fprintf(stdout, ", %s kg/m³", desk.Num(dd, 0))
	}
	fmt.Fprintln(stdout, "\ncaution: bale ties are under tension; cut from the side, wear eye protection, never stand under a lifted bale")
	return nil
}

func balesEdit(args []string, stdout io.Writer) error {
	fs := newFlags("bales edit")
	dir := storeFlag(fs)
	bf := addBaleFlags(fs)
	yes := fs.Bool("yes", false, "save even when a value looks implausible")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("give the bale (id, prefix, suffix or tag)")
	}
	var e desk.BaleEdit
	given := 0
	fs.Visit(func(f *flag.Flag) {
		v := f.Value.String()
		switch f.Name {
		case "site":
			e.Site = &v
		case "tag":
			e.Tag = &v
		case "grader":
			e.Grader = &v
		case "spec":
			e.Spec = &v
		case "notes":
			e.Note = &v
		case "kg":
			e.GrossKg = bf.kg
		default:
			return
		}
		given++
	})
	if flagSet(fs, "dims") {
		l, w, h, err := parseDims(*bf.dims)
		if err != nil {
			return err
		}
		e.Dims = &[3]float64{l, w, h}
		given++
	}
	if flagSet(fs, "received") {
		t, err := desk.ParseWhen("--received", *bf.rx)
		if err != nil {
			return usagef("%s", strings.TrimPrefix(err.Error(), "wrong input: "))
		}
		e.Received = &t
		given++
	}
	if given == 0 {
		return usagef("give what to change: --kg, --dims, --tag, --received, --spec, --site, --grader or --notes")
	}
	d, err := openDesk(*dir, false)
	if err != nil {
		return err
	}
	defer d.Close()
	id, rec, err := d.EditBale(pos[0], e, desk.SaveOptions{Confirm: *yes})
	if err != nil {
		return withHint(err)
	}
	fmt.Fprintf(stdout, "saved bale %s  %s  %s kg; the earlier value stays in its history\n", id, rec.Tag, desk.Num(rec.GrossKg, 1))
	return nil
}

func balesRemove(args []string, stdout io.Writer) error {
	fs := newFlags("bales remove")
	dir := storeFlag(fs)
	pos, d, err := openForArgs(fs, dir, args, 1, "give the bale (id, prefix, suffix or tag)")
	if err != nil {
		return err
	}
	defer d.Close()
	id, err := d.RemoveBale(pos[0])
	if err != nil {
		return withHint(err)
	}
	fmt.Fprintf(stdout, "removed bale %s (its history is kept; 'bale show %s' lists it)\n", id, id)
	return nil
}

func balesList(args []string, stdout io.Writer) error {
	fs := newFlags("bales list")
	dir := storeFlag(fs)
	site := fs.String("site", "", "only the bales of this site")
	fromS := fs.String("from", "", "first day received (2026-03-02)")
	toS := fs.String("to", "", "last day received, inclusive")
	asJSON := fs.Bool("json", false, "print JSON")
	_, d, err := openForArgs(fs, dir, args, 0, "")
	if err != nil {
		return err
	}
	defer d.Close()
	r, err := desk.ParseDateRange(*fromS, *toS)
	if err != nil {
		return usagef("%s", strings.TrimPrefix(err.Error(), "wrong input: "))
	}
	rows, err := d.Bales(desk.BaleFilter{Site: *site, Range: r})
	if err != nil {
		return err
	}
	out := make([]baleJSON, len(rows))
	for i, b := range rows {
		r := b.Bale
		out[i] = baleJSON{ID: b.ID.String(), Site: r.Site.String(), SiteName: b.SiteName, Received: recTime(r.ReceivedMs),
			GrossKg: r.GrossKg, LengthM: r.LengthM, WidthM: r.WidthM, HeightM: r.HeightM, DensityKg: r.DensityKgM3(),
			Tag: r.Tag, Grader: r.Grader, Spec: r.Spec, Pulls: b.Pulls, Conflicted: b.Conflicted,
			Audit: b.Audit.State.String(), Hazard: b.Audit.Hazard, LabelConflicts: b.Audit.LabelClash}
		if b.Audit.State == desk.AuditDone {
			f := b.Audit.TargetPET.Fraction
			out[i].TargetPET = &f
		}
		if b.Audit.HasVerdict {
			out[i].Verdict = b.Audit.Verdict.String()
		}
	}
	if *asJSON {
		return recJSON(stdout, out)
	}
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "id\treceived\tsite\ttag\tkg\tkg/m³\tpulls\tPET\tverdict\t")
	for i, b := range out {
		var marks []string
		if b.Conflicted || len(b.LabelConflicts) > 0 {
			marks = append(marks, "CONFLICT")
		}
		if b.Hazard {
			marks = append(marks, "HAZARD")
		}
		dens := "–"
		if b.DensityKg > 0 {
			dens = desk.Num(b.DensityKg, 0)
		}
		pet := "–"
		if b.TargetPET != nil {
			pet = fmt.Sprintf("%.1f %%", 100**b.TargetPET)
		}
		verdict := b.Verdict
		if verdict == "" {
			verdict = "–"
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%d\t%s\t%s\t%s\n", b.ID, b.Received[:min(16, len(b.Received))], b.SiteName, b.Tag,
			desk.Num(rows[i].Bale.GrossKg, 1), dens, b.Pulls, pet, verdict, strings.Join(marks, " "))
	}
	tw.Flush()
	fmt.Fprintln(stdout, desk.Plural(len(out), "bale", "bales"))
	return nil
}
