package yield

import "math"

// covariance accumulates a sample covariance matrix by Welford's online
// update of corrected sums of squares and products (Welford,
// Technometrics 4 (1962) 419):
//
//	x̄_n = x̄_{n−1} + (x − x̄_{n−1})/n,   C_n = C_{n−1} + (x − x̄_{n−1})(x − x̄_n)ᵀ
//
// skipping vectors that hold a NaN.
type covariance struct {
	n    int
	mean []float64
	m2   [][]float64
	dx   []float64
}

func newCovariance(k int) *covariance {
	c := &covariance{mean: make([]float64, k), m2: make([][]float64, k), dx: make([]float64, k)}
	for i := range c.m2 {
		c.m2[i] = make([]float64, k)
	}
	return c
}

func (c *covariance) add(x []float64) {
	for _, v := range x {
		if math.IsNaN(v) {
			return
		}
	}
	c.n++
	for i, v := range x {
		c.dx[i] = v - c.mean[i]
		c.mean[i] += c.dx[i] / float64(c.n)
	}
	for i := range x {
		for j := range x {
			c.m2[i][j] += c.dx[i] * (x[j] - c.mean[j])
		}
	}
}

// matrix is the sample covariance (n − 1 in the denominator); zeros with
// fewer than two vectors.
func (c *covariance) matrix() [][]float64 {
	out := make([][]float64, len(c.m2))
	for i := range out {
		out[i] = make([]float64, len(c.m2))
		if c.n > 1 {
			for j := range out[i] {
				out[i][j] = c.m2[i][j] / float64(c.n-1)
			}
		}
	}
	return out
}

// variances accumulates per-element sample variances (Welford, as
// covariance does, without the products).
type variances struct {
	n        int
	mean, m2 []float64
}

func newVariances(k int) *variances {
	return &variances{mean: make([]float64, k), m2: make([]float64, k)}
}

// add takes x scaled by k.
func (v *variances) add(x []float64, k float64) {
	v.n++
	for i, xi := range x {
		xi *= k
		d := xi - v.mean[i]
		v.mean[i] += d / float64(v.n)
		v.m2[i] += d * (xi - v.mean[i])
	}
}

func (v *variances) variances() []float64 {
	out := make([]float64, len(v.m2))
	if v.n > 1 {
		for i, m := range v.m2 {
			out[i] = m / float64(v.n-1)
		}
	}
	return out
}
