package store

import (
	"baleassay/data/record"
	"bytes"
	"cmp"
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"
)

// Rescue copies what still verifies of a damaged store into a new one.
// It does not trust the damaged file's structure: it reads every page of
// it directly and takes every log entry whose bytes match its id (the id
// is SHA-256 of the bytes, so a damaged entry cannot pass), wherever the
// page lies, reachable or not, and writes them in their old insertion
// order into a new store through the normal write path, which rebuilds
// every index. Any event that verifies is a record some device made and
// this store took in; merging is set union, so nothing false can enter
// and a copy met twice is counted once. Meta values (device id, clock,
// bundle records) and drafts are taken from the tree when their CRC
// verifies.

// RescueReport says what a rescue copied and what was lost.
type RescueReport struct {
	Events    int    // events written to the new store
	Expected  uint64 // events the damaged store's counts said it held (0: unknown)
	Missing   []SeqRange
	MissingID []record.EventID // ids the index still knew for missing events (at most 20)
	Refused   []string         // events found intact that the new store could not take, with why
	Meta      int              // meta values copied
	MetaLost  int              // meta values the counts promised that did not verify
	Dropped   []string         // meta values left out on purpose, with why
	Drafts    int
	NewDevice bool // the device id was lost: the new store has a new one
	Took      time.Duration
}

// SeqRange is an inclusive range of local insertion numbers.
type SeqRange struct{ From, To uint64 }

func (r SeqRange) String() string {
	if r.From == r.To {
		return fmt.Sprint(r.From)
	}
	return fmt.Sprintf("%d-%d", r.From, r.To)
}

// Lost is the number of events known to be missing.
func (r RescueReport) Lost() uint64 {
	var n uint64
	for _, m := range r.Missing {
		n += m.To - m.From + 1
	}
	return n
}

// evLoc is where a verified log entry lies in the damaged file.
type evLoc struct {
	seq  uint64
	page uint64
	elem int
}

// Rescue writes every event of the store in src that still verifies,
// with its meta values and drafts, into a new store in dst (which must
// not hold a store yet), and says what was lost. src is only read.
func Rescue(src, dst string, now func() time.Time) (RescueReport, error) {
	start := time.Now()
	var rep RescueReport
	if now == nil {
		now = time.Now
	}
	if a, b := filepath.Clean(src), filepath.Clean(dst); a == b {
		return rep, ErrRescueTarget
	}
	if _, err := os.Stat(filepath.Join(dst, DBFile)); err == nil {
		return rep, fmt.Errorf("%s already holds a store: give a new folder for the rescued records", dst)
	}
	f, err := os.Open(filepath.Join(src, DBFile))
	if err != nil {
		return rep, err
	}
	defer f.Close()
	m, size, err := readHeaderCopies(f)
	if err != nil {
		return rep, err
	}
	ps := int64(os.Getpagesize())
	for _, c := range m {
		if c.Err == "" {
			ps = int64(c.PageSize)
		}
	}
	rf := &rawFile{f: f, size: size, pageSize: ps}
	locs, err := findEvents(rf)
	if err != nil {
		return rep, err
	}
	meta, drafts, cnt := readTree(f, m, size, nil)
	if cnt != nil {
		rep.Expected = cnt.Events
	}
	if cnt != nil && uint64(len(meta)) < cnt.Meta {
		rep.MetaLost = int(cnt.Meta) - len(meta)
	}
	if _, ok := meta[metaDevice]; !ok {
		rep.NewDevice = true
	}
	for k := range meta {
		if strings.HasPrefix(k, MetaTransferPrefix+"dest/") {
			delete(meta, k)
			rep.Dropped = append(rep.Dropped, fmt.Sprintf("%s: export marks count in the old insertion numbers; the next export to that destination sends everything again (receivers keep what they have)", k))
		}
	}
	slices.Sort(rep.Dropped)
	rep.Meta, rep.Drafts = len(meta), len(drafts)
	slices.SortFunc(locs, func(a, b evLoc) int {
		switch {
		case a.seq != b.seq:
			return cmp.Compare(a.seq, b.seq)
		case a.page != b.page:
			return cmp.Compare(a.page, b.page)
		}
		return a.elem - b.elem
	})
	found := map[uint64]bool{}
	for _, l := range locs {
		found[l.seq] = true
	}
	top := rep.Expected
	if n := len(locs); n > 0 && locs[n-1].seq > top {
		top = locs[n-1].seq
	}
	for seq := uint64(1); seq <= top; seq++ {
		if found[seq] {
			continue
		}
		if k := len(rep.Missing); k > 0 && rep.Missing[k-1].To == seq-1 {
			rep.Missing[k-1].To = seq
		} else {
			rep.Missing = append(rep.Missing, SeqRange{seq, seq})
		}
	}
	if len(rep.Missing) > 0 {
		readTree(f, m, size, func(seq uint64, id record.EventID) {
			if !found[seq] && len(rep.MissingID) < 20 && !slices.Contains(rep.MissingID, id) {
				rep.MissingID = append(rep.MissingID, id)
			}
		})
	}
	source := rebuildSource{meta: meta, drafts: drafts, events: func(yield func(record.EventID, []byte) error) error {
		var cached uint64
		var page rawPage
		for _, l := range locs {
			if l.page != cached || page.buf == nil {
				buf, err := rf.page(l.page)
				if err != nil {
					return err
				}
				if page, err = parsePageHeader(buf); err != nil {
					return err
				}
				cached = l.page
			}
			e, err := page.elem(l.elem)
			if err != nil {
				return err
			}
			if err := yield(record.EventID(e.Value[:32]), e.Value[32:]); err != nil {
				return err
			}
		}
		return nil
	}}
	built, err := rebuild(dst, source, now)
	rep.Events, rep.Refused = built.Events, built.Refused
	rep.Took = time.Since(start)
	return rep, err
}

// findEvents reads every page of the file and returns where the log
// entries that verify lie: an 8-byte key and a value of an id followed
// by bytes whose SHA-256 is that id.
func findEvents(rf *rawFile) ([]evLoc, error) {
	var out []evLoc
	for id := uint64(2); id < rf.pages(); id++ {
		buf, err := rf.page(id)
		if err != nil {
			continue // a header that runs past the end: damaged, skip the page
		}
		p, err := parsePageHeader(buf)
		if err != nil || p.ID != id {
			continue
		}
		pid := id
		if p.Flags&(rawLeaf|rawBranch|rawFreelist) != 0 {
			id += uint64(p.Overflow) // its overflow pages hold no headers
		}
		if p.Flags != rawLeaf {
			continue
		}
		for i := 0; i < p.Count; i++ {
			e, err := p.elem(i)
			if err != nil || len(e.Key) != 8 || len(e.Value) < 33 || e.Flags != 0 {
				continue
			}
			if sha256.Sum256(e.Value[32:]) != [32]byte(e.Value[:32]) {
				continue
			}
			if _, err := record.DecodeTrusted(e.Value[32:]); err != nil {
				continue
			}
			out = append(out, evLoc{seq: binary.BigEndian.Uint64(e.Key), page: pid, elem: i})
		}
	}
	return out, nil
}

// readTree walks the tree from the newest header copy that verifies (or
// each in turn) for the meta values and drafts whose CRC verifies and the
// counts record; with ids set, it also hands over every entry of the id
// index (to name what is lost).
func readTree(f *os.File, m [2]rawMeta, size int64, ids func(seq uint64, id record.EventID)) (map[string][]byte, map[string][]byte, *counts) {
	meta, drafts := map[string][]byte{}, map[string][]byte{}
	var cnt *counts
	order := []int{0, 1}
	if m[1].Txid > m[0].Txid {
		order = []int{1, 0}
	}
	for _, i := range order {
		if m[i].Err != "" {
			continue
		}
		w := newPageWalk(f, m[i], size, true)
		w.only = map[string]bool{string(bMeta): true, string(bDrafts): true}
		if ids != nil {
			w.only = map[string]bool{string(bIDs): true}
		}
		w.onLeaf = func(bucket []byte, p rawPage) {
			for j := 0; j < p.Count; j++ {
				e, err := p.elem(j)
				if err != nil {
					return
				}
				switch {
				case bytes.Equal(bucket, bMeta):
					if v, ok := openCRC(bMeta, e.Key, e.Value); ok {
						if string(e.Key) == metaCounts {
							if c, ok := decodeCounts(v); ok && cnt == nil {
								cnt = &c
							}
						} else if _, have := meta[string(e.Key)]; !have {
							meta[string(e.Key)] = bytes.Clone(v)
						}
					}
				case bytes.Equal(bucket, bDrafts):
					if v, ok := openCRC(bDrafts, e.Key, e.Value); ok {
						if _, have := drafts[string(e.Key)]; !have {
							drafts[string(e.Key)] = bytes.Clone(v)
						}
					}
				case bytes.Equal(bucket, bIDs) && len(e.Key) == 36 && len(e.Value) == 8:
					ids(binary.BigEndian.Uint64(e.Value), record.EventID(e.Key[4:]))
				}
			}
		}
		w.run()
		if cnt != nil || ids != nil {
			break // the newest copy that verifies was readable
		}
	}
	return meta, drafts, cnt
}

// ErrRescueTarget refuses a rescue into the damaged store's own folder.
var ErrRescueTarget = errors.New("rescue into a new folder, not the damaged store's own")
