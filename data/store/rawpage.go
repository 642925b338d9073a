package store

import (
	"encoding/binary"
	"fmt"
	"hash/fnv"
	"io"
	"os"
)

// The bbolt file format (go.etcd.io/bbolt, file version 2), read directly
// with pread so that a damaged page can be examined without trusting it:
// the check and the rescue read pages this way, and so does the header
// check at open. Integers are little-endian (the platforms Go's bbolt
// runs on are all little-endian).
const (
	rawPageHeader = 16 // id u64, flags u16, count u16, overflow u32
	rawElemSize   = 16 // branch: pos, ksize u32, pgid u64; leaf: flags, pos, ksize, vsize u32
	rawBranch     = 0x01
	rawLeaf       = 0x02
	rawMetaPage   = 0x04
	rawFreelist   = 0x10
	rawBucketLeaf = 0x01 // leaf element flag: the value is a bucket header
	rawBucketSize = 16   // bucket header: root pgid u64, sequence u64
	boltMagic     = 0xED0CDAED
	boltVersion   = 2
	metaSumOffset = 56 // bytes of the meta struct covered by its checksum
)

// rawMeta is one of the two header copies (pages 0 and 1).
type rawMeta struct {
	PageSize uint32
	Root     uint64 // the root bucket's page
	Freelist uint64
	HWM      uint64 // high-water mark: pages in use are below it
	Txid     uint64
	Err      string // why this copy does not verify; empty when it does
}

func parseMeta(page []byte) rawMeta {
	if len(page) < rawPageHeader+64 {
		return rawMeta{Err: "cut short"}
	}
	m := page[rawPageHeader:]
	le := binary.LittleEndian
	r := rawMeta{PageSize: le.Uint32(m[8:]), Root: le.Uint64(m[16:]), Freelist: le.Uint64(m[32:]), HWM: le.Uint64(m[40:]), Txid: le.Uint64(m[48:])}
	h := fnv.New64a()
	h.Write(m[:metaSumOffset])
	switch {
	case le.Uint32(m) != boltMagic:
		r.Err = "wrong magic number"
	case le.Uint32(m[4:]) != boltVersion:
		r.Err = fmt.Sprintf("file version %d", le.Uint32(m[4:]))
	case le.Uint64(m[metaSumOffset:]) != h.Sum64():
		r.Err = "checksum does not match"
	case le.Uint16(page[8:])&rawMetaPage == 0:
		r.Err = "not marked as a header page"
	case r.PageSize < 512 || r.PageSize > 1<<20 || r.PageSize&(r.PageSize-1) != 0:
		r.Err = fmt.Sprintf("page size %d", r.PageSize)
	case r.Root < 2 || r.Root >= r.HWM || (r.Freelist != ^uint64(0) && (r.Freelist < 2 || r.Freelist >= r.HWM)):
		r.Err = "page numbers out of range"
	}
	return r
}

// readHeaderFile reads both header copies of the bbolt file at path.
func readHeaderFile(path string) ([2]rawMeta, int64, error) {
	f, err := os.Open(path)
	if err != nil {
		return [2]rawMeta{}, 0, err
	}
	defer f.Close()
	return readHeaderCopies(f)
}

// readHeaderCopies reads both header copies of a bbolt file.
func readHeaderCopies(f *os.File) ([2]rawMeta, int64, error) {
	var out [2]rawMeta
	st, err := f.Stat()
	if err != nil {
		return out, 0, err
	}
	size := st.Size()
	first := make([]byte, 4096)
	n, err := f.ReadAt(first, 0)
	if err != nil && err != io.EOF {
		return out, size, err
	}
	out[0] = parseMeta(first[:n])
	ps := int64(os.Getpagesize())
	if out[0].Err == "" {
		ps = int64(out[0].PageSize)
	}
	second := make([]byte, 4096)
	n, err = f.ReadAt(second, ps)
	if err != nil && err != io.EOF {
		return out, size, err
	}
	out[1] = parseMeta(second[:n])
	return out, size, nil
}

// checkHeaderCopies refuses a file whose header copies do not both
// verify. bbolt alone would fall back to the other copy, which is one
// save older: a save already acknowledged would silently be gone. The
// header is 64 bytes at the start of a page, inside one disk sector, so
// a power cut does not tear it: a copy that does not verify is damage.
func checkHeaderCopies(path string) error {
	m, size, err := readHeaderFile(path)
	if err != nil {
		return err
	}
	for i, c := range m {
		if c.Err != "" {
			return damagef("header copy %d of 2 does not verify: %s", i, c.Err)
		}
	}
	if m[0].PageSize != m[1].PageSize {
		return damagef("the two header copies disagree on the page size")
	}
	for _, c := range m {
		if int64(c.HWM)*int64(c.PageSize) > size {
			return damagef("the file is shorter (%d bytes) than its header says (%d pages of %d bytes): it was cut short", size, c.HWM, c.PageSize)
		}
	}
	return nil
}

// rawFile reads pages of a bbolt file by number.
type rawFile struct {
	f        *os.File
	size     int64
	pageSize int64
}

func (r *rawFile) pages() uint64 { return uint64(r.size / r.pageSize) }

// page reads page id with its overflow pages; short is true when the
// file ends before the page does.
func (r *rawFile) page(id uint64) ([]byte, error) {
	off := int64(id) * r.pageSize
	if id >= r.pages() {
		return nil, fmt.Errorf("page %d is beyond the end of the file", id)
	}
	head := make([]byte, r.pageSize)
	if _, err := r.f.ReadAt(head, off); err != nil {
		return nil, fmt.Errorf("page %d: %w", id, err)
	}
	over := uint64(binary.LittleEndian.Uint32(head[12:]))
	if over == 0 {
		return head, nil
	}
	if id+over >= r.pages() {
		return nil, fmt.Errorf("page %d says it runs %d pages past the end of the file", id, id+over+1-r.pages())
	}
	full := make([]byte, int64(over+1)*r.pageSize)
	if _, err := r.f.ReadAt(full, off); err != nil {
		return nil, fmt.Errorf("page %d: %w", id, err)
	}
	return full, nil
}

// rawPage is a parsed branch or leaf page (or an inline bucket's page).
type rawPage struct {
	ID       uint64
	Flags    uint16
	Count    int
	Overflow uint32
	buf      []byte
}

func parsePageHeader(buf []byte) (rawPage, error) {
	if len(buf) < rawPageHeader {
		return rawPage{}, fmt.Errorf("page cut short")
	}
	le := binary.LittleEndian
	p := rawPage{ID: le.Uint64(buf), Flags: le.Uint16(buf[8:]), Count: int(le.Uint16(buf[10:])), Overflow: le.Uint32(buf[12:]), buf: buf}
	if p.Flags&(rawBranch|rawLeaf) != 0 && rawPageHeader+p.Count*rawElemSize > len(buf) {
		return p, fmt.Errorf("page %d: %d elements do not fit in it", p.ID, p.Count)
	}
	return p, nil
}

// checkTreePage checks branch or leaf page p, found as page id at depth
// in its tree, against where it was found and against its contents.
// bbolt's node.spill gives a page ⌈size/pageSize⌉ pages, size being the
// header, the element array and every key and value (bbolt before 1.4
// gave ⌊size/pageSize⌋+1: one more when size is a whole number of
// pages), and its commit frees as many as the header's overflow count
// says: a count that does not fit the contents is damage.
func checkTreePage(p rawPage, id uint64, depth int, hwm uint64, pageSize int) error {
	switch {
	case p.ID != id:
		return fmt.Errorf("page %d calls itself page %d", id, p.ID)
	case p.Flags != rawBranch && p.Flags != rawLeaf:
		return fmt.Errorf("page %d is neither a branch nor a leaf (flags %#x)", id, p.Flags)
	case p.Count == 0 && (p.Flags == rawBranch || depth > 0):
		return fmt.Errorf("page %d is empty", id)
	case id+uint64(p.Overflow) >= hwm:
		return fmt.Errorf("page %d (+%d) runs past the file's pages 2..%d", id, p.Overflow, hwm-1)
	}
	size := p.declaredSize()
	want := (size+pageSize-1)/pageSize - 1
	if int(p.Overflow) != want && (size%pageSize != 0 || int(p.Overflow) != want+1) {
		return fmt.Errorf("page %d says it runs over %d more pages, its contents need %d", id, p.Overflow, want)
	}
	return nil
}

// declaredSize is the size p's element array gives it: the header, the
// array, and every key and value. parsePageHeader has checked that the
// array lies in p.buf; the keys and values need not.
func (p rawPage) declaredSize() int {
	le := binary.LittleEndian
	size := rawPageHeader + p.Count*rawElemSize
	for i := 0; i < p.Count; i++ {
		e := p.buf[rawPageHeader+i*rawElemSize:]
		if p.Flags&rawBranch != 0 {
			size += int(le.Uint32(e[4:]))
		} else {
			size += int(le.Uint32(e[8:])) + int(le.Uint32(e[12:]))
		}
	}
	return size
}

// rawElem is one element of a branch or leaf page.
type rawElem struct {
	Key, Value []byte // Value is empty on a branch page
	Child      uint64 // branch pages: the child page
	Flags      uint32 // leaf pages
}

// elem returns element i, checking that its key and value lie inside the
// page.
func (p rawPage) elem(i int) (rawElem, error) {
	le := binary.LittleEndian
	at := rawPageHeader + i*rawElemSize
	e := p.buf[at : at+rawElemSize]
	var out rawElem
	var pos, ks, vs uint64
	if p.Flags&rawBranch != 0 {
		pos, ks = uint64(le.Uint32(e)), uint64(le.Uint32(e[4:]))
		out.Child = le.Uint64(e[8:])
	} else {
		out.Flags = le.Uint32(e)
		pos, ks, vs = uint64(le.Uint32(e[4:])), uint64(le.Uint32(e[8:])), uint64(le.Uint32(e[12:]))
	}
	start := uint64(at) + pos
	if start+ks+vs > uint64(len(p.buf)) {
		return out, fmt.Errorf("page %d element %d points outside the page", p.ID, i)
	}
	out.Key = p.buf[start : start+ks]
	out.Value = p.buf[start+ks : start+ks+vs]
	return out, nil
}

// freelistIDs parses a freelist page.
func freelistIDs(buf []byte) ([]uint64, error) {
	p, err := parsePageHeader(buf)
	if err != nil {
		return nil, err
	}
	if p.Flags&rawFreelist == 0 {
		return nil, fmt.Errorf("page %d is not a free-page list", p.ID)
	}
	le := binary.LittleEndian
	n, at := uint64(p.Count), uint64(rawPageHeader)
	if p.Count == 0xFFFF {
		n, at = le.Uint64(buf[rawPageHeader:]), at+8
	}
	if at+8*n > uint64(len(buf)) || at+8*n < at {
		return nil, fmt.Errorf("free-page list of %d entries does not fit in its page", n)
	}
	ids := make([]uint64, n)
	for i := range ids {
		ids[i] = le.Uint64(buf[at+8*uint64(i):])
	}
	return ids, nil
}
