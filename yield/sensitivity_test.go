package yield

// Source: invented pulls; the expected shares of the spread are computed
// by our own model, with tolerances of our own.

import (
	"math"
	"testing"
)

func TestSensitivityOneInput(t *testing.T) {
	// Proportional pulls (no audit spread), the line fixed, only the
	// conversion ranged: the conversion must carry all of the glycolysate's
	// spread and none of the flake's. Computed by our own model.
	pulls := inventedPulls(t, 4, 3)
	for i := range pulls {
		copy(pulls[i].Kg, pulls[0].Kg)
	}
	plan := DefaultPlan()
	plan.Conversion = Range(0.8, 1)
	sp := auditSpread(t, pulls, 548)
	rows, err := Sensitivity(sp, 548, plan, MCOptions{Seed: 1, FixedLine: true})
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 1 || rows[0].Kind != InputConversion || rows[0].GlycolysateShare != 1 || rows[0].FlakeSD != 0 {
		t.Fatalf("rows %+v", rows)
	}
}

func TestSensitivityAddsUp(t *testing.T) {
	// Every ranged input of the built-in line and a 6-pull audit: the
	// parts' variances add up to about the joint variance of a full run
	// (the model is close to additive in its inputs; computed, with a
	// tolerance of our own for the interactions and the simulation noise),
	// and the audit leads the flake's spread for these invented pulls.
	pulls := inventedPulls(t, 6, 4)
	plan := DefaultPlan()
	sp := auditSpread(t, pulls, 548)
	rows, err := Sensitivity(sp, 548, plan, MCOptions{Seed: 2})
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) < 10 {
		t.Fatalf("%d inputs, want the audit and the line's ranges", len(rows))
	}
	parts := 0.0
	sum := 0.0
	for _, r := range rows {
		parts += r.FlakeSD * r.FlakeSD
		sum += r.FlakeShare
	}
	if math.Abs(sum-1) > 1e-12 {
		t.Errorf("flake shares sum to %g", sum)
	}
	mc, _ := Simulate(pulls, 548, plan, MCOptions{Seed: 2, Draws: 20000})
	joint := (mc.FlakeKg.P90 - mc.FlakeKg.P10) / (2 * 1.2816) // normal SD from the P10–P90
	if r := math.Sqrt(parts) / joint; r < 0.8 || r > 1.25 {
		t.Errorf("√Σ parts %g vs joint SD %g (ratio %g)", math.Sqrt(parts), joint, r)
	}
	if rows[0].Kind != InputAudit {
		t.Errorf("first driver %q, want the audit", rows[0].Name)
	}
}
