package store

import (
	"baleassay/data/record"
	"time"
)

// WriteDemo checks encoded events as at the given time, writes them in one
// transaction and marks the store as a demo store, with note saying how
// the scenario was made.
func (s *Store) WriteDemo(raws [][]byte, at time.Time, note string) (ApplyResult, error) {
	items, _, err := record.CheckEvents(raws, nil, at, record.CheckWorkers(len(raws)))
	if err != nil {
		return ApplyResult{}, err
	}
	res, err := s.commit(items, nil, true, func(w wtx, c *counts) error {
		return metaPut(w.bucket(bMeta), c, metaDemo, []byte(note))
	})
	if err == nil {
		s.demo.Store(true)
	}
	return res, err
}
