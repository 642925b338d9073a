package assess

import (
	"fmt"
	"math"
	"regexp"
	"strconv"
)

// Numbers in files and on command lines are plain decimals: an optional
// sign, digits with at most one decimal point, and an optional exponent
// (1.25, -0.5, .5, 2e-3). strconv also reads hexadecimal floats
// ("0x1p4" is 16), digit separators ("1_0") and "Inf" or "NaN", which a
// grader never means and which would let one file read differently from
// how it looks.
var (
	decimalRE = regexp.MustCompile(`^[+-]?([0-9]+(\.[0-9]*)?|\.[0-9]+)([eE][+-]?[0-9]+)?$`)
	wholeRE   = regexp.MustCompile(`^[+-]?[0-9]+$`)
)

// ParseDecimal reads a plain decimal number; anything else, and a number
// too large for a float64, is ErrBadNumber.
func ParseDecimal(s string) (float64, error) {
	if len(s) > 64 || !decimalRE.MatchString(s) {
		return 0, fmt.Errorf("%w: %s is not a plain decimal number (digits, one decimal point, optional exponent: 1.25, 2e-3)", ErrBadNumber, excerpt(s))
	}
	x, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(x, 0) {
		return 0, fmt.Errorf("%w: %s is too large", ErrBadNumber, excerpt(s))
	}
	return x, nil
}

// ParseWhole reads a plain whole number (digits with an optional sign)
// that fits an int.
func ParseWhole(s string) (int, error) {
	if len(s) > 20 || !wholeRE.MatchString(s) {
		return 0, fmt.Errorf("%w: %s is not a whole number", ErrBadNumber, excerpt(s))
	}
	n, err := strconv.Atoi(s)
	if err != nil {
		return 0, fmt.Errorf("%w: %s is too large", ErrBadNumber, excerpt(s))
	}
	return n, nil
}
