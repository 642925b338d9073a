package assess

import (
	"fmt"
	"math"
)

// maxPulls caps the sample-size iteration; advice above it is reported
// as "more than maxPulls".
const maxPulls = 100000

// PullsForHalfWidth returns the number of pulls n for which a two-sided
// interval at level c, t·s/√n, is no wider than h on each side, given the
// per-pull standard deviation s (ASTM D5231 §8.3, iterated because t
// depends on n):
//
//	n₀ = (z·s / h)²,  then  n_{k+1} = ⌈(t_{n_k − 1}·s / h)²⌉  until stable
//
// The finite-population correction is left out, so the advice errs on the
// side of more pulls. The result is at least 2 (one pull has no interval).
func PullsForHalfWidth(s, h, c float64) (int, error) {
	switch {
	case math.IsNaN(s) || s < 0:
		return 0, fmt.Errorf("assess: spread %g is not a standard deviation", s)
	case !(h > 0):
		return 0, fmt.Errorf("%w (half-width %g)", ErrBadPrecision, h)
	case !(c > 0 && c < 1):
		return 0, fmt.Errorf("confidence %g: %w", c, ErrBadConfidence)
	}
	need := func(q float64) int {
		x := math.Ceil(q * q * s * s / (h * h))
		if x > maxPulls {
			return maxPulls + 1
		}
		return max(2, int(x))
	}
	n := need(NormalZ(c))
	for range 100 {
		if n > maxPulls {
			return n, nil
		}
		next := need(StudentT(c, n-1))
		if next == n {
			return n, nil
		}
		n = next
	}
	return n, nil
}

// PullsForPrecision returns the pulls needed to estimate a share x̄ with
// per-pull standard deviation s to a relative precision e (half-width
// e·x̄) at level c: n = (t·s / (e·x̄))² of ASTM D5231, iterated.
func PullsForPrecision(s, mean, e, c float64) (int, error) {
	if !(e > 0) {
		return 0, fmt.Errorf("%w (got %g)", ErrBadPrecision, e)
	}
	if !(mean > 0) {
		return 0, fmt.Errorf("assess: share is 0, so no relative precision can be reached; use an absolute half-width")
	}
	return PullsForHalfWidth(s, e*mean, c)
}
