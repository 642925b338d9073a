package assess

import (
	"errors"
	"math"
	"testing"
)

// refLoad is the load of testdata/ref/load_example.py: 3 audited bales of
// a 24-bale load, PVC in pulls of clear PET (invented masses).
func refLoad() Load {
	mk := func(label string, kg float64, pulls [][2]float64) LoadBale {
		a := Audit{BaleKg: kg}
		for i, p := range pulls {
			q := NewPull(string(rune('1' + i)))
			_ = q.Set("pvc", p[1])
			_ = q.Set("pet_clear", p[0]-p[1])
			a.Pulls = append(a.Pulls, q)
		}
		return LoadBale{Label: label, Audit: a}
	}
	return Load{Bales: 24, Audited: []LoadBale{
		mk("A", 540, [][2]float64{{20, 0.10}, {22, 0.05}, {19, 0.12}}),
		mk("B", 512, [][2]float64{{21, 0.30}, {20, 0.22}}),
		mk("C", 575, [][2]float64{{23, 0.02}, {18, 0.04}, {20, 0.00}}),
	}}
}

func TestLoadHandWorked(t *testing.T) {
	// Source: testdata/ref/load_example.py, hand-worked from Cochran,
	// Sampling Techniques, 3rd ed., ch. 10–11 (its printed output).
	const (
		wantShare = 0.0058078649302417936
		wantSE    = 0.0032075697682445695
	)
	lr, err := AssessLoad(refLoad(), Options{})
	if err != nil {
		t.Fatal(err)
	}
	pvc, _ := lr.Category("pvc")
	if math.Abs(pvc.Fraction-wantShare) > 1e-15 || math.Abs(pvc.SE-wantSE) > 1e-12*wantSE {
		t.Errorf("pvc %.17g se %.17g, want %.17g %.17g", pvc.Fraction, pvc.SE, wantShare, wantSE)
	}
	// Half-width t(0.95; 2)·SE; t = 2.920 in the NIST/SEMATECH e-Handbook
	// table (§1.3.6.7.2), printed to 4 digits: agree to its rounding.
	if half := pvc.High - pvc.Fraction; math.Abs(half-2.920*wantSE) > 0.0005*wantSE {
		t.Errorf("half-width %g, want %g", half, 2.920*wantSE)
	}
	if lr.Audited != 3 || lr.Bales != 24 || math.Abs(lr.F1-0.125) > 1e-15 {
		t.Errorf("audited %d of %d, f1 %g", lr.Audited, lr.Bales, lr.F1)
	}
	// Fractions sum to 1 and the spread reproduces every SE.
	sum := 0.0
	checked := 0
	for j, c := range lr.Categories {
		sum += c.Fraction
		if c.Kind != IntervalT {
			continue
		}
		checked++
		v := 0.0
		for _, term := range lr.Spread.Terms {
			v += term[j] * term[j]
		}
		if math.Abs(math.Sqrt(v)-c.SE) > 1e-12*c.SE {
			t.Errorf("%s: spread %g, SE %g", c.Key, math.Sqrt(v), c.SE)
		}
	}
	if math.Abs(sum-1) > 1e-12 || checked < 2 {
		t.Errorf("fractions sum to %g; %d spreads checked", sum, checked)
	}
}

func TestLoadOnePullBorrowsPooledSpread(t *testing.T) {
	// Source: testdata/ref/load_example.py, second case (bale C with one
	// pull borrows the pooled within-bale variance of A and B).
	const wantShare, wantSE = 0.0057675614449979084, 0.0032447823462058351
	l := refLoad()
	l.Audited[2].Audit.Pulls = l.Audited[2].Audit.Pulls[:1]
	lr, err := AssessLoad(l, Options{})
	if err != nil {
		t.Fatal(err)
	}
	pvc, _ := lr.Category("pvc")
	if math.Abs(pvc.Fraction-wantShare) > 1e-15 || math.Abs(pvc.SE-wantSE) > 1e-12*wantSE || !lr.PooledWithin {
		t.Errorf("pvc %.17g se %.17g pooled %v, want %.17g %.17g", pvc.Fraction, pvc.SE, lr.PooledWithin, wantShare, wantSE)
	}
}

func TestLoadOneBaleAsksForAnother(t *testing.T) {
	l := refLoad()
	l.Audited = l.Audited[:1]
	lr, err := AssessLoad(l, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if pvc, _ := lr.Category("pvc"); pvc.HasInterval {
		t.Errorf("one bale of 24 gave an interval: %+v", pvc)
	}
	sv, _ := JudgeLoad(lr, mustSpec(t, "glycol-feed"))
	adv := AdviseLoad(lr, &sv, 0)
	if sv.Verdict != Undecided || adv.Kind != AdviceAnotherPull || adv.Route != RouteMoreBales {
		t.Errorf("one bale: verdict %v advice %v %v", sv.Verdict, adv.Kind, adv.Route)
	}
}

func TestLoadEveryBaleAudited(t *testing.T) {
	// With every bale of the load audited the between-bale term vanishes
	// (1 − f₁ = 0): the load's variance is the within-bale term alone,
	// Σ M_i²·v_i / (n·M̄)² (Cochran's formula with f₁ = 1, computed).
	l := refLoad()
	l.Bales = 3
	lr, _ := AssessLoad(l, Options{})
	want := 0.0
	for i, r := range lr.PerBale {
		pvc, _ := r.Category("pvc")
		m := l.Audited[i].Audit.BaleKg
		want += m * m * pvc.SE * pvc.SE
	}
	want = math.Sqrt(want) / (3 * lr.MeanBaleKg)
	pvc, _ := lr.Category("pvc")
	if math.Abs(pvc.SE-want) > 1e-12*want {
		t.Errorf("se %g, want %g", pvc.SE, want)
	}
	if df := lr.Spread.DF; df != 1 {
		t.Errorf("df %d, want 1 (the smallest m_i − 1)", df)
	}
}

func TestLoadAdviceRoutes(t *testing.T) {
	// A PVC limit just above the load's estimate is undecided; the advice
	// names a route whose figure decides it by the projection it used.
	lr, _ := AssessLoad(refLoad(), Options{})
	pvc, _ := lr.Category("pvc")
	spec := Spec{Name: "p", Limits: []Limit{{Item: "pvc", Max: frac(pvc.Fraction + 0.5*(pvc.High-pvc.Fraction))}}}
	sv, err := JudgeLoad(lr, spec)
	if err != nil {
		t.Fatal(err)
	}
	if sv.Verdict != Undecided {
		t.Fatalf("setup: %v", sv.Verdict)
	}
	adv := AdviseLoad(lr, &sv, 0)
	if adv.Kind != AdviceDecide || adv.Bales != sv.Limits[0].Need {
		t.Fatalf("advice %v bales %+v, table %+v", adv.Kind, adv.Bales, sv.Limits[0].Need)
	}
	gap := math.Abs(pvc.Fraction - sv.Limits[0].Limit)
	c := lr.Components["pvc"]
	if adv.Bales.Known() {
		n := adv.Bales.Total
		if v := LoadVariance(c, n, lr.Bales, lr.MeanPulls, lr.PullShare); StudentT(0.9, n-1)*math.Sqrt(v) > gap {
			t.Errorf("%d bales do not decide: half-width %g > %g", n, StudentT(0.9, n-1)*math.Sqrt(v), gap)
		}
	}
	if adv.Route == RouteNone {
		t.Errorf("no route: %s", adv.Why)
	}
}

func TestLoadValidation(t *testing.T) {
	l := refLoad()
	l.Bales = 2
	if _, err := AssessLoad(l, Options{}); !errors.Is(err, ErrBadLoad) {
		t.Errorf("3 audited of 2: %v", err)
	}
	l = refLoad()
	l.Audited[1].Audit.BaleKg = 0
	if _, err := AssessLoad(l, Options{}); !errors.Is(err, ErrBadLoad) {
		t.Errorf("bale without mass: %v", err)
	}
	l = refLoad()
	l.Audited[1].Label = "A"
	if _, err := AssessLoad(l, Options{}); !errors.Is(err, ErrBadLoad) {
		t.Errorf("duplicate label: %v", err)
	}
	l = refLoad()
	l.Audited[0].Audit.Pulls[0].Kg[0] = -1
	if _, err := AssessLoad(l, Options{}); !errors.Is(err, ErrNegativeMass) {
		t.Errorf("negative mass: %v", err)
	}
	if _, err := AssessLoad(Load{Bales: 5}, Options{}); !errors.Is(err, ErrBadLoad) {
		t.Errorf("nothing audited: %v", err)
	}
}
