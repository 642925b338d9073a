package main

import (
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"
	"time"

	"baleassay/assess"
	"baleassay/data/desk"
	"baleassay/data/geo"
	"baleassay/data/record"
)

func init() {
	register(command{
		name:    "sites",
		usage:   "add --name N --lat LAT --lon LON [--kind K] [--notes S] [--yes] | list | near LAT LON [-k N] | within LAT LON KM | box S W N E | summary (within LAT LON KM | box S W N E | SITE) [--from DAY] [--to DAY] | edit SITE [--name N] [--notes S] [--kind K] | move SITE LAT LON | remove SITE [--yes]  [--json] [--store DIR|--demo]",
		summary: "keep pickup sites and query them offline by distance, box or region",
		run:     runSites,
	})
}

// siteJSON is one site of 'sites list --json'.
type siteJSON struct {
	ID         string  `json:"id"`
	Name       string  `json:"name"`
	Kind       string  `json:"kind"`
	Lat        float64 `json:"lat"`
	Lon        float64 `json:"lon"`
	Notes      string  `json:"notes,omitempty"`
	Conflicted bool    `json:"conflicted"`
}

// hitJSON is one site of 'sites near|within|box --json'; km is the
// haversine distance from the query point (absent for box).
type hitJSON struct {
	ID   string   `json:"id"`
	Name string   `json:"name"`
	Lat  float64  `json:"lat"`
	Lon  float64  `json:"lon"`
	Km   *float64 `json:"km,omitempty"`
}

func runSites(args []string, stdout, stderr io.Writer) error {
	return dispatch(args, stdout,
		sub("add", sitesAdd), sub("list", sitesList),
		subcommand{[]string{"near", "within", "box"}, sitesQuery},
		sub("summary", sitesSummary), sub("move", sitesMove), sub("edit", sitesEdit), sub("remove", sitesRemove))
}

func sitesAdd(args []string, stdout io.Writer) error {
	fs := newFlags("sites add")
	dir := storeFlag(fs)
	name := fs.String("name", "", "site name")
	lat := fs.Float64("lat", math.NaN(), "latitude, WGS 84 degrees (north positive)")
	lon := fs.Float64("lon", math.NaN(), "longitude, WGS 84 degrees (east positive)")
	kind := fs.String("kind", "yard", "yard, mrf, depot, supplier or other")
	notes := fs.String("notes", "", "contact notes")
	yes := fs.Bool("yes", false, "save even when a value looks implausible")
	pos, err := parseWithNumbers(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		return usagef("unexpected argument %q (give the name with --name)", pos[0])
	}
	if *name == "" || math.IsNaN(*lat) || math.IsNaN(*lon) {
		return usagef("give --name, --lat and --lon")
	}
	k, err := record.ParseSiteKind(*kind)
	if err != nil {
		return usagef("%v", err)
	}
	d, err := openDesk(*dir, true)
	if err != nil {
		return err
	}
	defer d.Close()
	id, err := d.AddSite(record.SiteRecord{Name: *name, Kind: k, Lat: *lat, Lon: *lon, Notes: *notes}, desk.SaveOptions{Confirm: *yes})
	if err != nil {
		return withHint(err)
	}
	fmt.Fprintf(stdout, "saved site %s  %s\n", id, *name)
	return nil
}

func sitesList(args []string, stdout io.Writer) error {
	fs := newFlags("sites list")
	dir := storeFlag(fs)
	asJSON := fs.Bool("json", false, "print JSON")
	_, d, err := openForArgs(fs, dir, args, 0, "")
	if err != nil {
		return err
	}
	defer d.Close()
	sites, err := d.Sites()
	if err != nil {
		return err
	}
	out := make([]siteJSON, len(sites))
	for i, v := range sites {
		out[i] = siteJSON{v.ID.String(), v.Site.Name, v.Site.Kind.String(), v.Site.Lat, v.Site.Lon, v.Site.Notes, v.Conflicted}
	}
	if *asJSON {
		return recJSON(stdout, out)
	}
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "id\tname\tkind\tlat\tlon\t")
	for _, v := range out {
		mark := ""
		if v.Conflicted {
			mark = "CONFLICT (see bale conflicts)"
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%.5f\t%.5f\t%s\n", v.ID, v.Name, v.Kind, v.Lat, v.Lon, mark)
	}
	tw.Flush()
	fmt.Fprintln(stdout, desk.Plural(len(out), "site", "sites"))
	return nil
}

func sitesQuery(sub string, args []string, stdout io.Writer) error {
	fs := newFlags("sites " + sub)
	dir := storeFlag(fs)
	k := fs.Int("k", 5, "number of nearest sites (near)")
	asJSON := fs.Bool("json", false, "print JSON")
	pos, err := parseWithNumbers(fs, args)
	if err != nil {
		return err
	}
	hits, err := querySites(sub, pos, *k, *dir)
	if err != nil {
		return err
	}
	out := make([]hitJSON, len(hits))
	for i, h := range hits {
		out[i] = hitJSON{ID: h.ID.String(), Name: h.Name, Lat: h.Lat, Lon: h.Lon}
		if sub != "box" {
			km := h.Km
			out[i].Km = &km
		}
	}
	if *asJSON {
		return recJSON(stdout, out)
	}
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "id\tname\tlat\tlon\tkm")
	for _, h := range out {
		km := ""
		if h.Km != nil {
			km = fmt.Sprintf("%.2f", *h.Km)
		}
		fmt.Fprintf(tw, "%s\t%s\t%.5f\t%.5f\t%s\n", h.ID, h.Name, h.Lat, h.Lon, km)
	}
	tw.Flush()
	fmt.Fprintln(stdout, desk.Plural(len(out), "site", "sites"))
	return nil
}

// querySites runs near, within or box on the store's site index.
func querySites(sub string, pos []string, k int, dir string) ([]geo.Hit, error) {
	var names []string
	switch sub {
	case "near":
		names = []string{"LAT", "LON"}
	case "within":
		names = []string{"LAT", "LON", "KM"}
	case "box":
		names = []string{"S", "W", "N", "E"}
	default:
		return nil, usagef("unknown query %q: use within or box", sub)
	}
	if len(pos) != len(names) {
		return nil, usagef("%s needs %d numbers: %v", sub, len(names), names)
	}
	x, err := recFloats(names, pos)
	if err != nil {
		return nil, err
	}
	if sub == "near" && k < 1 {
		return nil, usagef("-k %d: give at least 1", k)
	}
	d, err := openDesk(dir, false)
	if err != nil {
		return nil, err
	}
	defer d.Close()
	q, err := siteQuery(sub, x, k)
	if err != nil {
		return nil, err
	}
	return d.FindSites(q)
}

func siteQuery(sub string, x []float64, k int) (desk.Query, error) {
	switch sub {
	case "near":
		return desk.Query{Kind: desk.QueryNear, Lat: x[0], Lon: x[1], K: k}, nil
	case "within":
		return desk.Query{Kind: desk.QueryWithin, Lat: x[0], Lon: x[1], Km: x[2]}, nil
	}
	return desk.Query{Kind: desk.QueryBox, South: x[0], West: x[1], North: x[2], East: x[3]}, nil
}

// statJSON is the spread of one share across bales (fractions 0..1); sd
// is null for fewer than two bales.
type statJSON struct {
	N    int      `json:"n"`
	Mean *float64 `json:"mean"`
	SD   *float64 `json:"sd"`
	Min  *float64 `json:"min"`
	Max  *float64 `json:"max"`
}

type groupStatJSON struct {
	Key string `json:"key"`
	statJSON
}

// summaryJSON is the output of 'sites summary --json'.
type summaryJSONRec struct {
	Sites       int             `json:"sites"`
	From        string          `json:"from,omitempty"`
	To          string          `json:"to,omitempty"`
	Bales       int             `json:"bales"`
	Audited     int             `json:"audited"`
	TargetPET   statJSON        `json:"target_pet"`
	Groups      []groupStatJSON `json:"groups"`
	HazardBales int             `json:"hazard_bales"`
	Hazards     []flaggedJSON   `json:"hazards"`
	LabelClash  []flaggedJSON   `json:"label_conflicts"`
	Unassessed  []flaggedJSON   `json:"unassessed"`
}

func statOut(s desk.Stat) statJSON {
	if s.N == 0 {
		return statJSON{}
	}
	p := func(x float64) *float64 { return &x }
	out := statJSON{N: s.N, Mean: p(s.Mean), Min: p(s.Min), Max: p(s.Max)}
	if s.N > 1 {
		out.SD = p(s.SD)
	}
	return out
}

// flaggedJSON names a bale that needs a look.
type flaggedJSON struct {
	Bale     string `json:"bale"`
	Tag      string `json:"tag,omitempty"`
	Site     string `json:"site"`
	SiteName string `json:"site_name"`
}

func flaggedOut(fs []desk.Flagged) []flaggedJSON {
	out := []flaggedJSON{}
	for _, f := range fs {
		out = append(out, flaggedJSON{f.Bale.String(), f.Tag, f.Site.String(), f.SiteName})
	}
	return out
}

func sitesSummary(args []string, stdout io.Writer) error {
	fs := newFlags("sites summary")
	dir := storeFlag(fs)
	fromS := fs.String("from", "", "first day of bales received (2026-03-02)")
	toS := fs.String("to", "", "last day of bales received, inclusive")
	asJSON := fs.Bool("json", false, "print JSON")
	pos, err := parseWithNumbers(fs, args)
	if err != nil {
		return err
	}
	r, err := desk.ParseDateRange(*fromS, *toS)
	if err != nil {
		return usagef("%v", strings.TrimPrefix(err.Error(), desk.ErrUsage.Error()+": "))
	}
	if len(pos) == 0 {
		return usagef("give the region (within LAT LON KM, or box S W N E) or one SITE")
	}
	d, err := openDesk(*dir, false)
	if err != nil {
		return err
	}
	defer d.Close()
	var sum desk.Summary
	switch pos[0] {
	case "within", "box":
		names := map[string][]string{"within": {"LAT", "LON", "KM"}, "box": {"S", "W", "N", "E"}}[pos[0]]
		if len(pos)-1 != len(names) {
			return usagef("%s needs %d numbers: %v", pos[0], len(names), names)
		}
		x, err := recFloats(names, pos[1:])
		if err != nil {
			return err
		}
		q, _ := siteQuery(pos[0], x, 0)
		if sum, err = d.SummarizeRegion(q, r); err != nil {
			return err
		}
	default:
		if len(pos) != 1 {
			return usagef("give one site, or a region")
		}
		if _, sum, err = d.SummarizeSite(pos[0], r); err != nil {
			return err
		}
	}
	out := summaryJSONRec{Sites: sum.Sites, Bales: sum.Bales, Audited: sum.Audited, TargetPET: statOut(sum.TargetPET),
		HazardBales: len(sum.Hazards), Hazards: flaggedOut(sum.Hazards), LabelClash: flaggedOut(sum.LabelClash), Unassessed: flaggedOut(sum.Unassessed)}
	if !r.From.IsZero() {
		out.From = r.From.Format(time.RFC3339)
	}
	if !r.Until.IsZero() {
		out.To = r.Until.Format(time.RFC3339)
	}
	for _, g := range sum.Groups {
		out.Groups = append(out.Groups, groupStatJSON{g.Group.Key(), statOut(g.Stat)})
	}
	if *asJSON {
		return recJSON(stdout, out)
	}
	fmt.Fprintf(stdout, "%s, %s received, %d with pulls assessed\n", desk.Plural(sum.Sites, "site", "sites"), desk.Plural(sum.Bales, "bale", "bales"), sum.Audited)
	if sum.Audited > 0 {
		tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
		fmt.Fprintln(tw, "share of bale mass\tmean\tsd\tmin\tmax")
		row := func(name string, st desk.Stat) {
			sd := "–"
			if st.N > 1 {
				sd = fmt.Sprintf("%.2f %%", 100*st.SD)
			}
			fmt.Fprintf(tw, "%s\t%.2f %%\t%s\t%.2f %%\t%.2f %%\n", name, 100*st.Mean, sd, 100*st.Min, 100*st.Max)
		}
		row(assess.GroupPET.String(), sum.TargetPET)
		for _, g := range sum.Groups {
			row(g.Group.String(), g.Stat)
		}
		tw.Flush()
		fmt.Fprintln(stdout, "per bale: Cochran ratio estimate Σ kg / Σ pull kg over its pulls; then mean and sample SD across bales")
	}
	printFlagged(stdout, "HAZARDS found in", sum.Hazards, "keep such bales apart; handle batteries and chemical containers per local rules")
	printFlagged(stdout, "CONFLICT: pull labels used twice (two devices) in", sum.LabelClash, "both pulls are counted; see bale conflicts")
	printFlagged(stdout, "could not assess", sum.Unassessed, "see bale show BALE for the reason")
	return nil
}

func printFlagged(w io.Writer, head string, fs []desk.Flagged, tail string) {
	if len(fs) == 0 {
		return
	}
	fmt.Fprintf(w, "%s %s: %s\n", head, desk.Plural(len(fs), "bale", "bales"), tail)
	for _, f := range fs {
		fmt.Fprintf(w, "  %s  %s  site %s\n", f.Bale, f.Tag, f.SiteName)
	}
}

func sitesMove(args []string, stdout io.Writer) error {
	fs := newFlags("sites move")
	dir := storeFlag(fs)
	yes := fs.Bool("yes", false, "save even when a value looks implausible")
	pos, err := parseWithNumbers(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 3 {
		return usagef("give the site id and the new LAT LON")
	}
	x, err := recFloats([]string{"LAT", "LON"}, pos[1:])
	if err != nil {
		return err
	}
	d, err := openDesk(*dir, false)
	if err != nil {
		return err
	}
	defer d.Close()
	id, rec, err := d.EditSite(pos[0], desk.SiteEdit{Lat: &x[0], Lon: &x[1]}, desk.SaveOptions{Confirm: *yes})
	if err != nil {
		return withHint(err)
	}
	fmt.Fprintf(stdout, "moved site %s  %s to %s, %s\n", id, rec.Name, desk.Num(rec.Lat, 5), desk.Num(rec.Lon, 5))
	return nil
}

func sitesEdit(args []string, stdout io.Writer) error {
	fs := newFlags("sites edit")
	dir := storeFlag(fs)
	yes := fs.Bool("yes", false, "save even when a value looks implausible")
	var e desk.SiteEdit
	fs.Func("name", "new name", func(v string) error { e.Name = &v; return nil })
	fs.Func("notes", "new contact notes", func(v string) error { e.Notes = &v; return nil })
	fs.Func("kind", "yard, mrf, depot, supplier or other", func(v string) error {
		k, err := record.ParseSiteKind(v)
		e.Kind = &k
		return err
	})
	pos, err := parseArgs(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		return usagef("give the site (id, prefix, suffix or name)")
	}
	if e.Name == nil && e.Notes == nil && e.Kind == nil {
		return usagef("give what to change: --name, --notes or --kind (sites move changes the position)")
	}
	d, err := openDesk(*dir, false)
	if err != nil {
		return err
	}
	defer d.Close()
	id, rec, err := d.EditSite(pos[0], e, desk.SaveOptions{Confirm: *yes})
	if err != nil {
		return withHint(err)
	}
	fmt.Fprintf(stdout, "saved site %s  %s (%s); the earlier value stays in its history\n", id, rec.Name, rec.Kind)
	return nil
}

func sitesRemove(args []string, stdout io.Writer) error {
	fs := newFlags("sites remove")
	dir := storeFlag(fs)
	yes := fs.Bool("yes", false, "remove even when the site still has bales")
	pos, d, err := openForArgs(fs, dir, args, 1, "give the site id")
	if err != nil {
		return err
	}
	defer d.Close()
	id, err := d.RemoveSite(pos[0], desk.SaveOptions{Confirm: *yes})
	if err != nil {
		return withHint(err)
	}
	fmt.Fprintf(stdout, "removed site %s (its history is kept; 'bale show %s' lists it)\n", id, id)
	return nil
}
