package store

import (
	"baleassay/data/record"
	"bytes"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime/debug"
	"time"

	bolt "go.etcd.io/bbolt"
	berrors "go.etcd.io/bbolt/errors"
)

// CheckReport is what Check found.
type CheckReport struct {
	Events    uint64
	Entities  map[string]uint64 // by kind name
	Conflicts uint64
	Sites     uint64 // visible sites in the site index cache
	Drafts    uint64
	MetaKeys  uint64
	Pages     map[string]int // pages by type: branch, leaf, overflow, free, freelist, inline
	FileBytes int64
	Problems  []string // empty when the store holds together
	Took      time.Duration
}

// OK reports whether the check found nothing wrong.
func (r CheckReport) OK() bool { return len(r.Problems) == 0 }

// Check examines the store in dir without changing it: both header
// copies; every page of the file (read directly, so a damaged page is
// described rather than followed), each used once or free, keys in order
// and inside the ranges their branches give; then, through bbolt, every
// event against its id, in order, and every index against the events: id
// index, entity records, histories, supersessions and heads, the kind
// index, the conflict set, the site index cache, the meta values, the
// drafts and the counts. It opens the file read-only and takes another
// process's write lock into account like any reader.
func Check(dir string) (CheckReport, error) {
	start := time.Now()
	r := CheckReport{Entities: map[string]uint64{}, Pages: map[string]int{}}
	path := filepath.Join(dir, DBFile)
	f, err := os.Open(path)
	if err != nil {
		return r, err
	}
	defer f.Close()
	m, size, err := readHeaderCopies(f)
	if err != nil {
		return r, err
	}
	r.FileBytes = size
	cur := -1
	for i, c := range m {
		if c.Err != "" {
			r.Problems = append(r.Problems, fmt.Sprintf("header copy %d of 2 does not verify: %s", i, c.Err))
			continue
		}
		if cur < 0 || c.Txid > m[cur].Txid {
			cur = i
		}
	}
	if cur < 0 {
		r.Problems = append(r.Problems, "no header copy verifies: bbolt cannot open the file; 'bale store rescue' reads its pages directly")
		r.Took = time.Since(start)
		return r, nil
	}
	if int64(m[cur].HWM)*int64(m[cur].PageSize) > size {
		r.Problems = append(r.Problems, fmt.Sprintf("the file is shorter (%d bytes) than its header says: it was cut short", size))
	}
	w := newPageWalk(f, m[cur], size, true)
	w.run()
	w.checkFree(w.readFree(), true)
	r.Pages = w.counts
	r.Problems = append(r.Problems, w.problems...)
	if w.loops {
		r.Problems = append(r.Problems, "the page tree loops back on itself: the records were not read through bbolt (its cursor would never return); 'bale store rescue' reads the pages directly")
	} else {
		r.Problems = append(r.Problems, checkLogical(dir, path, &r)...)
	}
	r.Took = time.Since(start)
	return r, nil
}

// checkLogical runs the checks through bbolt, behind the store boundary.
func checkLogical(dir, path string, r *CheckReport) (problems []string) {
	defer debug.SetPanicOnFault(debug.SetPanicOnFault(true))
	defer func() {
		if p := recover(); p != nil {
			problems = append(problems, fmt.Sprintf("reading the file through bbolt failed: %v", p))
		}
	}()
	db, err := bolt.Open(path, 0o600, &bolt.Options{ReadOnly: true, Timeout: OpenTimeout})
	if err != nil {
		if errors.Is(err, berrors.ErrTimeout) {
			return []string{(&StoreInUseError{Path: dir}).Error()}
		}
		return []string{fmt.Sprintf("bbolt cannot open the file: %v", err)}
	}
	defer db.Close()
	var c checker
	err = db.View(func(tx *bolt.Tx) error {
		if layoutOf(tx) != layoutVersion {
			c.problem("the file does not hold a store of this layout (an older store is upgraded when a writing command opens it)")
			return nil
		}
		c.run(tx, r)
		return nil
	})
	if err != nil {
		c.problem("%v", err)
	}
	return c.problems
}

type checker struct{ problems []string }

func (c *checker) problem(format string, args ...any) {
	if len(c.problems) < maxProblems {
		c.problems = append(c.problems, fmt.Sprintf(format, args...))
	}
}

// note records err as a problem; it reports whether err was nil.
func (c *checker) note(err error) bool {
	if err == nil {
		return true
	}
	var de *DamagedError
	if errors.As(err, &de) {
		c.problem("%s", de.Detail)
	} else {
		c.problem("%v", err)
	}
	return false
}

func (c *checker) run(tx *bolt.Tx, r *CheckReport) {
	cnt, err := verifyMeta(tx)
	if !c.note(err) {
		if cnt, err = loadCounts(tx); err != nil {
			return
		}
	}
	r.MetaKeys = cnt.Meta
	c.note(checkLogEnd(tx, cnt))
	sups := c.log(tx, cnt, r)
	c.idIndex(tx, cnt)
	c.entities(tx, cnt, sups, r)
	c.siteCache(tx, cnt, r)
	c.drafts(tx, cnt, r)
}

// log checks every event in insertion order against its id, its
// decoding, the id index and its entity's history; it returns the number
// of supersessions the events list.
func (c *checker) log(tx *bolt.Tx, cnt counts, r *CheckReport) uint64 {
	ent, ids := tx.Bucket(bEnt), tx.Bucket(bIDs)
	var want, sups uint64 = 1, 0
	cur := tx.Bucket(bLog).Cursor()
	for k, v := cur.First(); k != nil; k, v = cur.Next() {
		if len(k) != 8 || beUint64(k) != want {
			c.problem("the log has key %x where event %d belongs", k, want)
			return sups
		}
		seq := want
		want++
		id, raw, err := checkLogValue(seq, v, record.EventID{})
		if !c.note(err) {
			continue
		}
		e, err := record.DecodeTrusted(raw)
		if err != nil {
			c.problem("event %s (log entry %d) does not decode: %v", id.Short(), seq, err)
			continue
		}
		r.Events++
		sups += uint64(len(e.Supersedes))
		if hs, _, ok := parseHist(ent.Get(entKey(e.Entity, tagHistory, id))); !ok || hs != seq {
			c.problem("event %s (log entry %d) is missing from the history of %s %s", id.Short(), seq, e.Kind, e.Entity)
		}
		if rec, ok, err := entityRecord(tx, e.Entity); err == nil && ok && rec.Kind != e.Kind {
			c.problem("event %s is a %s but entity %s is recorded as a %s", id.Short(), e.Kind, e.Entity, rec.Kind)
		}
		if v := ids.Get(idKey(seq, id)); len(v) != 8 || beUint64(v) != seq {
			c.problem("event %s (log entry %d) is missing from the id index", id.Short(), seq)
		}
		for _, t := range e.Supersedes {
			if ent.Get(supByKey(e.Entity, t, id)) == nil {
				c.problem("event %s supersedes %s, which the supersession index does not say", id.Short(), t.Short())
			}
		}
	}
	if want-1 != cnt.Events {
		c.problem("the log holds %d events, the counts say %d", want-1, cnt.Events)
	}
	return sups
}

// idIndex checks that the id index holds exactly one entry per event
// (each event's own entry is checked by log).
func (c *checker) idIndex(tx *bolt.Tx, cnt counts) {
	var n uint64
	var oc orderCheck
	_ = tx.Bucket(bIDs).ForEach(func(k, v []byte) error {
		n++
		if len(k) != 36 || len(v) != 8 || !oc.next(k) || uint64(beUint64(k[:4])) != beUint64(v)>>idGenShift {
			c.problem("the id index has a damaged entry (%x)", k)
		}
		return nil
	})
	if n != cnt.Events {
		c.problem("the id index holds %d entries for %d events", n, cnt.Events)
	}
}

// entities checks every entity (verifyEntity), the totals of bucket ent,
// the kind index and the conflict set.
func (c *checker) entities(tx *bolt.Tx, cnt counts, sups uint64, r *CheckReport) {
	var ver entVerifier
	var byKind [maxKinds]uint64
	var hist, supby, conflicts uint64
	cur := tx.Bucket(bEnt).Cursor()
	vc := tx.Bucket(bEnt).Cursor()
	var last []byte
	for k, v := cur.First(); k != nil; k, v = cur.Next() {
		if len(k) < 17 {
			c.problem("bucket ent has a key of %d bytes", len(k))
			continue
		}
		switch k[16] {
		case tagHistory:
			hist++
			continue
		case tagSupBy:
			supby++
			continue
		case tagRecord:
		default:
			continue // reported by verify
		}
		if last != nil && bytes.Compare(last, k) >= 0 {
			c.problem("bucket ent: keys out of order at %x", k)
		}
		last = append(last[:0], k...)
		e := record.EntityID(k[:16])
		rec, ok := decodeEntRecord(k, v)
		if !ok {
			c.problem("the record of entity %s does not verify", e)
			continue
		}
		if int(rec.Kind) < maxKinds {
			byKind[rec.Kind]++
		}
		if rec.Heads > 1 {
			conflicts++
		}
		c.note(ver.verify(tx, vc, e, true))
	}
	if hist != cnt.Events {
		c.problem("the histories hold %d events, the counts say %d", hist, cnt.Events)
	}
	if supby != sups {
		c.problem("the supersession index holds %d entries, the events list %d", supby, sups)
	}
	var total uint64
	for k := 1; k < maxKinds; k++ {
		if byKind[k] != cnt.Entities[k] {
			c.problem("%d entities of kind %s are recorded, the counts say %d", byKind[k], record.Kind(k), cnt.Entities[k])
		}
		if byKind[k] > 0 {
			r.Entities[record.Kind(k).String()] = byKind[k]
		}
		total += byKind[k]
	}
	var kinds uint64
	_ = tx.Bucket(bKinds).ForEach(func(k, _ []byte) error { kinds++; return nil })
	if kinds != total {
		c.problem("the kind index lists %d entities, %d are recorded", kinds, total)
	}
	var set uint64
	_ = tx.Bucket(bConflicts).ForEach(func(k, _ []byte) error { set++; return nil })
	if set != conflicts || conflicts != cnt.Conflicts {
		c.problem("%d entities have two heads or more, the conflict set lists %d, the counts say %d", conflicts, set, cnt.Conflicts)
	}
	r.Conflicts = conflicts
}

// siteCache checks the site index cache against every site's state.
func (c *checker) siteCache(tx *bolt.Tx, cnt counts, r *CheckReport) {
	sites, err := readSiteCache(tx)
	if !c.note(err) {
		return
	}
	cached := make(map[record.EntityID]int, len(sites))
	for i, s := range sites {
		cached[s.ID] = i
	}
	visible := uint64(0)
	err = forKind(tx, record.KindSite, func(e record.EntityID, rec entRecord) error {
		st, err := stateOf(tx, e, rec)
		if err != nil {
			return err
		}
		u := siteUpdateOf(st)
		i, in := cached[e]
		switch {
		case u.Remove && in:
			c.problem("the site index cache still lists deleted site %s", e)
		case !u.Remove && !in:
			c.problem("site %s is missing from the site index cache", e)
		case !u.Remove:
			visible++
			s := sites[i]
			if s.Name != u.Site.Name || math.Float64bits(s.Lat) != math.Float64bits(u.Site.Lat) || math.Float64bits(s.Lon) != math.Float64bits(u.Site.Lon) {
				c.problem("the site index cache shows site %s other than its current value", e)
			}
		}
		return nil
	})
	c.note(err)
	r.Sites = visible
	if visible != uint64(len(sites)) {
		c.problem("the site index cache lists %d sites, %d are visible", len(sites), visible)
	}
}

func (c *checker) drafts(tx *bolt.Tx, cnt counts, r *CheckReport) {
	var n uint64
	_ = tx.Bucket(bDrafts).ForEach(func(k, v []byte) error {
		n++
		raw, ok := openCRC(bDrafts, k, v)
		if !ok {
			c.problem("draft %q does not verify", k)
		} else if _, err := record.DecodePull(raw); err != nil {
			c.problem("draft %q does not decode: %v", k, err)
		}
		return nil
	})
	r.Drafts = n
	if n != cnt.Drafts {
		c.problem("%d drafts found, the counts say %d", n, cnt.Drafts)
	}
}
