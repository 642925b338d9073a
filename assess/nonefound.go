package assess

import (
	"fmt"
	"math"
)

// BoundMethod says how the upper bound of a category found in no pull
// was computed.
type BoundMethod int

// The bound methods.
const (
	// BoundBinomial: the exact binomial bound on piece-equivalents, bale
	// mass unknown (an infinite population).
	BoundBinomial BoundMethod = iota + 1
	// BoundHypergeometric: the exact bound for a bale of known mass,
	// sampled without replacement.
	BoundHypergeometric
	// BoundWholeBale: the whole bale was sorted, so none found is none.
	BoundWholeBale
)

func (m BoundMethod) String() string {
	switch m {
	case BoundBinomial:
		return "binomial"
	case BoundHypergeometric:
		return "hypergeometric"
	case BoundWholeBale:
		return "whole_bale"
	}
	return fmt.Sprintf("BoundMethod(%d)", int(m))
}

// NoneFound is what an audit says about a category (or group) that no
// pull held: not zero, but an upper bound on its mass share.
type NoneFound struct {
	Pulls int
	Kg    float64 // mass sorted in those pulls
	// Level is the two-sided confidence level of the report; Upper is the
	// upper end of the interval [0, Upper] at that level, the same tail
	// as every other interval's upper end.
	Level, Upper float64
	// PieceKg is the typical piece mass the bound assumes.
	PieceKg float64
	Method  BoundMethod
}

// Text is the bound in a grader's words, e.g.
// "none found in 2 pulls (43 kg): at most 0.9 % at 90 %".
func (b NoneFound) Text() string {
	if b.Method == BoundWholeBale {
		return fmt.Sprintf("none found in the whole bale (%s kg sorted)", kgText(b.Kg))
	}
	return fmt.Sprintf("none found in %d %s (%s kg): at most %s %% at %s %%",
		b.Pulls, plural(b.Pulls, "pull", "pulls"), kgText(b.Kg), pctText(b.Upper), levelText(b.Level))
}

// UpperText is the upper bound in per cent, two significant digits,
// rounded up: "0.25".
func (b NoneFound) UpperText() string { return pctText(b.Upper) }

// kgText prints a mass without trailing noise: 43, 43.5, 0.75.
func kgText(kg float64) string {
	if kg >= 100 {
		return fmt.Sprintf("%.0f", kg)
	}
	return trimZeros(fmt.Sprintf("%.1f", kg))
}

// pctText prints a share in per cent with two significant digits at
// most, never rounding a non-zero bound down to 0.
func pctText(x float64) string {
	p := 100 * x
	switch {
	case p == 0:
		return "0"
	case p >= 10:
		return fmt.Sprintf("%.0f", math.Ceil(p))
	}
	d := 1 - int(math.Floor(math.Log10(p))) // two significant digits
	scale := math.Pow(10, float64(d))
	return trimZeros(fmt.Sprintf("%.*f", max(0, d), math.Ceil(p*scale)/scale))
}

func levelText(c float64) string { return trimZeros(fmt.Sprintf("%.1f", 100*c)) }

func trimZeros(s string) string {
	for len(s) > 1 && s[len(s)-1] == '0' && containsDot(s) {
		s = s[:len(s)-1]
	}
	if len(s) > 1 && s[len(s)-1] == '.' {
		s = s[:len(s)-1]
	}
	return s
}

func containsDot(s string) bool {
	for _, r := range s {
		if r == '.' {
			return true
		}
	}
	return false
}

// noneFoundUpper is the upper bound of the mass share of a category
// found in none of the sampled kg, at two-sided level c.
//
// The sorted mass is read as n = ⌊W/m⌋ piece-equivalents of the
// category's typical piece mass m, each either the category or not;
// finding none of them bounds the share p by the exact (Clopper–Pearson)
// bound for 0 of n, whose upper tail is α/2 with α = 1 − c:
//
//	(1 − p)^n = α/2,   p = 1 − (α/2)^(1/n)
//
// — the bound whose one-sided 95 % form is the "rule of three", p ≈ 3/n
// (Hanley & Lippman-Hand, JAMA 249 (1983) 1743). With the bale mass M
// known, the N = ⌊M/m⌋ piece-equivalents of the bale are sampled without
// replacement, and the bound is the largest D (in pieces) that is not
// rejected, from the hypergeometric probability of finding none
// (Cochran, Sampling Techniques, 3rd ed., ch. 3, confidence limits for a
// proportion from the hypergeometric distribution):
//
//	P(0 | D) = C(N − D, n) / C(N, n) > α/2,   p = D_max / N
//
// A sort of the whole bale gives 0. The bound assumes the category's
// pieces are spread through the bale independently of each other;
// clustered pieces make the truth wider, which the coverage simulation
// measures.
func noneFoundUpper(sampledKg, baleKg, pieceKg, c float64) (float64, BoundMethod) {
	tail := (1 - c) / 2
	n := math.Floor(sampledKg/pieceKg + 1e-9)
	if baleKg > 0 {
		if sampledKg >= baleKg*(1-1e-9) {
			return 0, BoundWholeBale
		}
		N := math.Floor(baleKg/pieceKg + 1e-9)
		if n < 1 || N < 1 {
			return 1, BoundHypergeometric
		}
		n = math.Min(n, N)
		return float64(hyperMaxDefects(N, n, tail)) / N, BoundHypergeometric
	}
	if n < 1 {
		return 1, BoundBinomial
	}
	return -math.Expm1(math.Log(tail) / n), BoundBinomial
}

// hyperMaxDefects is the largest D in [0, N − n] with
// C(N − D, n)/C(N, n) > tail. The probability falls as D grows, so a
// bisection finds it.
func hyperMaxDefects(N, n, tail float64) int {
	logP := func(D float64) float64 {
		a, _ := math.Lgamma(N - D + 1)
		b, _ := math.Lgamma(N - D - n + 1)
		c, _ := math.Lgamma(N + 1)
		d, _ := math.Lgamma(N - n + 1)
		return a - b - c + d
	}
	lt := math.Log(tail)
	lo, hi := 0.0, N-n // logP(0) = 0 > lt always
	if logP(hi) > lt {
		return int(hi)
	}
	for hi-lo > 1 {
		mid := math.Floor((lo + hi) / 2)
		if logP(mid) > lt {
			lo = mid
		} else {
			hi = mid
		}
	}
	return int(lo)
}

// noneFoundPulls returns the pulls of mean mass pullKg needed for the
// bound of a category still found in none of them to reach limit: the
// smallest n with noneFoundUpper(n·w̄) ≤ limit, or a whole-bale sort.
// The bound falls as n grows, so a doubling search and a bisection find
// it.
func noneFoundPulls(limit, pieceKg, c float64, pop Population) SampleSize {
	ok := func(n int) bool {
		u, _ := noneFoundUpper(float64(n)*pop.PullKg, pop.BaleKg, pieceKg, c)
		return u <= limit
	}
	answer := func(n int) SampleSize {
		if pop.sampledShare(n) >= 1 {
			return SampleSize{State: SizeWholeBale}
		}
		return SampleSize{State: SizePulls, Total: n, More: max(0, n-pop.Taken)}
	}
	if !(pop.PullKg > 0) {
		return SampleSize{}
	}
	if ok(2) {
		return answer(2)
	}
	lo, hi := 2, 4
	for !ok(hi) {
		if hi >= MaxSearchPulls {
			return SampleSize{State: SizeBeyondReach}
		}
		lo, hi = hi, min(2*hi, MaxSearchPulls)
	}
	for hi-lo > 1 {
		mid := lo + (hi-lo)/2
		if ok(mid) {
			hi = mid
		} else {
			lo = mid
		}
	}
	return answer(hi)
}
