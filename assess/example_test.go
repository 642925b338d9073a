package assess_test

import (
	"fmt"
	"strings"

	"baleassay/assess"
)

func ExampleAssess() {
	// Source: the same masses as the hand-worked example in
	// testdata/ref/ratio_example.py: r = 0.005366, SE = 0.000689,
	// t(0.95, 3) = 2.353.
	csv := `pull,pet_clear,pvc,closures
A,95.0,0.5,4.5
B,112.0,0.9,7.1
C,76.5,0.2,3.3
D,104.0,0.6,5.4
`
	pulls, err := assess.ReadPulls(strings.NewReader(csv), "example.csv")
	if err != nil {
		fmt.Println(err)
		return
	}
	res, _ := assess.Assess(assess.Audit{Pulls: pulls, BaleKg: 820}, assess.Options{})
	pvc, _ := res.Category("pvc")
	fmt.Printf("PVC %.3f %% (90 %%: %.3f–%.3f %%)\n", 100*pvc.Fraction, 100*pvc.Low, 100*pvc.High)
	// Output:
	// PVC 0.537 % (90 %: 0.375–0.699 %)
}

// The masses are invented; the liquid interval (1.26–3.36 %) was checked
// by hand with t(0.95, 2) = 2.920 (Source: NIST/SEMATECH e-Handbook
// §1.3.6.7.2), so it straddles the 2 % limit.
func ExampleJudge() {
	csv := `pull,pet_clear,pet_green,pvc,liquid
A,20.0,1.0,0.02,0.5
B,22.5,0.8,0.01,0.4
C,18.0,1.2,0.03,0.6
`
	pulls, _ := assess.ReadPulls(strings.NewReader(csv), "example.csv")
	res, _ := assess.Assess(assess.Audit{Pulls: pulls, BaleKg: 500}, assess.Options{})
	spec, _ := assess.BuiltinSpec("glycol-feed")
	sv, _ := assess.Judge(res, spec)
	fmt.Println("verdict:", sv.Verdict, "grade:", sv.Grade)
	for _, l := range sv.Limits {
		fmt.Printf("%s %s %.2f: %s\n", l.Item, l.Bound, l.Limit, l.Verdict)
	}
	// Output:
	// verdict: undecided grade: first
	// pet min 0.72: pass
	// pvc max 0.01: pass
	// pla max 0.02: pass
	// liquid max 0.02: undecided
	// non_plastics max 0.06: pass
	// hazard zero 0.00: pass
}

func ExamplePullsForPrecision() {
	// s = 0.004, x̄ = 0.01, ±10 % at 90 %, six pulls taken; first with the
	// bale mass unknown, then for a 548 kg bale in pulls of 21.5 kg (the
	// finite-population correction). Computed by our own formula.
	n, _ := assess.PullsForPrecision(0.004, 0.01, 0.10, 0.90, assess.Population{Taken: 6})
	fmt.Println(n.Text())
	n, _ = assess.PullsForPrecision(0.004, 0.01, 0.10, 0.90, assess.Population{PullKg: 21.5, BaleKg: 548, Taken: 6})
	fmt.Println(n.Text())
	// Output:
	// 40 more pulls (46 in all)
	// 11 more pulls (17 in all)
}
