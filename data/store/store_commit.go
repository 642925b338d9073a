package store

import (
	"baleassay/data/geo"
	"baleassay/data/record"
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"runtime/debug"
	"slices"

	bolt "go.etcd.io/bbolt"
)

// logFill is the fill percent of the log bucket: its keys only ever grow
// (local insertion numbers), so its pages can be filled before a split
// instead of bbolt's default half, as bbolt's documentation advises for
// append-only buckets (Bucket.FillPercent).
const logFill = 1.0

// entPlan is what one write does to one entity.
type entPlan struct {
	id      record.EntityID
	rec     entRecord // as stored; zero for a new entity
	stored  bool
	fresh   []int                       // items new to the store, in batch order
	targets map[record.EventID]struct{} // ids the fresh events supersede
}

// plan is the work of one write, computed before anything is put.
type plan struct {
	fresh []int      // indexes of new items, in batch order
	ents  []*entPlan // entities touched, in order of first appearance
}

// planWrite walks the items in batch order, exactly as one insert after
// another would: events already stored, or repeated earlier in the batch,
// are present; an event whose entity is stored (or made earlier in the
// batch) under another kind fails with its index. It reads one entity
// record per entity and one history key per event.
func planWrite(tx *bolt.Tx, items []record.Checked) (plan, int, error) {
	cur := tx.Bucket(bEnt).Cursor()
	var p plan
	byEnt := make(map[record.EntityID]*entPlan)
	seen := make(map[record.EventID]struct{}, len(items))
	present := 0
	for i := range items {
		it := &items[i]
		if _, dup := seen[it.ID]; dup {
			present++
			continue
		}
		ep := byEnt[it.Entity]
		if ep == nil {
			ep = &entPlan{id: it.Entity, rec: entRecord{Kind: it.Kind}}
			k := recKey(it.Entity)
			if v := getAt(cur, k); v != nil {
				r, ok := decodeEntRecord(k, v)
				if !ok {
					return p, 0, damagef("the record of entity %s does not verify", it.Entity)
				}
				ep.rec, ep.stored = r, true
			}
			byEnt[it.Entity] = ep
			p.ents = append(p.ents, ep)
		}
		if ep.stored && getAt(cur, entKey(it.Entity, tagHistory, it.ID)) != nil {
			seen[it.ID] = struct{}{}
			present++
			continue
		}
		seen[it.ID] = struct{}{}
		if ep.rec.Kind != it.Kind {
			return p, 0, dataError{&record.EventError{Index: i, ID: it.ID, Err: &record.FieldError{Field: "kind",
				Value: fmt.Sprintf("%s (entity %s is a %s)", it.Kind, it.Entity, ep.rec.Kind), Err: record.ErrKindMismatch}}}
		}
		ep.fresh = append(ep.fresh, i)
		p.fresh = append(p.fresh, i)
	}
	return p, present, nil
}

// commit inserts the items and meta values in one bbolt transaction. The
// result is that of inserting the items one after another in batch order
// (local sequence numbers follow the batch); each bucket is written in
// its key order, and every entity the write touched is checked whole
// before the commit (verifyEntity), so a damaged page is reported, not
// written over.
func (s *Store) commit(items []record.Checked, meta map[string][]byte, observe bool, extra func(w wtx, c *counts) error) (res ApplyResult, err error) {
	s.wmu.Lock()
	defer s.wmu.Unlock()
	if err := s.writableLocked(); err != nil {
		return ApplyResult{}, err
	}
	defer s.releaseLocked()
	var siteUpdates []geo.Update
	defer s.nameDamage(&err)
	defer debug.SetPanicOnFault(debug.SetPanicOnFault(true))
	defer recoverDamage(&err)
	err = updateGuarded(s.db, s.noPathGuard, func(w wtx) error {
		tx := w.Tx
		res = ApplyResult{}
		siteUpdates = siteUpdates[:0]
		c, err := loadCounts(tx)
		if err != nil {
			return err
		}
		if err := checkLogEnd(tx, c); err != nil {
			return err
		}
		p, present, err := planWrite(tx, items)
		if err != nil {
			return err
		}
		res.Present = present
		if err := writeEvents(w, items, p, &c, &res); err != nil {
			return err
		}
		if observe {
			for _, i := range p.fresh {
				s.clock.Observe(items[i].Clock)
			}
		}
		res.New = len(p.fresh)
		m := w.bucket(bMeta)
		for _, k := range record.SortedKeys(meta) {
			if err := metaPut(m, &c, k, meta[k]); err != nil {
				return err
			}
		}
		if res.New > 0 {
			if err := metaPut(m, &c, metaClock, s.clock.Last().Bytes()); err != nil {
				return err
			}
		}
		var ver entVerifier
		entCur := tx.Bucket(bEnt).Cursor()
		for _, ep := range p.ents {
			if len(ep.fresh) == 0 {
				continue
			}
			if !s.noEntityCheck {
				if err := ver.verify(tx, entCur, ep.id, ep.stored); err != nil {
					return err
				}
			}
			if ep.rec.Kind == record.KindSite {
				st, err := stateTx(tx, ep.id)
				if err != nil {
					return err
				}
				siteUpdates = append(siteUpdates, siteUpdateOf(st))
			}
		}
		// In id order, like every other bucket: a bundle of sites in any
		// order then appends to each page once (random order would move a
		// page's entries at every insert: quadratic within one write).
		slices.SortFunc(siteUpdates, func(a, b geo.Update) int { return bytes.Compare(a.Site.ID[:], b.Site.ID[:]) })
		for _, u := range siteUpdates {
			if err := putSiteCache(w, &c, u); err != nil {
				return err
			}
		}
		if extra != nil {
			if err := extra(w, &c); err != nil {
				return err
			}
		}
		if err := putCounts(w, c); err != nil {
			return err
		}
		if s.hook != nil {
			if err := s.hook(); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		var de dataError
		switch {
		case errors.As(err, &de):
			return ApplyResult{}, de.err
		case errors.Is(err, ErrDamaged):
			return ApplyResult{}, err
		}
		s.failed = err
		return ApplyResult{}, &WriteError{Err: err}
	}
	if s.sites != nil {
		s.sites.Apply(siteUpdates)
	}
	return res, nil
}

// releaseLocked drops the file's mapped pages after a write (see
// releaseMapped); the caller holds the write lock.
func (s *Store) releaseLocked() {
	defer debug.SetPanicOnFault(debug.SetPanicOnFault(true))
	defer func() { _ = recover() }()
	_ = s.db.View(func(tx *bolt.Tx) error { releaseMapped(s.db, tx); return nil })
}

// entOp is one put or delete in bucket ent.
type entOp struct {
	key, val []byte
	del      bool
}

// writeEvents puts the new items of p: the log and the id index in
// insertion order, then every change to bucket ent sorted by key, so a
// write visits each page it changes once. The head index ends as one
// insert after another would leave it: a new event is a head unless some
// event (stored, or new in this batch) supersedes it, and every event a
// new one supersedes stops being a head.
func writeEvents(w wtx, items []record.Checked, p plan, c *counts, res *ApplyResult) error {
	if len(p.fresh) == 0 {
		return nil
	}
	logB, idB, entB := w.bucket(bLog), w.bucket(bIDs), w.bucket(bEnt)
	logB.FillPercent = logFill
	var ar arena
	first := c.Events + 1
	seqOf := make([]uint64, len(items)) // by item index; 0 for items not new
	for n, i := range p.fresh {         // batch order: ascending keys
		it := &items[i]
		seq := first + uint64(n)
		seqOf[i] = seq
		v := ar.alloc(32 + len(it.Raw))
		copy(v, it.ID[:])
		copy(v[32:], it.Raw)
		if err := logB.Put(binary.BigEndian.AppendUint64(ar.alloc(0), seq), v); err != nil {
			return err
		}
	}
	c.Events += uint64(len(p.fresh))
	idKeys := make([][]byte, len(p.fresh))
	idVals := make([][]byte, len(p.fresh))
	for n, i := range p.fresh {
		idKeys[n] = idKey(seqOf[i], items[i].ID)
		idVals[n] = binary.BigEndian.AppendUint64(ar.alloc(0), seqOf[i])
	}
	if err := putSorted(idB, idKeys, idVals); err != nil {
		return err
	}
	var ops []entOp
	kindB, confB := w.bucket(bKinds), w.bucket(bConflicts)
	cur := entB.Cursor()
	var newKinds, confPut, confDel [][]byte
	ents := make([]*entPlan, 0, len(p.ents))
	for _, ep := range p.ents {
		if len(ep.fresh) > 0 {
			ents = append(ents, ep)
		}
	}
	slices.SortFunc(ents, func(a, b *entPlan) int { return bytes.Compare(a.id[:], b.id[:]) })
	for _, ep := range ents {
		e := ep.id
		first := len(ops)
		for _, i := range ep.fresh {
			for _, t := range items[i].Supersedes {
				k := supByKey(e, t, items[i].ID)
				ops = append(ops, entOp{key: k, val: sealCRC(bEnt, k, nil)})
				if ep.targets == nil {
					ep.targets = make(map[record.EventID]struct{})
				}
				ep.targets[t] = struct{}{}
			}
		}
		added, removed := uint64(0), uint64(0)
		for _, i := range ep.fresh {
			it := &items[i]
			_, sup := ep.targets[it.ID]
			head := !sup && !(ep.stored && hasPrefixAt(cur, entKey(e, tagSupBy, it.ID)))
			ops = append(ops, entOp{key: ar.entKey(e, tagHistory, it.ID), val: histVal(ar.alloc(0)[:0:9], seqOf[i], head)})
			if head {
				added++
			}
		}
		if ep.stored {
			for _, t := range sortedIDs(ep.targets) {
				k := entKey(e, tagHistory, t)
				seq, head, ok := parseHist(getAt(cur, k))
				if ok && head {
					ops = append(ops, entOp{key: k, val: histVal(nil, seq, false)})
					removed++
				}
			}
		}
		before := ep.rec.Heads
		if removed > before+added {
			return damagef("entity %s: its record counts fewer heads than are stored", e)
		}
		rec := entRecord{Kind: ep.rec.Kind, Events: ep.rec.Events + uint64(len(ep.fresh)), Heads: before + added - removed}
		rk := recKey(e)
		ops = append(ops, entOp{key: rk, val: rec.encode(rk)})
		if !ep.stored {
			newKinds = append(newKinds, kindKey(rec.Kind, e))
			if int(rec.Kind) >= maxKinds {
				return fmt.Errorf("kind %d is beyond what the store counts", rec.Kind)
			}
			c.Entities[rec.Kind]++
		}
		switch after := rec.Heads; {
		case after > 1 && before <= 1:
			res.Conflicts++
			confPut = append(confPut, bytes.Clone(e[:]))
			c.Conflicts++
		case after <= 1 && before > 1:
			confDel = append(confDel, bytes.Clone(e[:]))
			c.Conflicts--
		}
		ep.rec = rec
		mine := ops[first:] // one entity's keys: entities are in id order already
		slices.SortFunc(mine, func(a, b entOp) int { return bytes.Compare(a.key, b.key) })
	}
	for _, op := range ops {
		var err error
		if op.del {
			err = entB.Delete(op.key)
		} else {
			err = entB.Put(op.key, op.val)
		}
		if err != nil {
			return err
		}
	}
	if err := putSorted(kindB, newKinds, nil); err != nil {
		return err
	}
	if err := putSorted(confB, confPut, nil); err != nil {
		return err
	}
	slices.SortFunc(confDel, bytes.Compare)
	for _, k := range confDel {
		if err := confB.Delete(k); err != nil {
			return err
		}
	}
	return nil
}

// putSorted puts keys (with their values) in key order: bbolt inserts in
// order touch each page once and append within it, where random order
// moves a node's entries on every insert.
func putSorted(b guardedBucket, keys [][]byte, vals [][]byte) error {
	idx := make([]int, len(keys))
	for i := range idx {
		idx[i] = i
	}
	slices.SortFunc(idx, func(a, c int) int { return bytes.Compare(keys[a], keys[c]) })
	for _, i := range idx {
		v := []byte{}
		if vals != nil {
			v = vals[i]
		}
		if err := b.Put(keys[i], v); err != nil {
			return err
		}
	}
	return nil
}

// hasPrefixAt reports whether the cursor's bucket holds a key starting
// with prefix.
func hasPrefixAt(c *bolt.Cursor, prefix []byte) bool {
	k, _ := c.Seek(prefix)
	return k != nil && bytes.HasPrefix(k, prefix)
}

// getAt is Bucket.Get through a cursor kept for many reads (Get makes a
// new cursor each time).
func getAt(c *bolt.Cursor, key []byte) []byte {
	k, v := c.Seek(key)
	if k == nil || !bytes.Equal(k, key) || v == nil {
		return nil
	}
	return v
}

func sortedIDs(set map[record.EventID]struct{}) []record.EventID {
	out := make([]record.EventID, 0, len(set))
	for id := range set {
		out = append(out, id)
	}
	slices.SortFunc(out, func(a, b record.EventID) int { return bytes.Compare(a[:], b[:]) })
	return out
}

// arena hands out byte slices from large blocks: a write's keys and
// values live until bbolt copies them at commit, and one allocation per
// 64 KiB costs the collector far less than one per key.
type arena struct{ block []byte }

// alloc returns n bytes; alloc(0) returns an empty slice with room to
// append 8 bytes in place (16 are reserved).
func (a *arena) alloc(n int) []byte {
	need := max(n, 16)
	if cap(a.block)-len(a.block) < need {
		a.block = make([]byte, 0, max(64<<10, need))
	}
	start := len(a.block)
	a.block = a.block[:start+need]
	return a.block[start : start+n : start+need]
}

// entKey is entKey in the arena.
func (a *arena) entKey(e record.EntityID, tag byte, id record.EventID) []byte {
	k := a.alloc(49)
	copy(k, e[:])
	k[16] = tag
	copy(k[17:], id[:])
	return k
}
