package store

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"os"
	"slices"
)

// A walk of a bbolt file's pages through pread (rawpage.go), trusting
// nothing: every page is read at most once, every key must lie in the
// range its parent gives it, and every page below the high-water mark
// must be used exactly once or be free. The check walks everything; the
// freelist check at a writable open walks only the branch pages.

// pageWalk is one walk from one header copy.
type pageWalk struct {
	rf        *rawFile
	meta      rawMeta
	leaves    bool              // read leaf pages (false: branch pages only)
	used      map[uint64]string // page → what it holds (leaves false: branch pages only)
	free      []uint64          // the free-page list, sorted (leaves false: read before the walk)
	below     map[uint64]uint64 // free page → the nearest leaf page before it (leaves false)
	leafDepth map[uint64]int    // tree root → depth of its leaves (leaves false)
	problems  []string          // what does not hold together
	counts    map[string]int    // pages by type
	onLeaf    func(bucket []byte, p rawPage)
	buckets   map[string]struct{} // top-level buckets found
	only      map[string]bool     // when set, walk only these buckets
	// loops: a page is met twice, or a tree is deeper than any bbolt
	// makes. bbolt's cursor would recurse without end on such a file (a
	// fatal stack overflow, not a panic), so it must not read it.
	loops bool
}

const maxProblems = 200

func (w *pageWalk) problem(format string, args ...any) {
	if len(w.problems) < maxProblems {
		w.problems = append(w.problems, fmt.Sprintf(format, args...))
	} else if len(w.problems) == maxProblems {
		w.problems = append(w.problems, "… more problems not listed")
	}
}

// use marks pages id..id+over as used by what; false if any was used.
func (w *pageWalk) use(id uint64, over uint32, what string) bool {
	if id < 2 || id+uint64(over) >= w.meta.HWM {
		w.problem("%s: page %d (+%d) is outside the file's pages 2..%d", what, id, over, w.meta.HWM-1)
		return false
	}
	for i := id; i <= id+uint64(over); i++ {
		if prev, dup := w.used[i]; dup {
			w.loops = true
			w.problem("page %d is used twice: by %s and by %s", i, prev, what)
			return false
		}
	}
	for i := id; i <= id+uint64(over); i++ {
		w.used[i] = what
	}
	return true
}

func newPageWalk(f *os.File, m rawMeta, size int64, leaves bool) *pageWalk {
	return &pageWalk{rf: &rawFile{f: f, size: size, pageSize: int64(m.PageSize)}, meta: m, leaves: leaves,
		used: map[uint64]string{0: "header copy 0", 1: "header copy 1"}, counts: map[string]int{}, buckets: map[string]struct{}{}}
}

// run walks the root bucket and every bucket in it, then the freelist.
func (w *pageWalk) run() {
	w.tree(nil, w.meta.Root, w.meta.Root, nil, nil, 0)
	if w.meta.Freelist != ^uint64(0) {
		buf, err := w.rf.page(w.meta.Freelist)
		if err != nil {
			w.problem("free-page list: %v", err)
			return
		}
		p, _ := parsePageHeader(buf)
		if w.use(w.meta.Freelist, p.Overflow, "the free-page list") {
			w.counts["freelist"] += int(p.Overflow) + 1
		}
	}
}

// tree walks the subtree at page id of bucket name (nil: the root
// bucket, whose leaf values are bucket headers), in the tree rooted at
// page root; keys must lie in [lo, hi) (nil: unbounded).
func (w *pageWalk) tree(name []byte, root, id uint64, lo, hi []byte, depth int) {
	what := "the bucket list"
	if name != nil {
		what = fmt.Sprintf("bucket %q", name)
	}
	if depth > 32 {
		w.loops = true
		w.problem("%s: the tree is more than 32 levels deep at page %d", what, id)
		return
	}
	if id < 2 || id >= w.meta.HWM {
		w.problem("%s: page %d is outside the file's pages 2..%d", what, id, w.meta.HWM-1)
		return
	}
	buf, err := w.rf.page(id)
	if err != nil {
		w.problem("%s: %v", what, err)
		return
	}
	p, err := parsePageHeader(buf)
	if err == nil {
		err = checkTreePage(p, id, depth, w.meta.HWM, int(w.rf.pageSize))
	}
	if err != nil {
		w.problem("%s: %v", what, err)
		return
	}
	if !w.use(id, p.Overflow, what) {
		return
	}
	if p.Flags == rawBranch {
		w.counts["branch"] += int(p.Overflow) + 1
	} else {
		w.counts["leaf"]++
		w.counts["overflow"] += int(p.Overflow)
	}
	w.elements(name, root, p, lo, hi, depth, what)
}

// elements checks a branch or leaf page's keys and descends.
func (w *pageWalk) elements(name []byte, root uint64, p rawPage, lo, hi []byte, depth int, what string) {
	var prev []byte
	for i := 0; i < p.Count; i++ {
		e, err := p.elem(i)
		if err != nil {
			w.problem("%s: %v", what, err)
			return
		}
		switch {
		case len(e.Key) == 0:
			w.problem("%s: page %d element %d has an empty key", what, p.ID, i)
			return
		case prev != nil && bytes.Compare(prev, e.Key) >= 0:
			w.problem("%s: page %d keys out of order at element %d", what, p.ID, i)
			return
		case lo != nil && bytes.Compare(e.Key, lo) < 0 || hi != nil && bytes.Compare(e.Key, hi) >= 0:
			w.problem("%s: page %d element %d lies outside the range its parent gives", what, p.ID, i)
			return
		}
		prev = e.Key
		if p.Flags == rawBranch && !w.leaves && w.childrenAreLeaves(root, depth) {
			w.unreadLeaf(e.Child, what)
			continue
		}
		if p.Flags == rawBranch {
			var next []byte
			if i+1 < p.Count {
				ne, err := p.elem(i + 1)
				if err != nil {
					w.problem("%s: %v", what, err)
					return
				}
				next = ne.Key
			} else {
				next = hi
			}
			w.tree(name, root, e.Child, bytes.Clone(e.Key), bytes.Clone(next), depth+1)
			continue
		}
		if name == nil {
			w.bucketEntry(e, depth)
		} else if e.Flags&rawBucketLeaf != 0 {
			w.problem("%s: page %d holds a nested bucket, which this store never makes", what, p.ID)
		}
	}
	if p.Flags == rawLeaf && name != nil && w.onLeaf != nil {
		w.onLeaf(name, p)
	}
}

// childrenAreLeaves tells whether the children of a branch page at depth
// in the tree rooted at page root are leaves. Every leaf of a bbolt tree
// is at the same depth, so the tree's leftmost path, read once per tree,
// tells for all its branches: one leaf header read per tree, not one per
// branch (a cold open of 2,000,000 events took 3.7 s with one per
// branch, 1.6 s so). A child that is not a leaf after all is not
// followed; were it a branch above it (a loop), the walk has met it
// already and says so.
func (w *pageWalk) childrenAreLeaves(root uint64, depth int) bool {
	if w.leafDepth == nil {
		w.leafDepth = map[uint64]int{}
	}
	d, ok := w.leafDepth[root]
	if !ok {
		d = -1
		id := root
		head := make([]byte, rawPageHeader+rawElemSize)
		for k := 0; k <= 32 && id < w.rf.pages(); k++ {
			if _, err := w.rf.f.ReadAt(head, int64(id)*w.rf.pageSize); err != nil {
				break
			}
			flags := binary.LittleEndian.Uint16(head[8:])
			if flags&rawLeaf != 0 {
				d = k
				break
			}
			if flags&rawBranch == 0 || binary.LittleEndian.Uint16(head[10:]) == 0 {
				break
			}
			id = binary.LittleEndian.Uint64(head[rawPageHeader+8:])
		}
		w.leafDepth[root] = d
	}
	return depth+1 == d
}

// unreadLeaf is a leaf below a branch when only branches are walked: it
// is not read and nothing is kept per leaf (a store of millions of
// events has hundreds of thousands); it is only checked against the free
// pages and noted as the nearest leaf before the next free one.
func (w *pageWalk) unreadLeaf(id uint64, what string) {
	w.counts["leaf"]++
	if prev := w.used[id]; prev != "" { // a branch met on the way down: a loop
		w.loops = true
		w.problem("page %d is used twice: by %s and as a leaf of %s", id, prev, what)
		return
	}
	j, hit := slices.BinarySearch(w.free, id)
	if hit {
		w.problem("the free-page list names page %d, which %s uses", id, what)
	} else if j < len(w.free) && id > w.below[w.free[j]] {
		w.below[w.free[j]] = id
	}
}

// bucketEntry follows one entry of the root bucket: a bucket header with
// its root page, or an inline bucket whose page is the value itself.
func (w *pageWalk) bucketEntry(e rawElem, depth int) {
	name := bytes.Clone(e.Key)
	if e.Flags&rawBucketLeaf == 0 || len(e.Value) < rawBucketSize {
		w.problem("the bucket list holds %q, which is not a bucket", name)
		return
	}
	w.buckets[string(name)] = struct{}{}
	if w.only != nil && !w.only[string(name)] {
		return
	}
	root := binary.LittleEndian.Uint64(e.Value)
	if root != 0 {
		w.tree(name, root, root, nil, nil, 0)
		return
	}
	p, err := parsePageHeader(e.Value[rawBucketSize:])
	if err != nil || p.Flags != rawLeaf {
		w.problem("bucket %q: its inline page does not parse", name)
		return
	}
	w.counts["inline"]++
	w.elements(name, 0, p, nil, nil, depth+1, fmt.Sprintf("bucket %q", name))
}

// readFree reads the free-page list.
func (w *pageWalk) readFree() []uint64 {
	if w.meta.Freelist == ^uint64(0) {
		return nil
	}
	buf, err := w.rf.page(w.meta.Freelist)
	if err != nil {
		w.problem("free-page list: %v", err)
		return nil
	}
	ids, err := freelistIDs(buf)
	if err != nil {
		w.problem("free-page list: %v", err)
		return nil
	}
	return ids
}

// checkFree checks the free-page list against the walk: every free page
// lies inside the file, is listed once and is used by nothing. With
// full, every page the walk did not use must be free (no lost space);
// without, the leaves were not read and each free page is checked
// against the overflow pages of the nearest leaf before it.
func (w *pageWalk) checkFree(ids []uint64, full bool) {
	seen := make(map[uint64]bool, len(ids))
	for _, id := range ids {
		switch {
		case id < 2 || id >= w.meta.HWM:
			w.problem("the free-page list names page %d, outside the file's pages 2..%d", id, w.meta.HWM-1)
		case seen[id]:
			w.problem("the free-page list names page %d twice", id)
		case w.used[id] != "":
			w.problem("the free-page list names page %d, which %s uses", id, w.used[id])
		case !full && w.insideLeaf(id):
			w.problem("the free-page list names page %d, which a leaf page runs over", id)
		}
		seen[id] = true
	}
	w.counts["free"] = len(seen)
	if full {
		for i := uint64(0); i < w.meta.HWM; i++ {
			if w.used[i] == "" && !seen[i] {
				w.problem("page %d is neither used nor free (lost space)", i)
			}
		}
	}
}

// insideLeaf reports whether free page id falls within the overflow
// pages of the nearest leaf before it (read from that leaf's header).
func (w *pageWalk) insideLeaf(id uint64) bool {
	leaf, ok := w.below[id]
	if !ok {
		return false
	}
	head := make([]byte, rawPageHeader)
	if _, err := w.rf.f.ReadAt(head, int64(leaf)*w.rf.pageSize); err != nil {
		return true
	}
	return id <= leaf+uint64(binary.LittleEndian.Uint32(head[12:]))
}
