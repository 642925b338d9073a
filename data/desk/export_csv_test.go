package desk

// Source: the records are the built-in demo scenario and invented
// hostile strings; every expected value is read back from the desk by
// other calls than the exporter's (AuditBale, Pulls, SummarizeSite,
// yield.Evaluate) and compared within the exported rounding.

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"baleassay/assess"
	"baleassay/data/demo"
	"baleassay/data/record"
	"baleassay/yield"
)

// demoScenario writes the demo scenario, six weeks ending on a fixed
// day, into a temporary store: the dates the tests pick stay valid.
func demoScenario(t *testing.T) *Desk {
	t.Helper()
	d, err := Open(Location{Dir: t.TempDir()}, Options{Create: true})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { d.Close() })
	if _, err := demo.WriteDemo(d.st, demo.DemoOptions{End: demoEnd, Weeks: 6, Seed: 1}); err != nil {
		t.Fatal(err)
	}
	return d
}

// demoEnd is the last day of the demo in these tests.
var demoEnd = time.Date(2026, 12, 1, 0, 0, 0, 0, time.UTC)

// want is an expected field: a string, a number with the decimals it is
// written with, a time, a bool, or nothing (an empty field).
type want struct {
	kind   byte // 's', 'n', 't', 'b', 0 for empty
	s      string
	x      float64
	digits int
	ms     int64
	b      bool
}

func ws(s string) want { return want{kind: 's', s: s} }
func wn(x float64, d int) want {
	if math.IsNaN(x) {
		return want{}
	}
	return want{kind: 'n', x: x, digits: d}
}
func wpct(x float64) want { return wn(100*x, PctDigits) }
func wt(ms int64) want {
	if ms == 0 {
		return want{}
	}
	return want{kind: 't', ms: ms}
}
func wb(b bool) want { return want{kind: 'b', b: b} }

var none = want{}

// check compares one typed field (as either reader gave it) with what
// the desk holds.
func (w want) check(got any) error {
	switch w.kind {
	case 0:
		if got != nil && got != "" {
			return fmt.Errorf("got %v, want an empty field", got)
		}
	case 's':
		if got != w.s && !(w.s == "" && got == nil) {
			return fmt.Errorf("got %q, want %q", got, w.s)
		}
	case 'b':
		if got != w.b {
			return fmt.Errorf("got %v, want %v", got, w.b)
		}
	case 't':
		g, ok := got.(float64)
		if !ok || int64(g) != w.ms {
			return fmt.Errorf("got %v, want %s (%d ms)", got, time.UnixMilli(w.ms).UTC().Format(time.RFC3339Nano), w.ms)
		}
	case 'n':
		g, ok := got.(float64)
		tol := 0.5*math.Pow(10, -float64(w.digits)) + 1e-9*math.Abs(w.x)
		if !ok || math.Abs(g-w.x) > tol {
			return fmt.Errorf("got %v, want %v within %g", got, w.x, tol)
		}
	}
	return nil
}

// goTyped converts a field as encoding/csv read it, by the same rules
// as testdata/csv_readback.py (but with Go's own parsers).
func goTyped(col, v string) (any, error) {
	if v == "" {
		return nil, nil
	}
	switch {
	case strings.HasSuffix(col, "_utc"):
		t, err := time.Parse(time.RFC3339Nano, v)
		if err != nil || !strings.HasSuffix(v, "Z") {
			return nil, fmt.Errorf("%s %q: not an ISO 8601 UTC time", col, v)
		}
		return float64(t.UnixMilli()), nil
	case numericColumn(col):
		if strings.ContainsAny(v, ",eE") {
			return nil, fmt.Errorf("%s %q: not a plain dot-decimal number", col, v)
		}
		return strconv.ParseFloat(v, 64)
	case col == "hazard_found" || col == "label_clash" || col == "conflicted":
		return strconv.ParseBool(v)
	}
	return v, nil
}

func numericColumn(col string) bool {
	for _, s := range []string{"_kg", "_m", "_pct", "_deg", "_kg_per_m3", "_kg_per_t", "_point", "_pieces"} {
		if strings.HasSuffix(col, s) {
			return true
		}
	}
	switch col {
	case "pulls", "bales", "audited", "pass", "undecided", "fail", "no_verdict", "no_pulls", "unassessed", "hazard_bales":
		return true
	}
	return false
}

// readBack reads a CSV export with encoding/csv and (unless python3 is
// missing outside CI) with Python's csv module, checks the RFC 4180
// shape, and returns the header and both readers' typed rows.
func readBack(t *testing.T, raw []byte) (header []string, readers map[string][]map[string]any) {
	t.Helper()
	if bytes.HasPrefix(raw, []byte("\xef\xbb\xbf")) {
		t.Fatal("the file starts with a byte-order mark")
	}
	if !bytes.HasSuffix(raw, []byte("\r\n")) || bytes.Count(raw, []byte("\n")) != bytes.Count(raw, []byte("\r\n")) {
		t.Fatal("lines do not all end with CRLF (RFC 4180 §2.1)")
	}
	r := csv.NewReader(bytes.NewReader(raw))
	recs, err := r.ReadAll() // also checks every row has the header's field count
	if err != nil {
		t.Fatal(err)
	}
	header = recs[0]
	seen := map[string]bool{}
	for _, h := range header {
		if seen[h] {
			t.Fatalf("column %s twice", h)
		}
		seen[h] = true
	}
	readers = map[string][]map[string]any{}
	for _, rec := range recs[1:] {
		row := map[string]any{}
		for i, v := range rec {
			if row[header[i]], err = goTyped(header[i], v); err != nil {
				t.Fatal(err)
			}
		}
		readers["encoding/csv"] = append(readers["encoding/csv"], row)
	}
	py := pythonCSV(t)
	if py == "" {
		return header, readers
	}
	path := filepath.Join(t.TempDir(), "export.csv")
	os.WriteFile(path, raw, 0o644)
	out, err := exec.Command(py, "testdata/csv_readback.py", path).Output()
	if err != nil {
		var ee *exec.ExitError
		if errorsAs(err, &ee) {
			t.Fatalf("python csv: %v: %s", err, ee.Stderr)
		}
		t.Fatal(err)
	}
	var got struct {
		Header []string
		Raw    [][]string
		Typed  []map[string]any
	}
	if err := json.Unmarshal(out, &got); err != nil {
		t.Fatal(err)
	}
	if fmt.Sprint(got.Header) != fmt.Sprint(header) || len(got.Raw) != len(recs)-1 {
		t.Fatalf("python read %d rows, header %v", len(got.Raw), got.Header)
	}
	for i, rec := range recs[1:] {
		for j := range rec {
			if got.Raw[i][j] != rec[j] {
				t.Fatalf("row %d %s: python %q, encoding/csv %q", i+1, header[j], got.Raw[i][j], rec[j])
			}
		}
	}
	readers["python csv"] = got.Typed
	return header, readers
}

func errorsAs(err error, target **exec.ExitError) bool {
	ee, ok := err.(*exec.ExitError)
	if ok {
		*target = ee
	}
	return ok
}

// pythonCSV finds python3; missing, it fails under CI and skips that
// half of the check elsewhere.
func pythonCSV(t *testing.T) string {
	t.Helper()
	if p, err := exec.LookPath("python3"); err == nil {
		return p
	}
	msg := "python3 is missing: install it (apt-get install python3, or scripts/deps.sh) to read the CSV back independently"
	if os.Getenv("CI") != "" {
		t.Fatal(msg)
	}
	t.Log(msg)
	return ""
}

// compare checks every row of every reader against the expected rows,
// found by the value of the key column.
func compare(t *testing.T, header []string, readers map[string][]map[string]any, key string, exp map[string]map[string]want) {
	t.Helper()
	if len(exp) == 0 {
		t.Fatal("no rows expected: the test would check nothing")
	}
	for name, rows := range readers {
		if len(rows) != len(exp) {
			t.Fatalf("%s: %d rows, want %d", name, len(rows), len(exp))
		}
		fields := 0
		for _, row := range rows {
			k, _ := row[key].(string)
			w, ok := exp[k]
			if !ok {
				t.Fatalf("%s: unexpected row %s", name, k)
			}
			for _, col := range header {
				wc, ok := w[col]
				if !ok {
					t.Fatalf("test knows no expected value of column %s", col)
				}
				if err := wc.check(row[col]); err != nil {
					t.Errorf("%s: row %s, column %s: %v", name, k, col, err)
				}
				fields++
			}
		}
		t.Logf("%s: %d rows, %d fields compared", name, len(rows), fields)
	}
}

func exportCSV(t *testing.T, d *Desk, tab Table, opt ExportOptions) []byte {
	t.Helper()
	var buf bytes.Buffer
	if _, err := d.ExportCSV(context.Background(), &buf, tab, opt); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

// expectBales reads each bale through AuditBale and yield.Evaluate.
func expectBales(t *testing.T, d *Desk, r DateRange) map[string]map[string]want {
	t.Helper()
	rows, err := d.Bales(BaleFilter{Range: r})
	if err != nil {
		t.Fatal(err)
	}
	plan, err := d.Plan("", "")
	if err != nil {
		t.Fatal(err)
	}
	exp := map[string]map[string]want{}
	for _, b := range rows {
		rec := b.Bale
		w := map[string]want{
			"bale_id": ws(b.ID.String()), "tag": ws(rec.Tag), "site_id": ws(rec.Site.String()), "site_name": ws(b.SiteName),
			"received_utc": wt(rec.ReceivedMs), "gross_kg": wn(rec.GrossKg, KgDigits),
			"length_m": none, "width_m": none, "height_m": none, "density_kg_per_m3": none,
			"grader": ws(rec.Grader), "spec": ws(b.Audit.Spec), "pulls": wn(float64(b.Pulls), 0), "audit": ws(b.Audit.State.String()),
			"verdict": none, "label_clash": wb(len(b.Audit.LabelClash) > 0), "conflicted": wb(b.Conflicted),
		}
		if rec.VolumeM3() > 0 {
			w["length_m"], w["width_m"], w["height_m"] = wn(rec.LengthM, KgDigits), wn(rec.WidthM, KgDigits), wn(rec.HeightM, KgDigits)
			w["density_kg_per_m3"] = wn(rec.GrossKg/(rec.LengthM*rec.WidthM*rec.HeightM), 1)
		}
		if b.Audit.HasVerdict {
			w["verdict"] = ws(b.Audit.Verdict.String())
		}
		for _, c := range []string{"sampled_kg", "target_pet_pct", "target_pet_ci90_low_pct", "target_pet_ci90_high_pct",
			"other_plastics_pct", "non_plastics_pct", "moisture_fines_pct", "hazards_pct", "hazard_found",
			"flake_kg_point", "glycolysate_kg_point", "hydroxyl_value_mg_koh_per_g_point"} {
			w[c] = none
		}
		if b.Pulls > 0 {
			a, err := d.AuditBale(b.ID.String(), AuditOptions{})
			if err != nil {
				t.Fatal(err)
			}
			res := a.Result
			pet := res.Group(assess.GroupPET)
			w["sampled_kg"], w["target_pet_pct"] = wn(res.SampledKg, KgDigits), wpct(pet.Fraction)
			if pet.HasInterval {
				w["target_pet_ci90_low_pct"], w["target_pet_ci90_high_pct"] = wpct(pet.Low), wpct(pet.High)
			}
			for _, g := range assess.Groups()[1:] {
				w[g.Key()+"_pct"] = wpct(res.Group(g).Fraction)
			}
			w["hazard_found"] = wb(len(res.HazardPulls) > 0 || res.HazardPieces > 0)
			y, err := yield.Evaluate(a.Input.Pulls, rec.GrossKg, plan)
			if err == nil {
				w["flake_kg_point"], w["glycolysate_kg_point"] = wn(y.Balance.FlakeKg, KgDigits), wn(y.Glycolysate.GlycolysateKg, KgDigits)
				w["hydroxyl_value_mg_koh_per_g_point"] = wn(y.Glycolysate.HydroxylValue, 2)
			}
		}
		exp[b.ID.String()] = w
	}
	return exp
}

func TestExportCSVBalesRoundTrip(t *testing.T) {
	d := demoScenario(t)
	for _, r := range []DateRange{{}, {From: time.Date(2026, 11, 2, 0, 0, 0, 0, time.UTC), Until: time.Date(2026, 11, 9, 0, 0, 0, 0, time.UTC)}} {
		header, readers := readBack(t, exportCSV(t, d, TableBales, ExportOptions{Range: r}))
		compare(t, header, readers, "bale_id", expectBales(t, d, r))
	}
}

func TestExportCSVPullsRoundTrip(t *testing.T) {
	d := demoScenario(t)
	r := DateRange{From: time.Date(2026, 11, 9, 0, 0, 0, 0, time.UTC), Until: time.Date(2026, 11, 16, 0, 0, 0, 0, time.UTC)}
	rows, err := d.Bales(BaleFilter{Range: r})
	if err != nil || len(rows) == 0 {
		t.Fatalf("%d bales in the week: %v", len(rows), err)
	}
	// One pull with its pieces examined (an invented count).
	counted := record.PullRecord{Label: "PX", Kg: map[string]float64{"pet_clear": 18.2, "pvc": 0.3}, Pieces: map[string]int64{"pvc": 7}, TotalPieces: 611}
	if _, _, err := d.AddPulls(rows[0].ID.String(), []record.PullRecord{counted}, SaveOptions{Confirm: true}); err != nil {
		t.Fatal(err)
	}
	header, readers := readBack(t, exportCSV(t, d, TablePulls, ExportOptions{Range: r}))
	if want := 9 + 2*assess.NumCategories() + 2; len(header) != want {
		t.Fatalf("%d columns, want %d", len(header), want)
	}
	totals := 0
	exp := map[string]map[string]want{}
	for _, b := range rows {
		_, ps, err := d.Pulls(b.ID.String())
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range ps {
			w := map[string]want{"pull_id": ws(p.ID.String()), "bale_id": ws(b.ID.String()), "bale_tag": ws(b.Bale.Tag),
				"site_id": ws(b.Bale.Site.String()), "site_name": ws(b.SiteName), "label": ws(p.Pull.Label), "taken_utc": wt(p.Pull.TakenMs),
				"weighed_kg": none, "sorted_kg": wn(p.PartsKg(), KgDigits), "conflicted": wb(p.Conflicted)}
			if p.Pull.StatedKg != 0 {
				w["weighed_kg"] = wn(p.Pull.StatedKg, KgDigits)
			}
			w["total_pieces"] = none
			if p.Pull.TotalPieces != 0 {
				w["total_pieces"] = wn(float64(p.Pull.TotalPieces), 0)
				totals++
			}
			for _, c := range assess.Categories() {
				w[c.Key+"_kg"] = wn(p.Pull.Kg[c.Key], KgDigits)
				w[c.Key+"_pieces"] = none
				if n, ok := p.Pull.Pieces[c.Key]; ok {
					w[c.Key+"_pieces"] = wn(float64(n), 0)
				}
			}
			exp[p.ID.String()] = w
		}
	}
	if totals != 1 {
		t.Fatalf("%d pulls with pieces examined, want the one added", totals)
	}
	compare(t, header, readers, "pull_id", exp)
}

func TestExportCSVSitesRoundTrip(t *testing.T) {
	d := demoScenario(t)
	// A site with no bales yet: its aggregate fields stay empty.
	if _, err := d.AddSite(record.SiteRecord{Name: "Newfield Yard", Lat: 44.7, Lon: 4.1}, SaveOptions{Confirm: true}); err != nil {
		t.Fatal(err)
	}
	r := DateRange{Until: time.Date(2026, 11, 20, 0, 0, 0, 0, time.UTC)}
	header, readers := readBack(t, exportCSV(t, d, TableSites, ExportOptions{Range: r}))
	sites, err := d.Sites()
	if err != nil {
		t.Fatal(err)
	}
	plan, _ := d.Plan("", "")
	exp := map[string]map[string]want{}
	for _, s := range sites {
		_, sum, err := d.SummarizeSite(s.ID.String(), r)
		if err != nil {
			t.Fatal(err)
		}
		rows, err := d.Bales(BaleFilter{Site: s.ID.String(), Range: r})
		if err != nil {
			t.Fatal(err)
		}
		var v VerdictCounts
		var latest *BaleRow
		var baleKg, flake, gly float64
		for i, b := range rows {
			v.add(b.Audit)
			if b.Audit.State == AuditDone && b.Audit.HasVerdict {
				latest = &rows[i]
			}
			if b.Pulls > 0 {
				a, err := d.AuditBale(b.ID.String(), AuditOptions{Spec: NoSpec})
				if err != nil {
					t.Fatal(err)
				}
				if y, err := yield.Evaluate(a.Input.Pulls, b.Bale.GrossKg, plan); err == nil {
					baleKg += b.Bale.GrossKg
					flake += y.Balance.FlakeKg
					gly += y.Glycolysate.GlycolysateKg
				}
			}
		}
		w := map[string]want{"site_id": ws(s.ID.String()), "name": ws(s.Site.Name), "kind": ws(s.Site.Kind.String()),
			"lat_deg": wn(s.Site.Lat, DegDigits), "lon_deg": wn(s.Site.Lon, DegDigits), "notes": ws(s.Site.Notes),
			"bales": wn(float64(sum.Bales), 0), "audited": wn(float64(sum.Audited), 0),
			"pass": wn(float64(v.Pass), 0), "undecided": wn(float64(v.Undecided), 0), "fail": wn(float64(v.Fail), 0),
			"no_verdict": wn(float64(v.NoVerdict), 0), "no_pulls": wn(float64(v.NoPulls), 0), "unassessed": wn(float64(v.Unassessed), 0),
			"hazard_bales":        wn(float64(len(sum.Hazards)), 0),
			"target_pet_mean_pct": none, "target_pet_sd_pct": none, "target_pet_min_pct": none, "target_pet_max_pct": none,
			"latest_received_utc": none, "latest_tag": none, "latest_verdict": none,
			"flake_kg_per_t": none, "glycolysate_kg_per_t": none, "conflicted": wb(s.Conflicted)}
		if p := sum.TargetPET; p.N > 0 {
			w["target_pet_mean_pct"], w["target_pet_min_pct"], w["target_pet_max_pct"] = wpct(p.Mean), wpct(p.Min), wpct(p.Max)
			if p.N > 1 {
				w["target_pet_sd_pct"] = wpct(p.SD)
			}
		}
		if latest != nil {
			w["latest_received_utc"], w["latest_tag"], w["latest_verdict"] = wt(latest.Bale.ReceivedMs), ws(latest.Bale.Tag), ws(latest.Audit.Verdict.String())
		}
		if baleKg > 0 {
			w["flake_kg_per_t"], w["glycolysate_kg_per_t"] = wn(1000*flake/baleKg, 1), wn(1000*gly/baleKg, 1)
		}
		exp[s.ID.String()] = w
	}
	compare(t, header, readers, "site_id", exp)
}

// TestExportCSVHostileText writes names and notes that a careless CSV
// writer breaks (commas, quotes, line breaks, leading spaces, formula
// signs, non-ASCII) and reads them back unchanged.
func TestExportCSVHostileText(t *testing.T) {
	d := openTest(t)
	// Control characters (tabs, line breaks) never reach a record: names
	// and notes are one line of printable text (record.TerminalSafe).
	if _, err := d.AddSite(record.SiteRecord{Name: "tab\there", Lat: 43, Lon: -1, Notes: "line one\nline two"}, SaveOptions{Confirm: true}); !errors.Is(err, record.ErrControlChar) {
		t.Fatalf("a name with a tab: %v", err)
	}
	names := []string{`Quote "Yard", North`, " leading space", "=SUM(A1:A9)", "Ærøskøbing Depot; 2nd gate", `back\slash 'single' +1`}
	for i, n := range names {
		id, err := d.AddSite(record.SiteRecord{Name: n, Lat: 44 + float64(i)/10, Lon: -1.5 - float64(i)/10, Notes: "line one; line two, \"quoted\""}, SaveOptions{Confirm: true})
		if err != nil {
			t.Fatalf("site %q: %v", n, err)
		}
		b := mustBale(t, d, id, 500, fmt.Sprintf("T,%d", i))
		if _, _, err := d.AddPulls(b.String(), []record.PullRecord{pull("P1", 20, 0.1), pull("P2", 22, 0)}, SaveOptions{}); err != nil {
			t.Fatal(err)
		}
	}
	header, readers := readBack(t, exportCSV(t, d, TableSites, ExportOptions{}))
	for name, rows := range readers {
		got := map[string]bool{}
		for _, row := range rows {
			got[row["name"].(string)] = true
			if row["notes"] != "line one; line two, \"quoted\"" {
				t.Errorf("%s: notes read back as %q", name, row["notes"])
			}
		}
		for _, n := range names {
			if !got[n] {
				t.Errorf("%s: name %q not read back (%v)", name, n, got)
			}
		}
	}
	_ = header
	_, readers = readBack(t, exportCSV(t, d, TableBales, ExportOptions{}))
	for name, rows := range readers {
		for _, row := range rows {
			if tag := row["tag"].(string); !strings.HasPrefix(tag, "T,") {
				t.Errorf("%s: tag %q", name, tag)
			}
		}
	}
}

// TestExportCSVValueColumns adds the value columns of the illustrative
// price sheet: each bale's cells equal what ValueBale gives with the same
// draws and seed, and a bale without pulls has empty cells.
func TestExportCSVValueColumns(t *testing.T) {
	d := demoScenario(t)
	r := DateRange{From: time.Date(2026, 11, 23, 0, 0, 0, 0, time.UTC), Until: time.Date(2026, 11, 26, 0, 0, 0, 0, time.UTC)}
	vo := ValueOptions{MC: yield.MCOptions{Draws: 300, Seed: 5}}
	raw := exportCSV(t, d, TableBales, ExportOptions{Range: r, Value: &vo})
	header, readers := readBack(t, raw)
	names := ValueColumns(yield.BuiltinPriceSheet())
	if got := header[len(header)-3:]; fmt.Sprint(got) != fmt.Sprint(names) {
		t.Fatalf("value columns %v, want %v", got, names)
	}
	plan, _ := d.Plan("", "")
	rows := readers["encoding/csv"]
	if len(rows) == 0 {
		t.Fatal("no bales in the range: the test would check nothing")
	}
	valued := 0
	for _, row := range rows {
		id := row["bale_id"].(string)
		want := ValueCells(nil)
		if row["audit"] == AuditDone.String() {
			v, err := d.ValueBale(context.Background(), id, plan, vo, nil)
			if err != nil {
				t.Fatal(err)
			}
			want = ValueCells(&v.Value)
			valued++
		}
		for i, n := range names {
			got, _ := row[n].(string)
			if got != want[i] {
				t.Errorf("bale %s, %s: %q, want %q", id, n, got, want[i])
			}
		}
	}
	if valued == 0 {
		t.Fatal("no bale was valued")
	}
}
