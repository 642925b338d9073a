package yield

import (
	"errors"
	"fmt"
)

// Sentinel errors of the yield model. Every error this package returns
// wraps one of them; test with errors.Is.
var (
	ErrBadNumber     = errors.New("yield: value is not a finite number")
	ErrOutOfRange    = errors.New("yield: value out of range")
	ErrUnknownKey    = errors.New("yield: unknown key")
	ErrUnknownGlycol = errors.New("yield: unknown glycol")
	ErrBadLine       = errors.New("yield: invalid line profile")
	ErrNotClosed     = errors.New("yield: line stage does not close")
	ErrBadSpec       = errors.New("yield: invalid flake spec")
	ErrBadCharge     = errors.New("yield: invalid glycolysis charge")
	ErrRebuildsPET   = errors.New("yield: stripping that much glycol leaves no chain ends")
	ErrBadBlend      = errors.New("yield: invalid polyol blend")
	ErrBadAudit      = errors.New("yield: invalid audit")
)

// FieldError names the field of an input that is wrong and says what to
// fix. Where is the place in a file or recipe ("stage 3 (sink_float)"),
// Field the field name as written in JSON or on the command line.
type FieldError struct {
	Where string
	Field string
	Msg   string
	Err   error // one of the sentinels above
}

func (e *FieldError) Error() string {
	s := "yield: "
	if e.Where != "" {
		s += e.Where + ": "
	}
	if e.Field != "" {
		s += e.Field + ": "
	}
	return s + e.Msg
}

func (e *FieldError) Unwrap() error { return e.Err }

func fieldErr(where, field string, sentinel error, format string, args ...any) error {
	return &FieldError{Where: where, Field: field, Msg: fmt.Sprintf(format, args...), Err: sentinel}
}

// checkFraction reports a FieldError unless 0 ≤ v ≤ 1 and finite.
func checkFraction(where, field string, v float64) error {
	if !finite(v) {
		return fieldErr(where, field, ErrBadNumber, "%v is not a number; give a fraction from 0 to 1", v)
	}
	if v < 0 || v > 1 {
		return fieldErr(where, field, ErrOutOfRange, "%g is outside 0–1; give a fraction (0.95, not 95)", v)
	}
	return nil
}

// checkPositive reports a FieldError unless v > 0 and finite.
func checkPositive(where, field string, v float64) error {
	if !finite(v) {
		return fieldErr(where, field, ErrBadNumber, "%v is not a number", v)
	}
	if v <= 0 {
		return fieldErr(where, field, ErrOutOfRange, "%g must be above 0", v)
	}
	return nil
}

// checkNonNegative reports a FieldError unless v ≥ 0 and finite.
func checkNonNegative(where, field string, v float64) error {
	if !finite(v) {
		return fieldErr(where, field, ErrBadNumber, "%v is not a number", v)
	}
	if v < 0 {
		return fieldErr(where, field, ErrOutOfRange, "%g must not be negative", v)
	}
	return nil
}
