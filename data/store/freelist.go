package store

import (
	"os"
	"slices"
	"strings"
)

// checkFreelist walks the branch pages of the file (pread, about one page
// in a hundred) and checks the free-page list against them before the
// first write: bbolt would otherwise take a page that a damaged list
// calls free, and overwrite live records with the next save.
func checkFreelist(path string) error { return checkBranches(path, true) }

// checkNoLoops walks the branch pages of the file before bbolt reads it:
// a branch whose child points back up the tree (one damaged page number)
// makes bbolt's cursor recurse until the stack overflows, which no
// recover catches. A read-only open refuses only that: other damage is
// found where records are read.
func checkNoLoops(path string) error { return checkBranches(path, false) }

// checkBranches walks the branch pages; with free, the free-page list
// is checked against them and any problem is damage.
func checkBranches(path string, free bool) error {
	m, size, err := readHeaderFile(path)
	if err != nil {
		return err
	}
	cur := m[0]
	if m[1].Err == "" && (cur.Err != "" || m[1].Txid > cur.Txid) {
		cur = m[1]
	}
	if cur.Err != "" {
		return damagef("no header copy verifies")
	}
	f, err := os.Open(path)
	if err != nil {
		return err
	}
	defer f.Close()
	w := newPageWalk(f, cur, size, false)
	var ids []uint64
	if free {
		ids = w.readFree()
		w.free = slices.Clone(ids)
		slices.Sort(w.free)
	}
	w.below = make(map[uint64]uint64, len(ids))
	w.run()
	if !free && !w.loops {
		return nil // reading tolerates what cannot make bbolt loop
	}
	if free {
		w.checkFree(ids, false)
	}
	if len(w.problems) > 0 {
		return damagef("%s", strings.Join(w.problems[:min(3, len(w.problems))], "; "))
	}
	return nil
}
