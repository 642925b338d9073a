package assess

import (
	"math/rand/v2"
	"testing"
)

// BenchmarkAssessJudge50 assesses a 50-pull audit and judges it against a
// built-in spec, as a grader's laptop does after each pull.
func BenchmarkAssessJudge50(b *testing.B) {
	a := randomAudit(rand.New(rand.NewPCG(5, 6)), 50)
	spec, _ := BuiltinSpec("glycol-feed")
	b.ReportAllocs()
	for b.Loop() {
		r, err := Assess(a, Options{})
		if err != nil {
			b.Fatal(err)
		}
		sv, _ := Judge(r, spec)
		_ = Advise(r, &sv, DefaultRelPrecision)
	}
}

// BenchmarkSumBaseline is the floor: one pass summing every mass of the
// same audit, the least any estimator must do.
func BenchmarkSumBaseline(b *testing.B) {
	a := randomAudit(rand.New(rand.NewPCG(5, 6)), 50)
	var s float64
	for b.Loop() {
		for _, p := range a.Pulls {
			for _, m := range p.Kg {
				s += m
			}
		}
	}
	_ = s
}
