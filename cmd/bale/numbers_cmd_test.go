package main

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// writeFile writes an invented test input and returns its path.
func writeFile(t *testing.T, name, body string) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), name)
	if err := os.WriteFile(p, []byte(body), 0o600); err != nil {
		t.Fatal(err)
	}
	return p
}

// twoPulls is the trap of a category found in no pull: two pulls, 43 kg,
// no PVC (invented masses).
const twoPulls = "pull,pet_clear,closures,labels\nA,19.5,1.0,0.5\nB,20.5,1.0,0.5\n"

func TestAssessNoneFoundIsBounded(t *testing.T) {
	pulls := writeFile(t, "two.csv", twoPulls)
	spec := writeFile(t, "tight.json", `{"name":"tight","limits":[{"item":"pvc","max":0.0001}]}`)
	code, out, errs := runCLI(t, "assess", pulls, "--spec", spec, "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rep struct {
		Categories []struct {
			Key       string
			High      *float64
			Interval  string
			NoneFound *struct {
				Upper float64
				Text  string
			} `json:"none_found"`
		}
		Spec struct {
			Verdict string
			Limits  []struct {
				Item, Verdict, Need string
				MorePulls           *int `json:"more_pulls"`
			}
		}
		Advice struct {
			Kind      string
			MorePulls *int `json:"more_pulls"`
		}
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	pvc := rep.Categories[8]
	// The bound is the exact binomial bound on 43/0.035 = 1228 PVC-bottle
	// equivalents, 1 − 0.05^(1/1228) = 0.2437 % (computed by our own
	// formula; testdata/ref/nonefound_bound.py prints it).
	if pvc.Key != "pvc" || pvc.Interval != "none_found" || pvc.NoneFound == nil || math.Abs(pvc.NoneFound.Upper-0.0024365481813142242) > 1e-12 {
		t.Fatalf("pvc: %+v", pvc)
	}
	if pvc.NoneFound.Text != "none found in 2 pulls (43 kg): at most 0.25 % at 90 %" {
		t.Errorf("text %q", pvc.NoneFound.Text)
	}
	l := rep.Spec.Limits[0]
	if rep.Spec.Verdict != "undecided" || l.Verdict != "undecided" || l.Need != "pulls" || l.MorePulls == nil || *l.MorePulls < 1 {
		t.Errorf("0.01 %% PVC on 2 empty pulls: %+v", l)
	}
	if rep.Advice.Kind != "decide" || rep.Advice.MorePulls == nil || *rep.Advice.MorePulls != *l.MorePulls {
		t.Errorf("advice %+v disagrees with the table's %d", rep.Advice, *l.MorePulls)
	}
	code, out, _ = runCLI(t, "assess", pulls, "--spec", spec)
	if code != 0 || !strings.Contains(out, "pvc: none found in 2 pulls (43 kg): at most 0.25 % at 90 %") || !strings.Contains(out, "Next: pvc ≤ 0.01 % is undecided") {
		t.Errorf("plain text:\n%s", out)
	}
}

func TestAssessFailedBaleAndHazard(t *testing.T) {
	pulls := writeFile(t, "fail.csv", "pull,pet_clear,pvc,hazard,total_count,pvc_count,hazard_count\nA,19.0,0.5,0,800,12,0\nB,20.0,0.6,0.02,820,15,1\n")
	code, out, errs := runCLI(t, "assess", pulls)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"FAIL    no grade", "Next: the bale fails pvc ≤ 1 %", "hazard: none (found)", "never crush, cut or bale a battery", "1.67 %"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
}

func TestYieldSpreadAndSensitivity(t *testing.T) {
	code, out, errs := yieldCLI(t, "yield", demoPulls, "--bale-kg", "548", "--draws", "2000", "--conversion", "0.9:1", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var got struct {
		Spread          string
		TargetPET       map[string]*float64 `json:"target_pet"`
		ConversionRange *[2]float64         `json:"conversion_range"`
		Sensitivity     []struct {
			Input            string
			GlycolysateShare float64 `json:"glycolysate_share"`
		}
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	if got.Spread != "audit" || got.TargetPET["p5"] == nil || got.ConversionRange == nil || got.ConversionRange[0] != 0.9 {
		t.Errorf("spread %q target %v conversion %v", got.Spread, got.TargetPET, got.ConversionRange)
	}
	conv := false
	for _, d := range got.Sensitivity {
		conv = conv || d.Input == "glycolysis: conversion" && d.GlycolysateShare > 0
	}
	if len(got.Sensitivity) < 2 || !conv {
		t.Errorf("sensitivity rows %+v", got.Sensitivity)
	}
	one := writeFile(t, "one.csv", "pull,pet_clear,closures\nA,20,1\n")
	code, out, _ = yieldCLI(t, "yield", one, "--bale-kg", "500", "--draws", "500")
	if code != 0 || !strings.Contains(out, "One pull: no spread of the audit can be given") {
		t.Errorf("one pull:\n%s", out)
	}
	if code, _, errs := yieldCLI(t, "glycolysis", "--pet-kg", "1", "--glycol", "DEG", "--glycol-ratio", "1", "--conversion", "0.9:1"); code != 2 || !strings.Contains(errs, "ranges are for bale yield") {
		t.Errorf("a range for one charge: exit %d %s", code, errs)
	}
}
