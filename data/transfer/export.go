package transfer

import (
	"baleassay/data/record"
	"baleassay/data/store"
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"regexp"
	"strings"
)

// BundleExt is the file extension of bundles; importing a folder reads
// the files with it.
const BundleExt = ".bale"

// ExportOptions choose what Export writes.
type ExportOptions struct {
	// SinceLast names a destination ("lab"): only events this store has
	// not yet exported to it are written, and the destination's mark is
	// advanced after each part is safely on disk. Empty means all events.
	SinceLast string
	// PartBytes is the payload size at which a new part starts
	// (DefaultPartBytes when 0). One event is never split.
	PartBytes int
}

// ExportResult says what Export wrote.
type ExportResult struct {
	Files  []string // in part order
	Seqs   []uint64 // bundle sequence numbers, one per file
	Events int
	Bytes  int64
}

var destName = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$`)

// ErrDestName refuses a destination name that is not a short word.
var ErrDestName = errors.New("data: destination name must be 1–64 letters, digits, '.', '_' or '-'")

// part is a run of local insertion numbers (after, last] in one bundle.
type part struct {
	after, last uint64
	events      int
}

// Export writes the store's events as signed bundles to path. If path is
// an existing folder, files are named bale-<device>-<seq>.bale in it;
// otherwise a single part goes to path itself and several parts to
// path's name with -1, -2, ... before the extension. Each file is
// written atomically (WriteFileAtomic) and only then recorded in the
// store (bundle sequence, hash, destination mark), in one meta write per
// part. If storing that record fails the file is removed again, so the device
// sequence never has a file the store does not know about. Nothing new
// to export writes no file.
func Export(s *store.Store, key *DeviceKey, path string, opt ExportOptions) (ExportResult, error) {
	var res ExportResult
	if opt.SinceLast != "" && !destName.MatchString(opt.SinceLast) {
		return res, fmt.Errorf("%w: %q", ErrDestName, opt.SinceLast)
	}
	limit := opt.PartBytes
	if limit <= 0 {
		limit = DefaultPartBytes
	}
	var after uint64
	if opt.SinceLast != "" {
		v, err := s.Meta(metaDest + opt.SinceLast)
		if err != nil {
			return res, err
		}
		if len(v) != 0 && len(v) != 8 {
			return res, fmt.Errorf("data: the store's export mark for %q is damaged", opt.SinceLast)
		}
		after = beU64(v)
	}
	parts, err := planParts(s, after, limit)
	if err != nil || len(parts) == 0 {
		return res, err
	}
	seqRaw, err := s.Meta(metaOutSeq)
	if err != nil {
		return res, err
	}
	prev, err := s.Meta(metaOutHash)
	if err != nil {
		return res, err
	}
	if len(seqRaw) != 0 && len(seqRaw) != 8 || len(prev) != 0 && len(prev) != 32 {
		return res, fmt.Errorf("data: the store's record of its last bundle (%s, %s) is damaged; exporting now would reuse bundle numbers", metaOutSeq, metaOutHash)
	}
	seq := beU64(seqRaw)
	names := partNames(path, s.DeviceID(), seq, len(parts))
	for i, p := range parts {
		seq++
		raws := make([][]byte, 0, p.events)
		err := s.ForEachRawSince(p.after, func(n uint64, _ record.EventID, raw []byte) error {
			if n > p.last {
				return errStopWalk
			}
			raws = append(raws, append([]byte(nil), raw...))
			return nil
		})
		if err != nil && !errors.Is(err, errStopWalk) {
			return res, err
		}
		stamp := s.Clock().Now()
		h := BundleHeader{Device: s.DeviceID(), Seq: seq, WallMs: stamp.WallMs, Logical: uint64(stamp.Logical),
			Part: uint64(i + 1), Parts: uint64(len(parts))}
		copy(h.Prev[:], prev)
		b, err := SealBundle(key, h, raws)
		if err != nil {
			return res, err
		}
		if err := WriteFileAtomic(names[i], b, 0o644); err != nil {
			return res, err
		}
		sum := sha256.Sum256(b)
		meta := map[string][]byte{metaOutSeq: u64be(seq), metaOutHash: sum[:]}
		if opt.SinceLast != "" {
			meta[metaDest+opt.SinceLast] = u64be(p.last)
		}
		if _, err := s.ApplyRaw(nil, meta); err != nil {
			os.Remove(names[i])
			return res, fmt.Errorf("data: %s was written but could not be recorded in the store, so it was removed again: %w", names[i], err)
		}
		prev = sum[:]
		res.Files = append(res.Files, names[i])
		res.Seqs = append(res.Seqs, seq)
		res.Events += len(raws)
		res.Bytes += int64(len(b))
	}
	return res, nil
}

var errStopWalk = errors.New("stop")

// planParts cuts the events after local seq `after` into parts whose
// payload stays under limit bytes (a single larger event gets its own
// part). It reads only sizes.
func planParts(s *store.Store, after uint64, limit int) ([]part, error) {
	var parts []part
	cur := part{after: after, last: after}
	size := 64 // body array, header and events array heads, generously
	err := s.ForEachRawSince(after, func(n uint64, _ record.EventID, raw []byte) error {
		add := bodyOverhead(len(raw)) + len(raw)
		if cur.events > 0 && size+add > limit {
			parts = append(parts, cur)
			cur, size = part{after: cur.last, last: cur.last}, 64
		}
		cur.last, cur.events, size = n, cur.events+1, size+add
		return nil
	})
	if err != nil {
		return nil, err
	}
	if cur.events > 0 {
		parts = append(parts, cur)
	}
	return parts, nil
}

// partNames returns the file names of an export of n parts.
func partNames(path string, dev record.DeviceID, lastSeq uint64, n int) []string {
	out := make([]string, n)
	if st, err := os.Stat(path); (err == nil && st.IsDir()) || strings.HasSuffix(path, string(os.PathSeparator)) {
		for i := range out {
			out[i] = filepath.Join(path, fmt.Sprintf("bale-%s-%06d%s", dev.String()[:12], lastSeq+uint64(i)+1, BundleExt))
		}
		return out
	}
	if n == 1 {
		return []string{path}
	}
	ext := filepath.Ext(path)
	stem := strings.TrimSuffix(path, ext)
	for i := range out {
		out[i] = fmt.Sprintf("%s-%d%s", stem, i+1, ext)
	}
	return out
}

func u64be(n uint64) []byte { return binary.BigEndian.AppendUint64(nil, n) }

// beU64 reads an 8-byte big-endian number; absent or malformed is 0.
func beU64(b []byte) uint64 {
	if len(b) != 8 {
		return 0
	}
	return binary.BigEndian.Uint64(b)
}
