package assess

// Source: invented test inputs; each expected number is computed by our own
// formula (the rules of Advise and the ratio estimator), not an outside value.

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// The audits below are invented inputs; the expected advice follows from
// the rules of Advise (the spec table and the advice must agree).

func TestAdviceFailedNamesFailingLimits(t *testing.T) {
	spec := Spec{Name: "two", Limits: []Limit{{Item: "pvc", Max: frac(0.01)}, {Item: "pla", Max: frac(0.01)}},
		Grades: []Grade{{"first", 0.9}, {"off", 0}}}
	r := shareWith("pvc", 0.02, 0.015, 0.025, 0.004, 5)
	sv, _ := Judge(r, spec)
	adv := Advise(r, &sv, DefaultRelPrecision)
	if adv.Kind != AdviceFailed || len(adv.Failing) != 1 || adv.Failing[0].Item != "pvc" {
		t.Fatalf("advice %v failing %v", adv.Kind, adv.Failing)
	}
	if !strings.Contains(adv.Why, "pvc ≤ 1 %") || !strings.Contains(adv.Why, "not needed") {
		t.Errorf("why: %q", adv.Why)
	}
	if sv.Grade != "" || sv.GradeState != GradeWithheld {
		t.Errorf("failed bale graded %q (%v)", sv.Grade, sv.GradeState)
	}
}

func TestAdviceAgreesWithTable(t *testing.T) {
	// Two undecided limits: the advice is the one needing more pulls, and
	// its figure is exactly the table's.
	a := refAudit()
	a.BaleKg = 0
	r, _ := Assess(a, Options{})
	pvc, _ := r.Category("pvc")
	pet := r.Group(GroupPET)
	spec := Spec{Name: "two", Limits: []Limit{
		{Item: "pvc", Max: frac(pvc.Fraction + 0.6*(pvc.High-pvc.Fraction))},
		{Item: "pet", Min: frac(pet.Fraction - 0.9*(pet.Fraction-pet.Low))},
	}}
	sv, _ := Judge(r, spec)
	undecided := 0
	most := 0
	for _, l := range sv.Limits {
		if l.Verdict == Undecided {
			undecided++
			most = max(most, l.Need.Total)
		}
	}
	if undecided != 2 {
		t.Fatalf("setup: %d undecided limits, want 2", undecided)
	}
	adv := Advise(r, &sv, DefaultRelPrecision)
	if adv.Kind != AdviceDecide || adv.Governing == nil || adv.Need != adv.Governing.Need || adv.Need.Total != most {
		t.Errorf("advice %v need %+v, table's most %d", adv.Kind, adv.Need, most)
	}
}

func TestAdvicePassedAndPrecision(t *testing.T) {
	r := shareWith("pvc", 0.004, 0.002, 0.006, 0.004, 5)
	sv, _ := Judge(r, Spec{Name: "t", Limits: []Limit{{Item: "pvc", Max: frac(0.01)}}})
	if adv := Advise(r, &sv, DefaultRelPrecision); adv.Kind != AdvicePassed || adv.Need.More != 0 {
		t.Errorf("passing bale: %v %+v", adv.Kind, adv.Need)
	}
	res, _ := Assess(refAudit(), Options{})
	adv := Advise(res, nil, DefaultRelPrecision)
	pet := res.Group(GroupPET)
	want, _ := PullsForPrecision(pet.SD, pet.Fraction, DefaultRelPrecision, res.Confidence, res.Population())
	if adv.Kind != AdvicePrecision || adv.Need != want {
		t.Errorf("no spec: %v %+v, want %+v", adv.Kind, adv.Need, want)
	}
}

func TestSpecTraps(t *testing.T) {
	// A contaminant maximum above 0.2 is a percentage written as a
	// fraction unless confirmed; a maximum on target PET is not a trap.
	_, err := ParseSpec([]byte(`{"name":"x","limits":[{"item":"pvc","max":0.5}]}`))
	if !errors.Is(err, ErrBadSpec) || !strings.Contains(err.Error(), "write fractions: 0.005 for 0.5 %") {
		t.Errorf("pvc max 0.5: %v", err)
	}
	if strings.HasPrefix(err.Error(), "assess:") {
		t.Errorf("message carries a package prefix: %v", err)
	}
	if _, err := ParseSpec([]byte(`{"name":"x","limits":[{"item":"pvc","max":0.5,"allow_large_max":true}]}`)); err != nil {
		t.Errorf("confirmed large max refused: %v", err)
	}
	if _, err := ParseSpec([]byte(`{"name":"x","limits":[{"item":"pet","min":0.5,"max":0.99}]}`)); err != nil {
		t.Errorf("pet max refused: %v", err)
	}
	if _, err := ParseSpec([]byte(`{"name":"x","limits":[{"item":"pet","min":72}]}`)); !errors.Is(err, ErrBadSpec) || !strings.Contains(err.Error(), "write fractions") {
		t.Errorf("pet min 72: %v", err)
	}
}

func TestCountAttached(t *testing.T) {
	// refAudit plus closures: counting them with the target raises the
	// "pet" share by exactly their ratio estimate (computed by our own
	// formula: the estimator is linear in the masses).
	a := refAudit()
	for i := range a.Pulls {
		_ = a.Pulls[i].Set("closures", 2+float64(i))
	}
	r, _ := Assess(a, Options{})
	cl, _ := r.Category("closures")
	if d := r.TargetAttached.Fraction - r.Group(GroupPET).Fraction - cl.Fraction; math.Abs(d) > 1e-15 {
		t.Errorf("attached share off by %g", d)
	}
	spec := Spec{Name: "a", CountAttached: true, Limits: []Limit{{Item: "pet", Min: frac(r.Group(GroupPET).High + 0.001)}}}
	sv, _ := Judge(r, spec)
	if !sv.CountAttached || sv.Limits[0].Share.Fraction != r.TargetAttached.Fraction {
		t.Errorf("count_attached not applied: %+v", sv.Limits[0].Share)
	}
}

func TestPieceSharesNeedTotal(t *testing.T) {
	// Counting only PVC pieces (8) and closures (1) gives no share; with
	// 400 pieces examined the share is 8/400 and its Clopper–Pearson
	// interval; a counted category with none found gets its bound.
	a := refAudit()
	_ = a.Pulls[0].SetPieces("pvc", 8)
	_ = a.Pulls[0].SetPieces("closures", 1)
	_ = a.Pulls[0].SetPieces("pla", 0)
	r, _ := Assess(a, Options{})
	for _, p := range r.Pieces {
		if p.Basis != BasisCounts || p.Fraction != 0 {
			t.Errorf("%s without a total: basis %v fraction %g", p.Key, p.Basis, p.Fraction)
		}
	}
	if len(r.Pieces) != 3 {
		t.Fatalf("%d piece rows, want 3", len(r.Pieces))
	}
	if p := r.Pieces[0]; p.Key != "pvc" || p.PerPull != 8 || math.Abs(p.Per100Kg-8) > 1e-12 {
		t.Errorf("pvc per pull %g per 100 kg %g, want 8 and 8 (100 kg pull)", p.PerPull, p.Per100Kg)
	}
	a.Pulls[0].TotalPieces = 400
	r, _ = Assess(a, Options{})
	pvc := r.Pieces[0]
	if pvc.Basis != BasisExamined || pvc.Fraction != 8.0/400 || pvc.ClopperPearson != ClopperPearson(8, 400, 0.90) {
		t.Errorf("pvc with total: %+v", pvc)
	}
	var pla PieceShare
	for _, p := range r.Pieces {
		if p.Key == "pla" {
			pla = p
		}
	}
	if !strings.HasPrefix(pla.NoneText(), "none of 400 pieces examined: at most ") {
		t.Errorf("pla none text %q", pla.NoneText())
	}
	a.Pulls[0].TotalPieces = 5
	if _, err := Assess(a, Options{}); !errors.Is(err, ErrBadTotal) {
		t.Errorf("total below the counts: %v", err)
	}
}

func TestSpreadReproducesSE(t *testing.T) {
	// Σ_k Terms[k][j]² must be SE² of every category (Cochran eq. 6.9 for
	// the ratio, D5231's s²/n for the mean, both with 1 − f), and every
	// term must sum to 0 over the categories.
	for _, m := range []Method{MethodRatio, MethodMean} {
		r, _ := Assess(refAudit(), Options{Method: m})
		if !r.Spread.Varies() || r.Spread.DF != 3 {
			t.Fatalf("%v: spread %+v", m, r.Spread.DF)
		}
		checked := 0
		for j, c := range r.Categories {
			v := 0.0
			for _, term := range r.Spread.Terms {
				v += term[j] * term[j]
			}
			if c.Kind == IntervalT {
				if math.Abs(math.Sqrt(v)-c.SE) > 1e-12*c.SE {
					t.Errorf("%v %s: √Σterm² = %g, SE = %g", m, c.Key, math.Sqrt(v), c.SE)
				}
				checked++
			}
		}
		if checked == 0 {
			t.Fatalf("%v: no category with an interval", m)
		}
		for k, term := range r.Spread.Terms {
			s := 0.0
			for _, v := range term {
				s += v
			}
			if math.Abs(s) > 1e-15 {
				t.Errorf("%v term %d sums to %g", m, k, s)
			}
		}
	}
}
