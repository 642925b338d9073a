package main

import (
	"baleassay/data/record"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"
)

func init() {
	register(command{
		name:    "bales",
		usage:   "add --site ID --kg N [--received DATE] [--dims LxWxH] [--tag T] [--grader G] [--spec S] [--yes] | list [--site ID] [--json]  [--store DIR|--demo]",
		summary: "record received bales and list them, by site",
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
}

func runBales(args []string, stdout, stderr io.Writer) error {
	return dispatch(args, stdout, sub("add", balesAdd), sub("list", balesList))
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
		x, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
			return 0, 0, 0, usagef("--dims %q: %q is not a number of metres", s, p)
		}
		v[i] = x
	}
	return v[0], v[1], v[2], nil
}

func balesAdd(args []string, stdout io.Writer) error {
	fs := newFlags("bales add")
	dir := storeFlag(fs)
	site := fs.String("site", "", "site id")
	kg := fs.Float64("kg", math.NaN(), "gross mass of the bale in kg")
	rx := fs.String("received", "", "when the bale arrived (2026-03-02 or RFC 3339; default now)")
	dims := fs.String("dims", "", "length x width x height in metres, e.g. 1.22x0.76x1.52")
	tag := fs.String("tag", "", "bale tag number")
	grader := fs.String("grader", "", "who graded it")
	spec := fs.String("spec", "", "spec the bale is bought against")
	yes := fs.Bool("yes", false, "save even when a value looks implausible")
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return usagef("unexpected argument %q", pos[0])
	}
	if *site == "" || math.IsNaN(*kg) {
		return usagef("give --site and --kg")
	}
	when, err := recDate("--received", *rx)
	if err != nil {
		return err
	}
	if when.IsZero() {
		when = time.Now()
	}
	l, w, h, err := parseDims(*dims)
	if err != nil {
		return err
	}
	s, err := openExistingStore(*dir)
	if err != nil {
		return err
	}
	defer s.Close()
	siteID, _, err := findEntity(s, *site, record.KindSite)
	if err != nil {
		return err
	}
	rec := record.BaleRecord{Site: siteID, ReceivedMs: when.UnixMilli(), GrossKg: *kg, LengthM: l, WidthM: w, HeightM: h,
		Tag: *tag, Grader: *grader, Spec: *spec}
	id, err := saveNew(s, record.Event{Kind: record.KindBale, Bale: &rec}, *yes)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "saved bale %s  %.1f kg", id, *kg)
	if d := rec.DensityKgM3(); d > 0 {
		fmt.Fprintf(stdout, ", %.0f kg/m³", d)
	}
	fmt.Fprintln(stdout, "\ncaution: bale ties are under tension; cut from the side, wear eye protection, never stand under a lifted bale")
	return nil
}

func balesList(args []string, stdout io.Writer) error {
	fs := newFlags("bales list")
	dir := storeFlag(fs)
	site := fs.String("site", "", "only the bales of this site")
	asJSON := fs.Bool("json", false, "print JSON")
	_, s, err := openForArgs(fs, dir, args, 0, "")
	if err != nil {
		return err
	}
	defer s.Close()
	var siteID record.EntityID
	if *site != "" {
		if siteID, _, err = findEntity(s, *site, record.KindSite); err != nil {
			return err
		}
	}
	bales, err := s.Bales(siteID)
	if err != nil {
		return err
	}
	pulls, err := s.PullsByBale()
	if err != nil {
		return err
	}
	names := map[record.EntityID]string{}
	if sites, err := s.Sites(); err == nil {
		for _, v := range sites {
			names[v.ID] = v.Site.Name
		}
	}
	out := make([]baleJSON, len(bales))
	for i, b := range bales {
		r := b.Bale
		out[i] = baleJSON{ID: b.ID.String(), Site: r.Site.String(), SiteName: names[r.Site], Received: recTime(r.ReceivedMs),
			GrossKg: r.GrossKg, LengthM: r.LengthM, WidthM: r.WidthM, HeightM: r.HeightM, DensityKg: r.DensityKgM3(),
			Tag: r.Tag, Grader: r.Grader, Spec: r.Spec, Pulls: len(pulls[b.ID]), Conflicted: b.Conflicted}
	}
	if *asJSON {
		return recJSON(stdout, out)
	}
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "id\treceived\tsite\ttag\tkg\tkg/m³\tpulls\t")
	for _, b := range out {
		mark := ""
		if b.Conflicted {
			mark = "CONFLICT"
		}
		dens := "–"
		if b.DensityKg > 0 {
			dens = fmt.Sprintf("%.0f", b.DensityKg)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%.1f\t%s\t%d\t%s\n", b.ID, b.Received[:min(16, len(b.Received))], b.SiteName, b.Tag, b.GrossKg, dens, b.Pulls, mark)
	}
	tw.Flush()
	fmt.Fprintf(stdout, "%d bales\n", len(out))
	return nil
}
