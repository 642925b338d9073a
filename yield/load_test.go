package yield

// Source: invented loads and pulls; the expected figures are computed by
// our own formulas (Cochran's two-stage estimator as in assess, and the
// yield model), the tolerances are ours.

import (
	"fmt"
	"math"
	"testing"

	"baleassay/assess"
)

// inventedLoad is a load of 28 bales of which n were audited with 4
// pulls each (invented pulls, one seed per bale).
func inventedLoad(t testing.TB, n int) assess.Load {
	l := assess.Load{Bales: 28}
	for i := range n {
		pulls := inventedPulls(t, 4, uint64(100+i))
		l.Audited = append(l.Audited, assess.LoadBale{Label: fmt.Sprintf("B%d", i+1), Audit: assess.Audit{Pulls: pulls, BaleKg: 520 + 10*float64(i)}})
	}
	return l
}

func TestLoadYield(t *testing.T) {
	for _, n := range []int{3, 6} {
		lr, err := assess.AssessLoad(inventedLoad(t, n), assess.Options{})
		if err != nil {
			t.Fatal(err)
		}
		rep, err := EvaluateLoad(lr, DefaultPlan())
		if err != nil {
			t.Fatal(err)
		}
		// The load's flake is the line applied to the load's composition
		// at its mass: a share of the load like a bale's (computed).
		if rep.BaleKg != lr.BaleKg || !(rep.Balance.FlakeShare > 0.5 && rep.Balance.FlakeShare < 1) {
			t.Errorf("%d bales: load %g kg, flake share %g", n, rep.BaleKg, rep.Balance.FlakeShare)
		}
		mc, err := SimulateLoad(lr, DefaultPlan(), MCOptions{Draws: 20000, Seed: 5, FixedLine: true})
		if err != nil {
			t.Fatal(err)
		}
		pet := lr.Group(assess.GroupPET)
		ratio := (mc.TargetPET.P95 - mc.TargetPET.P5) / (pet.High - pet.Low)
		t.Logf("%d of 28 bales audited: load 90 %% [%.4f, %.4f], drawn P5–P95 [%.4f, %.4f], ratio %.3f", n, pet.Low, pet.High, mc.TargetPET.P5, mc.TargetPET.P95, ratio)
		// The same 15 % agreement as a bale's (TestSpreadMatchesAudit).
		if mc.Spread != SpreadAudit || math.Abs(ratio-1) > 0.15 {
			t.Errorf("%d bales: width ratio %.3f, spread %v", n, ratio, mc.Spread)
		}
	}
}
