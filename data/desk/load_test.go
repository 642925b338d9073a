package desk

// Source: the bales, pulls and load here are invented test inputs; the
// expected figures come from package assess's own estimator (the
// hand-worked load of testdata/ref/load_example.py is checked there).

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/yield"
)

func TestAuditLoadStoredAndFiles(t *testing.T) {
	d := openTest(t)
	site := mustSite(t, d, "Orrin Bridge Yard", 45.112, 4.688)
	a := mustBale(t, d, site, 540, "LD-1")
	b := mustBale(t, d, site, 512, "LD-2")
	for id, pulls := range map[record.EntityID][]record.PullRecord{
		a: {pull("P1", 19.9, 0.10), pull("P2", 21.95, 0.05), pull("P3", 18.88, 0.12)},
		b: {pull("P1", 20.7, 0.30), pull("P2", 19.78, 0.22)},
	} {
		if _, _, err := d.AddPulls(id.String(), pulls, SaveOptions{}); err != nil {
			t.Fatal(err)
		}
	}
	file := filepath.Join(t.TempDir(), "bale-c.csv")
	if err := os.WriteFile(file, []byte("pull,pet_clear,pvc\n1,22.98,0.02\n2,17.96,0.04\n3,20,0\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	var ins []LoadBaleInput
	for _, s := range []string{"LD-1", "LD-2", file + ":575"} {
		in, err := ParseLoadBale(s)
		if err != nil {
			t.Fatal(err)
		}
		ins = append(ins, in)
	}
	plan := yield.DefaultPlan()
	la, err := d.AuditLoad(context.Background(), ins, LoadOptions{Bales: 24, Yield: &plan, MC: yield.MCOptions{Draws: 2000, Seed: 1}})
	if err != nil {
		t.Fatal(err)
	}
	// The same three bales as assess's hand-worked load: the desk must
	// hand the estimator exactly those pulls and masses.
	want, err := assess.AssessLoad(la.Load, assess.Options{})
	if err != nil {
		t.Fatal(err)
	}
	got, _ := la.Result.Category("pvc")
	ref, _ := want.Category("pvc")
	if got.Fraction != ref.Fraction || got.SE != ref.SE || la.Result.Audited != 3 || la.Result.Bales != 24 {
		t.Errorf("pvc %g ± %g of %d/%d bales, want %g ± %g", got.Fraction, got.SE, la.Result.Audited, la.Result.Bales, ref.Fraction, ref.SE)
	}
	if math.Abs(got.Fraction-0.0058078649302417936) > 1e-15 {
		t.Errorf("pvc %.17g, want the hand-worked 0.0058078649302417936", got.Fraction)
	}
	if la.Verdict == nil || la.Report.Spec == nil || la.Yield == nil || len(la.Drivers) == 0 {
		t.Fatalf("verdict %v, yield %v, %d drivers", la.Verdict, la.Yield, len(la.Drivers))
	}
	if la.Yield.BaleKg != la.Result.BaleKg || !(la.Yield.MC.FlakeKg.P50 > 0) {
		t.Errorf("load yield over %g kg, flake P50 %g", la.Yield.BaleKg, la.Yield.MC.FlakeKg.P50)
	}
}

func TestAuditLoadRefusals(t *testing.T) {
	if _, err := ParseLoadBale("bale.csv:heavy"); !errors.Is(err, ErrUsage) {
		t.Errorf("mass not a number: %v", err)
	}
	var d *Desk
	if _, err := d.AuditLoad(context.Background(), []LoadBaleInput{{Text: "LD-1"}}, LoadOptions{}); !errors.Is(err, ErrUsage) {
		t.Errorf("stored bale without a store: %v", err)
	}
	if _, err := d.AuditLoad(context.Background(), nil, LoadOptions{}); !errors.Is(err, ErrUsage) {
		t.Errorf("no bales: %v", err)
	}
	file := filepath.Join(t.TempDir(), "b.csv")
	_ = os.WriteFile(file, []byte("pull,pet_clear\n1,20\n"), 0o600)
	if _, err := d.AuditLoad(context.Background(), []LoadBaleInput{{File: file, Kg: 500}, {File: file, Kg: 500}}, LoadOptions{Bales: 1}); !errors.Is(err, assess.ErrBadLoad) {
		t.Errorf("more audited than delivered: %v", err)
	}
}

func TestHazardNotice(t *testing.T) {
	clean := []record.PullRecord{pull("P1", 20, 0)}
	if n := HazardNotice(clean); n != "" {
		t.Errorf("no hazard, notice %q", n)
	}
	bat := record.PullRecord{Label: "P2", Kg: map[string]float64{"pet_clear": 20}, Pieces: map[string]int64{"hazard": 1}}
	if n := HazardNotice(append(clean, bat)); n == "" || !strings.HasPrefix(n, "HAZARD in pull P2. ") || !strings.Contains(n, "battery") {
		t.Errorf("a counted battery: %q", n)
	}
}
