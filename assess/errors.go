package assess

import (
	"errors"
	"fmt"
)

// Sentinel errors of the audit model. Errors returned by this package wrap
// one of them; test with errors.Is. Their texts are plain words a grader
// reads, without a package prefix.
var (
	ErrNoPulls          = errors.New("the audit has no pulls")
	ErrNegativeMass     = errors.New("a mass is negative")
	ErrNonFiniteMass    = errors.New("a mass is not a finite number")
	ErrEmptyPull        = errors.New("a pull weighs 0 kg")
	ErrDuplicatePull    = errors.New("a pull label is used twice")
	ErrBaleLighter      = errors.New("the bale weighs less than its pulls")
	ErrUnknownCategory  = errors.New("unknown category")
	ErrBadConfidence    = errors.New("the confidence level must lie between 0 and 1")
	ErrNegativeCount    = errors.New("a piece count is negative")
	ErrBadTotal         = errors.New("the pieces examined are fewer than the pieces counted")
	ErrBadSpec          = errors.New("invalid spec")
	ErrBadPrecision     = errors.New("the precision must be above 0")
	ErrBadSpread        = errors.New("the spread is not a standard deviation")
	ErrNoShare          = errors.New("the share is 0")
	ErrCategoryMismatch = errors.New("the pull does not match the category list")
	ErrBadMethod        = errors.New("unknown estimator")
	ErrBadLoad          = errors.New("invalid load")

	// Errors of the pulls CSV reader, wrapped in an *InputError.
	ErrBadHeader = errors.New("bad header")
	ErrBadNumber = errors.New("not a number")
	ErrNoLabel   = errors.New("a pull label is empty")
	ErrBadCSV    = errors.New("malformed CSV")
)

// Error is a message for the grader that wraps one of the sentinels: its
// text is the message alone, errors.Is finds the sentinel.
type Error struct {
	Msg string
	Err error
}

func (e *Error) Error() string { return e.Msg }

func (e *Error) Unwrap() error { return e.Err }

// errorf builds an *Error from a sentinel and a message.
func errorf(sentinel error, format string, args ...any) error {
	return &Error{Msg: fmt.Sprintf(format, args...), Err: sentinel}
}
