package main

// Source: invented sites, bales, pulls and measured batches, and the
// invented demo scenario; checks follow the commands' documented
// behaviour.

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"baleassay/yield"
)

func TestValueCommand(t *testing.T) {
	out := recMust(t, "value", "../../testdata/demo-bale-0417.csv", "--bale-kg", "548", "--draws", "500")
	for _, want := range []string{"ILLUSTRATIVE", "glycolysate (sheet)", "Whole bale (548 kg)", "Caution"} {
		if !strings.Contains(out, want) {
			t.Errorf("value output lacks %q:\n%s", want, out)
		}
	}
	var v valueJSON
	js := recMust(t, "value", "../../testdata/demo-bale-0417.csv", "--bale-kg", "548", "--draws", "500", "--route", "flake", "--json")
	if err := json.Unmarshal([]byte(js), &v); err != nil {
		t.Fatal(err)
	}
	if v.Headline != "flake" || len(v.Routes) != 2 || !v.Prices.Illustrative || v.Prices.Currency != "EUR" || v.Routes[0].PerT.P50 == nil {
		t.Errorf("json: %+v", v)
	}
	// The sheet in use, as a file to start from, reads back.
	sheet := recMust(t, "value", "--show-prices")
	if _, err := yield.ReadPriceSheet(strings.NewReader(sheet), "shown"); err != nil {
		t.Errorf("--show-prices does not read back: %v", err)
	}
	bad := filepath.Join(t.TempDir(), "prices.json")
	os.WriteFile(bad, []byte(`{"name":"x","currency":"EUR","route":"flake","wash_cost_per_t":-3}`), 0o644)
	if code, _, errs := recRun(t, "value", "../../testdata/demo-bale-0417.csv", "--bale-kg", "548", "--prices", bad); code != 1 || !strings.Contains(errs, "wash cost") {
		t.Errorf("bad sheet: %d %s", code, errs)
	}
	if code, _, _ := recRun(t, "value", "../../testdata/demo-bale-0417.csv"); code != 2 {
		t.Errorf("no --bale-kg: exit %d", code)
	}
	if code, _, _ := recRun(t, "value", "../../testdata/demo-bale-0417.csv", "--bale-kg", "548", "--route", "pellets"); code != 2 {
		t.Errorf("unknown route: exit %d", code)
	}
}

func TestMeasuredCommands(t *testing.T) {
	dir := t.TempDir()
	st := []string{"--store", dir}
	recMust(t, append([]string{"sites", "add", "--name", "Tansy Cross Yard", "--lat", "44.921", "--lon", "4.495"}, st...)...)
	recMust(t, append([]string{"bales", "add", "--site", "Tansy Cross Yard", "--kg", "548", "--tag", "VO-77"}, st...)...)
	stdin = strings.NewReader("pull,pet_clear,pvc,closures\nP1,23.9,0.1,1.7\nP2,12.8,0.16,0.7\nP3,20.1,0.05,1.1\n")
	recMust(t, append([]string{"pulls", "add", "VO-77", "-"}, st...)...)
	add := []string{"measured", "add", "--bales", "VO-77", "--flake-kg", "400", "--moisture-pct", "0.8", "--stream", "floats=12.5",
		"--reactor-flake-kg", "300", "--glycol", "deg", "--glycol-kg", "300", "--ohv", "520", "--acid-value", "1.1", "--ran", "2026-03-01"}
	if code, _, errs := recRun(t, append(append(append([]string{}, add...), "--stream", "skip_9=3"), st...)...); code != 1 || !strings.Contains(errs, "has no stream") {
		t.Errorf("unknown stream: %d %s", code, errs)
	}
	if code, _, errs := recRun(t, append([]string{"measured", "add", "--bales", "VO-77", "--flake-kg", "150"}, st...)...); code != 1 || !strings.Contains(errs, "--yes") {
		t.Errorf("implausible flake share: %d %s", code, errs)
	}
	if code, _, _ := recRun(t, append([]string{"measured", "add", "--bales", "VO-77", "--flake-kg", "400", "--ohv", "500"}, st...)...); code != 2 {
		t.Errorf("hydroxyl value without a charge: exit %d", code)
	}
	out := recMust(t, append(add, st...)...)
	if !strings.Contains(out, "saved measured batch") {
		t.Fatalf("add: %s", out)
	}
	var rows []measuredJSON
	if err := json.Unmarshal([]byte(recMust(t, append([]string{"measured", "list", "--json"}, st...)...)), &rows); err != nil {
		t.Fatal(err)
	}
	if len(rows) != 1 || rows[0].Reactor == nil || rows[0].Reactor.Glycol != "DEG" || rows[0].Reactor.HydroxylMethod != "ASTM D4274" ||
		rows[0].Reactor.AcidMethod != "ASTM D4662" || rows[0].StreamsKg["floats"] != 12.5 || *rows[0].MoisturePct != 0.8 || rows[0].Ran != "2026-03-01T00:00:00Z" {
		t.Fatalf("list: %+v", rows)
	}
	// One batch: predicted against measured, and a proposal (the prior
	// dominates with one batch).
	out = recMust(t, append([]string{"calibrate", "--draws", "300"}, st...)...)
	if !strings.Contains(out, "1 batch predicted") || !strings.Contains(out, "flake_dry_kg") || !strings.Contains(out, "Tansy Cross Yard") {
		t.Errorf("calibrate: %s", out)
	}
	out = recMust(t, append([]string{"measured", "remove", rows[0].ID}, st...)...)
	if !strings.Contains(out, "removed measured batch") {
		t.Errorf("remove: %s", out)
	}
	if out := recMust(t, append([]string{"measured", "list"}, st...)...); !strings.Contains(out, "no measured batches") {
		t.Errorf("list after remove: %s", out)
	}
}

func TestCalibrateCommandOnDemo(t *testing.T) {
	dir := t.TempDir()
	recMust(t, "demo", "--store", dir)
	st := []string{"--store", dir}
	var rep calibrationJSON
	if err := json.Unmarshal([]byte(recMust(t, append([]string{"calibrate", "--draws", "800", "--json"}, st...)...)), &rep); err != nil {
		t.Fatal(err)
	}
	if len(rep.Lines) != 1 || rep.Lines[0].Proposal == nil || !rep.Lines[0].Proposal.Valid || len(rep.Sites) == 0 || len(rep.Lines[0].Batches) < 5 {
		t.Fatalf("calibrate json: %+v", rep)
	}
	file := filepath.Join(t.TempDir(), "line.json")
	out := recMust(t, append([]string{"calibrate", "--draws", "800", "--save", "--out", file}, st...)...)
	if !strings.Contains(out, "saved line") || !strings.Contains(out, "wrote the proposed profile") {
		t.Errorf("save: %s", out)
	}
	if _, err := yield.ReadLineFile(file); err != nil {
		t.Errorf("the written profile does not read back: %v", err)
	}
	out = recMust(t, append([]string{"settings", "list"}, st...)...)
	if !strings.Contains(out, yield.BuiltinLineName) {
		t.Errorf("the calibrated line is not stored: %s", out)
	}
	if code, _, errs := recRun(t, append([]string{"calibrate", "--line", "no such line", "--save"}, st...)...); code != 1 || !strings.Contains(errs, "0 lines") {
		t.Errorf("save without batches: %d %s", code, errs)
	}
}
