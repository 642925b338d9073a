package assess

import "math"

// Spread is the sampling error of the category shares in linearised
// form: for independent standard normal g_k,
//
//	x = Fractions + Σ_k g_k · Terms[k]
//
// has exactly the covariance matrix the estimator reports (its diagonal
// is SE²), and scaling the sum by √(DF/χ²_DF) gives the multivariate t
// whose marginal 90 % range is the report's 90 % interval. Every term
// sums to 0 over the categories, so every draw sums to 1.
//
// For the ratio estimator the term of pull i is the pull's residual
// (Cochran, Sampling Techniques, 3rd ed., eq. 6.9; the same
// linearisation gives the covariance of two ratios that share the
// denominator Σw):
//
//	Terms[i][j] = √((1 − f)/(n(n − 1))) · (c_ij − r_j·w_i) / w̄
//
// and for the mean of fractions the deviation p_ij − p̄_j with the same
// factor. DF is n − 1; it is 0 when there is no spread to draw (one
// pull, or a whole-bale sort with f = 1).
type Spread struct {
	Fractions []float64
	Terms     [][]float64
	DF        int
}

// Varies reports whether the spread has anything to draw: pulls of one
// composition leave only rounding noise (below 1e-12) in the terms.
func (s Spread) Varies() bool {
	if s.DF <= 0 {
		return false
	}
	for _, t := range s.Terms {
		for _, v := range t {
			if math.Abs(v) > 1e-12 {
				return true
			}
		}
	}
	return false
}

func spreadOf(pulls []Pull, w []float64, res Result) Spread {
	n := len(pulls)
	sp := Spread{Fractions: make([]float64, len(catalogue))}
	for j, c := range res.Categories {
		sp.Fractions[j] = c.Fraction
	}
	fpc := 1 - res.SampledShare
	if n < 2 || fpc <= 0 {
		return sp
	}
	k := math.Sqrt(fpc / float64(n*(n-1)))
	wbar := res.SampledKg / float64(n)
	sp.DF = n - 1
	sp.Terms = make([][]float64, n)
	for i, p := range pulls {
		t := make([]float64, len(catalogue))
		for j := range catalogue {
			if res.Method == MethodMean {
				t[j] = k * (p.Kg[j]/w[i] - sp.Fractions[j])
			} else {
				t[j] = k * (p.Kg[j] - sp.Fractions[j]*w[i]) / wbar
			}
		}
		sp.Terms[i] = t
	}
	return sp
}
