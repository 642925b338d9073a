package main

// Source: the demo scenario and invented stores; the checks are the
// commands' documented behaviour (README, "The lab's desk").

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// demoStore makes the demo scenario in a temporary folder.
func demoStore(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	if code, _, e := bale(t, "demo", "--store", dir); code != 0 {
		t.Fatalf("demo: %s", e)
	}
	return dir
}

func TestReportCommands(t *testing.T) {
	store, out := demoStore(t), t.TempDir()
	page := filepath.Join(out, "bale.html")
	code, stdout, e := bale(t, "report", "bale", "VO-04117", "--html", page, "--draws", "2000", "--store", store)
	if code != 0 || !strings.Contains(stdout, "wrote "+page) {
		t.Fatalf("report bale: %d %q %q", code, stdout, e)
	}
	first, _ := os.ReadFile(page)
	if !bytes.Contains(first, []byte("<h1>Bale VO-04117</h1>")) || !bytes.Contains(first, []byte(`data-figure="flow"`)) {
		t.Fatal("the bale report lacks its title or its mass flow")
	}
	// Never replaced without --force; replaced with it.
	code, _, e = bale(t, "report", "bale", "VO-04117", "--html", page, "--seed", "9", "--store", store)
	if code != 1 || !strings.Contains(e, "already there") || !strings.Contains(e, "--force") {
		t.Fatalf("second report without --force: %d %q", code, e)
	}
	if now, _ := os.ReadFile(page); !bytes.Equal(now, first) {
		t.Fatal("the report was changed without --force")
	}
	if code, _, e := bale(t, "report", "bale", "VO-04117", "--html", page, "--seed", "9", "--draws", "2000", "--force", "--store", store); code != 0 {
		t.Fatalf("--force: %q", e)
	}
	region := filepath.Join(out, "region.html")
	code, stdout, e = bale(t, "report", "site", "--within", "45.0", "4.7", "25", "--from", "2001-01-01", "--html", region, "--store", store)
	if code != 0 || !strings.Contains(stdout, "9 sites") {
		t.Fatalf("report site --within: %d %q %q", code, stdout, e)
	}
	if b, _ := os.ReadFile(region); !bytes.Contains(b, []byte("received from 2001-01-01")) || !bytes.Contains(b, []byte(`data-figure="map"`)) {
		t.Fatal("the region report lacks its range or its map")
	}
	if code, _, e := bale(t, "report", "site", "Kettleby Yard", "--html", filepath.Join(out, "k.html"), "--store", store); code != 0 {
		t.Fatalf("report site NAME: %q", e)
	}
	for _, args := range [][]string{
		{"report", "site", "--within", "45", "4.7", "--html", "x.html"},
		{"report", "site", "Kettleby Yard", "--within", "45", "4.7", "25", "--html", "x.html"},
		{"report", "site", "Kettleby Yard"},
		{"report", "bale", "VO-04117"},
		{"report", "pile", "x"},
	} {
		if code, _, _ := bale(t, append(args, "--store", store)...); code != 2 {
			t.Errorf("%v: exit %d, want 2 (usage)", args, code)
		}
	}
	if code, _, e := bale(t, "report", "bale", "NO-SUCH", "--html", filepath.Join(out, "n.html"), "--store", store); code != 1 || !strings.Contains(e, "NO-SUCH") {
		t.Errorf("unknown bale: %d %q", code, e)
	}
}

func TestExportCSVAndGeoJSONCommands(t *testing.T) {
	store, out := demoStore(t), t.TempDir()
	for _, tab := range []string{"bales", "pulls", "sites"} {
		path := filepath.Join(out, tab+".csv")
		code, stdout, e := bale(t, "export", "csv", tab, path, "--from", "2001-01-01", "--to", "2099-12-31", "--store", store)
		if code != 0 || !strings.Contains(stdout, tab+" table") {
			t.Fatalf("export csv %s: %d %q %q", tab, code, stdout, e)
		}
		raw, _ := os.ReadFile(path)
		recs, err := csv.NewReader(bytes.NewReader(raw)).ReadAll()
		if err != nil || len(recs) < 2 {
			t.Fatalf("%s.csv: %d records, %v", tab, len(recs), err)
		}
		if code, _, e := bale(t, "export", "csv", tab, path, "--store", store); code != 1 || !strings.Contains(e, "already there") {
			t.Errorf("export csv over a file: %d %q", code, e)
		}
	}
	valued := filepath.Join(out, "valued.csv")
	if code, _, e := bale(t, "export", "csv", "bales", valued, "--value", "--draws", "200", "--store", store); code != 0 {
		t.Fatalf("export csv bales --value: %q", e)
	}
	if raw, _ := os.ReadFile(valued); !bytes.Contains(raw, []byte(",value_eur_per_t_")) {
		t.Fatalf("no value columns: %.300s", raw)
	}
	if code, _, _ := bale(t, "export", "csv", "pulls", filepath.Join(out, "v.csv"), "--value", "--store", store); code != 2 {
		t.Error("--value on the pulls table accepted")
	}
	geo := filepath.Join(out, "sites.geojson")
	code, stdout, e := bale(t, "export", "geojson", "sites", geo, "--within", "45", "4.7", "25", "--area", "--store", store)
	if code != 0 || !strings.Contains(stdout, "9 sites") {
		t.Fatalf("export geojson: %d %q %q", code, stdout, e)
	}
	var fc struct {
		Type     string
		Features []struct{ Geometry struct{ Type string } }
	}
	raw, _ := os.ReadFile(geo)
	if json.Unmarshal(raw, &fc) != nil || fc.Type != "FeatureCollection" || len(fc.Features) != 10 || fc.Features[9].Geometry.Type != "Polygon" {
		t.Fatalf("geojson: %s", raw[:min(300, len(raw))])
	}
	for _, args := range [][]string{
		{"export", "csv", "tables", filepath.Join(out, "x.csv")},
		{"export", "csv", "bales"},
		{"export", "geojson", "bales", filepath.Join(out, "x.json")},
		{"export", "geojson", "sites", filepath.Join(out, "x.json"), "--area"},
	} {
		if code, _, _ := bale(t, append(args, "--store", store)...); code != 2 {
			t.Errorf("%v: exit %d, want 2 (usage)", args, code)
		}
	}
	if _, err := os.Stat(filepath.Join(out, "x.csv")); err == nil {
		t.Error("a refused export left a file")
	}
}

// TestImportFolderCommand imports a folder with two devices' bundles, a
// missing bundle, a tampered file and a note: one summary per device,
// every refusal listed, exit status 1.
func TestImportFolderCommand(t *testing.T) {
	lab, stick := t.TempDir(), t.TempDir()
	for i, name := range []string{"north", "south"} {
		tab := grader(t)
		if code, _, e := bale(t, "trust", "add", mustKey(t, tab), "--name", "tablet "+name, "--yes", "--store", lab); code != 0 {
			t.Fatalf("trust: %q", e)
		}
		for n := 1; n <= 3; n++ {
			if code, _, e := bale(t, "sites", "add", "--name", name+" yard "+string(rune('A'+n)), "--lat", "51.0", "--lon", string(rune('0'+i))+".5", "--store", tab, "--yes"); code != 0 {
				t.Fatalf("sites add: %q", e)
			}
			if code, _, e := bale(t, "export", "--to", filepath.Join(stick, name+"-"+string(rune('0'+n))+".bale"), "--since-last", "lab", "--store", tab); code != 0 {
				t.Fatalf("export: %q", e)
			}
		}
	}
	os.Remove(filepath.Join(stick, "south-2.bale"))
	raw, _ := os.ReadFile(filepath.Join(stick, "north-3.bale"))
	raw[len(raw)/2] ^= 1
	os.WriteFile(filepath.Join(stick, "north-3.bale"), raw, 0o644)
	os.WriteFile(filepath.Join(stick, "notes.txt"), []byte("x"), 0o644)
	code, out, e := bale(t, "import", stick, "--store", lab)
	if code != 1 {
		t.Fatalf("exit %d, want 1\n%s\n%s", code, out, e)
	}
	for _, want := range []string{
		"(tablet north): 2 bundles (1–2) in 2 files, 5 events: 5 new",
		"(tablet south): 2 bundles (1, 3) in 2 files",
		"1 bundle missing",
		"gap: bundle 2 from device",
		"5 files read: 4 accepted",
		"1 refused; 1 file not ending in .bale left alone",
		"refused: north-3.bale: ",
		"tampered",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
	if !strings.Contains(e, "1 of 5 files refused") || !strings.Contains(e, "import: file 5 of 5") {
		t.Errorf("stderr %q", e)
	}
	code, out, _ = bale(t, "import", stick, "--store", lab, "--json")
	var rep struct {
		Devices []struct {
			Bundles []uint64
			Missing int
			New     int
		}
		Refused []struct{ Path, Error string }
		Skipped []string
	}
	if code != 1 || json.Unmarshal([]byte(out), &rep) != nil || len(rep.Devices) != 2 || len(rep.Refused) != 1 || len(rep.Skipped) != 1 {
		t.Fatalf("--json: %d %s", code, out)
	}
	for _, d := range rep.Devices {
		if d.New != 0 {
			t.Errorf("second import brought %d new events", d.New)
		}
	}
}

// mustKey writes a store's public key and returns its path.
func mustKey(t *testing.T, store string) string {
	t.Helper()
	pub := filepath.Join(t.TempDir(), "key.pem")
	if code, _, e := bale(t, "key", "--store", store, "--public", pub); code != 0 {
		t.Fatalf("key: %q", e)
	}
	return pub
}
