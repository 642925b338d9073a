package store

import (
	"baleassay/data/geo"
	"baleassay/data/record"
	"bytes"
	"errors"
	"fmt"
	"slices"

	bolt "go.etcd.io/bbolt"
)

// seqFill is the fill percent of the seq bucket: its keys only ever grow
// (local insertion numbers), so its pages can be filled before a split
// instead of bbolt's default half, as bbolt's documentation advises for
// append-only buckets (Bucket.FillPercent).
const seqFill = 1.0

// kindValues are the one-byte values of the entity bucket, shared so that
// a write does not allocate one per entity.
var kindValues = func() (v [256][]byte) {
	for i := range v {
		v[i] = []byte{byte(i)}
	}
	return
}()

// plan is the work of one write, computed before anything is put.
type plan struct {
	fresh   []int             // indexes of new items, in batch order
	newEnts []record.EntityID // entities not yet in the store, in batch order
	newKind []record.Kind     // the kind of each of newEnts
	order   []record.EntityID // entities touched, in order of first appearance
	before  map[record.EntityID]int
}

// planWrite walks the items in batch order, exactly as one insert after
// another would: events already stored, or repeated earlier in the batch,
// are present; an event whose entity is stored (or made earlier in the
// batch) under another kind fails with its index.
func planWrite(tx *bolt.Tx, items []record.Checked) (plan, int, error) {
	evB, entB := tx.Bucket(bEvents), tx.Bucket(bEntity)
	p := plan{before: make(map[record.EntityID]int)}
	seen := make(map[record.EventID]struct{}, len(items))
	made := make(map[record.EntityID]record.Kind)
	present := 0
	for i := range items {
		it := &items[i]
		if _, dup := seen[it.ID]; dup || evB.Get(it.ID[:]) != nil {
			present++
			continue
		}
		seen[it.ID] = struct{}{}
		ent := it.Entity
		k, inBatch := made[ent]
		if !inBatch {
			if v := entB.Get(ent[:]); v != nil {
				k = record.Kind(v[0])
			} else {
				made[ent] = it.Kind
				k = it.Kind
				p.newEnts = append(p.newEnts, ent)
				p.newKind = append(p.newKind, it.Kind)
			}
		}
		if k != it.Kind {
			return p, 0, dataError{&record.EventError{Index: i, ID: it.ID, Err: &record.FieldError{Field: "kind",
				Value: fmt.Sprintf("%s (entity %s is a %s)", it.Kind, ent, k), Err: record.ErrKindMismatch}}}
		}
		if _, ok := p.before[ent]; !ok {
			p.before[ent] = -1 // counted below, before any head changes
			p.order = append(p.order, ent)
		}
		p.fresh = append(p.fresh, i)
	}
	return p, present, nil
}

// putSorted puts keys (with their values) in key order: bbolt inserts in
// order touch each page once and append within it, where random order
// moves a node's entries on every insert.
func putSorted(b *bolt.Bucket, keys [][]byte, vals [][]byte) error {
	idx := make([]int, len(keys))
	for i := range idx {
		idx[i] = i
	}
	slices.SortFunc(idx, func(a, c int) int { return bytes.Compare(keys[a], keys[c]) })
	for _, i := range idx {
		var v []byte
		if vals != nil {
			v = vals[i]
		}
		if err := b.Put(keys[i], v); err != nil {
			return err
		}
	}
	return nil
}

// commit inserts the items and meta values in one bbolt transaction. The
// result is that of inserting the items one after another in batch order
// (local sequence numbers follow the batch); each bucket is written in
// its key order.
func (s *Store) commit(items []record.Checked, meta map[string][]byte, observe bool, extra func(tx *bolt.Tx) error) (ApplyResult, error) {
	s.wmu.Lock()
	defer s.wmu.Unlock()
	if err := s.writableLocked(); err != nil {
		return ApplyResult{}, err
	}
	var res ApplyResult
	var siteUpdates []geo.Update
	err := s.db.Update(func(tx *bolt.Tx) error {
		res = ApplyResult{}
		siteUpdates = siteUpdates[:0]
		p, present, err := planWrite(tx, items)
		if err != nil {
			return err
		}
		res.Present = present
		if err := writeEvents(tx, items, p); err != nil {
			return err
		}
		headB, entB := tx.Bucket(bHeads), tx.Bucket(bEntity)
		for _, i := range p.fresh {
			if observe {
				s.clock.Observe(items[i].Clock)
			}
		}
		res.New = len(p.fresh)
		m := tx.Bucket(bMeta)
		for _, k := range record.SortedKeys(meta) {
			if err := m.Put([]byte(k), bytes.Clone(meta[k])); err != nil {
				return err
			}
		}
		if res.New > 0 {
			if err := m.Put([]byte(metaClock), s.clock.Last().Bytes()); err != nil {
				return err
			}
		}
		for _, ent := range p.order {
			if after := countPrefix(headB, ent[:]); after > 1 && p.before[ent] <= 1 {
				res.Conflicts++
			}
			if record.Kind(entB.Get(ent[:])[0]) == record.KindSite {
				st, err := stateTx(tx, ent)
				if err != nil {
					return err
				}
				u := siteUpdateOf(st)
				if err := putSiteCache(tx, u); err != nil {
					return err
				}
				siteUpdates = append(siteUpdates, u)
			}
		}
		if extra != nil {
			if err := extra(tx); err != nil {
				return err
			}
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
		if errors.As(err, &de) {
			return ApplyResult{}, de.err
		}
		s.failed = err
		return ApplyResult{}, &WriteError{Err: err}
	}
	s.sites.Apply(siteUpdates)
	return res, nil
}

// writeEvents puts the new items of p into every index, bucket by bucket
// in key order. The head index ends as one insert after another would
// leave it: a new event is a head unless some event (stored, or new in
// this batch) supersedes it, and every event a new one supersedes stops
// being a head.
func writeEvents(tx *bolt.Tx, items []record.Checked, p plan) error {
	evB, seqB, entB := tx.Bucket(bEvents), tx.Bucket(bSeq), tx.Bucket(bEntity)
	byB, headB, supB := tx.Bucket(bByEntity), tx.Bucket(bHeads), tx.Bucket(bSupBy)
	if len(p.fresh) == 0 {
		return nil
	}
	var seq uint64
	if k, _ := seqB.Cursor().Last(); k != nil {
		seq = beUint64(k)
	}
	seqB.FillPercent = seqFill
	seqKeys := make([]byte, 8*len(p.fresh))
	for n, i := range p.fresh { // batch order: ascending keys
		k := seqKeys[8*n : 8*n+8]
		putBE(k, seq+uint64(n)+1)
		if err := seqB.Put(k, items[i].ID[:]); err != nil {
			return err
		}
	}
	keys := make([][]byte, len(p.fresh))
	vals := make([][]byte, len(p.fresh))
	for n, i := range p.fresh {
		keys[n], vals[n] = items[i].ID[:], items[i].Raw
	}
	if err := putSorted(evB, keys, vals); err != nil {
		return err
	}
	entKeys := make([][]byte, len(p.newEnts))
	entVals := make([][]byte, len(p.newEnts))
	for n := range p.newEnts {
		entKeys[n], entVals[n] = p.newEnts[n][:], kindValues[p.newKind[n]]
	}
	if err := putSorted(entB, entKeys, entVals); err != nil {
		return err
	}
	for _, ent := range p.order { // heads before this write, per entity
		p.before[ent] = countPrefix(headB, ent[:])
	}
	pairs := make([][]byte, len(p.fresh))
	pairBuf := make([]byte, 48*len(p.fresh))
	for n, i := range p.fresh {
		k := pairBuf[48*n : 48*n+48]
		copy(k, items[i].Entity[:])
		copy(k[16:], items[i].ID[:])
		pairs[n] = k
	}
	if err := putSorted(byB, pairs, nil); err != nil {
		return err
	}
	var sups, gone [][]byte
	for _, i := range p.fresh {
		it := &items[i]
		for _, t := range it.Supersedes {
			k := make([]byte, 0, 80)
			k = append(append(append(k, it.Entity[:]...), t[:]...), it.ID[:]...)
			sups = append(sups, k)
			gone = append(gone, k[:48])
		}
	}
	if err := putSorted(supB, sups, nil); err != nil {
		return err
	}
	slices.SortFunc(pairs, bytes.Compare)
	for _, pk := range pairs {
		if countPrefix(supB, pk) == 0 {
			if err := headB.Put(pk, nil); err != nil {
				return err
			}
		}
	}
	slices.SortFunc(gone, bytes.Compare)
	for _, tk := range gone {
		if err := headB.Delete(tk); err != nil {
			return err
		}
	}
	return nil
}

func putBE(b []byte, n uint64) {
	for i := 7; i >= 0; i-- {
		b[i] = byte(n)
		n >>= 8
	}
}

func beUint64(b []byte) uint64 {
	var n uint64
	for _, c := range b {
		n = n<<8 | uint64(c)
	}
	return n
}

// countPrefix counts the keys of b that start with prefix.
func countPrefix(b *bolt.Bucket, prefix []byte) int {
	n := 0
	c := b.Cursor()
	for k, _ := c.Seek(prefix); k != nil && bytes.HasPrefix(k, prefix); k, _ = c.Next() {
		n++
	}
	return n
}
