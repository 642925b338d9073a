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
