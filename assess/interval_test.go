package assess

import (
	"math"
	"testing"
)

func TestStudentTTable(t *testing.T) {
	// Source: NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.2,
	// "Critical Values of the Student's t Distribution" (upper-tail
	// probabilities 0.05, 0.025 and 0.005 are two-sided levels 0.90,
	// 0.95 and 0.99), three decimals.
	cases := []struct {
		conf float64
		df   int
		want float64
	}{
		{0.90, 1, 6.314},
		{0.90, 2, 2.920},
		{0.90, 10, 1.812},
		{0.90, 120, 1.658},
		{0.95, 10, 2.228},
		{0.95, 30, 2.042},
		{0.99, 5, 4.032},
		{0.99, 20, 2.845},
	}
	for _, c := range cases {
		got := StudentT(c.conf, c.df)
		if math.Abs(got-c.want) > 0.0006 {
			t.Errorf("StudentT(%g, %d) = %.4f, table %.3f", c.conf, c.df, got, c.want)
		}
	}
	// Source: same handbook, normal quantile z(0.95) = 1.645, z(0.975) = 1.960.
	if z := NormalZ(0.90); math.Abs(z-1.645) > 0.0005 {
		t.Errorf("NormalZ(0.90) = %.4f, want 1.645", z)
	}
	if z := NormalZ(0.95); math.Abs(z-1.960) > 0.0005 {
		t.Errorf("NormalZ(0.95) = %.4f, want 1.960", z)
	}
}

// Source: Newcombe, "Two-sided confidence intervals for the single
// proportion: comparison of seven methods", Stat. Med. 17 (1998) 857,
// Table II, 95 % intervals, method 3 (Wilson score) and method 5
// (Clopper–Pearson exact), four decimals.
var newcombeTable = []struct {
	x, n          int
	wilson, exact Interval
}{
	{81, 263, Interval{0.2553, 0.3662}, Interval{0.2527, 0.3676}},
	{15, 148, Interval{0.0624, 0.1605}, Interval{0.0578, 0.1617}},
	{0, 20, Interval{0, 0.1611}, Interval{0, 0.1684}},
	{1, 29, Interval{0.0061, 0.1718}, Interval{0.0009, 0.1776}},
}

func TestWilsonNewcombe(t *testing.T) {
	for _, c := range newcombeTable {
		got := Wilson(c.x, c.n, 0.95)
		if math.Abs(got.Low-c.wilson.Low) > 0.00006 || math.Abs(got.High-c.wilson.High) > 0.00006 {
			t.Errorf("Wilson(%d/%d) = [%.4f, %.4f], Newcombe [%.4f, %.4f]", c.x, c.n, got.Low, got.High, c.wilson.Low, c.wilson.High)
		}
	}
}

func TestClopperPearsonNewcombe(t *testing.T) {
	for _, c := range newcombeTable {
		got := ClopperPearson(c.x, c.n, 0.95)
		if math.Abs(got.Low-c.exact.Low) > 0.00006 || math.Abs(got.High-c.exact.High) > 0.00006 {
			t.Errorf("ClopperPearson(%d/%d) = [%.4f, %.4f], Newcombe [%.4f, %.4f]", c.x, c.n, got.Low, got.High, c.exact.Low, c.exact.High)
		}
	}
}

// The known relations between the two intervals and closed forms.
func TestProportionIntervalRelations(t *testing.T) {
	for n := 1; n <= 60; n += 7 {
		for x := 0; x <= n; x++ {
			for _, conf := range []float64{0.8, 0.9, 0.95, 0.99} {
				w, e := Wilson(x, n, conf), ClopperPearson(x, n, conf)
				p := float64(x) / float64(n)
				for name, iv := range map[string]Interval{"wilson": w, "exact": e} {
					if !(iv.Low <= p+1e-12 && p <= iv.High+1e-12) || iv.Low < 0 || iv.High > 1 {
						t.Fatalf("%s(%d/%d, %g) = %v does not hold p̂ = %g inside [0,1]", name, x, n, conf, iv, p)
					}
				}
				// Symmetry: the interval for n − x is the mirror image.
				// Source: common practice (both methods are equivariant under x → n − x).
				wm, em := Wilson(n-x, n, conf), ClopperPearson(n-x, n, conf)
				if math.Abs(w.Low-(1-wm.High)) > 1e-9 || math.Abs(e.Low-(1-em.High)) > 1e-9 {
					t.Fatalf("mirror symmetry broken at %d/%d", x, n)
				}
			}
		}
		// Closed form at x = 0: the exact upper bound is 1 − (α/2)^(1/n).
		// Source: Clopper & Pearson, Biometrika 26 (1934) 404 (the Beta
		// quantile reduces to a power at x = 0).
		if got, want := ClopperPearson(0, n, 0.95).High, 1-math.Pow(0.025, 1/float64(n)); math.Abs(got-want) > 1e-9 {
			t.Errorf("ClopperPearson(0/%d).High = %g, closed form %g", n, got, want)
		}
		// At x = 0 the Wilson upper bound is z²/(n + z²).
		// Source: Newcombe 1998, method 3 with p̂ = 0.
		z := NormalZ(0.95)
		if got, want := Wilson(0, n, 0.95).High, z*z/(float64(n)+z*z); math.Abs(got-want) > 1e-12 {
			t.Errorf("Wilson(0/%d).High = %g, closed form %g", n, got, want)
		}
	}
}
