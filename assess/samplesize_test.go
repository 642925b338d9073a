package assess

import (
	"math"
	"testing"
)

func TestPullsForPrecisionD5231(t *testing.T) {
	// Source: ASTM D5231 §8.3 illustration (shared/REFERENCE.md): s = 0.004,
	// x̄ = 0.01, e = 0.10 at 90 % gives about 46 samples after iterating t.
	n, err := PullsForPrecision(0.004, 0.01, 0.10, 0.90)
	if err != nil {
		t.Fatal(err)
	}
	if n != 46 {
		t.Errorf("n = %d, want 46", n)
	}
	// The fixed point: t at n − 1 df gives back n.
	// Source: the formula itself, n = ⌈(t·s/(e·x̄))²⌉.
	tq := StudentT(0.90, n-1)
	if got := int(math.Ceil(math.Pow(tq*0.004/0.001, 2))); got != n {
		t.Errorf("not a fixed point: %d vs %d", got, n)
	}
}

func TestPullsForHalfWidthMonotone(t *testing.T) {
	prev := 0
	for _, s := range []float64{0.001, 0.002, 0.005, 0.01, 0.02, 0.05} {
		n, err := PullsForHalfWidth(s, 0.005, 0.9)
		if err != nil {
			t.Fatal(err)
		}
		if n < prev || n < 2 {
			t.Fatalf("s = %g: n = %d after %d", s, n, prev)
		}
		prev = n
	}
	if _, err := PullsForHalfWidth(0.01, 0, 0.9); err == nil {
		t.Error("zero half-width accepted")
	}
	if _, err := PullsForPrecision(0.01, 0, 0.1, 0.9); err == nil {
		t.Error("zero share accepted for a relative precision")
	}
}
