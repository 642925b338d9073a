package main

import (
	"fmt"
	"io"
	"math"
	"text/tabwriter"
	"time"

	"baleassay/assess"
	"baleassay/data/geo"
	"baleassay/data/record"
	"baleassay/data/store"
)

func init() {
	register(command{
		name:    "sites",
		usage:   "add --name N --lat LAT --lon LON [--kind K] [--notes S] [--yes] | list | near LAT LON [-k N] | within LAT LON KM | box S W N E | summary (within LAT LON KM | box S W N E) [--from DATE] [--to DATE] | move ID LAT LON | remove ID  [--json] [--store DIR|--demo]",
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
		sub("summary", sitesSummary), sub("move", sitesMove), sub("remove", sitesRemove))
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
	s, err := openStore(*dir)
	if err != nil {
		return err
	}
	defer s.Close()
	ev := record.Event{Kind: record.KindSite, Site: &record.SiteRecord{Name: *name, Kind: k, Lat: *lat, Lon: *lon, Notes: *notes}}
	id, err := saveNew(s, ev, *yes)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "saved site %s  %s\n", id, *name)
	return nil
}

func sitesList(args []string, stdout io.Writer) error {
	fs := newFlags("sites list")
	dir := storeFlag(fs)
	asJSON := fs.Bool("json", false, "print JSON")
	_, s, err := openForArgs(fs, dir, args, 0, "")
	if err != nil {
		return err
	}
	defer s.Close()
	sites, err := s.Sites()
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
	fmt.Fprintf(stdout, "%d sites\n", len(out))
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
	fmt.Fprintf(stdout, "%d sites\n", len(out))
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
	s, err := openExistingStore(dir)
	if err != nil {
		return nil, err
	}
	defer s.Close()
	ix := s.SiteIndex()
	var hits []geo.Hit
	switch sub {
	case "near":
		hits, err = ix.Nearest(x[0], x[1], k)
	case "within":
		hits, err = ix.Within(x[0], x[1], x[2])
	default:
		hits, err = ix.InBox(x[0], x[1], x[2], x[3])
	}
	if err != nil {
		return nil, usagef("%v", err)
	}
	return hits, nil
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
}

func statOut(s store.Stat) statJSON {
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

func sitesSummary(args []string, stdout io.Writer) error {
	fs := newFlags("sites summary")
	dir := storeFlag(fs)
	fromS := fs.String("from", "", "first day of bales received (2026-03-02)")
	toS := fs.String("to", "", "day after the last day of bales received")
	asJSON := fs.Bool("json", false, "print JSON")
	pos, err := parseWithNumbers(fs, args)
	if err != nil {
		return err
	}
	if len(pos) == 0 || (pos[0] != "within" && pos[0] != "box") {
		return usagef("give the region: within LAT LON KM, or box S W N E")
	}
	from, err := recDate("--from", *fromS)
	if err != nil {
		return err
	}
	to, err := recDate("--to", *toS)
	if err != nil {
		return err
	}
	if !from.IsZero() && !to.IsZero() && !to.After(from) {
		return usagef("--to %s is not after --from %s", *toS, *fromS)
	}
	hits, err := querySites(pos[0], pos[1:], 0, *dir)
	if err != nil {
		return err
	}
	s, err := openExistingStore(*dir)
	if err != nil {
		return err
	}
	defer s.Close()
	sum, err := s.Summarize(hits, from, to)
	if err != nil {
		return err
	}
	out := summaryJSONRec{Sites: sum.Sites, Bales: sum.Bales, Audited: sum.Audited, TargetPET: statOut(sum.TargetPET), HazardBales: sum.HazardBales}
	if !from.IsZero() {
		out.From = from.Format(time.RFC3339)
	}
	if !to.IsZero() {
		out.To = to.Format(time.RFC3339)
	}
	for _, g := range sum.Groups {
		out.Groups = append(out.Groups, groupStatJSON{g.Group.Key(), statOut(g.Stat)})
	}
	if *asJSON {
		return recJSON(stdout, out)
	}
	fmt.Fprintf(stdout, "%d sites, %d bales received, %d with pulls assessed\n", sum.Sites, sum.Bales, sum.Audited)
	if sum.Audited == 0 {
		return nil
	}
	tw := tabwriter.NewWriter(stdout, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "share of bale mass\tmean\tsd\tmin\tmax")
	row := func(name string, st store.Stat) {
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
	if sum.HazardBales > 0 {
		fmt.Fprintf(stdout, "HAZARDS found in %d bales: flag these sites; handle batteries and chemical containers per local rules\n", sum.HazardBales)
	}
	return nil
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
	s, err := openExistingStore(*dir)
	if err != nil {
		return err
	}
	defer s.Close()
	id, st, err := findEntity(s, pos[0], record.KindSite)
	if err != nil {
		return err
	}
	cur, _ := st.Current()
	rec := *cur.Site
	rec.Lat, rec.Lon = x[0], x[1]
	if _, err := s.Supersede(id, record.Event{Site: &rec}, store.SaveOptions{Confirm: *yes}); err != nil {
		return recSaveError(err)
	}
	fmt.Fprintf(stdout, "moved site %s  %s to %.5f, %.5f\n", id, rec.Name, rec.Lat, rec.Lon)
	return nil
}

func sitesRemove(args []string, stdout io.Writer) error {
	fs := newFlags("sites remove")
	dir := storeFlag(fs)
	pos, s, err := openForArgs(fs, dir, args, 1, "give the site id")
	if err != nil {
		return err
	}
	defer s.Close()
	id, _, err := findEntity(s, pos[0], record.KindSite)
	if err != nil {
		return err
	}
	if _, err := s.Delete(id); err != nil {
		return recSaveError(err)
	}
	fmt.Fprintf(stdout, "removed site %s (its history is kept; 'bale show %s' lists it)\n", id, id)
	return nil
}

// findEntity resolves an id argument to an entity of the wanted kind (any
// kind when kind is 0) that is not deleted.
func findEntity(s *store.Store, arg string, kind record.Kind) (record.EntityID, record.EntityState, error) {
	id, err := s.FindEntity(arg)
	if err != nil {
		return id, record.EntityState{}, err
	}
	st, err := s.Entity(id)
	if err != nil {
		return id, st, err
	}
	if kind != 0 && st.Kind != kind {
		return id, st, fmt.Errorf("%s is a %s, not a %s", id, st.Kind, kind)
	}
	if st.Deleted() {
		return id, st, fmt.Errorf("%s %s was deleted; 'bale show %s' lists its history", st.Kind, id, id)
	}
	return id, st, nil
}

// saveNew saves one event of a new entity and returns the entity's id.
func saveNew(s *store.Store, ev record.Event, yes bool) (record.EntityID, error) {
	ids, err := s.Save([]record.Event{ev}, store.SaveOptions{Confirm: yes})
	if err != nil {
		return record.EntityID{}, recSaveError(err)
	}
	e, err := s.Event(ids[0])
	return e.Entity, err
}
