package yield

import (
	"math"
	"testing"
)

// TestAgreeHandWorked checks bias, spread and coverage on five invented
// pairs against figures worked by hand (our own formulas; the t quantile
// and the binomial interval come from gonum through package assess).
func TestAgreeHandWorked(t *testing.T) {
	s := func(p10, mean, p90 float64) Summary { return Summary{P10: p10, P50: mean, P90: p90, Mean: mean} }
	pairs := []Pair{
		{s(90, 100, 110), 105, 0},   // inside, +5
		{s(90, 100, 110), 88, 0},    // below, −12
		{s(190, 200, 210), 212, 5},  // above, +12; with error: 200 + √(10² + (1.2816·5)²) = 211.88 < 212: still above
		{s(190, 200, 210), 196, 0},  // inside, −4
		{s(45, 50, 55), 54, 0},      // inside, +4
		{s(math.NaN(), 1, 2), 1, 0}, // skipped: no prediction
	}
	a := Agree(pairs)
	// By hand: differences 5, −12, 12, −4, 4: mean 1, SD √((16+169+121+25+9)/4) = √85 = 9.2195;
	// relative 0.05, −0.12, 0.06, −0.02, 0.08: mean 0.01.
	if a.N != 5 || math.Abs(a.Bias-1) > 1e-12 || math.Abs(a.SD-math.Sqrt(85)) > 1e-12 || math.Abs(a.BiasRel-0.01) > 1e-12 {
		t.Errorf("N %d bias %v SD %v rel %v", a.N, a.Bias, a.SD, a.BiasRel)
	}
	// Source: Student's t table, t(0.95; 4 df) = 2.132 (NIST/SEMATECH
	// e-Handbook of Statistical Methods, 1.3.6.7.2).
	if h := a.BiasHigh - a.Bias; math.Abs(h-2.132*math.Sqrt(85)/math.Sqrt(5)) > 1e-3 {
		t.Errorf("bias half-width %v", h)
	}
	if a.Inside != 3 || a.Below != 1 || a.Above != 1 || a.Coverage != 0.6 || a.InsideWithError != 3 {
		t.Errorf("inside %d below %d above %d coverage %v with error %d", a.Inside, a.Below, a.Above, a.Coverage, a.InsideWithError)
	}
	// 3 of 5 inside: the exact 90 % interval [0.189, 0.924] holds 0.8.
	if a.Verdict != CoverageAsStated || !(a.CoverageLow < 0.8 && 0.8 < a.CoverageHigh) {
		t.Errorf("verdict %v [%v, %v]", a.Verdict, a.CoverageLow, a.CoverageHigh)
	}
	// A larger measuring error takes the third pair in: √(10² + (1.2816·8)²) = 14.3 > 12.
	pairs[2].MeasureSD = 8
	if b := Agree(pairs); b.InsideWithError != 4 || b.Inside != 3 {
		t.Errorf("with error %d, without %d", b.InsideWithError, b.Inside)
	}
	// Too few pairs are not judged; twenty all outside are too narrow.
	if Agree(pairs[:4]).Verdict != CoverageTooFew {
		t.Errorf("four pairs judged")
	}
	var out []Pair
	for range 20 {
		out = append(out, Pair{Predicted: s(1, 2, 3), Measured: 10})
	}
	if v := Agree(out).Verdict; v != CoverageTooNarrow {
		t.Errorf("20 outside: %v", v)
	}
	var in []Pair
	for range 30 {
		in = append(in, Pair{Predicted: s(1, 2, 3), Measured: 2})
	}
	if v := Agree(in).Verdict; v != CoverageTooWide {
		t.Errorf("30 inside: %v", v)
	}
}
