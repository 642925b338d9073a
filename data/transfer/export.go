package transfer

import (
	"baleassay/data/record"
	"baleassay/data/store"
	"crypto/sha256"
	"encoding/binary"
	"errors"
	"fmt"
	"io/fs"
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
	// Force lets an export to a file name replace an existing file. In a
	// folder, Export always picks names that are free.
	Force bool
}

// ExportResult says what Export wrote.
type ExportResult struct {
	Files  []string // in part order
	Seqs   []uint64 // bundle sequence numbers, one per file
	Events int
	Bytes  int64
	// Relayed counts the events of other devices, sent with their
	// authors' proofs.
	Relayed int
	// CleanedTemps counts temporary files of killed exports removed from
	// the target folder.
	CleanedTemps int
}

var destName = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$`)

// ErrDestName refuses a destination name that is not a short word.
var ErrDestName = errors.New("destination name must be 1–64 letters, digits, '.', '_' or '-'")

// Export writes the store's events as signed bundles to path. If path is
// an existing folder (or ends in a path separator), files are named
// bale-<device>-<seq>.bale in it, with -2, -3, ... added when a name is
// taken, so no file is ever replaced; otherwise a single part goes to
// path itself and several parts to path's name with -1, -2, ... before
// the extension, and an existing file there is refused unless
// opt.Force. Each file is written atomically (WriteFileNew) and only then
// recorded in the store (bundle sequence, hash, destination mark), in
// one meta write per part. If storing that record fails the file is
// removed again, so the device sequence never has a file the store does
// not know about. Nothing new to export writes no file. Temporary files
// a killed export left in the target folder are removed first.
//
// Every event carries its author's proof: this device's own events get a
// proof signed with key, and other devices' events the proofs stored
// when they were imported (see BundleFormat). An event of another
// device without a stored proof stops the export before anything is
// written.
func Export(s *store.Store, key *DeviceKey, path string, opt ExportOptions) (ExportResult, error) {
	var res ExportResult
	if opt.SinceLast != "" && !destName.MatchString(opt.SinceLast) {
		return res, fmt.Errorf("%w: %q", ErrDestName, opt.SinceLast)
	}
	if key.DeviceID() != s.DeviceID() {
		return res, fmt.Errorf("%w: the store's device is %s, its key %s belongs to device %s; a store made by an older baleassay "+
			"cannot prove its own records: export them with that version, or start a new store", ErrDeviceKey, s.DeviceID(), key.Fingerprint(), key.DeviceID())
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
			return res, fmt.Errorf("the store's export mark for %q is damaged", opt.SinceLast)
		}
		after = beU64(v)
	}
	plan, err := planExport(s, key.DeviceID(), after, limit)
	if err != nil || len(plan.parts) == 0 {
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
		return res, fmt.Errorf("the store's record of its last bundle (%s, %s) is damaged; exporting now would reuse bundle numbers", metaOutSeq, metaOutHash)
	}
	seq := beU64(seqRaw)
	folder := isFolderTarget(path)
	var names []string
	if folder {
		res.CleanedTemps = CleanStaleTemps(path)
	} else {
		res.CleanedTemps = CleanStaleTemps(filepath.Dir(path))
		names = fileNames(path, len(plan.parts))
		if !opt.Force {
			for _, n := range names {
				if _, err := os.Lstat(n); err == nil {
					return res, fmt.Errorf("%w: %s; give a new file name or a folder, or --force to replace it", ErrTargetExists, n)
				}
			}
		}
	}
	for i, p := range plan.parts {
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
		relayed := make([][]byte, len(p.proofs))
		for k, pi := range p.proofs {
			relayed[k] = plan.proofs[pi]
		}
		stamp := s.Clock().Now()
		h := BundleHeader{Seq: seq, WallMs: stamp.WallMs, Logical: uint64(stamp.Logical), Part: uint64(i + 1), Parts: uint64(len(plan.parts))}
		copy(h.Prev[:], prev)
		b, err := SealBundle(key, h, raws, relayed)
		if err != nil {
			return res, err
		}
		var name string
		if folder {
			name, err = writeInFolder(path, fmt.Sprintf("bale-%s-%06d", s.DeviceID().String()[:12], seq), b)
		} else {
			name = names[i]
			err = writeFile(name, b, 0o644, opt.Force)
		}
		if err != nil {
			return res, err
		}
		sum := sha256.Sum256(b)
		meta := map[string][]byte{metaOutSeq: u64be(seq), metaOutHash: sum[:]}
		if opt.SinceLast != "" {
			meta[metaDest+opt.SinceLast] = u64be(p.last)
		}
		if _, err := s.ApplyRaw(nil, meta); err != nil {
			os.Remove(name)
			return res, fmt.Errorf("%s was written but could not be recorded in the store, so it was removed again: %w", name, err)
		}
		prev = sum[:]
		res.Files = append(res.Files, name)
		res.Seqs = append(res.Seqs, seq)
		res.Events += len(raws)
		res.Relayed += p.relayed
		res.Bytes += int64(len(b))
	}
	return res, nil
}

var errStopWalk = errors.New("stop")

// isFolderTarget reports whether an export to path names files itself.
func isFolderTarget(path string) bool {
	st, err := os.Stat(path)
	return (err == nil && st.IsDir()) || strings.HasSuffix(path, string(os.PathSeparator))
}

// writeInFolder writes b to dir/stem.bale, or to dir/stem-2.bale, -3, ...
// when a name is taken: an export never replaces a file in a folder (a
// stick may hold another device's bundle of the same number, or this
// device's own from before a restore).
func writeInFolder(dir, stem string, b []byte) (string, error) {
	for k := 1; k <= 1000; k++ {
		name := filepath.Join(dir, stem+BundleExt)
		if k > 1 {
			name = filepath.Join(dir, fmt.Sprintf("%s-%d%s", stem, k, BundleExt))
		}
		err := WriteFileNew(name, b, 0o644)
		if !errors.Is(err, fs.ErrExist) {
			return name, err
		}
	}
	return "", fmt.Errorf("%w: %s%s and 999 variants of it", ErrTargetExists, filepath.Join(dir, stem), BundleExt)
}

// fileNames returns the file names of an export of n parts to a file.
func fileNames(path string, n int) []string {
	if n == 1 {
		return []string{path}
	}
	out := make([]string, n)
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
