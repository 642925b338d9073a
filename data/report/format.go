package report

import (
	"math"
	"strconv"
	"strings"
	"time"

	"baleassay/data/desk"
)

// nbsp joins a number to its unit.
const nbsp = "\u00a0"

// num writes x with at most digits decimals, trailing zeros dropped,
// thousands not grouped, never an exponent; "–" for NaN.
func num(x float64, digits int) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "–"
	}
	return desk.Num(x, digits)
}

// fixed writes x with exactly digits decimals ("–" for NaN), for columns.
func fixed(x float64, digits int) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "–"
	}
	s := strconv.FormatFloat(x, 'f', digits, 64)
	if s == "-0" || strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-")
	}
	return s
}

// pctDigits is how many decimals a percentage needs to show a share of
// that size with two or three significant figures.
func pctDigits(v float64) int {
	v = math.Abs(v)
	switch {
	case v == 0 || v >= 10:
		return 1
	case v >= 1:
		return 2
	case v >= 0.1:
		return 2
	case v >= 0.01:
		return 3
	}
	return 4
}

// pct writes a share (0 to 1) as a percentage: "93.2 %", "0.031 %".
func pct(x float64) string {
	if math.IsNaN(x) {
		return "–"
	}
	v := 100 * x
	return fixed(v, pctDigits(v)) + nbsp + "%"
}

// pctRange writes an interval of shares with the digits of its wider end.
func pctRange(lo, hi float64) string {
	d := max(pctDigits(100*lo), pctDigits(100*hi))
	return fixed(100*lo, d) + "–" + fixed(100*hi, d) + nbsp + "%"
}

// kg writes a mass in kg with decimals suited to its size.
func kg(x float64) string { return massNum(x) + nbsp + "kg" }

func massNum(x float64) string {
	a := math.Abs(x)
	switch {
	case a >= 100:
		return fixed(x, 1)
	case a >= 1:
		return fixed(x, 2)
	}
	return fixed(x, 3)
}

// day writes a date.
func day(t time.Time) string { return t.UTC().Format("2006-01-02") }

// stamp writes a time to the minute, UTC.
func stamp(t time.Time) string { return t.UTC().Format("2006-01-02 15:04 UTC") }

// level writes a confidence level: "90 %".
func level(c float64) string { return num(100*c, 2) + nbsp + "%" }

// tonnes writes a large mass in t, a small one in kg.
func tonnes(x float64) string {
	if math.Abs(x) >= 10000 {
		return fixed(x/1000, 2) + nbsp + "t"
	}
	return kg(x)
}

// pctUp writes an upper bound as a percentage with two significant
// digits, rounded up so that the bound written is never below the bound
// computed: 0.000852 → "0.086 %".
func pctUp(x float64) string {
	v := 100 * x
	if !(v > 0) || math.IsInf(v, 0) {
		return pct(x)
	}
	d := 1 - int(math.Floor(math.Log10(v))) // decimals for two significant digits
	scale := math.Pow(10, float64(d))
	up := math.Ceil(v*scale-1e-9) / scale
	return fixed(up, max(0, d)) + nbsp + "%"
}
