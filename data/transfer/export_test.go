package transfer

import (
	"baleassay/data/internal/testkit"
	"baleassay/data/store"
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// xStoreWithEvents makes a store holding n new site events of its own.
func xStoreWithEvents(t testing.TB, n int) (*store.Store, *DeviceKey) {
	t.Helper()
	dir := t.TempDir()
	s := xferStore(t, dir, testkit.XferNow)
	key, _, err := LoadOrCreateDeviceKey(dir)
	if err != nil {
		t.Fatal(err)
	}
	m := testkit.NewMaker(byte(n), uint64(n))
	m.Dev = s.DeviceID()
	raws := make([][]byte, n)
	for i := range raws {
		raws[i] = testkit.Enc(t, m.Site(m.Entity(), "Yard "+strings.Repeat("k", i%7), 51.0+float64(i)/1e4, 4.0, nil...))
	}
	if _, err := s.ApplyRaw(raws, nil); err != nil {
		t.Fatal(err)
	}
	return s, key
}

func TestExportImportRoundTrip(t *testing.T) {
	src, key := xStoreWithEvents(t, 40)
	out := filepath.Join(t.TempDir(), "lab.bale")
	res, err := Export(src, key, out, ExportOptions{SinceLast: "lab"})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Files) != 1 || res.Events != 40 || res.Seqs[0] != 1 {
		t.Fatalf("export result %+v, want one file, 40 events, seq 1", res)
	}
	dst := xferStore(t, t.TempDir(), testkit.XferNow)
	tl := &TrustList{}
	if err := tl.Add("tablet", key.Fingerprint()); err != nil {
		t.Fatal(err)
	}
	im := &Importer{Store: dst, Trust: tl.Func(Fingerprint{}), Now: func() time.Time { return testkit.XferNow }}
	rep := im.ImportFiles([]string{out})
	if f := rep.Files[0]; f.Err != nil || f.New != 40 || f.Present != 0 || f.Seq != 1 {
		t.Fatalf("import: %+v", f)
	}
	a, _ := src.EventSetHash()
	b, _ := dst.EventSetHash()
	if a != b {
		t.Fatal("event sets differ after import")
	}
	// Nothing new since the last export to lab: no file.
	if res, err := Export(src, key, out, ExportOptions{SinceLast: "lab"}); err != nil || len(res.Files) != 0 {
		t.Fatalf("second export %+v, %v; want no file", res, err)
	}
	// Twice the same file: a no-op, flagged as a replay.
	before := xContentHash(t, dst)
	rep = im.ImportFiles([]string{out})
	if f := rep.Files[0]; f.Err != nil || f.New != 0 || f.Present != 40 || !f.Replay {
		t.Fatalf("replay: %+v", f)
	}
	if xContentHash(t, dst) != before {
		t.Fatal("replaying a bundle changed the store")
	}
}

func TestExportParts(t *testing.T) {
	src, key := xStoreWithEvents(t, 300)
	dir := t.TempDir()
	res, err := Export(src, key, dir, ExportOptions{PartBytes: 8 << 10})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Files) < 3 {
		t.Fatalf("300 events in 8 KiB parts gave %d files", len(res.Files))
	}
	dst := xferStore(t, t.TempDir(), testkit.XferNow)
	im := &Importer{Store: dst, Trust: func(fp Fingerprint) (string, bool) { return "t", fp == key.Fingerprint() }}
	files, err := ExpandPaths([]string{dir})
	if err != nil || len(files) != len(res.Files) {
		t.Fatalf("ExpandPaths: %v %v", files, err)
	}
	// Import all but the second part: the gap is reported.
	rep := im.ImportFiles(append([]string{files[0]}, files[2:]...))
	if len(rep.Gaps) != 1 || rep.Gaps[0].From != 2 || rep.Gaps[0].To != 2 {
		t.Fatalf("gaps %v, want bundle 2 missing", rep.Gaps)
	}
	if !strings.Contains(rep.Gaps[0].String(), "bundle 2 from device") {
		t.Fatalf("gap text %q", rep.Gaps[0])
	}
	total := 0
	for i, f := range append([]string{files[0]}, files[2:]...) {
		fr := rep.Files[i]
		if fr.Err != nil {
			t.Fatalf("%s: %v", f, fr.Err)
		}
		st, _ := os.Stat(f)
		if st.Size() > 8<<10+200 {
			t.Fatalf("part %s is %d bytes, above the 8 KiB limit", f, st.Size())
		}
		total += fr.New
	}
	rep = im.ImportFiles(files[1:2])
	if len(rep.Gaps) != 0 || rep.Files[0].Err != nil {
		t.Fatalf("after the missing part: gaps %v err %v", rep.Gaps, rep.Files[0].Err)
	}
	if total+rep.Files[0].New != 300 {
		t.Fatalf("imported %d events, want 300", total+rep.Files[0].New)
	}
}

func TestWriteFileAtomicLeavesNoTemp(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "x.bale")
	if err := os.WriteFile(p, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := WriteFileAtomic(p, []byte("new content"), 0o644); err != nil {
		t.Fatal(err)
	}
	b, _ := os.ReadFile(p)
	ents, _ := os.ReadDir(dir)
	if !bytes.Equal(b, []byte("new content")) || len(ents) != 1 {
		t.Fatalf("content %q, %d entries; want new content and no temp file", b, len(ents))
	}
	// A folder that cannot be written: error, old file untouched.
	if err := WriteFileAtomic(filepath.Join(dir, "missing", "y.bale"), []byte("z"), 0o644); err == nil {
		t.Fatal("writing into a missing folder succeeded")
	}
}

func TestExportRefusesBadDestination(t *testing.T) {
	src, key := xStoreWithEvents(t, 1)
	_, err := Export(src, key, filepath.Join(t.TempDir(), "a.bale"), ExportOptions{SinceLast: "../etc"})
	if !errors.Is(err, ErrDestName) {
		t.Fatalf("got %v, want ErrDestName", err)
	}
}

// TestImportReportsWarnings: events the records' validation warns about
// (here a site at exactly 0, 0) are imported and listed in the report.
func TestImportReportsWarnings(t *testing.T) {
	src, key := xStoreWithEvents(t, 2)
	m := testkit.NewMaker(9, 9)
	m.Dev = src.DeviceID()
	// Source: data/validate.go, WarnNullIsland for coordinates exactly 0, 0.
	if _, err := src.ApplyRaw([][]byte{testkit.Enc(t, m.Site(m.Entity(), "Unfixed GPS yard", 0, 0))}, nil); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(t.TempDir(), "w.bale")
	if _, err := Export(src, key, out, ExportOptions{}); err != nil {
		t.Fatal(err)
	}
	dst := xferStore(t, t.TempDir(), testkit.XferNow)
	im := &Importer{Store: dst, Trust: xTrustOnly(key), Now: func() time.Time { return testkit.XferNow }}
	fr := im.ImportFiles([]string{out}).Files[0]
	if fr.Err != nil || fr.New != 3 || fr.Warnings != 1 || !strings.Contains(strings.Join(fr.Flags, "\n"), "null_island") {
		t.Fatalf("report %+v", fr)
	}
	if !strings.Contains(fr.SummaryLine(), "1 imported event(s) with warning null_island") {
		t.Fatalf("summary %q", fr.SummaryLine())
	}
}

// TestExportRefusesDamagedSequence: a damaged record of the last bundle
// number stops the export instead of reusing numbers.
func TestExportRefusesDamagedSequence(t *testing.T) {
	src, key := xStoreWithEvents(t, 1)
	if _, err := src.ApplyRaw(nil, map[string][]byte{metaOutSeq: {1, 2, 3}}); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(t.TempDir(), "d.bale")
	if _, err := Export(src, key, out, ExportOptions{}); err == nil || !strings.Contains(err.Error(), "damaged") {
		t.Fatalf("got %v, want a damaged-record error", err)
	}
	if _, err := os.Stat(out); !errors.Is(err, os.ErrNotExist) {
		t.Fatal("a file was written despite the error")
	}
}
