package yield

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"baleassay/assess"
)

// inventedPulls returns n invented pulls of about 100 kg around the
// typical bale's composition, each category scaled by a lognormal-ish
// factor, from a fixed seed.
func inventedPulls(t testing.TB, n int, seed uint64) []assess.Pull {
	rng := rand.New(rand.NewPCG(seed, 7))
	base := typicalBale(t)
	pulls := make([]assess.Pull, n)
	for i := range pulls {
		p := assess.NewPull(fmt.Sprintf("P%d", i+1))
		size := 12 + 16*rng.Float64()
		for j, v := range base {
			p.Kg[j] = v / 548 * size * math.Exp(0.5*rng.NormFloat64())
		}
		pulls[i] = p
	}
	return pulls
}

// auditSpread is the spread of the ratio estimate of pulls from a bale.
func auditSpread(t testing.TB, pulls []assess.Pull, baleKg float64) assess.Spread {
	t.Helper()
	r, err := assess.Assess(assess.Audit{Pulls: pulls, BaleKg: baleKg}, assess.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return r.Spread
}

func TestQuantileDefinition7(t *testing.T) {
	x := []float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10}
	s := summarize(x)
	// Source: Hyndman & Fan, Am. Stat. 50 (1996) 361, definition 7
	// (h = (n − 1)q + 1, 1-based): 1.9, 5.5, 9.1 for 1…10, worked by hand.
	if math.Abs(s.P10-1.9) > 1e-12 || math.Abs(s.P50-5.5) > 1e-12 || math.Abs(s.P90-9.1) > 1e-12 || s.Mean != 5.5 {
		t.Errorf("got %+v", s)
	}
	if one := summarize([]float64{3}); one.P10 != 3 || one.P90 != 3 {
		t.Errorf("one value: %+v", one)
	}
}

func TestSimulateReproducible(t *testing.T) {
	pulls := inventedPulls(t, 20, 1)
	plan := DefaultPlan()
	a, err := Simulate(pulls, 548, plan, MCOptions{Draws: 2000, Seed: 42})
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Simulate(pulls, 548, plan, MCOptions{Draws: 2000, Seed: 42})
	c, _ := Simulate(pulls, 548, plan, MCOptions{Draws: 2000, Seed: 43})
	// Source: common practice (a seeded run is reproducible).
	if a.FlakeKg != b.FlakeKg || a.HydroxylValue != b.HydroxylValue || a.GlycolysateKg != b.GlycolysateKg {
		t.Errorf("same seed, different numbers: %+v vs %+v", a.FlakeKg, b.FlakeKg)
	}
	if a.FlakeKg == c.FlakeKg {
		t.Errorf("different seeds gave identical flake summaries")
	}
	for _, s := range []Summary{a.FlakeKg, a.GlycolysateKg, a.HydroxylValue} {
		if !(s.P10 <= s.P50 && s.P50 <= s.P90) || !(s.P10 < s.P90) || s.N != 2000 {
			t.Errorf("summary out of order or degenerate: %+v", s)
		}
	}
	// The deterministic flake sits inside the 10–90 % band of the draws.
	// Source: common practice (a point estimate lies within its spread).
	rep, _ := Evaluate(pulls, 548, plan)
	if rep.Balance.FlakeKg < a.FlakeKg.P10 || rep.Balance.FlakeKg > a.FlakeKg.P90 {
		t.Errorf("point flake %g outside [%g, %g]", rep.Balance.FlakeKg, a.FlakeKg.P10, a.FlakeKg.P90)
	}
	for it, s := range a.SpecPass {
		if !(s >= 0 && s <= 1) {
			t.Errorf("%s pass share %g", FlakeItem(it), s)
		}
	}
}

func TestSimulateHomogeneousAuditHasNoSpread(t *testing.T) {
	// Pulls of one composition but different masses: every resample has
	// the same ratio estimate, so with the line fixed every draw equals
	// the deterministic result. Source: common practice (Σc/Σw of
	// proportional rows is their common proportion).
	base := typicalBale(t)
	var pulls []assess.Pull
	for i, size := range []float64{60, 90, 110, 140, 75} {
		p := assess.NewPull(fmt.Sprintf("H%d", i))
		for j, v := range base {
			p.Kg[j] = v / 548 * size
		}
		pulls = append(pulls, p)
	}
	plan := DefaultPlan()
	res, err := Simulate(pulls, 548, plan, MCOptions{Draws: 500, Seed: 3, FixedLine: true})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Evaluate(pulls, 548, plan)
	if err != nil {
		t.Fatal(err)
	}
	for name, c := range map[string][2]float64{
		"flake":       {res.FlakeKg.P10, rep.Balance.FlakeKg},
		"flake p90":   {res.FlakeKg.P90, rep.Balance.FlakeKg},
		"glycolysate": {res.GlycolysateKg.P50, rep.Glycolysate.GlycolysateKg},
		"OHV":         {res.HydroxylValue.Mean, rep.Glycolysate.HydroxylValue},
	} {
		if relErr(c[0], c[1]) > 1e-9 {
			t.Errorf("%s: draws %g, deterministic %g", name, c[0], c[1])
		}
	}
	// With the line's ranges drawn, the spread opens.
	v, _ := Simulate(pulls, 548, plan, MCOptions{Draws: 500, Seed: 3})
	if !(v.FlakeKg.P90 > v.FlakeKg.P10) {
		t.Errorf("varying the line gave no spread: %+v", v.FlakeKg)
	}
}

func TestDrawAllocatesNothing(t *testing.T) {
	s := newSimulator(auditSpread(t, inventedPulls(t, 20, 2), 548), 548, DefaultPlan(), MCOptions{Seed: 1})
	// Source: common practice (the allocation-free inner loop).
	if n := testing.AllocsPerRun(200, func() { s.draw() }); n != 0 {
		t.Errorf("draw allocates %v times", n)
	}
}

func TestSimulateErrors(t *testing.T) {
	pulls := inventedPulls(t, 5, 1)
	if _, err := Simulate(pulls, 548, DefaultPlan(), MCOptions{Draws: -1}); err == nil {
		t.Error("negative draws accepted")
	}
	if _, err := Simulate(pulls, math.NaN(), DefaultPlan(), MCOptions{}); err == nil {
		t.Error("NaN bale mass accepted")
	}
	if _, err := Simulate(nil, 548, DefaultPlan(), MCOptions{}); err == nil {
		t.Error("no pulls accepted")
	}
}

// BenchmarkSimulate is the speed goal: 10,000 draws of a 20-pull audit
// through the full built-in line and glycolysis.
func BenchmarkSimulate(b *testing.B) {
	pulls := inventedPulls(b, 20, 1)
	plan := DefaultPlan()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Simulate(pulls, 548, plan, MCOptions{Draws: 10000, Seed: 1}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkEvaluate is one deterministic evaluation of the same audit:
// ratio estimate, line, flake checks, glycolysis with its distribution.
// The ratio BenchmarkSimulate / (10,000 × this) is the Monte Carlo's cost
// per draw relative to a plain evaluation.
func BenchmarkEvaluate(b *testing.B) {
	pulls := inventedPulls(b, 20, 1)
	plan := DefaultPlan()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Evaluate(pulls, 548, plan); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkDraw is the inner loop alone.
func BenchmarkDraw(b *testing.B) {
	s := newSimulator(auditSpread(b, inventedPulls(b, 20, 1), 548), 548, DefaultPlan(), MCOptions{Seed: 1})
	b.ReportAllocs()
	for b.Loop() {
		s.draw()
	}
}
