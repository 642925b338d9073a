package assess

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// refAudit is the four-pull example of testdata/ref/ratio_example.py: PVC
// masses c in pulls of mass w, the rest of each pull clear PET.
func refAudit() Audit {
	w := []float64{100, 120, 80, 110}
	c := []float64{0.50, 0.90, 0.20, 0.60}
	a := Audit{BaleKg: 820}
	for i := range w {
		p := NewPull(string(rune('A' + i)))
		_ = p.Set("pvc", c[i])
		_ = p.Set("pet_clear", w[i]-c[i])
		a.Pulls = append(a.Pulls, p)
	}
	return a
}

func TestRatioEstimatorHandWorked(t *testing.T) {
	// Source: testdata/ref/ratio_example.py, hand-worked from Cochran,
	// Sampling Techniques, 3rd ed., eq. 6.9 (its printed output).
	const (
		wantR      = 0.0053658536585365849
		wantSE     = 0.00068866227250139703
		wantMean   = 0.0051136363636363636
		wantSEMean = 0.0007261473300257885
	)
	r, err := Assess(refAudit(), Options{Method: MethodRatio, Confidence: 0.90})
	if err != nil {
		t.Fatal(err)
	}
	pvc, _ := r.Category("pvc")
	if math.Abs(pvc.Fraction-wantR) > 1e-15 || math.Abs(pvc.SE-wantSE)/wantSE > 1e-12 {
		t.Errorf("ratio: r = %.17g se = %.17g, want %.17g %.17g", pvc.Fraction, pvc.SE, wantR, wantSE)
	}
	if r.SampledShare != 0.5 {
		t.Errorf("f = %g, want 0.5", r.SampledShare)
	}
	// Interval = r ± t(0.95, 3)·SE; t = 2.353 from the NIST/SEMATECH table.
	// Source: NIST/SEMATECH e-Handbook §1.3.6.7.2.
	if half := (pvc.High - pvc.Low) / 2; math.Abs(half-2.353*wantSE) > 0.0005*wantSE*2.353 {
		t.Errorf("half-width %g, want t·SE = %g", half, 2.353*wantSE)
	}
	m, _ := Assess(refAudit(), Options{Method: MethodMean, Confidence: 0.90})
	pm, _ := m.Category("pvc")
	if math.Abs(pm.Fraction-wantMean) > 1e-15 || math.Abs(pm.SE-wantSEMean)/wantSEMean > 1e-12 {
		t.Errorf("mean: x̄ = %.17g se = %.17g, want %.17g %.17g", pm.Fraction, pm.SE, wantMean, wantSEMean)
	}
}

// randomAudit makes n pulls of 80–130 kg with a spread of contaminants.
func randomAudit(rng *rand.Rand, n int) Audit {
	a := Audit{}
	for i := range n {
		p := NewPull("P" + string(rune('0'+i%10)) + string(rune('a'+i/10)))
		total := 80 + 50*rng.Float64()
		for j := range p.Kg {
			if rng.IntN(3) > 0 {
				p.Kg[j] = total * 0.02 * rng.Float64()
			}
		}
		p.Kg[0] += total * 0.6
		a.Pulls = append(a.Pulls, p)
	}
	a.BaleKg = a.SampledKg() * (2 + 10*rng.Float64())
	return a
}

func TestAssessInvariants(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := range 200 {
		a := randomAudit(rng, 2+rng.IntN(30))
		for _, m := range []Method{MethodRatio, MethodMean} {
			r, err := Assess(a, Options{Method: m})
			if err != nil {
				t.Fatal(err)
			}
			var sumCat, sumGrp float64
			for _, s := range r.Categories {
				sumCat += s.Fraction
				if !(s.Low <= s.Fraction && s.Fraction <= s.High) || s.Low < 0 || s.High > 1 {
					t.Fatalf("trial %d %v: %s interval [%g, %g] misses %g", trial, m, s.Key, s.Low, s.High, s.Fraction)
				}
			}
			for _, s := range r.Groups {
				sumGrp += s.Fraction
			}
			if math.Abs(sumCat-1) > 1e-12 || math.Abs(sumGrp-1) > 1e-12 {
				t.Fatalf("trial %d %v: fractions sum to %g (categories), %g (groups)", trial, m, sumCat, sumGrp)
			}
			// Wider at a higher confidence.
			r99, _ := Assess(a, Options{Method: m, Confidence: 0.99})
			for j := range r.Categories {
				lo, hi := r.Categories[j], r99.Categories[j]
				if hi.High-hi.Low < lo.High-lo.Low-1e-15 {
					t.Fatalf("trial %d: %s narrower at 99 %% than at 90 %%", trial, lo.Key)
				}
			}
		}
	}
}

func TestMorePullsSameSpreadNarrower(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	a := randomAudit(rng, 6)
	a.BaleKg = 0 // no finite-population correction, so only n changes
	double := Audit{}
	for k := range 2 {
		for _, p := range a.Pulls {
			q := p
			q.Label = p.Label + string(rune('x'+k))
			double.Pulls = append(double.Pulls, q)
		}
	}
	r1, err1 := Assess(a, Options{})
	r2, err2 := Assess(double, Options{})
	if err1 != nil || err2 != nil {
		t.Fatal(err1, err2)
	}
	compared := 0
	for j := range r1.Categories {
		if r1.Categories[j].Kind != IntervalT {
			continue
		}
		w1 := r1.Categories[j].High - r1.Categories[j].Low
		w2 := r2.Categories[j].High - r2.Categories[j].Low
		if w1 > 0 && !(w2 < w1) {
			t.Errorf("%s: width %g with 12 pulls, %g with 6", r1.Categories[j].Key, w2, w1)
		}
		compared++
	}
	if compared == 0 {
		t.Fatal("no category had an interval to compare")
	}
}

func TestWholeBaleSortedZeroWidth(t *testing.T) {
	a := refAudit()
	a.BaleKg = a.SampledKg()
	r, err := Assess(a, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range r.Categories {
		if s.High != s.Low || s.SE != 0 {
			t.Errorf("%s: f = 1 gives [%g, %g]", s.Key, s.Low, s.High)
		}
	}
	one := Audit{Pulls: a.Pulls[:1], BaleKg: a.Pulls[0].TotalKg()}
	r1, _ := Assess(one, Options{})
	if s, _ := r1.Category("pvc"); !s.HasInterval || s.Low != s.High {
		t.Errorf("one pull that is the whole bale: %+v", s)
	}
}

func TestOnePullNoInterval(t *testing.T) {
	a := refAudit()
	a.Pulls = a.Pulls[:1]
	r, err := Assess(a, Options{})
	if err != nil {
		t.Fatal(err)
	}
	s, _ := r.Category("pvc")
	if s.HasInterval || !math.IsNaN(s.SE) {
		t.Errorf("one pull gave an interval: %+v", s)
	}
	sv, _ := Judge(r, mustSpec(t, "glycol-feed"))
	if sv.Verdict != Undecided {
		t.Errorf("one pull: verdict %v, want undecided", sv.Verdict)
	}
	adv := Advise(r, &sv, DefaultRelPrecision)
	if adv.Kind != AdviceAnotherPull || adv.Need.Total != 2 || adv.Need.More != 1 {
		t.Errorf("one pull: advice %v %+v, want another pull", adv.Kind, adv.Need)
	}
}

func TestAuditValidation(t *testing.T) {
	good := refAudit()
	cases := map[string]struct {
		mod  func(*Audit)
		want error
	}{
		"negative":   {func(a *Audit) { a.Pulls[1].Kg[3] = -0.1 }, ErrNegativeMass},
		"nan":        {func(a *Audit) { a.Pulls[1].Kg[3] = math.NaN() }, ErrNonFiniteMass},
		"inf":        {func(a *Audit) { a.Pulls[1].Kg[3] = math.Inf(1) }, ErrNonFiniteMass},
		"empty pull": {func(a *Audit) { a.Pulls[2].Kg = make([]float64, NumCategories()) }, ErrEmptyPull},
		"duplicate":  {func(a *Audit) { a.Pulls[2].Label = a.Pulls[0].Label }, ErrDuplicatePull},
		"light bale": {func(a *Audit) { a.BaleKg = 400 }, ErrBaleLighter},
		"no pulls":   {func(a *Audit) { a.Pulls = nil }, ErrNoPulls},
	}
	for name, c := range cases {
		a := good
		a.Pulls = make([]Pull, len(good.Pulls))
		for i, p := range good.Pulls {
			p.Kg = append([]float64(nil), p.Kg...)
			a.Pulls[i] = p
		}
		c.mod(&a)
		if _, err := Assess(a, Options{}); !errors.Is(err, c.want) {
			t.Errorf("%s: err = %v, want %v", name, err, c.want)
		}
	}
	if _, err := Assess(good, Options{Confidence: 1}); !errors.Is(err, ErrBadConfidence) {
		t.Errorf("confidence 1: %v", err)
	}
}
