package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func runCLI(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(args, &out, &errb)
	return code, out.String(), errb.String()
}

func TestAssessDemoJSON(t *testing.T) {
	code, out, errs := runCLI(t, "assess", "../../testdata/demo-bale-0417.csv", "--bale-kg", "548", "--json")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rep struct {
		Pulls      int     `json:"pulls"`
		SampledKg  float64 `json:"sampled_kg"`
		BaleKg     float64 `json:"bale_kg"`
		Confidence float64 `json:"confidence"`
		Method     string  `json:"method"`
		Categories []struct {
			Key                     string
			Code                    *int
			Kg, Fraction, Low, High float64
		} `json:"categories"`
		Groups []struct {
			Key  string
			Code *int
		} `json:"groups"`
		Spec struct {
			Name    string
			Verdict string
			Limits  []struct {
				Item, Verdict string
				Limit         float64
				MorePulls     *int `json:"more_pulls"`
				Need          string
			}
		} `json:"spec"`
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil {
		t.Fatal(err)
	}
	// The demo file has 6 pulls and the bale weighs 548 kg.
	// Source: testdata/demo-bale-0417.csv (our demo scenario).
	if rep.Pulls != 6 || rep.BaleKg != 548 || rep.Confidence != 0.9 || rep.Method != "ratio" {
		t.Errorf("header fields: %+v", rep)
	}
	if len(rep.Categories) != 24 || rep.Categories[8].Key != "pvc" || *rep.Categories[8].Code != 3 {
		t.Errorf("categories: %d, [8] = %+v", len(rep.Categories), rep.Categories[8])
	}
	if len(rep.Groups) != 5 || rep.Groups[0].Code != nil {
		t.Errorf("groups must not carry a code: %+v", rep.Groups)
	}
	var sum float64
	for _, c := range rep.Categories {
		sum += c.Fraction
	}
	if sum < 1-1e-12 || sum > 1+1e-12 {
		t.Errorf("fractions sum to %g", sum)
	}
	if rep.Spec.Name != "glycol-feed" || len(rep.Spec.Limits) == 0 {
		t.Errorf("spec: %+v", rep.Spec)
	}
	for _, l := range rep.Spec.Limits {
		if (l.Verdict == "undecided") != (l.MorePulls != nil && *l.MorePulls > 0 || l.Need == "whole_bale" || l.Need == "unknown") {
			t.Errorf("limit %s %s: more_pulls %v", l.Item, l.Verdict, l.MorePulls)
		}
	}
}

func TestAssessPlainText(t *testing.T) {
	code, out, errs := runCLI(t, "assess", "../../testdata/demo-bale-0417.csv", "--bale-kg=548", "--spec", "bottle-clear")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"6 pulls", "Cochran ratio", "Spec bottle-clear", "pvc", "Safety"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q", want)
		}
	}
}

func TestAssessBadInput(t *testing.T) {
	dir := t.TempDir()
	spec := filepath.Join(dir, "spec.json")
	os.WriteFile(spec, []byte(`{"name":"x","limits":[{"item":"pvc","max":5}]}`), 0o644)
	cases := []struct {
		args    []string
		code    int
		mention string
	}{
		{[]string{"assess"}, 2, "exactly one"},
		{[]string{"assess", "a.csv", "b.csv"}, 2, "exactly one"},
		{[]string{"assess", "../../testdata/demo-bale-0417.csv", "--method", "median"}, 2, "ratio or mean"},
		{[]string{"assess", "../../testdata/demo-bale-0417.csv", "--confidence", "95"}, 2, "between 0 and 1"},
		{[]string{"assess", "../../testdata/demo-bale-0417.csv", "--bale-kg", "NaN"}, 2, "bale-kg"},
		{[]string{"assess", "../../testdata/demo-bale-0417.csv", "--bale-kg", "100"}, 1, "below"},
		{[]string{"assess", "../../testdata/demo-bale-0417.csv", "--spec", "no-such-spec"}, 1, "built-in"},
		{[]string{"assess", "../../testdata/demo-bale-0417.csv", "--spec", spec}, 1, "0 to 1"},
		{[]string{"assess", "../../testdata/bad/unknown-category.csv"}, 1, "unknown-category.csv:1:16"},
		{[]string{"assess", "../../testdata/bad/duplicate-label.csv"}, 1, "twice"},
		{[]string{"assess", "../../testdata/bad/zero-mass-pull.csv"}, 1, "0 kg"},
		{[]string{"assess", "../../testdata/bad/nan-mass.csv"}, 1, "finite"},
		{[]string{"assess", filepath.Join(dir, "missing.csv")}, 1, "cannot read"},
		{[]string{"no-such-command"}, 2, "unknown command"},
	}
	for _, c := range cases {
		code, out, errs := runCLI(t, c.args...)
		if code != c.code || !strings.Contains(errs, c.mention) {
			t.Errorf("%v: exit %d, stderr %q; want exit %d mentioning %q", c.args, code, errs, c.code, c.mention)
		}
		if out != "" {
			t.Errorf("%v: printed a report despite the error", c.args)
		}
	}
}

func TestCategoriesJSON(t *testing.T) {
	code, out, _ := runCLI(t, "categories", "--json")
	if code != 0 {
		t.Fatal(code)
	}
	var rows []struct {
		Key   string
		Code  int
		Group string
	}
	if err := json.Unmarshal([]byte(out), &rows); err != nil {
		t.Fatal(err)
	}
	// Source: ASTM D7611, the resin identification codes 1–7.
	want := map[string]int{"pet_clear": 1, "hdpe": 2, "pvc": 3, "ldpe": 4, "pp": 5, "ps": 6, "pla": 7}
	seen := 0
	for _, r := range rows {
		if c, ok := want[r.Key]; ok {
			seen++
			if c != r.Code {
				t.Errorf("%s: code %d, want %d", r.Key, r.Code, c)
			}
		}
	}
	if seen != len(want) {
		t.Errorf("%d of the %d coded categories listed", seen, len(want))
	}
	if len(rows) != 24 {
		t.Errorf("%d categories", len(rows))
	}
}
