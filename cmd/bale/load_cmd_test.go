package main

import (
	"encoding/json"
	"math"
	"strings"
	"testing"
)

// loadFiles are the three audited bales of testdata/load (invented), with
// their masses: the hand-worked load of testdata/ref/load_example.py.
var loadFiles = []string{"../../testdata/load/bale-a.csv:540", "../../testdata/load/bale-b.csv:512", "../../testdata/load/bale-c.csv:575"}

func TestLoadFilesHandWorked(t *testing.T) {
	code, out, errs := recRun(t, append(append([]string{"load"}, loadFiles...), "--bales", "24", "--json")...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rep struct {
		Bales, Audited int
		Categories     []struct {
			Key       string
			Fraction  float64
			Low, High *float64
		}
		Spec struct {
			Verdict string
			Limits  []struct {
				Item, Verdict, Need string
				MoreBales           *int `json:"more_bales"`
			}
		}
		Advice  struct{ Kind, Route string }
		PerBale []struct{ Label string } `json:"per_bale"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	// Source: testdata/ref/load_example.py: PVC share 0.0058078649302417936,
	// SE 0.0032075697682445695, half-width t(0.95; 2)·SE with t = 2.920
	// (NIST/SEMATECH e-Handbook §1.3.6.7.2, 4 digits).
	pvc := rep.Categories[8]
	if pvc.Key != "pvc" || math.Abs(pvc.Fraction-0.0058078649302417936) > 1e-15 || math.Abs(*pvc.High-pvc.Fraction-2.920*0.0032075697682445695) > 0.0005*0.0032075697682445695*2.920 {
		t.Errorf("pvc %+v", pvc)
	}
	if rep.Bales != 24 || rep.Audited != 3 || len(rep.PerBale) != 3 {
		t.Errorf("bales %d audited %d per-bale %d", rep.Bales, rep.Audited, len(rep.PerBale))
	}
	undecided := 0
	for _, l := range rep.Spec.Limits {
		if l.Verdict == "undecided" {
			undecided++
			if l.Need == "pulls" && (l.MoreBales == nil || *l.MoreBales < 1) {
				t.Errorf("undecided %s without bales: %+v", l.Item, l)
			}
		}
	}
	if rep.Spec.Verdict != "undecided" || undecided == 0 || rep.Advice.Kind != "decide" || rep.Advice.Route == "none" {
		t.Errorf("verdict %s (%d undecided), advice %+v", rep.Spec.Verdict, undecided, rep.Advice)
	}
	code, out, _ = recRun(t, append(append([]string{"load"}, loadFiles...), "--bales", "24", "--yield", "--draws", "500")...)
	for _, want := range []string{"Load audit: 3 of 24 bales audited", "Next: pvc ≤ 1 % is undecided", "The load through", "What drives the spread"} {
		if code != 0 || !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

func TestLoadStoredBales(t *testing.T) {
	dir := t.TempDir()
	st := []string{"--store", dir}
	recMust(t, append([]string{"sites", "add", "--name", "Tansy Cross Yard", "--lat", "44.921", "--lon", "4.495"}, st...)...)
	for i, b := range []struct{ tag, kg, pulls string }{
		{"LD-1", "540", "pull,pet_clear,pvc\nP1,19.9,0.10\nP2,21.95,0.05\nP3,18.88,0.12\n"},
		{"LD-2", "512", "pull,pet_clear,pvc\nP1,20.7,0.30\nP2,19.78,0.22\n"},
	} {
		recMust(t, append([]string{"bales", "add", "--site", "tansy cross yard", "--kg", b.kg, "--tag", b.tag}, st...)...)
		stdin = strings.NewReader(b.pulls)
		if out := recMust(t, append([]string{"pulls", "add", b.tag, "-"}, st...)...); !strings.Contains(out, "saved") {
			t.Fatalf("bale %d: %s", i, out)
		}
	}
	out := recMust(t, append([]string{"load", "LD-1", "LD-2", "../../testdata/load/bale-c.csv:575", "--bales", "24"}, st...)...)
	if !strings.Contains(out, "Load audit: 3 of 24 bales audited") || !strings.Contains(out, "LD-1") {
		t.Errorf("stored and file bales:\n%s", out)
	}
	if code, _, errs := recRun(t, append([]string{"load", "../../testdata/load/bale-a.csv", "--bales", "24"}, st...)...); code == 0 || !strings.Contains(errs, "add the bale's gross mass after a colon") {
		t.Errorf("file without mass: exit %d %s", code, errs)
	}
	if code, _, errs := recRun(t, append([]string{"load", "LD-1", "LD-2", "--bales", "1"}, st...)...); code != 1 || !strings.Contains(errs, "give the number of bales delivered") {
		t.Errorf("more audited than delivered: exit %d %s", code, errs)
	}
}
