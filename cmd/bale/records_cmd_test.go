package main

import (
	"baleassay/data/desk"
	"baleassay/data/geo"
	"baleassay/data/store"
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

func recRun(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

func recMust(t *testing.T, args ...string) string {
	t.Helper()
	code, out, errs := recRun(t, args...)
	if code != 0 {
		t.Fatalf("bale %s: exit %d\n%s", strings.Join(args, " "), code, errs)
	}
	return out
}

func storeHash(t *testing.T, dir string) [32]byte {
	t.Helper()
	s, err := store.Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	h, err := s.ContentHash()
	if err != nil {
		t.Fatal(err)
	}
	return h
}

func TestDemoStoreCommands(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "demo")
	recMust(t, "demo", "--store", dir)
	// A second run refuses without --force.
	if code, _, errs := recRun(t, "demo", "--store", dir); code != 1 || !strings.Contains(errs, "--force") {
		t.Fatalf("second demo: exit %d, %s", code, errs)
	}
	var sites []siteJSON
	if err := json.Unmarshal([]byte(recMust(t, "sites", "list", "--store", dir, "--json")), &sites); err != nil {
		t.Fatal(err)
	}
	if len(sites) != 12 {
		t.Fatalf("%d demo sites, want 12 (data/scenario.go)", len(sites))
	}
	// near: objects with id, name, lat, lon, km, nearest first.
	var near []map[string]any
	if err := json.Unmarshal([]byte(recMust(t, "sites", "near", "45.0", "4.7", "-k", "4", "--store", dir, "--json")), &near); err != nil {
		t.Fatal(err)
	}
	if len(near) != 4 {
		t.Fatalf("near -k 4 gave %d", len(near))
	}
	prev := -1.0
	for _, h := range near {
		for _, f := range []string{"id", "name", "lat", "lon", "km"} {
			if _, ok := h[f]; !ok {
				t.Fatalf("near object lacks %q: %v", f, h)
			}
		}
		km := h["km"].(float64)
		if km < prev {
			t.Fatal("near is not nearest first")
		}
		prev = km
		// The reported km is the haversine distance of the reported point.
		if d := geo.HaversineKm(45, 4.7, h["lat"].(float64), h["lon"].(float64)); d != km {
			t.Fatalf("km %g, haversine %g", km, d)
		}
	}
	var conflicts []conflictJSON
	json.Unmarshal([]byte(recMust(t, "conflicts", "--store", dir, "--json")), &conflicts)
	if len(conflicts) != 1 || len(conflicts[0].Heads) != 2 {
		t.Fatalf("demo conflicts: %+v", conflicts)
	}
	c := conflicts[0]
	show := recMust(t, "show", c.ID, "--store", dir)
	if !strings.Contains(show, "CONFLICT") || !strings.Contains(show, "history") {
		t.Fatalf("show of the conflicted site:\n%s", show)
	}
	if code, _, _ := recRun(t, "conflicts", "resolve", c.ID, "00000000", "--store", dir); code != 1 {
		t.Fatal("resolve with an event that is not a head did not fail")
	}
	recMust(t, "conflicts", "resolve", c.ID, strings.ToUpper(c.Heads[1].Event[:12]), "--store", dir)
	if out := recMust(t, "conflicts", "--store", dir); !strings.Contains(out, "no conflicts") {
		t.Fatalf("after resolve: %s", out)
	}
	var sh showJSON
	json.Unmarshal([]byte(recMust(t, "show", c.ID, "--store", dir, "--json")), &sh)
	if sh.Conflicted || sh.Events != 4 || len(sh.History) != 4 || sh.Heads[0].Summary != c.Heads[1].Summary {
		t.Fatalf("after resolve: %+v", sh)
	}
	// Region summary over the whole region.
	var sum summaryJSONRec
	json.Unmarshal([]byte(recMust(t, "sites", "summary", "box", "44", "4", "46", "6", "--store", dir, "--json")), &sum)
	if sum.Sites != 12 || sum.Bales == 0 || sum.Audited != sum.Bales || sum.TargetPET.Mean == nil || len(sum.Groups) != 4 {
		t.Fatalf("summary %+v", sum)
	}
	// within: every hit inside the radius, nearest first; box: no km.
	var within []hitJSON
	json.Unmarshal([]byte(recMust(t, "sites", "within", "45.0", "4.7", "15", "--store", dir, "--json")), &within)
	if len(within) == 0 || len(within) == 12 {
		t.Fatalf("within 15 km: %d sites", len(within))
	}
	for i, h := range within {
		if *h.Km > 15 || (i > 0 && *h.Km < *within[i-1].Km) {
			t.Fatalf("within: %+v", within)
		}
	}
	var box []map[string]any
	json.Unmarshal([]byte(recMust(t, "sites", "box", "44.9", "4.4", "45.1", "4.9", "--store", dir, "--json")), &box)
	for _, h := range box {
		if _, ok := h["km"]; ok {
			t.Fatal("box hits carry km")
		}
		if lat := h["lat"].(float64); lat < 44.9 || lat > 45.1 {
			t.Fatalf("box hit outside: %v", h)
		}
	}
	if len(box) == 0 {
		t.Fatal("box found nothing")
	}
	// A date range keeps fewer bales; a bad date is wrong usage (exit 2).
	var part summaryJSONRec
	json.Unmarshal([]byte(recMust(t, "sites", "summary", "box", "44", "4", "46", "6", "--from", time.Now().UTC().AddDate(0, 0, -14).Format("2006-01-02"), "--store", dir, "--json")), &part)
	if part.Bales == 0 || part.Bales >= sum.Bales || part.From == "" {
		t.Fatalf("last two weeks: %d of %d bales", part.Bales, sum.Bales)
	}
	if code, _, _ := recRun(t, "sites", "summary", "box", "44", "4", "46", "6", "--from", "1 March", "--store", dir); code != 2 {
		t.Fatalf("bad date: exit %d, want 2", code)
	}
	var bales []baleJSON
	json.Unmarshal([]byte(recMust(t, "bales", "list", "--site", sites[0].ID, "--store", dir, "--json")), &bales)
	if len(bales) == 0 || bales[0].SiteName != sites[0].Name || bales[0].Pulls < 4 {
		t.Fatalf("bales of %s: %+v", sites[0].Name, bales)
	}
}

func TestRecordCommandsOnNewStore(t *testing.T) {
	dir := t.TempDir()
	st := []string{"--store", dir}
	out := recMust(t, append([]string{"sites", "add", "--name", "Cape Yard", "--lat", "-33.92", "--lon", "18.42"}, st...)...)
	siteID := strings.Fields(out)[2]
	// Negative positional numbers are coordinates, not flags.
	var near []hitJSON
	json.Unmarshal([]byte(recMust(t, append([]string{"sites", "near", "-33.9", "18.4", "--json"}, st...)...)), &near)
	if len(near) != 1 || near[0].ID != siteID || *near[0].Km > 5 {
		t.Fatalf("near: %+v", near)
	}
	// Bad input: exit 1, a message naming the field, and the store unchanged.
	before := storeHash(t, dir)
	code, _, errs := recRun(t, append([]string{"sites", "add", "--name", "X", "--lat", "91", "--lon", "0"}, st...)...)
	if code != 1 || !strings.Contains(errs, "site.lat") {
		t.Fatalf("lat 91: exit %d, %s", code, errs)
	}
	code, _, errs = recRun(t, append([]string{"sites", "add", "--name", "No fix", "--lat", "0", "--lon", "0"}, st...)...)
	if code != 1 || !strings.Contains(errs, "--yes") {
		t.Fatalf("0,0 without --yes: exit %d, %s", code, errs)
	}
	if storeHash(t, dir) != before {
		t.Fatal("refused saves changed the store")
	}
	if code, _, _ := recRun(t, append([]string{"sites", "near", "95", "0"}, st...)...); code != 2 {
		t.Fatalf("near 95 0: exit %d, want 2 (usage)", code)
	}
	out = recMust(t, append([]string{"bales", "add", "--site", siteID, "--kg", "540", "--dims", "1.22x0.76x1.52", "--received", "2026-11-20"}, st...)...)
	baleID := strings.Fields(out)[2]
	csv := filepath.Join(t.TempDir(), "pulls.csv")
	os.WriteFile(csv, []byte("# two pulls\npull,pet_clear,pvc,film,hazard_count\nA,20.5,0.2,0.3,0\nB,21,0,0.5,1\n"), 0o644)
	recMust(t, append([]string{"pulls", "add", baleID, csv}, st...)...)
	// The same labels again are refused and nothing is saved.
	before = storeHash(t, dir)
	if code, _, errs := recRun(t, append([]string{"pulls", "add", baleID, csv}, st...)...); code != 1 || !strings.Contains(errs, "already has a pull") {
		t.Fatalf("duplicate pulls: exit %d %s", code, errs)
	}
	if storeHash(t, dir) != before {
		t.Fatal("refused pulls changed the store")
	}
	var pulls []pullJSON
	json.Unmarshal([]byte(recMust(t, append([]string{"pulls", "list", baleID, "--json"}, st...)...)), &pulls)
	if len(pulls) != 2 || pulls[0].Kg["pet_clear"] != 20.5 || pulls[1].Pieces["hazard"] != 1 || pulls[0].TotalKg != 21 {
		t.Fatalf("pulls %+v", pulls)
	}
	var sh showJSON
	json.Unmarshal([]byte(recMust(t, append([]string{"show", baleID, "--json"}, st...)...)), &sh)
	// Target PET of the two pulls by the ratio estimator: (20.5+21)/(21+21.5)
	// = 41.5/42.5 (hand computation).
	if sh.Kind != "bale" || sh.Pulls != 2 || sh.TargetPET == nil || *sh.TargetPET != 41.5/42.5 {
		t.Fatalf("show bale: %+v", sh)
	}
	recMust(t, append([]string{"sites", "move", siteID, "-33.95", "18.47"}, st...)...)
	// A site that still has bales is removed only when confirmed, and the
	// refusal says how many.
	if code, _, errs := recRun(t, append([]string{"sites", "remove", siteID}, st...)...); code != 1 || !strings.Contains(errs, "still has 1 bale,") || !strings.Contains(errs, "--yes") {
		t.Fatalf("remove a site with a bale: exit %d %s", code, errs)
	}
	recMust(t, append([]string{"sites", "remove", siteID, "--yes"}, st...)...)
	var sites []siteJSON
	json.Unmarshal([]byte(recMust(t, append([]string{"sites", "list", "--json"}, st...)...)), &sites)
	if len(sites) != 0 {
		t.Fatal("removed site still listed")
	}
	json.Unmarshal([]byte(recMust(t, append([]string{"show", siteID, "--json"}, st...)...)), &sh)
	if !sh.Deleted || sh.Events != 3 {
		t.Fatalf("removed site: %+v", sh)
	}
	// The demo command never writes into a store with real records.
	if code, _, errs := recRun(t, "demo", "--store", dir); code != 1 || !strings.Contains(errs, "real records") {
		t.Fatalf("demo over real data: exit %d %s", code, errs)
	}
}

func TestStoreLocation(t *testing.T) {
	t.Setenv("BALEASSAY_STORE", "")
	t.Setenv("XDG_DATA_HOME", "/srv/xdg")
	d, _ := desk.DefaultDir()
	demo, _ := desk.DemoDir()
	// XDG Base Directory Specification: $XDG_DATA_HOME/<app>.
	if d != "/srv/xdg/baleassay/store" || demo != "/srv/xdg/baleassay/demo" {
		t.Fatalf("store %s, demo %s", d, demo)
	}
	t.Setenv("BALEASSAY_STORE", "/tmp/x")
	if d, _ := desk.DefaultDir(); d != "/tmp/x" {
		t.Fatalf("BALEASSAY_STORE ignored: %s", d)
	}
	if d, _ := storeDir(""); d != "/tmp/x" {
		t.Fatal("empty --store is not the default")
	}
	if d, _ := storeDir(demoMarker); d != demo {
		t.Fatal("--demo is not the demo folder")
	}
	if code, _, errs := recRun(t, "sites", "list", "--store", filepath.Join(t.TempDir(), "none")); code != 1 || !strings.Contains(errs, "no records store") {
		t.Fatalf("list on a missing store: %d %s", code, errs)
	}
}
