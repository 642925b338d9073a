package record

import (
	"errors"
	"fmt"
)

// Sentinel errors. Errors returned by this package wrap one of them; test
// with errors.Is. Validation errors also wrap ErrInvalid.
var (
	ErrInvalid        = errors.New("not valid")
	ErrDecode         = errors.New("malformed event encoding")
	ErrNotCanonical   = errors.New("event bytes are not in deterministic encoding")
	ErrTooLarge       = errors.New("event is too large")
	ErrVersion        = errors.New("unknown event format version")
	ErrKind           = errors.New("unknown entity kind")
	ErrPayload        = errors.New("payload does not match the event kind")
	ErrMissingID      = errors.New("id is missing")
	ErrLatitude       = errors.New("latitude outside -90..90 degrees")
	ErrLongitude      = errors.New("longitude outside -180..180 degrees")
	ErrNonFinite      = errors.New("value is not a finite number")
	ErrNegative       = errors.New("value is negative")
	ErrNotPositive    = errors.New("value must be above zero")
	ErrPullParts      = errors.New("pull parts exceed the stated pull mass")
	ErrRequired       = errors.New("required field is empty")
	ErrTooLong        = errors.New("text is too long")
	ErrBadSetting     = errors.New("setting body is not valid JSON")
	ErrTombstone      = errors.New("a deletion must supersede an event and carry no payload")
	ErrKindMismatch   = errors.New("event kind differs from the entity's kind")
	ErrUnknownSetting = errors.New("unknown setting kind")
	ErrSettingName    = errors.New("a setting's name differs from the name in its document")
	ErrOutOfRange     = errors.New("value outside its physical range")
	ErrControlChar    = errors.New("text holds a control character")
)

// FieldError is a validation error located at one field of one record.
type FieldError struct {
	Field string // dotted path, e.g. "site.lat" or "pull.kg.pvc"
	Value string // the offending value as text, may be empty
	Err   error  // a sentinel of this package or of package assess
}

func (e *FieldError) Error() string {
	msg := e.Err.Error()
	if e.Value != "" {
		return fmt.Sprintf("%s = %s: %s", e.Field, e.Value, msg)
	}
	return fmt.Sprintf("%s: %s", e.Field, msg)
}

// Unwrap gives both ErrInvalid and the specific sentinel.
func (e *FieldError) Unwrap() []error { return []error{ErrInvalid, e.Err} }

// EventError locates an error at one event of a batch.
type EventError struct {
	Index int     // position in the batch
	ID    EventID // zero when the bytes could not be decoded
	Err   error
}

func (e *EventError) Error() string {
	if e.ID == (EventID{}) {
		return fmt.Sprintf("event %d: %v", e.Index, e.Err)
	}
	return fmt.Sprintf("event %d (%s): %v", e.Index, e.ID.Short(), e.Err)
}

func (e *EventError) Unwrap() error { return e.Err }
