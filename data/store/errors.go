package store

import (
	"baleassay/data/record"
	"errors"
	"fmt"
	"strings"
)

// Sentinel errors of the store.
var (
	ErrNeedsConfirm = errors.New("save has warnings that need confirming")
	ErrStoreInUse   = errors.New("store in use by another process")
	ErrStoreFailed  = errors.New("store stopped after a write failure")
	ErrClosed       = errors.New("store is closed")
	ErrNotFound     = errors.New("not found")
	ErrMetaKey      = errors.New("meta key outside the allowed prefix")
	ErrDemoRecords  = errors.New("demo records refused")
	ErrAmbiguousID  = errors.New("id prefix matches more than one entity")
	ErrDamaged      = errors.New("the store is damaged")
	ErrReadOnly     = errors.New("the store was opened read-only")
	ErrNoStore      = errors.New("no records store in this folder")
)

// WarningsError refuses a save whose events have warnings the user has
// not confirmed. It wraps ErrNeedsConfirm.
type WarningsError struct {
	Warnings []record.Warning
}

func (e *WarningsError) Error() string {
	parts := make([]string, len(e.Warnings))
	for i, w := range e.Warnings {
		parts[i] = w.String()
	}
	return "needs confirming: " + strings.Join(parts, "; ")
}

func (e *WarningsError) Unwrap() error { return ErrNeedsConfirm }

// StoreInUseError says which store is held by another process.
type StoreInUseError struct {
	Path string
}

func (e *StoreInUseError) Error() string {
	return fmt.Sprintf("store %s is in use by another bale process; close it (or wait for it to finish) and try again", e.Path)
}

func (e *StoreInUseError) Unwrap() error { return ErrStoreInUse }

// dataError marks an error found inside a write transaction that is about
// the data, not the disk: it does not stop the store.
type dataError struct{ err error }

func (e dataError) Error() string { return e.err.Error() }
func (e dataError) Unwrap() error { return e.err }

// DamagedError reports that what the store read from its file does not
// hold together: a page, an index entry or an event's bytes that no
// longer match what was written (a failing disk, a flipped bit, a copy
// cut short). Nothing was changed by the operation that found it. It
// wraps ErrDamaged.
type DamagedError struct {
	Dir    string
	Detail string // what was found, for the check and for a bug report
}

func (e *DamagedError) Error() string {
	where := "the store"
	if e.Dir != "" {
		where = "the store at " + e.Dir
	}
	return fmt.Sprintf("%s is damaged (%s); nothing was changed. Run 'bale store check' to see what is affected, "+
		"then 'bale store rescue NEW-FOLDER' to copy every record that still verifies into a new store; "+
		"keep this folder until you have checked the rescued one, and ask the devices that sent records to export again to refill what was lost",
		where, e.Detail)
}

func (e *DamagedError) Unwrap() error { return ErrDamaged }

// damagef builds a *DamagedError without the folder (the store boundary
// fills it in).
func damagef(format string, args ...any) error {
	return &DamagedError{Detail: fmt.Sprintf(format, args...)}
}

// ReadOnlyError refuses a write on a store opened for reading.
type ReadOnlyError struct{ Dir string }

func (e *ReadOnlyError) Error() string {
	return fmt.Sprintf("the store at %s was opened for reading only; open it for writing (it must not be on read-only media)", e.Dir)
}

func (e *ReadOnlyError) Unwrap() error { return ErrReadOnly }

// DemoRecordsError refuses events of the invented demo scenario in a
// store of real records. It wraps ErrDemoRecords.
type DemoRecordsError struct{ N int }

func (e *DemoRecordsError) Error() string {
	return fmt.Sprintf("%d %s of the invented demo scenario: this store holds real records and takes demo records only when told to", e.N, plural(e.N, "record", "records"))
}

func (e *DemoRecordsError) Unwrap() error { return ErrDemoRecords }

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}
