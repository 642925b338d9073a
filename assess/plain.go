package assess

import (
	"math"
	"strconv"
	"strings"
)

// maxPlainLen is the longest plain decimal Plain and Sig write; a longer
// one (a hostile or damaged value such as 1e308 or -1e-300) is written as
// a mantissa times a power of ten instead.
const maxPlainLen = 24

// Plain writes x for a person to read: decimals, the shortest form that
// reads back as x ("0.00001", "1000000", "0.1"), never an exponent
// ("1e+06" reads as a typing slip). Values no one types (beyond
// maxPlainLen characters) are written as "1 × 10³⁰⁸". NaN and ±Inf are
// written as strconv does.
func Plain(x float64) string {
	s := strconv.FormatFloat(x, 'f', -1, 64)
	if len(s) <= maxPlainLen || math.IsNaN(x) || math.IsInf(x, 0) {
		return s
	}
	return powerOfTen(x, 4)
}

// Sig writes x with n significant digits (n ≥ 1) in decimals, trailing
// zeros after the point dropped, as %.ng would but never with an
// exponent: Sig(1.234e-5, 3) is "0.0000123", Sig(123456, 3) "123456"
// (whole digits are never cut).
func Sig(x float64, n int) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return strconv.FormatFloat(x, 'g', -1, 64)
	}
	if x == 0 {
		return "0"
	}
	n = max(1, n)
	_, exp, _ := strings.Cut(strconv.FormatFloat(x, 'e', n-1, 64), "e")
	e, _ := strconv.Atoi(exp)
	s := strconv.FormatFloat(x, 'f', max(0, n-1-e), 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	if len(s) > maxPlainLen {
		return powerOfTen(x, n)
	}
	return s
}

// powerOfTen writes x as "m × 10ᵉ" with n significant digits.
func powerOfTen(x float64, n int) string {
	mant, exp, _ := strings.Cut(strconv.FormatFloat(x, 'e', max(0, n-1), 64), "e")
	if strings.Contains(mant, ".") {
		mant = strings.TrimRight(strings.TrimRight(mant, "0"), ".")
	}
	e, _ := strconv.Atoi(exp)
	const digits = "⁰¹²³⁴⁵⁶⁷⁸⁹"
	sup := []rune(digits)
	var b strings.Builder
	b.WriteString(mant + " × 10")
	if e < 0 {
		b.WriteString("⁻")
		e = -e
	}
	for _, c := range strconv.Itoa(e) {
		b.WriteRune(sup[c-'0'])
	}
	return b.String()
}
