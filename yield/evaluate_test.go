package yield

import (
	"errors"
	"math"
	"strings"
	"testing"

	"baleassay/assess"
	"pgregory.net/rapid"
)

func TestEvaluateUsesRatioOfSums(t *testing.T) {
	pulls := inventedPulls(t, 8, 5)
	rep, err := Evaluate(pulls, 548, DefaultPlan())
	if err != nil {
		t.Fatal(err)
	}
	// Source: Cochran, Sampling Techniques, 3rd ed. (1977), ch. 6: the
	// ratio estimate r = Σc_i / Σw_i, scaled to the bale.
	var w float64
	c := make([]float64, assess.NumCategories())
	for _, p := range pulls {
		w += p.TotalKg()
		for j, v := range p.Kg {
			c[j] += v
		}
	}
	for j := range c {
		if want := c[j] / w * 548; math.Abs(rep.BaleComposition[j]-want) > 1e-9*548 {
			t.Errorf("%s: %g kg, want %g", assess.CategoryAt(j).Key, rep.BaleComposition[j], want)
		}
	}
	// The glycol is charged against the dry flake. Source: common practice.
	if math.Abs(rep.Glycolysate.GlycolKg-rep.Balance.FlakeDryKg) > 1e-9 {
		t.Errorf("glycol %g kg for %g kg of dry flake at 1:1", rep.Glycolysate.GlycolKg, rep.Balance.FlakeDryKg)
	}
}

func TestCleanerAuditNeverLowersFlake(t *testing.T) {
	plan := DefaultPlan()
	pulls := inventedPulls(t, 20, 9)
	rapid.Check(t, func(t *rapid.T) {
		i := rapid.IntRange(0, len(pulls)-1).Draw(t, "pull")
		from := rapid.IntRange(0, assess.NumCategories()-1).Filter(func(j int) bool { return !assess.CategoryAt(j).IsTargetPET() }).Draw(t, "from")
		to := rapid.IntRange(0, 6).Draw(t, "to")
		share := rapid.Float64Range(0, 1).Draw(t, "share")
		a, err := Evaluate(pulls, 548, plan)
		if err != nil {
			t.Fatal(err)
		}
		cleaner := make([]assess.Pull, len(pulls))
		copy(cleaner, pulls)
		p := cleaner[i]
		p.Kg = append([]float64(nil), p.Kg...)
		move := p.Kg[from] * share
		p.Kg[from] -= move
		p.Kg[to] += move
		cleaner[i] = p
		b, err := Evaluate(cleaner, 548, plan)
		if err != nil {
			t.Fatal(err)
		}
		// Source: common practice (the monotonicity property: a
		// cleaner audit never lowers the flake yield).
		if b.Balance.FlakeKg < a.Balance.FlakeKg*(1-1e-12) {
			t.Fatalf("cleaner pull %d (%g kg %s → %s) lowered flake %g → %g", i, move, assess.CategoryAt(from).Key, assess.CategoryAt(to).Key, a.Balance.FlakeKg, b.Balance.FlakeKg)
		}
	})
}

func TestEvaluateBatchesAndErrors(t *testing.T) {
	pulls := inventedPulls(t, 6, 4)
	plan := DefaultPlan()
	plan.ReactorKg = 100
	rep, err := Evaluate(pulls, 548, plan)
	if err != nil {
		t.Fatal(err)
	}
	// Source: common practice (whole batches of the stated charge).
	want := int(math.Ceil((rep.Balance.FlakeDryKg + rep.Glycolysate.GlycolKg) / 100))
	if rep.Batches != want || want < 2 {
		t.Errorf("batches %d, want %d", rep.Batches, want)
	}
	bad := DefaultPlan()
	bad.Recipe.GlycolKg = 5
	if _, err := Evaluate(pulls, 548, bad); !errors.Is(err, ErrBadCharge) {
		t.Errorf("fixed glycol mass for a bale: %v", err)
	}
	bad = DefaultPlan()
	bad.Recipe.StripEG = 1
	bad.Recipe.Ratio = 0.1
	if _, err := Evaluate(pulls, 548, bad); !errors.Is(err, ErrRebuildsPET) {
		t.Errorf("over-stripping: %v", err)
	}
	if _, err := Evaluate(pulls, 548, Plan{}); !errors.Is(err, ErrBadLine) {
		t.Errorf("no line: %v", err)
	}
	if _, err := Evaluate(pulls, 10, DefaultPlan()); !errors.Is(err, assess.ErrBaleLighter) {
		t.Errorf("bale lighter than pulls: %v", err)
	}
}

func TestHazardWarnings(t *testing.T) {
	pulls := inventedPulls(t, 4, 2)
	hz := catIdx(t, "hazard")
	pulls[2].Kg = append([]float64(nil), pulls[2].Kg...)
	pulls[2].Kg[hz] = 0.3
	plan := DefaultPlan()
	rep, err := Evaluate(pulls, 548, plan)
	if err != nil {
		t.Fatal(err)
	}
	// Common practice: hazardous items in bales are safety flags.
	if len(rep.Warnings) < 1 || !strings.Contains(rep.Warnings[0], pulls[2].Label) {
		t.Errorf("no hazard warning naming the pull: %q", rep.Warnings)
	}
	if rep.Balance.Flake[hz] != 0 {
		t.Errorf("built-in sort left %g kg hazards in the flake", rep.Balance.Flake[hz])
	}
	m, _ := Compile(waterBathOnly(1))
	plan.Line = m
	rep, _ = Evaluate(pulls, 548, plan)
	if !strings.Contains(strings.Join(rep.Warnings, "\n"), "reach the flake") {
		t.Errorf("hazards in the flake not flagged: %q", rep.Warnings)
	}
}
