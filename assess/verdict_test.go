package assess

import (
	"errors"
	"math"
	"testing"
)

func sqrtInt(n int) float64 { return math.Sqrt(float64(n)) }

func mustSpec(t testing.TB, name string) Spec {
	t.Helper()
	s, ok := BuiltinSpec(name)
	if !ok {
		t.Fatalf("no built-in spec %q", name)
	}
	return s
}

// shareWith builds a result whose item key has the given interval.
func shareWith(key string, f, lo, hi, sd float64, pulls int) Result {
	r := Result{Pulls: pulls, PullKg: 20, Confidence: 0.9, Categories: make([]Share, NumCategories()), Groups: make([]Share, len(Groups()))}
	for i, c := range catalogue {
		r.Categories[i] = Share{Key: c.Key, HasInterval: true}
	}
	for i, g := range Groups() {
		r.Groups[i] = Share{Key: g.Key(), HasInterval: true}
	}
	s := Share{Key: key, Fraction: f, Low: lo, High: hi, SD: sd, SE: (hi - lo) / 3.4, HasInterval: true, Kind: IntervalT}
	if i, ok := CategoryIndex(key); ok {
		r.Categories[i] = s
	} else if g, ok := LookupGroup(key); ok {
		r.Groups[g-GroupPET] = s
	}
	return r
}

// The intervals below are invented inputs; each expected verdict follows
// from the rule pass / fail / undecided by where the interval lies
// (common practice for decisions from confidence intervals).
func TestJudgeBounds(t *testing.T) {
	spec := Spec{Name: "t", Limits: []Limit{{Item: "pvc", Max: frac(0.01)}}}
	cases := []struct {
		name         string
		f, lo, hi    float64
		want         Verdict
		wantMoreSome bool
	}{
		{"wholly below max", 0.004, 0.002, 0.006, Pass, false},
		{"high on the limit", 0.008, 0.006, 0.01, Pass, false},
		{"straddles", 0.009, 0.006, 0.012, Undecided, true},
		{"wholly above", 0.02, 0.015, 0.025, Fail, false},
		{"low on the limit", 0.012, 0.01, 0.014, Undecided, true},
	}
	for _, c := range cases {
		sv, err := Judge(shareWith("pvc", c.f, c.lo, c.hi, 0.004, 5), spec)
		if err != nil {
			t.Fatal(err)
		}
		lv := sv.Limits[0]
		if lv.Verdict != c.want || sv.Verdict != c.want {
			t.Errorf("%s: limit %v spec %v, want %v", c.name, lv.Verdict, sv.Verdict, c.want)
		}
		if c.wantMoreSome && (!lv.Need.Known() || lv.Need.More < 1) {
			t.Errorf("%s: undecided without a pull count: %+v", c.name, lv)
		}
		if !c.wantMoreSome && lv.Need.More != 0 {
			t.Errorf("%s: decided but asks for %d pulls", c.name, lv.Need.More)
		}
	}
	min := Spec{Name: "m", Limits: []Limit{{Item: "pet", Min: frac(0.8)}}}
	if sv, _ := Judge(shareWith("pet", 0.85, 0.81, 0.89, 0.05, 5), min); sv.Verdict != Pass {
		t.Errorf("min wholly above: %v", sv.Verdict)
	}
	if sv, _ := Judge(shareWith("pet", 0.75, 0.70, 0.79, 0.05, 5), min); sv.Verdict != Fail {
		t.Errorf("min wholly below: %v", sv.Verdict)
	}
}

func TestSpecVerdictIsWorstLimit(t *testing.T) {
	spec := Spec{Name: "two", Limits: []Limit{{Item: "pvc", Max: frac(0.01)}, {Item: "pla", Max: frac(0.01)}}}
	r := shareWith("pvc", 0.02, 0.015, 0.025, 0.004, 5) // pvc fails, pla 0 passes
	sv, _ := Judge(r, spec)
	if sv.Verdict != Fail {
		t.Errorf("one failing limit: %v", sv.Verdict)
	}
}

func TestHazardZeroTolerance(t *testing.T) {
	a := refAudit()
	hz, _ := CategoryIndex("hazard")
	a.Pulls[2].Kg[hz] = 0.3
	r, _ := Assess(a, Options{})
	sv, _ := Judge(r, mustSpec(t, "glycol-feed"))
	if sv.Verdict != Fail {
		t.Fatalf("hazard found, verdict %v", sv.Verdict)
	}
	if len(r.HazardPulls) != 1 || r.HazardPulls[0] != "C" {
		t.Errorf("hazard pulls %v, want [C]", r.HazardPulls)
	}
	// Counted but weightless (a battery below the scale's resolution).
	b := refAudit()
	_ = b.Pulls[1].SetPieces("hazard", 1)
	r, _ = Assess(b, Options{})
	if sv, _ := Judge(r, mustSpec(t, "glycol-feed")); sv.Verdict != Fail || r.HazardPieces != 1 {
		t.Errorf("counted hazard: verdict %v, pieces %d", sv.Verdict, r.HazardPieces)
	}
}

func TestSpecValidation(t *testing.T) {
	bad := []string{
		`{"name":"x","limits":[{"item":"unobtainium","max":0.1}]}`,
		`{"name":"x","limits":[{"item":"pvc","max":2}]}`,
		`{"name":"x","limits":[{"item":"pvc"}]}`,
		`{"name":"x","limits":[{"item":"pvc","min":0.5,"max":0.1}]}`,
		`{"name":"","limits":[]}`,
		`{"name":"x","limits":[],"colour":"red"}`,
		`{"name":"x","limits":[]} {}`,
		`{"name":"x",`,
	}
	for _, b := range bad {
		if _, err := ParseSpec([]byte(b)); !errors.Is(err, ErrBadSpec) {
			t.Errorf("%s: err = %v, want ErrBadSpec", b, err)
		}
	}
	good := `{"name":"yard-7","limits":[{"item":"pet","min":0.8},{"item":"non_plastics","max":0.05}],"zero_tolerance":["hazards"],"grades":[{"name":"a","min_pet":0.9}]}`
	if _, err := ParseSpec([]byte(good)); err != nil {
		t.Errorf("good spec refused: %v", err)
	}
	for _, n := range BuiltinSpecNames() {
		if err := mustSpec(t, n).Validate(); err != nil {
			t.Errorf("built-in %s: %v", n, err)
		}
	}
}

// Grade bands of the built-in glycol-feed spec: 0.94 and 0.72 echo the
// trade-association PET bale grades published in 2015 (Source: those
// grades: top grade ≥ 94 %, failing grade ≤ 72 % PET containers);
// 0.83 is illustrative. The shares tested are invented inputs.
func TestGradeBands(t *testing.T) {
	s := mustSpec(t, "glycol-feed")
	cases := []struct {
		f, lo, hi float64
		grade     string
		state     GradeState
	}{
		{0.96, 0.95, 0.97, "first", GradeSure},
		{0.95, 0.93, 0.97, "first", GradeSpans},
		{0.90, 0.88, 0.92, "second", GradeSure},
		{0.50, 0.40, 0.60, "off-grade", GradeSure},
	}
	for _, c := range cases {
		g, state := grade(Share{Fraction: c.f, Low: c.lo, High: c.hi, HasInterval: true, Kind: IntervalT}, s, true)
		if g != c.grade || state != c.state {
			t.Errorf("PET %g [%g, %g]: grade %q %v, want %q %v", c.f, c.lo, c.hi, g, state, c.grade, c.state)
		}
	}
	// One pull: the band of the estimate, but no claim about an interval.
	if g, state := grade(Share{Fraction: 0.96, HasInterval: false}, s, false); g != "first" || state != GradeNoInterval {
		t.Errorf("one pull: grade %q %v, want first no_interval", g, state)
	}
}

func TestMorePullsDecide(t *testing.T) {
	// The predicted count, taken with the same spread, decides the limit.
	spec := Spec{Name: "t", Limits: []Limit{{Item: "pvc", Max: frac(0.007)}}}
	a := refAudit()
	a.BaleKg = 0
	r, _ := Assess(a, Options{})
	sv, _ := Judge(r, spec)
	lv := sv.Limits[0]
	if lv.Verdict != Undecided || !lv.Need.Known() {
		t.Fatalf("setup: %+v", lv)
	}
	pvc, _ := r.Category("pvc")
	n := r.Pulls + lv.Need.More
	half := StudentT(r.Confidence, n-1) * pvc.SD / sqrtInt(n)
	if pvc.Fraction+half > 0.007 {
		t.Errorf("with %d pulls the interval still reaches %g > 0.007", n, pvc.Fraction+half)
	}
}

func errorsIs(err, target error) bool { return errors.Is(err, target) }
