package publish

import (
	"errors"
	"fmt"
)

// Sentinel errors; test with errors.Is.
var (
	ErrDSN          = errors.New("cannot read the database address")
	ErrConnect      = errors.New("cannot connect to the database")
	ErrSchemaNewer  = errors.New("the database schema is newer than this program")
	ErrSchemaName   = errors.New("invalid schema name")
	ErrNoPostGIS    = errors.New("PostGIS is required but not available")
	ErrKindMismatch = errors.New("an event's kind differs from its entity's kind in the database")
	ErrCorrupt      = errors.New("a stored event does not match its id")
	ErrBatchSize    = errors.New("batch size must be at least 1")
)

// EventError locates a failure at one event of the store.
type EventError struct {
	Seq uint64 // the store's local sequence number
	ID  string // hex event id
	Err error
}

func (e *EventError) Error() string {
	return fmt.Sprintf("event %s (store sequence %d): %v", e.ID, e.Seq, e.Err)
}

func (e *EventError) Unwrap() error { return e.Err }
