package record

import (
	"baleassay/assess"
	"fmt"
	"math"
	"strconv"
	"time"
)

// The physical range of every number a record stores. A value outside
// its range is refused on save and on import alike (ValidateEvent), so a
// typing slip (grams for kilograms, centimetres for metres), a broken
// clock or a hostile file cannot put a number into the store that later
// overflows a sum or a duration. The ranges are wide on purpose: they
// bound what can be physically true of a bale, not what is usual (that
// is what the density warnings are for).
const (
	// MaxBaleKg bounds a bale's gross mass, a pull's stated mass, each
	// sorted part and the sum of a pull's parts (a pull may be the whole
	// bale). Bottle bales from horizontal balers weigh 250–800 kg
	// (common practice); no baler makes a bale of five tonnes.
	MaxBaleKg = 5000.0
	// MaxBaleDimM bounds each bale dimension in metres. Bales are about
	// 0.7–1.6 m on a side (common practice); 5 m catches centimetres
	// typed as metres.
	MaxBaleDimM = 5.0
	// MaxPieces bounds one category's piece count in a pull. A whole bale
	// of MaxBaleKg in 5 g pieces would be 10⁶ pieces.
	MaxPieces = 1_000_000
)

// The range of every stored time, in Unix milliseconds UTC. Clock
// stamps say when a device recorded an event: from 2000-01-01
// (inclusive) to 2100-01-01 (exclusive); a stamp outside comes from a
// clock that lost its setting (1970) or from a damaged or hostile file.
// Dates a grader types (a bale's receipt, a pull's sampling) may be
// entered after the fact for old audits, so they start at 1950-01-01.
// Both bounds keep RFC 3339 output (years to 9999) and duration
// arithmetic far from overflowing.
var (
	MinTimeMs = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC).UnixMilli()
	MaxTimeMs = time.Date(2100, 1, 1, 0, 0, 0, 0, time.UTC).UnixMilli() // exclusive
	MinDateMs = time.Date(1950, 1, 1, 0, 0, 0, 0, time.UTC).UnixMilli()
)

// checkTime refuses a clock stamp outside [MinTimeMs, MaxTimeMs).
func checkTime(field string, ms int64) error {
	if ms < MinTimeMs || ms >= MaxTimeMs {
		return &FieldError{Field: field, Value: strconv.FormatInt(ms, 10),
			Err: fmt.Errorf("%w: a clock stamp must lie from 2000-01-01 to 2099-12-31 UTC; check the device's date", ErrOutOfRange)}
	}
	return nil
}

// checkDate refuses a typed date outside [MinDateMs, MaxTimeMs).
func checkDate(field string, ms int64) error {
	if ms < MinDateMs || ms >= MaxTimeMs {
		return &FieldError{Field: field, Value: strconv.FormatInt(ms, 10),
			Err: fmt.Errorf("%w: a date must lie from 1950-01-01 to 2099-12-31 UTC", ErrOutOfRange)}
	}
	return nil
}

// ValidateGrossKg holds a bale's gross mass to the rule of a save: finite,
// above 0, at most MaxBaleKg (for a mass given beside a pulls file).
func ValidateGrossKg(kg float64) error {
	return checkKg("bale.gross_kg", kg, true, ErrNonFinite, ErrNotPositive)
}

// checkKg refuses a mass that is not finite, negative or above MaxBaleKg.
// positive also refuses zero. nonFinite and negative are the sentinels
// the caller's rule uses (pull parts use package assess's).
func checkKg(field string, x float64, positive bool, nonFinite, negative error) error {
	switch {
	case math.IsNaN(x) || math.IsInf(x, 0):
		return &FieldError{Field: field, Value: fnum(x), Err: nonFinite}
	case x < 0 || (positive && x == 0):
		return &FieldError{Field: field, Value: fnum(x), Err: negative}
	case x > MaxBaleKg:
		return &FieldError{Field: field, Value: fnum(x),
			Err: fmt.Errorf("%w: above %s kg, more than any bale weighs; check the unit (kg)", ErrOutOfRange, assess.Plain(MaxBaleKg))}
	}
	return nil
}

// TerminalSafe reports the first character of s that must not be
// stored in a name, tag, label or note, and its byte offset; it is
// assess.TerminalSafe (control characters, bidirectional controls, line
// and paragraph separators). ok is true when s holds none. Invalid UTF-8
// is refused elsewhere.
func TerminalSafe(s string) (r rune, at int, ok bool) { return assess.TerminalSafe(s) }

// FormatSkew writes a clock difference given in milliseconds for people
// ("3m0s", "45 days", "12 years"), for any int64 without overflow:
// differences beyond what time.Duration holds are never converted to one.
func FormatSkew(ms int64) string {
	neg := ms < 0
	var u uint64
	if neg {
		u = uint64(-(ms + 1)) + 1 // |math.MinInt64| without overflow
	} else {
		u = uint64(ms)
	}
	const day = 24 * 3600 * 1000
	var s string
	switch {
	case u >= 2*365*day:
		s = fmt.Sprintf("%d years", u/(365*day))
	case u >= 2*day:
		s = fmt.Sprintf("%d days", (u+day/2)/day)
	default:
		s = (time.Duration(u) * time.Millisecond).Round(time.Second).String()
	}
	if neg {
		return "-" + s
	}
	return s
}
