package store

import (
	"baleassay/data/record"
	"errors"
	"fmt"
	"time"
)

// rebuildSource is what a new store is built from: the upgrade of a
// store of the previous layout, and the rescue of a damaged one.
type rebuildSource struct {
	meta   map[string][]byte // meta values (device id, clock, transfer records, ...)
	drafts map[string][]byte // draft name → CBOR of the pull
	// events calls yield for every event to copy, in local insertion
	// order; its bytes have already been checked against the id.
	events func(yield func(id record.EventID, raw []byte) error) error
}

// rebuildReport says what a rebuild copied and what it could not.
type rebuildReport struct {
	Events  int      // events written
	Refused []string // events that could not be written, with the reason
}

// rebuildBatch is the number of events per transaction of a rebuild.
const rebuildBatch = 20_000

// rebuild writes a new store in dir from src. Events are decoded but not
// validated again: they passed the validation of their day, and a rule
// tightened since must not lose a record on upgrade or rescue. An event
// that does not decode, or whose entity is already of another kind, is
// left out and reported.
func rebuild(dir string, src rebuildSource, now func() time.Time) (rebuildReport, error) {
	var rep rebuildReport
	s, err := openOnce(dir, Options{Now: now, NoSiteIndex: true, Timeout: OpenTimeout})
	if err != nil {
		return rep, err
	}
	defer s.Close()
	var items []record.Checked
	flush := func() error {
		for len(items) > 0 {
			res, err := s.commit(items, nil, true, nil)
			var ee *record.EventError
			if errors.As(err, &ee) && ee.Index >= 0 && ee.Index < len(items) {
				rep.Refused = append(rep.Refused, fmt.Sprintf("event %s: %v", items[ee.Index].ID.Short(), err))
				items = append(items[:ee.Index], items[ee.Index+1:]...)
				continue
			}
			if err != nil {
				return err
			}
			rep.Events += res.New
			items = items[:0]
		}
		return nil
	}
	err = src.events(func(id record.EventID, raw []byte) error {
		e, err := record.DecodeTrusted(raw)
		if err != nil {
			rep.Refused = append(rep.Refused, fmt.Sprintf("event %s does not decode: %v", id.Short(), err))
			return nil
		}
		items = append(items, record.CheckedOf(id, append([]byte(nil), raw...), e))
		if len(items) == rebuildBatch {
			return flush()
		}
		return nil
	})
	if err == nil {
		err = flush()
	}
	if err != nil {
		return rep, err
	}
	err = s.writeTx(func(w wtx, c *counts) error {
		m := w.bucket(bMeta)
		for _, k := range record.SortedKeys(src.meta) {
			if k == metaCounts || k == metaLayout {
				continue
			}
			v := src.meta[k]
			if last := s.clock.Last(); k == metaClock && record.HLCFromBytes(v).Compare(last) < 0 {
				v = last.Bytes() // never behind the events copied
			}
			if err := metaPut(m, c, k, v); err != nil {
				return err
			}
		}
		d := w.bucket(bDrafts)
		for _, name := range record.SortedKeys(src.drafts) {
			k := []byte(name)
			if d.Get(k) == nil {
				c.Drafts++
			}
			if err := d.Put(k, sealCRC(bDrafts, k, src.drafts[name])); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		return rep, err
	}
	return rep, s.Close()
}
