package yield

// Source: invented pulls; the audit's interval is our own assess.Assess
// (computed by our own formula), the 15 % agreement band ours.

import (
	"math"
	"testing"

	"baleassay/assess"
)

// TestSpreadMatchesAudit is the agreement the Monte Carlo owes the
// audit: across 3, 6 and 12 pulls, the P5–P95 of the drawn target-PET
// share is within 15 % of the width of the 90 % interval that
// assess.Assess (bale assess) gives for it. The pulls are invented
// (inventedPulls); the 15 % is the goal the project set itself. Run
// with -v for the figures.
func TestSpreadMatchesAudit(t *testing.T) {
	checked := 0
	for _, n := range []int{3, 6, 12} {
		for _, seed := range []uint64{1, 2, 3, 4, 5} {
			pulls := inventedPulls(t, n, seed)
			baleKg := 548.0
			est, err := assess.Assess(assess.Audit{Pulls: pulls, BaleKg: baleKg}, assess.Options{})
			if err != nil {
				t.Fatal(err)
			}
			pet := est.Group(assess.GroupPET)
			mc, err := Simulate(pulls, baleKg, DefaultPlan(), MCOptions{Draws: 20000, Seed: seed, FixedLine: true})
			if err != nil {
				t.Fatal(err)
			}
			audit := pet.High - pet.Low
			drawn := mc.TargetPET.P95 - mc.TargetPET.P5
			ratio := drawn / audit
			t.Logf("%2d pulls, seed %d: assess 90 %% [%.4f, %.4f] width %.4f; drawn P5–P95 [%.4f, %.4f] width %.4f; ratio %.3f",
				n, seed, pet.Low, pet.High, audit, mc.TargetPET.P5, mc.TargetPET.P95, drawn, ratio)
			if mc.Spread != SpreadAudit || math.Abs(ratio-1) > 0.15 {
				t.Errorf("%d pulls, seed %d: drawn width / audit width = %.3f (spread %v)", n, seed, ratio, mc.Spread)
			}
			checked++
		}
	}
	if checked != 15 {
		t.Fatalf("%d audits checked, want 15", checked)
	}
}

func TestOnePullNoSpread(t *testing.T) {
	pulls := inventedPulls(t, 1, 9)
	mc, err := Simulate(pulls, 548, DefaultPlan(), MCOptions{Draws: 300, Seed: 1, FixedLine: true})
	if err != nil {
		t.Fatal(err)
	}
	if mc.Spread != SpreadNone || mc.TargetPET.P5 != mc.TargetPET.P95 || mc.FlakeKg.P10 != mc.FlakeKg.P90 {
		t.Errorf("one pull: spread %v, target PET %+v, flake %+v", mc.Spread, mc.TargetPET, mc.FlakeKg)
	}
}

func TestProjectSimplex(t *testing.T) {
	// Worked by hand: (0.7, 0.5, −0.2) onto Σ = 1: τ = 0.1, giving
	// (0.6, 0.4, 0). A point already on the simplex stays.
	buf := make([]float64, 3)
	v := []float64{0.7, 0.5, -0.2}
	projectSimplex(v, 1, buf)
	for i, want := range []float64{0.6, 0.4, 0} {
		if math.Abs(v[i]-want) > 1e-15 {
			t.Errorf("v = %v, want (0.6, 0.4, 0)", v)
		}
	}
	w := []float64{0.2, 0.3, 0.5}
	projectSimplex(w, 1, buf)
	if w[0] != 0.2 || w[1] != 0.3 || w[2] != 0.5 {
		t.Errorf("a point on the simplex moved: %v", w)
	}
}
