package store

import (
	"baleassay/data/record"
	"bytes"
	"errors"
	"fmt"
	"strings"
)

// ApplyResult counts what a write did.
type ApplyResult struct {
	New       int // events inserted
	Present   int // events already in the store (or repeated in the batch), left as they were
	Conflicts int // entities that became conflicted by this write
	// Warnings are the implausible values found in the new events (kept:
	// an import does not ask; a local Save asks first).
	Warnings []record.EventWarning
}

// ApplyRaw adds encoded events (from an import) and meta values in one
// committed and synced transaction, all or nothing. Every event is first
// decoded strictly (DecodeEvent), hashed and validated (ValidateEvent),
// on all CPUs (checkEvents); the failure of the lowest index is returned
// as an *EventError naming its index and field, and nothing is written.
// Events already present are counted, not rewritten. raws may alias a
// larger buffer that the caller leaves unchanged during the call: the
// store reads it until the commit and keeps nothing of it afterwards.
// Meta keys must start with MetaTransferPrefix.
func (s *Store) ApplyRaw(raws [][]byte, meta map[string][]byte) (ApplyResult, error) {
	return s.ApplyRawWithIDs(raws, nil, meta, ApplyOptions{})
}

// ApplyOptions tune ApplyRawWithIDs.
type ApplyOptions struct {
	// AllowDemo lets a store of real records take events of the demo
	// scenario; without it they are refused with a *DemoRecordsError.
	AllowDemo bool
	// MetaFrom, when set, computes more meta values inside the write
	// transaction from the values stored there (read returns nil for a
	// key not stored), so that two writes that each read and change a
	// value cannot lose one's change. Its keys follow ApplyChecked's rule;
	// an error from it refuses the write.
	MetaFrom func(read func(key string) ([]byte, error)) (map[string][]byte, error)
}

// ApplyRawWithIDs is ApplyRaw with the events' ids when the caller has
// them (OpenBundle hashed every event to check its stated id); nil ids
// are computed here.
func (s *Store) ApplyRawWithIDs(raws [][]byte, ids []record.EventID, meta map[string][]byte, opt ApplyOptions) (ApplyResult, error) {
	b, err := s.Check(raws, ids)
	if err != nil {
		return ApplyResult{}, err
	}
	return s.ApplyChecked(b, meta, opt)
}

// Checked is a batch of events that passed every check short of the
// store's own (Check), ready for ApplyChecked. It refers to the callers'
// bytes, which must stay unchanged until it is applied.
type Checked struct {
	items []record.Checked
	warns []record.EventWarning
}

// Len is the number of events in the batch.
func (c Checked) Len() int { return len(c.items) }

// Check decodes strictly (DecodeEvent), hashes (unless ids are given)
// and validates (ValidateEvent) every event on all CPUs, the first half
// of ApplyRaw. It reads nothing from the store, so an importer can check
// the next file while the store writes this one.
func (s *Store) Check(raws [][]byte, ids []record.EventID) (Checked, error) {
	items, warns, err := record.CheckEvents(raws, ids, s.now(), record.CheckWorkers(len(raws)))
	return Checked{items: items, warns: warns}, err
}

// ApplyChecked writes a checked batch and meta values in one committed
// and synced transaction, all or nothing: the second half of ApplyRaw.
// Meta keys must start with MetaTransferPrefix.
func (s *Store) ApplyChecked(b Checked, meta map[string][]byte, opt ApplyOptions) (ApplyResult, error) {
	if !opt.AllowDemo && !s.demo.Load() {
		n := 0
		for i := range b.items {
			if b.items[i].Demo {
				n++
			}
		}
		if n > 0 {
			return ApplyResult{}, &DemoRecordsError{N: n}
		}
	}
	if err := checkMetaKeys(meta); err != nil {
		return ApplyResult{}, err
	}
	var extra func(w wtx, c *counts) error
	if opt.MetaFrom != nil {
		extra = func(w wtx, c *counts) error { return putMetaFrom(w, c, opt.MetaFrom) }
	}
	res, err := s.commit(b.items, meta, true, extra)
	res.Warnings = b.warns
	return res, err
}

// checkMetaKeys refuses meta keys an apply may not write.
func checkMetaKeys(meta map[string][]byte) error {
	for k := range meta {
		if !strings.HasPrefix(k, MetaTransferPrefix) || len(k) > 200 {
			return fmt.Errorf("%w: %q (want %q...)", ErrMetaKey, k, MetaTransferPrefix)
		}
	}
	return nil
}

// putMetaFrom runs an ApplyOptions.MetaFrom inside the write and puts
// what it returns; its refusals are the caller's (dataError), not a
// failure of the disk.
func putMetaFrom(w wtx, c *counts, from func(read func(key string) ([]byte, error)) (map[string][]byte, error)) error {
	m := w.bucket(bMeta)
	read := func(key string) ([]byte, error) {
		v, _, err := metaGet(m.Bucket, key)
		return bytes.Clone(v), err
	}
	more, err := from(read)
	if err == nil {
		err = checkMetaKeys(more)
	}
	if err != nil {
		if errors.Is(err, ErrDamaged) {
			return err
		}
		return dataError{err}
	}
	for _, k := range record.SortedKeys(more) {
		if err := metaPut(m, c, k, more[k]); err != nil {
			return err
		}
	}
	return nil
}

// SaveOptions tune Save.
type SaveOptions struct {
	// Confirm accepts warnings. Without it a save with warnings is
	// refused with a *WarningsError and nothing is written.
	Confirm bool
}

// Save stamps local events (format version, this device, a fresh clock
// stamp, and a new entity id where Entity is zero), validates them and
// writes them in one committed and synced transaction. It returns the new
// event ids in order, and the entity ids through the events' Entity when
// they were made here.
func (s *Store) Save(evs []record.Event, opt SaveOptions) ([]record.EventID, error) {
	ids, _, err := s.save(evs, opt, nil)
	return ids, err
}

// save is Save with an extra step run inside the transaction.
func (s *Store) save(evs []record.Event, opt SaveOptions, extra func(w wtx, c *counts) error) ([]record.EventID, []record.Event, error) {
	items := make([]record.Checked, len(evs))
	var warns []record.Warning
	now := s.now()
	out := make([]record.Event, len(evs))
	for i, e := range evs {
		e.Version = record.FormatVersion
		e.Device = s.device
		e.Demo = e.Demo || s.demo.Load()
		e.Clock = s.clock.Now()
		if e.Entity.IsZero() {
			id, err := record.NewEntityID()
			if err != nil {
				return nil, nil, err
			}
			e.Entity = id
		}
		raw, err := record.EncodeEvent(e)
		if err != nil {
			return nil, nil, &record.EventError{Index: i, Err: err}
		}
		id := record.IDOf(raw)
		w, err := record.ValidateEventAt(e, now)
		if err != nil {
			return nil, nil, &record.EventError{Index: i, ID: id, Err: err}
		}
		warns = append(warns, w...)
		items[i] = record.CheckedOf(id, raw, e)
		out[i] = e
	}
	if len(warns) > 0 && !opt.Confirm {
		return nil, nil, &WarningsError{Warnings: warns}
	}
	if _, err := s.commit(items, nil, false, extra); err != nil {
		return nil, nil, err
	}
	ids := make([]record.EventID, len(items))
	for i, it := range items {
		ids[i] = it.ID
	}
	return ids, out, nil
}

// writable reports why the store cannot take a write, if it cannot.
func (s *Store) writableLocked() error {
	if s.closed {
		return ErrClosed
	}
	if s.readOnly && s.readFirst {
		return s.reopenWritable()
	}
	if s.readOnly {
		return &ReadOnlyError{Dir: s.dir}
	}
	if s.failed != nil {
		return &WriteError{Err: s.failed}
	}
	return nil
}
