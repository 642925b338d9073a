package store

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"os"

	bolt "go.etcd.io/bbolt"
)

// At its commit bbolt frees every page a write changed, trusting the
// overflow count in each page's header: a count damaged on disk would
// hand live pages to the free-page list (the next save then overwrites
// records) or, when huge, make the commit allocate without bound. So
// every write goes through a guarded bucket: before a key is put or
// deleted, the committed pages on its path from the bucket's root (for a
// delete also their neighbours, which a merge may take in) and the path
// of the bucket's header in the bucket list are read with pread
// (rawpage.go) and must hold together: each page calls itself by its
// number, is a branch or a leaf, ends below the high-water mark, and its
// overflow count is what its contents need. A page that does not is
// damage, reported before anything is written.
//
// Keys written in order mostly fall in the leaf checked last, so a write
// reads each page it changes about once: a compare per key, a pread per
// page.

// wtx is a write transaction whose buckets are guarded.
type wtx struct {
	*bolt.Tx
	g *pathGuard
}

// bucket is the named top-level bucket, guarded.
func (w wtx) bucket(name []byte) guardedBucket {
	return guardedBucket{Bucket: w.Tx.Bucket(name), name: name, g: w.g}
}

// guardedBucket checks a key's pages before writing it (see above).
type guardedBucket struct {
	*bolt.Bucket
	name []byte
	g    *pathGuard
}

func (b guardedBucket) Put(key, val []byte) error {
	if b.g != nil {
		if err := b.g.touch(b.Bucket, b.name, key, false); err != nil {
			return err
		}
	}
	return b.Bucket.Put(key, val)
}

func (b guardedBucket) Delete(key []byte) error {
	if b.g != nil {
		if err := b.g.touch(b.Bucket, b.name, key, true); err != nil {
			return err
		}
	}
	return b.Bucket.Delete(key)
}

// updateGuarded runs fn in a write transaction of db with its guard
// (without, when off: benchmarks only).
func updateGuarded(db *bolt.DB, off bool, fn func(w wtx) error) error {
	return db.Update(func(tx *bolt.Tx) error {
		if off {
			return fn(wtx{tx, nil})
		}
		g, err := newPathGuard(db.Path(), tx)
		if err != nil {
			return err
		}
		defer g.close()
		return fn(wtx{tx, g})
	})
}

// pathGuard holds what one write transaction has checked.
type pathGuard struct {
	rf       rawFile
	meta     rawMeta
	pages    map[uint64]rawPage // pages that verified (branches with their bytes)
	last     map[string]leafSpan
	listDone map[string]bool // bucket names whose header path is checked
	scratch  []byte          // one page, for leaves
}

// leafSpan is the key range [lo, hi) that leads to one leaf (nil bounds
// are open); near says its neighbours were checked too.
type leafSpan struct {
	lo, hi []byte
	near   bool
}

func (s leafSpan) holds(key []byte) bool {
	return (s.lo == nil || bytes.Compare(key, s.lo) >= 0) && (s.hi == nil || bytes.Compare(key, s.hi) < 0)
}

// newPathGuard starts the guard of write transaction tx on the file at
// path: the header copy it builds on is the one of transaction id−1.
// The caller closes the guard.
func newPathGuard(path string, tx *bolt.Tx) (*pathGuard, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	metas, size, err := readHeaderCopies(f)
	if err != nil {
		f.Close()
		return nil, err
	}
	want := uint64(tx.ID()) - 1
	g := &pathGuard{pages: map[uint64]rawPage{}, last: map[string]leafSpan{}, listDone: map[string]bool{}}
	found := false
	for _, m := range metas {
		if m.Err == "" && m.Txid == want {
			g.meta, found = m, true
		}
	}
	if !found {
		f.Close()
		return nil, damagef("no header copy of the file is that of the last save (transaction %d)", want)
	}
	g.rf = rawFile{f: f, size: size, pageSize: int64(g.meta.PageSize)}
	if err := g.checkFreePageList(); err != nil {
		f.Close()
		return nil, err
	}
	return g, nil
}

func (g *pathGuard) close() { g.rf.f.Close() }

// checkFreePageList checks the list's page, which every commit frees:
// its overflow count may exceed what its entries need by one page
// (bbolt sizes it before pending pages are released), never more.
func (g *pathGuard) checkFreePageList() error {
	id := g.meta.Freelist
	if id == ^uint64(0) {
		return nil
	}
	buf, err := g.rf.page(id)
	if err != nil {
		return damagef("the free-page list: %v", err)
	}
	p, _ := parsePageHeader(buf)
	ids, err := freelistIDs(buf)
	switch {
	case err != nil:
		return damagef("the free-page list: %v", err)
	case p.ID != id:
		return damagef("the free-page list's page %d calls itself page %d", id, p.ID)
	case id+uint64(p.Overflow) >= g.meta.HWM:
		return damagef("the free-page list's page %d runs past the file's pages (to %d)", id, g.meta.HWM-1)
	}
	need := (rawPageHeader + 8*(len(ids)+1)) / int(g.meta.PageSize)
	if int(p.Overflow) > need+1 {
		return damagef("the free-page list's page %d says it runs over %d pages, its %d entries need %d", id, p.Overflow, len(ids), need)
	}
	return nil
}

// touch checks the pages a write of key in bucket b (named name) changes.
func (g *pathGuard) touch(b *bolt.Bucket, name, key []byte, del bool) error {
	if !g.listDone[string(name)] {
		if _, err := g.descend(g.meta.Root, name, false); err != nil {
			return err
		}
		g.listDone[string(name)] = true
	}
	if s, ok := g.last[string(name)]; ok && s.holds(key) && (s.near || !del) {
		return nil
	}
	root := uint64(b.Root())
	if root == 0 { // an inline bucket lives in the bucket list's leaf
		return nil
	}
	span, err := g.descend(root, key, del)
	if err != nil {
		return err
	}
	g.last[string(name)] = span
	return nil
}

// descend checks the pages from root to the leaf that key leads to, the
// way bbolt's cursor goes: at a branch, the last element whose key is
// not above key, or the first.
func (g *pathGuard) descend(root uint64, key []byte, near bool) (leafSpan, error) {
	span := leafSpan{near: near}
	id := root
	for depth := 0; ; depth++ {
		if depth > 32 {
			return span, damagef("a tree is more than 32 levels deep at page %d", id)
		}
		p, err := g.page(id, depth)
		if err != nil {
			return span, err
		}
		if p.Flags == rawLeaf {
			return span, nil
		}
		i, err := childFor(p, key)
		if err != nil {
			return span, damagef("%v", err)
		}
		if near {
			for _, j := range []int{i - 1, i + 1} {
				if j < 0 || j >= p.Count {
					continue
				}
				e, _ := p.elem(j)
				if _, err := g.page(e.Child, depth+1); err != nil {
					return span, err
				}
			}
		}
		e, _ := p.elem(i)
		if i > 0 {
			span.lo = e.Key
		}
		if i+1 < p.Count {
			next, _ := p.elem(i + 1)
			span.hi = next.Key
		}
		id = e.Child
	}
}

// childFor is the element of branch page p that key leads to.
func childFor(p rawPage, key []byte) (int, error) {
	lo, hi := 0, p.Count // first element whose key is above key
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		e, err := p.elem(m)
		if err != nil {
			return 0, err
		}
		if bytes.Compare(e.Key, key) <= 0 {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return max(lo-1, 0), nil
}

// page reads page id (at depth in its tree) and checks it: once per
// transaction. Leaves are not kept.
func (g *pathGuard) page(id uint64, depth int) (rawPage, error) {
	if p, ok := g.pages[id]; ok {
		return p, nil
	}
	if id < 2 {
		return rawPage{}, damagef("a tree points at page %d, a header copy", id)
	}
	p, err := g.readTreePage(id, depth)
	if err != nil {
		return rawPage{}, damagef("%v", err)
	}
	if p.Flags == rawBranch {
		g.pages[id] = p
	} else {
		g.pages[id] = rawPage{ID: p.ID, Flags: p.Flags}
	}
	return p, nil
}

// readTreePage reads branch or leaf page id and checks it (checkTreePage)
// before reading more than its first page and element array: a damaged
// overflow count never sizes a read. A branch page is kept whole; a
// leaf is read into the guard's scratch buffer and not kept.
func (g *pathGuard) readTreePage(id uint64, depth int) (rawPage, error) {
	ps := g.rf.pageSize
	if id >= g.rf.pages() {
		return rawPage{}, fmt.Errorf("page %d is beyond the end of the file", id)
	}
	if g.scratch == nil {
		g.scratch = make([]byte, ps)
	}
	if _, err := g.rf.f.ReadAt(g.scratch, int64(id)*ps); err != nil {
		return rawPage{}, fmt.Errorf("page %d: %w", id, err)
	}
	le := binary.LittleEndian
	over, count := le.Uint32(g.scratch[12:]), int64(le.Uint16(g.scratch[10:]))
	span := int64(over) + 1 // trusted only after checkTreePage; the array read is bounded by count
	buf := g.scratch
	if n := rawPageHeader + count*rawElemSize; n > ps {
		if n > span*ps {
			return rawPage{}, fmt.Errorf("page %d: %d elements do not fit in it", id, count)
		}
		buf = make([]byte, n)
		if _, err := g.rf.f.ReadAt(buf, int64(id)*ps); err != nil {
			return rawPage{}, fmt.Errorf("page %d: %w", id, err)
		}
	}
	p, err := parsePageHeader(buf)
	if err == nil {
		err = checkTreePage(p, id, depth, g.meta.HWM, int(ps))
	}
	if err != nil || p.Flags != rawBranch {
		return p, err
	}
	full := make([]byte, span*ps)
	if _, err := g.rf.f.ReadAt(full, int64(id)*ps); err != nil {
		return rawPage{}, fmt.Errorf("page %d: %w", id, err)
	}
	return parsePageHeader(full)
}
