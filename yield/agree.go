package yield

import (
	"fmt"
	"math"

	"baleassay/assess"
)

// AgreementLevel is the two-sided level of the intervals Agree gives
// for the bias and the coverage.
const AgreementLevel = 0.90

// NominalCoverage is the share of measurements a P10–P90 prediction
// should hold.
const NominalCoverage = 0.80

// CoverageVerdict says whether the predicted P10–P90 held as many
// measurements as it should.
type CoverageVerdict uint8

// The coverage verdicts.
const (
	CoverageTooFew    CoverageVerdict = iota + 1 // fewer than MinCoverageN measurements: nothing can be said
	CoverageAsStated                             // 80 % lies inside the interval of the observed share
	CoverageTooNarrow                            // fewer fall inside than 80 %: the P10–P90 is too narrow (or biased)
	CoverageTooWide                              // more fall inside than 80 %: the P10–P90 is wider than it needs to be
)

// MinCoverageN is the fewest measurements whose coverage is judged.
const MinCoverageN = 5

func (v CoverageVerdict) String() string {
	switch v {
	case CoverageTooFew:
		return "too_few"
	case CoverageAsStated:
		return "as_stated"
	case CoverageTooNarrow:
		return "too_narrow"
	case CoverageTooWide:
		return "too_wide"
	}
	return fmt.Sprintf("CoverageVerdict(%d)", uint8(v))
}

// Pair is one predicted quantity and what was measured, with the
// measurement's own standard deviation (0 when not stated).
type Pair struct {
	Predicted Summary
	Measured  float64
	MeasureSD float64
}

// Agreement is how predictions of one quantity compare with what was
// measured.
type Agreement struct {
	N int
	// Bias is the mean of measured − predicted mean, in the quantity's
	// unit; BiasRel the mean of (measured − predicted)/predicted. BiasLow
	// and BiasHigh bound Bias at AgreementLevel by Student's t on N − 1
	// degrees of freedom (NaN for N < 2).
	Bias, BiasRel, BiasLow, BiasHigh float64
	// SD and SDRel are the sample standard deviations of the differences
	// (NaN for N < 2): the spread of the prediction's error.
	SD, SDRel float64
	// Inside counts measurements within [P10, P90]; Below and Above the
	// others.
	Inside, Below, Above int
	// Coverage is Inside/N; CoverageLow and CoverageHigh its
	// Clopper–Pearson interval at AgreementLevel.
	Coverage, CoverageLow, CoverageHigh float64
	Verdict                             CoverageVerdict
	// InsideWithError counts measurements within the P10–P90 widened by
	// the measurement's own error: each side's distance d from the mean
	// becomes √(d² + (z₀.₉·s)²), z₀.₉ = 1.2816 the normal 90 % quantile
	// and s the measurement's SD (the two errors added as independent and
	// roughly normal). It asks whether the prediction's spread is honest
	// for what a scale or a titration can show; VerdictWithError judges it.
	InsideWithError  int
	VerdictWithError CoverageVerdict
}

// Agree compares predictions with measurements: the bias (mean of
// measured − predicted) with a t interval, the spread (sample SD of the
// differences), and the coverage of the predicted P10–P90, which should
// hold 80 % of measurements if the prediction's spread is honest. The
// coverage is judged by whether 80 % lies inside the exact binomial
// (Clopper–Pearson) interval of the observed share; with fewer than
// MinCoverageN pairs it is not judged. Pairs whose prediction or
// measurement is not a number are skipped.
func Agree(pairs []Pair) Agreement {
	var d, rel []float64
	a := Agreement{}
	for _, p := range pairs {
		pm := p.Predicted.Mean
		if !finite(pm) || !finite(p.Measured) || !finite(p.Predicted.P10) || !finite(p.Predicted.P90) {
			continue
		}
		a.N++
		d = append(d, p.Measured-pm)
		if pm != 0 {
			rel = append(rel, (p.Measured-pm)/pm)
		}
		switch {
		case p.Measured < p.Predicted.P10:
			a.Below++
		case p.Measured > p.Predicted.P90:
			a.Above++
		default:
			a.Inside++
		}
		e := z90 * math.Max(0, p.MeasureSD)
		lo := pm - math.Hypot(pm-p.Predicted.P10, e)
		hi := pm + math.Hypot(p.Predicted.P90-pm, e)
		if p.Measured >= lo && p.Measured <= hi {
			a.InsideWithError++
		}
	}
	a.Bias, a.SD = meanSD(d)
	a.BiasRel, a.SDRel = meanSD(rel)
	a.BiasLow, a.BiasHigh = math.NaN(), math.NaN()
	if a.N >= 2 {
		h := assess.StudentT(AgreementLevel, a.N-1) * a.SD / math.Sqrt(float64(a.N))
		a.BiasLow, a.BiasHigh = a.Bias-h, a.Bias+h
	}
	a.Coverage = math.NaN()
	if a.N > 0 {
		a.Coverage = float64(a.Inside) / float64(a.N)
	}
	iv := assess.ClopperPearson(a.Inside, a.N, AgreementLevel)
	a.CoverageLow, a.CoverageHigh = iv.Low, iv.High
	a.Verdict = judgeCoverage(a.Inside, a.N)
	a.VerdictWithError = judgeCoverage(a.InsideWithError, a.N)
	return a
}

// z90 is the standard normal 0.9 quantile (1.2816), the distance of a
// normal P90 from the mean in SDs, from gonum through assess.NormalZ.
var z90 = assess.NormalZ(0.8)

func judgeCoverage(inside, n int) CoverageVerdict {
	iv := assess.ClopperPearson(inside, n, AgreementLevel)
	switch {
	case n < MinCoverageN:
		return CoverageTooFew
	case NominalCoverage < iv.Low:
		return CoverageTooWide
	case NominalCoverage > iv.High:
		return CoverageTooNarrow
	}
	return CoverageAsStated
}

// meanSD is the mean and the sample standard deviation (n − 1); NaN
// where undefined.
func meanSD(x []float64) (mean, sd float64) {
	if len(x) == 0 {
		return math.NaN(), math.NaN()
	}
	for _, v := range x {
		mean += v
	}
	mean /= float64(len(x))
	if len(x) < 2 {
		return mean, math.NaN()
	}
	ss := 0.0
	for _, v := range x {
		ss += (v - mean) * (v - mean)
	}
	return mean, math.Sqrt(ss / float64(len(x)-1))
}
