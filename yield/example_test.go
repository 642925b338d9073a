package yield_test

import (
	"fmt"

	"baleassay/assess"
	"baleassay/yield"
)

// One kilogram of PET glycolysed with one kilogram of DEG, without
// catalyst. The printed figures are computed by our own formulas and
// checked against yield/testdata/ref/glycolysis_ref.py (528.70, p =
// 0.3558, 64.42 / 22.92 / 8.15 %, EW, Mn, weight shares).
func ExampleGlycolyse() {
	r := yield.DefaultRecipe(1, "DEG", 1)
	r.CatalystPct = 0
	g, err := yield.Glycolyse(r)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("OHV %.1f mg KOH/g, EW %.1f g/eq, Mn %.1f g/mol\n", g.HydroxylValue, g.EquivalentWeight, g.Mn)
	fmt.Printf("p = %.3f; n0 %.1f %%, n1 %.1f %%, n2 %.1f %%\n", g.Dist.P, 100*g.Dist.Number[0], 100*g.Dist.Number[1], 100*g.Dist.Number[2])
	fmt.Printf("free glycol %.1f wt %%, 3+ units %.1f wt %%\n", 100*g.Dist.FreeGlycolWt, 100*g.Dist.LongOligomerWt)
	// Output:
	// OHV 528.7 mg KOH/g, EW 106.1 g/eq, Mn 212.2 g/mol
	// p = 0.356; n0 64.4 %, n1 22.9 %, n2 8.2 %
	// free glycol 27.5 wt %, 3+ units 18.5 wt %
}

// A glycolysate blended with castor oil to 12 % recycled PET, foamed with
// water and TDI at index 105. Source of the printed figures:
// testdata/ref/glycolysis_ref.py (same arithmetic in Python).
func ExampleMixBlend() {
	tdi, _ := yield.LookupIsocyanate("TDI")
	r, err := yield.MixBlend(yield.Blend{
		Polyols:        []yield.Polyol{{Name: "glycolysate", HydroxylValue: 527.4, Kg: 20, PETShare: 0.499}, yield.Castor(1)},
		NCOPct:         tdi.NCOPct,
		Index:          105,
		WaterKg:        1.5,
		TargetPETShare: 0.12,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("castor %.2f kg; blend %.2f kg at OHV %.1f\n", r.Polyols[1].Kg, r.BlendKg, r.HydroxylValue)
	fmt.Printf("TDI %.2f kg; recycled PET %.1f %% of the blend, %.1f %% of the foam\n", r.IsocyanateKg, 100*r.RecycledPETShare, 100*r.FormulationPETShare)
	// Output:
	// castor 63.17 kg; blend 83.17 kg at OHV 251.4
	// TDI 49.30 kg; recycled PET 12.0 % of the blend, 7.4 % of the foam
}

// Which categories sink in a water bath. From memory (handbook
// densities: polyolefins float, PET and PVC sink); labels 0.90–1.40
// straddle water and split by overlap, (1.40 − 1.00)/(1.40 − 0.90).
func ExampleSinkShare() {
	for _, key := range []string{"pet_clear", "pvc", "closures", "labels"} {
		c, _ := assess.LookupCategory(key)
		s, _ := yield.SinkShare(c.Density, 1.00)
		fmt.Printf("%s: %.0f %% sinks\n", key, 100*s)
	}
	// Output:
	// pet_clear: 100 % sinks
	// pvc: 100 % sinks
	// closures: 0 % sinks
	// labels: 80 % sinks
}

// An invented bale of 500 kg through the built-in line. The printed
// figures are this model's own at the line's midpoints (regression
// values, not outside data); the outside checks are in line_test.go.
func ExampleModel_Run() {
	m, err := yield.Compile(yield.BuiltinLine())
	if err != nil {
		fmt.Println(err)
		return
	}
	kg := make([]float64, assess.NumCategories())
	for key, v := range map[string]float64{"pet_clear": 440, "closures": 20, "labels": 10, "pvc": 1, "liquid": 15, "fines": 14} {
		i, _ := assess.CategoryIndex(key)
		kg[i] = v
	}
	b, err := m.Run(kg)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("flake %.1f kg (%.1f %% of the bale), PVC %.0f ppm, closures %.0f ppm\n", b.FlakeKg, 100*b.FlakeShare, b.ResidualPPM()["pvc"], b.ResidualPPM()["closures"])
	fmt.Printf("floats %.1f kg, balance closes: %v\n", b.StreamKg("floats"), b.Closure < yield.ClosureTolerance)
	// Output:
	// flake 410.6 kg (82.1 % of the bale), PVC 13 ppm, closures 17 ppm
	// floats 27.7 kg, balance closes: true
}

// Three invented pulls from a 540 kg bale, carried through the built-in
// line and glycolysis by 10,000 bootstrap draws with a fixed seed. The
// printed figures are this model's own (regression values): the same
// seed gives the same numbers.
func ExampleSimulate() {
	mk := func(label string, kg map[string]float64) assess.Pull {
		p := assess.NewPull(label)
		for k, v := range kg {
			if err := p.Set(k, v); err != nil {
				panic(err)
			}
		}
		return p
	}
	pulls := []assess.Pull{
		mk("A", map[string]float64{"pet_clear": 21.0, "pet_green": 2.1, "closures": 0.9, "labels": 0.5, "pvc": 0.10, "liquid": 0.6}),
		mk("B", map[string]float64{"pet_clear": 18.5, "pet_green": 3.0, "closures": 1.1, "labels": 0.6, "paper": 0.4, "liquid": 0.9}),
		mk("C", map[string]float64{"pet_clear": 24.2, "pet_green": 1.2, "closures": 0.8, "labels": 0.4, "hdpe": 0.7, "fines": 0.5}),
	}
	res, err := yield.Simulate(pulls, 540, yield.DefaultPlan(), yield.MCOptions{Seed: 2026})
	if err != nil {
		fmt.Println(err)
		return
	}
	f, g, pet := res.FlakeKg, res.GlycolysateKg, res.TargetPET
	fmt.Printf("target PET P5 %.1f %%, P95 %.1f %%\n", 100*pet.P5, 100*pet.P95)
	fmt.Printf("flake kg P10 %.0f, P50 %.0f, P90 %.0f\n", f.P10, f.P50, f.P90)
	fmt.Printf("glycolysate kg P10 %.0f, P50 %.0f, P90 %.0f\n", g.P10, g.P50, g.P90)
	fmt.Printf("hydroxyl value P50 %.0f mg KOH/g\n", res.HydroxylValue.P50)
	// Output:
	// target PET P5 87.0 %, P95 93.3 %
	// flake kg P10 443, P50 455, P90 467
	// glycolysate kg P10 881, P50 905, P90 929
	// hydroxyl value P50 527 mg KOH/g
}
