package assess

import (
	"math"
	"sync"

	"gonum.org/v1/gonum/stat/distuv"
)

// StudentT returns the two-sided Student t quantile t* for a confidence
// level c and df degrees of freedom: the (1 + c)/2 quantile of Student's
// t distribution, from gonum's stat/distuv.
func StudentT(c float64, df int) float64 {
	k := tKey{c, df}
	tCache.Lock()
	q, ok := tCache.m[k]
	tCache.Unlock()
	if ok {
		return q
	}
	q = distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(df)}.Quantile((1 + c) / 2)
	tCache.Lock()
	if len(tCache.m) > 4096 { // bound the memo; levels are few in practice
		clear(tCache.m)
	}
	tCache.m[k] = q
	tCache.Unlock()
	return q
}

// tCache memoises t quantiles: the sample-size iteration asks for the
// same few (level, df) pairs again and again.
type tKey struct {
	c  float64
	df int
}

var tCache = struct {
	sync.Mutex
	m map[tKey]float64
}{m: map[tKey]float64{}}

// NormalZ returns the two-sided standard normal quantile for level c.
func NormalZ(c float64) float64 {
	return distuv.UnitNormal.Quantile((1 + c) / 2)
}

// Interval is a two-sided interval for a proportion.
type Interval struct {
	Low, High float64
}

// Wilson returns the Wilson score interval for x successes in n trials at
// two-sided level c (Wilson, J. Am. Stat. Assoc. 22 (1927) 209; method 3
// of Newcombe, Stat. Med. 17 (1998) 857):
//
//	centre = (p̂ + z²/2n) / (1 + z²/n)
//	half   = z·√(p̂(1 − p̂)/n + z²/4n²) / (1 + z²/n)
//
// with p̂ = x/n and z the normal quantile. n = 0 gives [0, 1].
func Wilson(x, n int, c float64) Interval {
	if n <= 0 {
		return Interval{0, 1}
	}
	z := NormalZ(c)
	nn := float64(n)
	p := float64(x) / nn
	z2 := z * z
	den := 1 + z2/nn
	centre := (p + z2/(2*nn)) / den
	half := z * math.Sqrt(p*(1-p)/nn+z2/(4*nn*nn)) / den
	return Interval{math.Max(0, centre-half), math.Min(1, centre+half)}
}

// ClopperPearson returns the exact interval for x successes in n trials
// at two-sided level c from Beta quantiles (Clopper & Pearson, Biometrika
// 26 (1934) 404; method 5 of Newcombe 1998):
//
//	low  = B⁻¹(α/2; x, n − x + 1)      (0 when x = 0)
//	high = B⁻¹(1 − α/2; x + 1, n − x)  (1 when x = n)
//
// with α = 1 − c. n = 0 gives [0, 1].
func ClopperPearson(x, n int, c float64) Interval {
	if n <= 0 {
		return Interval{0, 1}
	}
	alpha := 1 - c
	iv := Interval{0, 1}
	if x > 0 {
		iv.Low = distuv.Beta{Alpha: float64(x), Beta: float64(n - x + 1)}.Quantile(alpha / 2)
	}
	if x < n {
		iv.High = distuv.Beta{Alpha: float64(x + 1), Beta: float64(n - x)}.Quantile(1 - alpha/2)
	}
	return iv
}
