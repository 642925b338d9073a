package store

// Source: the records in this file are invented test inputs (random
// histories of an invented scenario), not check values.

import (
	"baleassay/data/internal/testkit"
	"bytes"
	"encoding/binary"
	"errors"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	bolt "go.etcd.io/bbolt"
)

// lastLogLeaf builds a store and returns its folder and the page number
// and page size of the log bucket's last leaf, the page the next save
// appends to.
func lastLogLeaf(t *testing.T) (dir string, leaf uint64, ps int64) {
	t.Helper()
	dir = t.TempDir()
	s := xferStore(t, dir, testkit.XferNow)
	rng := rand.New(rand.NewPCG(11, 11))
	for range 3 {
		if _, err := s.ApplyRaw(xHistory(t, rng, 60), nil); err != nil {
			t.Fatal(err)
		}
	}
	s.Close()
	path := filepath.Join(dir, DBFile)
	m, size, err := readHeaderFile(path)
	if err != nil {
		t.Fatal(err)
	}
	cur := m[0]
	if m[1].Txid > cur.Txid {
		cur = m[1]
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	w := newPageWalk(f, cur, size, true)
	w.onLeaf = func(bucket []byte, p rawPage) {
		if bytes.Equal(bucket, bLog) {
			leaf = p.ID
			if p.declaredSize()%int(cur.PageSize) == 0 {
				t.Fatalf("page %d fills its pages exactly; the off-by-one case below needs another", p.ID)
			}
		}
	}
	w.run()
	if leaf == 0 || len(w.problems) > 0 {
		t.Fatalf("walk of the sound store: leaf %d, problems %q", leaf, w.problems)
	}
	return dir, leaf, int64(cur.PageSize)
}

// TestSaveRefusesDamagedOverflowCount: the overflow count in the header
// of the leaf a save changes is damaged on disk. bbolt's commit would
// free as many pages as it says: a huge count made the commit allocate
// without bound (an import ran out of memory), a count one too high
// handed a live page to the free-page list. Either way the save must
// report damage and leave the file as it was.
func TestSaveRefusesDamagedOverflowCount(t *testing.T) {
	for _, over := range []uint32{1, 1 << 20, 0x9D000000} { // the last as found; only once the guard held on the others
		if t.Failed() {
			break
		}
		dir, leaf, ps := lastLogLeaf(t)
		path := filepath.Join(dir, DBFile)
		raw, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		binary.LittleEndian.PutUint32(raw[int64(leaf)*ps+12:], over)
		if err := os.WriteFile(path, raw, 0o600); err != nil {
			t.Fatal(err)
		}
		s, err := OpenWith(dir, Options{Now: func() time.Time { return testkit.XferNow }})
		if err == nil {
			_, err = s.ApplyRaw(xHistory(t, rand.New(rand.NewPCG(12, 12)), 20), nil)
			s.Close()
		}
		if !errors.Is(err, ErrDamaged) {
			t.Errorf("overflow count %d on leaf %d: the save answered %v, want the store reported damaged", over, leaf, err)
		}
		after, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(after, raw) {
			t.Errorf("overflow count %d on leaf %d: the refused save changed the file", over, leaf)
		}
	}
}

// TestDamagedMetaKeyIsNotAbsent: a byte flip in a leaf's key length
// turned the key of a bundle sequence record into a longer one, with its
// value intact and the keys still in order; a lookup of the record then
// found nothing, and an import reported a bundle missing that the lab
// had. A lookup that finds nothing must check the entries beside the
// place the key would be: a key damaged that way (longer, or cut short)
// does not verify. Drafts are looked up the same way.
func TestDamagedMetaKeyIsNotAbsent(t *testing.T) {
	for _, c := range []struct {
		name   string
		bucket []byte
		key    string
		damage func(k []byte) []byte
	}{
		{"meta key longer", bMeta, MetaTransferPrefix + "seen/0123", func(k []byte) []byte { return append(bytes.Clone(k), "0a1b"...) }},
		{"meta key cut short", bMeta, MetaTransferPrefix + "seen/0123", func(k []byte) []byte { return k[:len(k)-2] }},
		{"draft key longer", bDrafts, "bay 3", func(k []byte) []byte { return append(bytes.Clone(k), 'x') }},
	} {
		dir := t.TempDir()
		s := xferStore(t, dir, testkit.XferNow)
		if _, err := s.ApplyRaw(xHistory(t, rand.New(rand.NewPCG(13, 13)), 30), map[string][]byte{MetaTransferPrefix + "seen/0123": {7, 7}}); err != nil {
			t.Fatal(err)
		}
		if err := s.PutDraft("bay 3", *testkit.PullEv(testkit.Ent(1), testkit.Ent(2), testkit.DevA, 1, map[string]float64{"pet_clear": 1}).Pull); err != nil {
			t.Fatal(err)
		}
		s.Close()
		db, err := bolt.Open(filepath.Join(dir, DBFile), 0o600, nil)
		if err != nil {
			t.Fatal(err)
		}
		err = db.Update(func(tx *bolt.Tx) error {
			b := tx.Bucket(c.bucket)
			k := []byte(c.key)
			v := bytes.Clone(b.Get(k))
			if v == nil {
				t.Fatalf("%s: no entry %q", c.name, k)
			}
			if err := b.Delete(k); err != nil {
				return err
			}
			return b.Put(c.damage(k), v)
		})
		db.Close()
		if err != nil {
			t.Fatal(err)
		}
		s = xferStore(t, dir, testkit.XferNow)
		if bytes.Equal(c.bucket, bMeta) {
			v, err := s.Meta(c.key)
			if !errors.Is(err, ErrDamaged) {
				t.Errorf("%s: Meta answered %v, %v; want the store reported damaged", c.name, v, err)
			}
		} else {
			_, ok, err := s.Draft(c.key)
			if !errors.Is(err, ErrDamaged) {
				t.Errorf("%s: Draft answered %v, %v; want the store reported damaged", c.name, ok, err)
			}
		}
		if v, err := s.Meta("b-never-written"); err != nil || v != nil { // far from the damaged entry
			t.Errorf("%s: a key that was never there: %v, %v", c.name, v, err)
		}
		s.Close()
	}
}

// TestBranchLoopIsDamageNotACrash: one damaged page number makes a
// branch page name itself as its child. bbolt's cursor then recurses
// until the goroutine stack overflows, a fatal error no recover
// catches; every command died that way, the store check too. Opening
// (for reading or writing) must report damage, the check must report the
// loop without reading through bbolt, and the rescue must still copy
// every event.
func TestBranchLoopIsDamageNotACrash(t *testing.T) {
	dir := t.TempDir()
	s := xferStore(t, dir, testkit.XferNow)
	rng := rand.New(rand.NewPCG(14, 14))
	for range 4 {
		if _, err := s.ApplyRaw(xHistory(t, rng, 80), nil); err != nil {
			t.Fatal(err)
		}
	}
	events, err := s.LastSeq()
	if err != nil {
		t.Fatal(err)
	}
	s.Close()
	path := filepath.Join(dir, DBFile)
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	m, size, err := readHeaderFile(path)
	if err != nil {
		t.Fatal(err)
	}
	cur := m[0]
	if m[1].Txid > cur.Txid {
		cur = m[1]
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	w := newPageWalk(f, cur, size, false)
	w.run()
	f.Close()
	ps := int(cur.PageSize)
	branch := uint64(0)
	for id := range w.used {
		at := int(id) * ps
		if id >= 2 && binary.LittleEndian.Uint16(raw[at+8:]) == rawBranch && binary.LittleEndian.Uint64(raw[at:]) == id {
			branch = max(branch, id)
		}
	}
	if branch == 0 {
		t.Fatal("the store has no branch page to damage; make it larger")
	}
	binary.LittleEndian.PutUint64(raw[int(branch)*ps+rawPageHeader+8:], branch) // element 0's child: itself
	if err := os.WriteFile(path, raw, 0o600); err != nil {
		t.Fatal(err)
	}
	for _, ro := range []bool{true, false} {
		if s, err := OpenWith(dir, Options{ReadOnly: ro}); !errors.Is(err, ErrDamaged) {
			if err == nil {
				s.Close()
			}
			t.Errorf("open (read-only %v) of a store whose branch page %d loops: %v, want damage", ro, branch, err)
		}
	}
	r, err := Check(dir)
	if err != nil || r.OK() || !strings.Contains(strings.Join(r.Problems, "\n"), "loops back on itself") {
		t.Errorf("check: %v, problems %q", err, r.Problems)
	}
	rep, err := Rescue(dir, filepath.Join(t.TempDir(), "rescued"), func() time.Time { return testkit.XferNow })
	if err != nil || rep.Events != int(events) || rep.Lost() != 0 {
		t.Errorf("rescue: %+v, %v; want all %d events", rep, err, events)
	}
}
