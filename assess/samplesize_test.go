package assess

import (
	"math"
	"testing"
)

// smallestByScan is the sample-size condition checked pull by pull: the
// slow, obvious answer the solver must equal.
func smallestByScan(s, h, c float64, pop Population, limit int) (int, bool) {
	for n := 2; n <= limit; n++ {
		if pop.sampledShare(n) >= 1 {
			return 0, false // whole bale
		}
		if StudentT(c, n-1)*s*math.Sqrt((1-pop.sampledShare(n))/float64(n)) <= h {
			return n, true
		}
	}
	return 0, false
}

func TestPullsForHalfWidthNISTTable(t *testing.T) {
	// Source: NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.2
	// (upper critical values of Student's t): t(0.95; 3) = 2.353,
	// t(0.95; 4) = 2.132. With s = h, n pulls suffice when t/√n ≤ 1:
	// n = 4 gives 2.353/2 = 1.18, n = 5 gives 2.132/2.236 = 0.953, so 5.
	got, err := PullsForHalfWidth(1, 1, 0.90, Population{})
	if err != nil {
		t.Fatal(err)
	}
	if got.State != SizePulls || got.Total != 5 {
		t.Errorf("s = h at 90 %%: %+v, want 5 pulls", got)
	}
}

func TestPullsForPrecisionSmallestN(t *testing.T) {
	// s = 0.004, x̄ = 0.01, e = 0.10 at 90 %: h = 0.001, the condition
	// t(n−1)·4 ≤ √n. Computed by our own formula (the pull-by-pull scan
	// below gives 46).
	n, err := PullsForPrecision(0.004, 0.01, 0.10, 0.90, Population{Taken: 6})
	if err != nil {
		t.Fatal(err)
	}
	want, _ := smallestByScan(0.004, 0.001, 0.90, Population{}, 1000)
	if n.State != SizePulls || n.Total != want || n.More != want-6 {
		t.Errorf("got %+v, want %d in all, %d more", n, want, want-6)
	}
	if want != 46 {
		t.Errorf("scan gives %d, want 46", want)
	}
}

// The solver must return the smallest n for every spread, half-width and
// level: 1,280 cases against a pull-by-pull scan (the iteration it
// replaced could alternate between two values and stop at the lower).
func TestPullsForHalfWidthEqualsScan(t *testing.T) {
	cases := 0
	for _, c := range []float64{0.80, 0.90, 0.95, 0.99} {
		for i := range 320 {
			ratio := 0.3 + float64(i)*0.01 // s/h from 0.3 to 3.49
			for _, pop := range []Population{{}} {
				got, err := PullsForHalfWidth(ratio, 1, c, pop)
				if err != nil {
					t.Fatal(err)
				}
				want, ok := smallestByScan(ratio, 1, c, pop, 100000)
				if !ok || got.State != SizePulls || got.Total != want {
					t.Fatalf("s/h = %g at %g: got %+v, scan %d", ratio, c, got, want)
				}
				cases++
			}
		}
	}
	if cases != 1280 {
		t.Fatalf("%d cases ran, want 1280", cases)
	}
}

func TestPullsForHalfWidthFiniteBale(t *testing.T) {
	// A 500 kg bale in pulls of 25 kg holds 20 pulls. Shrinking half-widths
	// must give answers that never exceed what the bale holds and that
	// equal the scan, then "sort the whole bale".
	pop := Population{PullKg: 25, BaleKg: 500, Taken: 3}
	sawWhole, sawPulls := false, false
	for _, h := range []float64{0.5, 0.2, 0.1, 0.05, 0.03, 0.02, 0.01, 0.001} {
		got, err := PullsForHalfWidth(0.1, h, 0.90, pop)
		if err != nil {
			t.Fatal(err)
		}
		want, ok := smallestByScan(0.1, h, 0.90, pop, 1000)
		switch {
		case !ok:
			if got.State != SizeWholeBale {
				t.Errorf("h = %g: %+v, want sort the whole bale", h, got)
			}
			sawWhole = true
		default:
			if got.State != SizePulls || got.Total != want || got.Total >= 20 {
				t.Errorf("h = %g: %+v, want %d pulls", h, got, want)
			}
			sawPulls = true
		}
		free, _ := PullsForHalfWidth(0.1, h, 0.90, Population{})
		if got.State == SizePulls && got.Total > free.Total {
			t.Errorf("h = %g: the correction asked for more pulls (%d) than without (%d)", h, got.Total, free.Total)
		}
	}
	if !sawWhole || !sawPulls {
		t.Errorf("the sweep missed a case: whole bale %v, pulls %v", sawWhole, sawPulls)
	}
}

func TestPullsForHalfWidthBeyondReach(t *testing.T) {
	got, err := PullsForHalfWidth(1, 1e-9, 0.90, Population{})
	if err != nil {
		t.Fatal(err)
	}
	if got.State != SizeBeyondReach || got.Text() != "sort the whole bale" {
		t.Errorf("got %+v %q, want beyond reach", got, got.Text())
	}
}

func TestPullsForHalfWidthBadInput(t *testing.T) {
	for _, c := range []struct {
		s, h, c float64
		want    error
	}{
		{0.01, 0, 0.9, ErrBadPrecision},
		{math.NaN(), 0.01, 0.9, ErrBadSpread},
		{-1, 0.01, 0.9, ErrBadSpread},
		{0.01, 0.01, 1, ErrBadConfidence},
	} {
		if _, err := PullsForHalfWidth(c.s, c.h, c.c, Population{}); !errorsIs(err, c.want) {
			t.Errorf("%+v: err %v, want %v", c, err, c.want)
		}
	}
	if _, err := PullsForPrecision(0.01, 0, 0.1, 0.9, Population{}); !errorsIs(err, ErrNoShare) {
		t.Errorf("zero share: %v", err)
	}
}
