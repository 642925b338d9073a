package yield

import (
	"baleassay/assess"
	"errors"
	"fmt"
	"strings"
)

// Sentinel errors of the yield model. Every error this package returns
// wraps one of them; test with errors.Is. Their texts, like every
// message of this package, carry no package prefix: a grader reads
// "glycol ratio must be above 0 (got 0)".
var (
	ErrBadNumber     = errors.New("a value is not a finite number")
	ErrOutOfRange    = errors.New("a value is out of range")
	ErrUnknownKey    = errors.New("unknown key")
	ErrUnknownGlycol = errors.New("unknown glycol")
	ErrBadLine       = errors.New("invalid line profile")
	ErrNotClosed     = errors.New("a line stage does not close")
	ErrBadSpec       = errors.New("invalid flake spec")
	ErrBadCharge     = errors.New("invalid glycolysis charge")
	ErrRebuildsPET   = errors.New("stripping that much glycol leaves no chain ends")
	ErrBadBlend      = errors.New("invalid polyol blend")
	ErrBadAudit      = errors.New("invalid audit")
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
	var b strings.Builder
	if e.Where != "" && !contextWords[e.Where] {
		b.WriteString(e.Where)
		b.WriteString(": ")
	}
	if e.Field == "" {
		b.WriteString(e.Msg)
		return b.String()
	}
	b.WriteString(fieldWords(e.Field))
	for _, verb := range []string{"must ", "is ", "has ", "needs ", "applies "} {
		if strings.HasPrefix(e.Msg, verb) {
			b.WriteByte(' ')
			b.WriteString(e.Msg)
			return b.String()
		}
	}
	b.WriteString(": ")
	b.WriteString(e.Msg)
	return b.String()
}

// fieldLabels name the fields in a grader's or chemist's words; other
// fields are written with spaces for underscores.
var fieldLabels = map[string]string{
	"strip_eg": "EG stripping share", "pet_kg": "PET mass", "glycol_kg": "glycol mass", "catalyst_pct": "catalyst loading",
	"pet_mn": "PET Mn", "pvc_kg": "PVC mass", "inert_kg": "inert solids mass", "bale_kg": "bale mass", "reactor_kg": "reactor charge",
	"isocyanate_nco": "NCO content", "target_pet_share": "target recycled-PET share", "pet_share": "recycled-PET share",
	"water_kg": "water mass", "kg": "mass",
}

func fieldWords(field string) string {
	if l, ok := fieldLabels[field]; ok {
		return l
	}
	return strings.NewReplacer("_", " ", ".", " ").Replace(field)
}

// contextWords are Where values that name a part of the model rather
// than a place in a file; the message leaves them out, the field says
// enough.
var contextWords = map[string]bool{"glycolysis": true, "blend": true, "plan": true, "audit": true, "monte carlo": true, "line": true, "flake spec": true}

func (e *FieldError) Unwrap() error { return e.Err }

func fieldErr(where, field string, sentinel error, format string, args ...any) error {
	return &FieldError{Where: where, Field: field, Msg: fmt.Sprintf(format, args...), Err: sentinel}
}

// checkFraction reports a FieldError unless 0 ≤ v ≤ 1 and finite.
func checkFraction(where, field string, v float64) error {
	if !finite(v) {
		return fieldErr(where, field, ErrBadNumber, "is not a number (%v); give a fraction from 0 to 1", v)
	}
	if v < 0 || v > 1 {
		return fieldErr(where, field, ErrOutOfRange, "is %s, outside 0–1; give a fraction (0.95, not 95)", assess.Plain(v))
	}
	return nil
}

// checkPositive reports a FieldError unless v > 0 and finite.
func checkPositive(where, field string, v float64) error {
	if !finite(v) {
		return fieldErr(where, field, ErrBadNumber, "is not a number (%v)", v)
	}
	if v <= 0 {
		return fieldErr(where, field, ErrOutOfRange, "must be above 0 (got %s)", assess.Plain(v))
	}
	return nil
}

// checkNonNegative reports a FieldError unless v ≥ 0 and finite.
func checkNonNegative(where, field string, v float64) error {
	if !finite(v) {
		return fieldErr(where, field, ErrBadNumber, "is not a number (%v)", v)
	}
	if v < 0 {
		return fieldErr(where, field, ErrOutOfRange, "must not be negative (got %s)", assess.Plain(v))
	}
	return nil
}
