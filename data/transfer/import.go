package transfer

import (
	"baleassay/assess"
	"baleassay/data/record"
	"baleassay/data/store"
	"bytes"
	"context"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"time"
)

// Clock-skew flags of the importer: a bundle stamped further ahead of
// this device's clock than SkewAhead, or further behind than SkewBehind,
// is imported and flagged. Ahead cannot happen with right clocks; behind
// also happens when a file is carried for weeks, hence the wide bound.
// Illustrative thresholds (common practice for offline sync, not a
// standard).
const (
	SkewAhead  = 10 * time.Minute
	SkewBehind = 30 * 24 * time.Hour
)

// Importer applies bundle files to a store.
type Importer struct {
	Store *store.Store
	Trust TrustFunc
	// Now is this device's clock for skew flags (time.Now when nil).
	Now func() time.Time
	// Progress, when set, is called as each file moves through the steps.
	Progress func(Progress)
	// MaxBytes caps the file size (MaxBundleBytes when 0).
	MaxBytes int64
	// AllowDemo lets a store of real records take the demo scenario's
	// records (store.ErrDemoRecords otherwise).
	AllowDemo bool
	// Context, when set, stops ImportFiles between files once it is done;
	// the files already imported stay.
	Context context.Context
}

// Progress reports where an import is.
type Progress struct {
	File        string
	Index, Of   int    // file number from 1, and how many files
	Step        string // "reading", "verifying", "applying", "done", "refused"
	Events      int    // events in the file, once known
	EventsSoFar int    // events applied from earlier files in this run
}

// FileReport is the outcome of one file.
type FileReport struct {
	Path        string
	Device      record.DeviceID
	Seq         uint64
	Part, Parts uint64
	Signer      string // trust-list name
	Events      int
	New         int
	Present     int
	Conflicts   int
	Warnings    int      // new events the records' validation warns about (kept, listed in Flags)
	Replay      bool     // this exact bundle was imported before: a no-op
	Flags       []string // clock skew, sequence chain mismatches
	Err         error    // non-nil: the file was refused and nothing changed
}

// ImportReport is the outcome of a run.
type ImportReport struct {
	Files []FileReport
	Gaps  []SeqGap // per device seen in this run, bundles below the highest that are missing
	// Stopped is the context's error when the run stopped before the
	// last file.
	Stopped error
}

// Refused counts refused files.
func (r ImportReport) Refused() int {
	n := 0
	for _, f := range r.Files {
		if f.Err != nil {
			n++
		}
	}
	return n
}

// ExpandPaths turns the command-line arguments into files: a folder
// stands for its *.bale files (not recursive), sorted by name.
func ExpandPaths(args []string) ([]string, error) {
	var out []string
	for _, a := range args {
		st, err := os.Stat(a)
		if err != nil {
			return nil, err
		}
		if !st.IsDir() {
			out = append(out, a)
			continue
		}
		m, err := filepath.Glob(filepath.Join(a, "*"+BundleExt))
		if err != nil {
			return nil, err
		}
		sort.Strings(m)
		out = append(out, m...)
	}
	return out, nil
}

// ImportFiles imports each file in its own transaction; a refused file
// does not stop the others. Gaps are computed after the last file.
//
// Files go through two stages: reading, the signature and every event's
// checks (prepare), which need nothing from the store, and then the
// store's write (apply), one file at a time in the given order. The next
// file is prepared while the store writes the current one, so both CPUs
// of a small machine work; at most two files are held in memory.
func (im *Importer) ImportFiles(paths []string) ImportReport {
	var rep ImportReport
	devs := map[record.DeviceID]bool{}
	type job struct {
		path string
		prep preparedFile
	}
	jobs := make(chan job)
	stop := make(chan struct{})
	defer close(stop)
	go func() {
		defer close(jobs)
		for _, p := range paths {
			raw, err := ReadBundleFile(p, im.MaxBytes)
			prep := preparedFile{fr: FileReport{Err: err}}
			if err == nil {
				prep = im.prepare(raw)
			}
			select {
			case jobs <- job{p, prep}:
			case <-stop:
				return
			}
		}
	}()
	done := 0
	i := 0
	for j := range jobs {
		i++
		if im.Context != nil && im.Context.Err() != nil {
			rep.Stopped = im.Context.Err()
			break
		}
		im.progress(Progress{File: j.path, Index: i, Of: len(paths), Step: "reading", EventsSoFar: done})
		im.progress(Progress{File: j.path, Index: i, Of: len(paths), Step: "verifying", EventsSoFar: done})
		fr := im.finish(j.path, j.prep, i, len(paths), done)
		done += fr.New + fr.Present
		if fr.Err == nil {
			devs[fr.Device] = true
		}
		rep.Files = append(rep.Files, fr)
	}
	rep.Gaps = im.gaps(devs)
	return rep
}

func (im *Importer) progress(p Progress) {
	if im.Progress != nil {
		im.Progress(p)
	}
}

// finish applies a prepared file and reports it.
func (im *Importer) finish(path string, prep preparedFile, idx, of, soFar int) FileReport {
	fr := prep.fr
	if fr.Err == nil {
		fr = im.apply(prep, func(p Progress) {
			p.File, p.Index, p.Of, p.EventsSoFar = path, idx, of, soFar
			im.progress(p)
		})
	}
	fr.Path = path
	var use *UnknownSignerError
	if errors.As(fr.Err, &use) {
		use.File = path
	}
	step := "done"
	if fr.Err != nil {
		step = "refused"
	}
	im.progress(Progress{File: path, Index: idx, Of: of, Step: step, Events: fr.Events, EventsSoFar: soFar + fr.New + fr.Present})
	return fr
}

// ReadBundleFile reads a bundle, refusing a file over max bytes
// (MaxBundleBytes when max ≤ 0) before reading it, and reading no more
// than max+1 bytes even if the file grows meanwhile.
func ReadBundleFile(path string, max int64) ([]byte, error) {
	if max <= 0 {
		max = MaxBundleBytes
	}
	// A FIFO, a device or a folder named *.bale is refused from its
	// status, before it is opened (opening a FIFO waits for a writer).
	f, st, err := assess.OpenRegular(path)
	if errors.Is(err, assess.ErrNotRegular) {
		return nil, bundleErr(ErrBundleNotFile, "file", -1, "%v: only regular files are read", err)
	}
	if err != nil {
		return nil, err
	}
	defer f.Close()
	if st.Size() > max {
		return nil, bundleErr(ErrBundleTooLarge, "file", -1, "%d bytes, limit %d", st.Size(), max)
	}
	// One allocation of the stated size; a file that grew meanwhile is
	// noticed by the extra byte read after it.
	b := make([]byte, st.Size())
	if _, err := io.ReadFull(f, b); err != nil {
		return nil, fmt.Errorf("data: reading %s: %w", path, err)
	}
	if n, _ := f.Read(make([]byte, 1)); n > 0 {
		return nil, bundleErr(ErrBundleTooLarge, "file", -1, "%s grew while it was read; copy it again", path)
	}
	return b, nil
}

// ImportBytes imports one bundle held in memory.
func (im *Importer) ImportBytes(raw []byte) FileReport {
	im.progress(Progress{Step: "verifying"})
	prep := im.prepare(raw)
	if prep.fr.Err != nil {
		return prep.fr
	}
	return im.apply(prep, im.progress)
}

// preparedFile is a bundle that passed every check that needs nothing
// from the store: size, signature, strict body, ids, every event's
// decoding and validation. fr holds the refusal, if any.
type preparedFile struct {
	fr    FileReport
	ob    *OpenedBundle
	batch store.Checked
}

func (im *Importer) prepare(raw []byte) preparedFile {
	var p preparedFile
	max := im.MaxBytes
	if max <= 0 {
		max = MaxBundleBytes
	}
	if int64(len(raw)) > max {
		p.fr.Err = bundleErr(ErrBundleTooLarge, "file", -1, "%d bytes, limit %d", len(raw), max)
		return p
	}
	ob, err := OpenBundle(raw, im.Trust)
	if err != nil {
		p.fr.Err = err
		return p
	}
	h := ob.Header
	p.ob = ob
	p.fr.Device, p.fr.Seq, p.fr.Part, p.fr.Parts, p.fr.Signer = h.Device, h.Seq, h.Part, h.Parts, ob.SignerName
	p.fr.Events = len(ob.Raws)
	p.batch, err = im.Store.Check(ob.Raws, ob.IDs)
	if err != nil {
		p.fr.Err = im.eventErr(ob, err)
	}
	return p
}

// eventErr names the bundle entry of an event the store refused.
func (im *Importer) eventErr(ob *OpenedBundle, err error) error {
	var ee *record.EventError
	if errors.As(err, &ee) && ee.Index >= 0 && ee.Index < len(ob.Raws) {
		return &EventRefusedError{Index: ee.Index, ID: ob.IDs[ee.Index].String(), Err: err}
	}
	return err
}

// apply writes a prepared bundle with its sequence records, in one
// transaction. The sequence records are read and written inside it
// (ApplyOptions.MetaFrom), so two imports at once keep both updates.
func (im *Importer) apply(p preparedFile, prog func(Progress)) FileReport {
	fr, ob := p.fr, p.ob
	meta := map[string][]byte{}
	for _, p := range ob.Proofs {
		if p.Device != im.Store.DeviceID() { // this device can always prove its own events afresh
			meta[metaProofKey(p.Raw)] = p.Raw
		}
	}
	var flags []string
	seq := func(read func(string) ([]byte, error)) (map[string][]byte, error) {
		m, f, replay, err := seqMeta(ob, read)
		flags, fr.Replay = f, replay
		return m, err
	}
	prog(Progress{Step: "applying", Events: fr.Events})
	res, err := im.Store.ApplyChecked(p.batch, meta, store.ApplyOptions{AllowDemo: im.AllowDemo, MetaFrom: seq})
	fr.Flags = append(append(flags, im.skewFlags(ob.Header)...), behindFlags(ob)...)
	if err != nil {
		fr.Err = im.eventErr(ob, err)
		return fr
	}
	fr.New, fr.Present, fr.Conflicts = res.New, res.Present, res.Conflicts
	fr.Warnings = len(res.Warnings)
	fr.Flags = append(fr.Flags, warningFlags(res.Warnings)...)
	return fr
}

// warningFlags summarises the records' warnings on imported events (an
// import keeps such events; a person should look at them), one line per
// kind of warning with its count and first example.
func warningFlags(ws []record.EventWarning) []string {
	type sum struct {
		n     int
		first record.EventWarning
	}
	by := map[record.WarningCode]*sum{}
	var order []record.WarningCode
	for _, w := range ws {
		if by[w.Code] == nil {
			by[w.Code] = &sum{first: w}
			order = append(order, w.Code)
		}
		by[w.Code].n++
	}
	var out []string
	for _, c := range order {
		x := by[c]
		out = append(out, fmt.Sprintf("%d imported event(s) with warning %s, e.g. events[%d] %s", x.n, c, x.first.Index, x.first.Warning))
	}
	return out
}

// seqMeta computes the sequence meta this bundle adds and its flags. The
// result depends only on the set of bundles imported: the seen set is a
// union, and of two different bundles claiming one (device, seq) the one
// with the smaller hash is recorded (both are imported; their events are
// signed and merge by union).
func seqMeta(ob *OpenedBundle, read func(key string) ([]byte, error)) (map[string][]byte, []string, bool, error) {
	h := ob.Header
	var flags []string
	seenRaw, err := read(metaSeenKey(h.Device))
	if err != nil {
		return nil, nil, false, err
	}
	seen, err := decodeSeqSet(seenRaw)
	if err != nil {
		return nil, nil, false, err
	}
	rec := append(append([]byte(nil), ob.Hash[:]...), h.Prev[:]...)
	key := metaBundleKey(h.Device, h.Seq)
	old, err := read(key)
	if err != nil {
		return nil, nil, false, err
	}
	replay := len(old) == 64 && bytes.Equal(old[:32], ob.Hash[:])
	if len(old) == 64 && !replay {
		flags = append(flags, fmt.Sprintf("device %s has written two different bundles numbered %d (restored from a backup?); both are imported", h.Device, h.Seq))
		if bytes.Compare(old[:32], ob.Hash[:]) < 0 {
			rec = old
		}
	}
	// Chain checks against the neighbours already recorded.
	if h.Seq > 1 {
		if p, _ := read(metaBundleKey(h.Device, h.Seq-1)); len(p) == 64 && !bytes.Equal(p[:32], h.Prev[:]) {
			flags = append(flags, fmt.Sprintf("bundle %d from device %s names a previous bundle other than the bundle %d imported here", h.Seq, h.Device, h.Seq-1))
		}
	}
	if n, _ := read(metaBundleKey(h.Device, h.Seq+1)); len(n) == 64 && !bytes.Equal(n[32:], ob.Hash[:]) {
		flags = append(flags, fmt.Sprintf("bundle %d from device %s does not follow this bundle %d", h.Seq+1, h.Device, h.Seq))
	}
	enc, err := encodeSeqSet(seen.Add(h.Seq))
	if err != nil {
		return nil, nil, false, err
	}
	return map[string][]byte{metaSeenKey(h.Device): enc, key: rec}, flags, replay, nil
}

func (im *Importer) skewFlags(h BundleHeader) []string {
	now := time.Now
	if im.Now != nil {
		now = im.Now
	}
	// Both stamps lie in 2000–2100 (the header is checked), so the
	// difference is far from overflowing; FormatSkew never converts it to
	// a time.Duration anyway.
	d := h.WallMs - now().UnixMilli()
	switch {
	case d > SkewAhead.Milliseconds():
		return []string{fmt.Sprintf("clock skew: device %s stamped this bundle %s ahead of this device's clock; check that device's date and time", h.Device, record.FormatSkew(d))}
	case -d > SkewBehind.Milliseconds():
		return []string{fmt.Sprintf("clock skew: bundle stamped %s before this device's clock; an old file, or that device's clock is behind", record.FormatSkew(-d))}
	}
	return nil
}

// behindFlags flags the exporting device's own events stamped more than
// SkewBehind before the bundle's clock: old records sent again, or
// records saved while that device's clock was behind, which then sort
// before edits they may have replaced. One line, with the count and the
// furthest example. Relayed events of other devices are not flagged
// (their age says nothing about the exporter's clock).
func behindFlags(ob *OpenedBundle) []string {
	h := ob.Header
	n, worst, worstAt := 0, int64(0), -1
	for i, raw := range ob.Raws {
		if dev, _ := record.AuthorOf(raw); dev != h.Device {
			continue
		}
		ms, ok := record.ClockOf(raw)
		if !ok {
			continue
		}
		if d := h.WallMs - ms.WallMs; d > SkewBehind.Milliseconds() {
			n++
			if d > worst {
				worst, worstAt = d, i
			}
		}
	}
	if n == 0 {
		return nil
	}
	return []string{fmt.Sprintf("clock skew: %d event(s) of device %s stamped more than %s before the bundle's own clock, up to %s (events[%d]): old records sent again, or that device's clock was behind when they were saved",
		n, h.Device, record.FormatSkew(SkewBehind.Milliseconds()), record.FormatSkew(worst), worstAt)}
}

// gaps lists missing sequence numbers for the given devices.
func (im *Importer) gaps(devs map[record.DeviceID]bool) []SeqGap {
	ids := make([]record.DeviceID, 0, len(devs))
	for d := range devs {
		ids = append(ids, d)
	}
	sort.Slice(ids, func(i, j int) bool { return bytes.Compare(ids[i][:], ids[j][:]) < 0 })
	var out []SeqGap
	for _, d := range ids {
		v, err := im.Store.Meta(metaSeenKey(d))
		if err != nil {
			continue
		}
		set, err := decodeSeqSet(v)
		if err != nil {
			continue
		}
		for _, r := range set.Missing() {
			out = append(out, SeqGap{Device: d, From: r.Lo, To: r.Hi})
		}
	}
	return out
}

// SummaryLine is a one-line report of a file for people.
func (f FileReport) SummaryLine() string {
	name := filepath.Base(f.Path)
	if f.Err != nil {
		return fmt.Sprintf("%s: refused: %v", name, f.Err)
	}
	dev := hex.EncodeToString(f.Device[:])
	s := fmt.Sprintf("%s: bundle %d (part %d of %d) from device %s, signed by %q: %d new, %d already present, %d %s created",
		name, f.Seq, f.Part, f.Parts, dev, f.Signer, f.New, f.Present, f.Conflicts, plural(f.Conflicts, "conflict", "conflicts"))
	if f.Replay {
		s += " (imported before: nothing changed)"
	}
	if len(f.Flags) > 0 {
		s += "\n  " + strings.Join(f.Flags, "\n  ")
	}
	return s
}
