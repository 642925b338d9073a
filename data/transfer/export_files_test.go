package transfer

import (
	"bytes"
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"
)

// An export to a file name never replaces an existing file (it used to
// overwrite another device's bundle waiting on the stick) unless told to;
// in a folder it picks a free name.
func TestExportNeverOverwrites(t *testing.T) {
	src, key := xStoreWithEvents(t, 5)
	stick := t.TempDir()
	theirs := filepath.Join(stick, "week14.bale")
	other := []byte("another device's bundle, not yet imported")
	if err := os.WriteFile(theirs, other, 0o644); err != nil {
		t.Fatal(err)
	}
	_, err := Export(src, key, theirs, ExportOptions{})
	if !errors.Is(err, ErrTargetExists) || !errors.Is(err, fs.ErrExist) || !strings.Contains(err.Error(), "--force") {
		t.Fatalf("export over an existing file: %v", err)
	}
	if b, _ := os.ReadFile(theirs); !bytes.Equal(b, other) {
		t.Fatal("the existing file was changed")
	}
	if seq, _ := src.Meta(metaOutSeq); seq != nil {
		t.Fatal("a refused export used up a bundle number")
	}
	// Into the folder: the name the export would take is taken too.
	name := filepath.Join(stick, "bale-"+src.DeviceID().String()[:12]+"-000001.bale")
	if err := os.WriteFile(name, other, 0o644); err != nil {
		t.Fatal(err)
	}
	res, err := Export(src, key, stick+string(os.PathSeparator), ExportOptions{})
	if err != nil || len(res.Files) != 1 || res.Files[0] != strings.TrimSuffix(name, ".bale")+"-2.bale" {
		t.Fatalf("export into the folder: %+v, %v", res, err)
	}
	if b, _ := os.ReadFile(name); !bytes.Equal(b, other) {
		t.Fatal("the file of the same name was changed")
	}
	// With Force the named file is replaced.
	res, err = Export(src, key, theirs, ExportOptions{Force: true})
	if err != nil || len(res.Files) != 1 {
		t.Fatalf("forced export: %+v, %v", res, err)
	}
	if b, _ := os.ReadFile(theirs); bytes.Equal(b, other) {
		t.Fatal("--force did not replace the file")
	}
}

// Two writers of one new name: exactly one wins, the other is told the
// file exists, and the file holds the winner's bytes whole.
func TestWriteFileNewRace(t *testing.T) {
	for round := range 50 {
		path := filepath.Join(t.TempDir(), "x.bale")
		var wg sync.WaitGroup
		errs := make([]error, 2)
		bodies := [][]byte{bytes.Repeat([]byte{'a'}, 1<<16), bytes.Repeat([]byte{'b'}, 1<<16)}
		for i := range 2 {
			wg.Add(1)
			go func() { defer wg.Done(); errs[i] = WriteFileNew(path, bodies[i], 0o644) }()
		}
		wg.Wait()
		won := -1
		for i, err := range errs {
			switch {
			case err == nil && won < 0:
				won = i
			case err == nil:
				t.Fatalf("round %d: both writers succeeded", round)
			case !errors.Is(err, ErrTargetExists):
				t.Fatalf("round %d: %v", round, err)
			}
		}
		if b, _ := os.ReadFile(path); won < 0 || !bytes.Equal(b, bodies[won]) {
			t.Fatalf("round %d: winner %d, content not whole", round, won)
		}
		if ents, _ := os.ReadDir(filepath.Dir(path)); len(ents) != 1 {
			t.Fatalf("round %d: %d entries left, want the file alone", round, len(ents))
		}
	}
}

// A temporary file a killed export left is removed by the next export
// into the folder; one a live writer holds is left alone.
func TestExportCleansStaleTemps(t *testing.T) {
	defer func(d time.Duration) { staleAfter = d }(staleAfter)
	staleAfter = 0
	src, key := xStoreWithEvents(t, 2)
	stick := t.TempDir()
	dead := filepath.Join(stick, tempPrefix+"1234"+tempSuffix)
	if err := os.WriteFile(dead, []byte("half a bundle"), 0o644); err != nil {
		t.Fatal(err)
	}
	live, err := os.CreateTemp(stick, tempPrefix+"*"+tempSuffix)
	if err != nil {
		t.Fatal(err)
	}
	defer live.Close()
	lockTemp(live)
	res, err := Export(src, key, stick+string(os.PathSeparator), ExportOptions{})
	if err != nil || len(res.Files) != 1 {
		t.Fatalf("export: %+v %v", res, err)
	}
	if _, err := os.Stat(dead); !errors.Is(err, fs.ErrNotExist) || res.CleanedTemps != 1 {
		t.Fatalf("stale temp: %v, cleaned %d", err, res.CleanedTemps)
	}
	if _, err := os.Stat(live.Name()); err != nil {
		t.Fatalf("a live writer's temp was removed: %v", err)
	}
}

// WriteStream writes through a buffer as WriteFileNew writes a slice: a
// failed writer leaves nothing, an existing file is never replaced
// without replace, and is with it.
func TestWriteStream(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "pulls.csv")
	boom := errors.New("boom")
	if err := WriteStream(path, 0o644, false, func(w io.Writer) error { io.WriteString(w, "half"); return boom }); !errors.Is(err, boom) {
		t.Fatalf("failed writer: %v", err)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 0 {
		t.Fatalf("a failed write left %v", ents)
	}
	big := strings.Repeat("pull,pet_clear\n", 10_000) // beyond one buffer
	if err := WriteStream(path, 0o644, false, func(w io.Writer) error { _, err := io.WriteString(w, big); return err }); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(path); string(b) != big {
		t.Fatalf("wrote %d bytes, want %d", len(b), len(big))
	}
	if err := WriteStream(path, 0o644, false, func(w io.Writer) error { return nil }); !errors.Is(err, ErrTargetExists) {
		t.Fatalf("over an existing file: %v", err)
	}
	if err := WriteStream(path, 0o644, true, func(w io.Writer) error { _, err := io.WriteString(w, "new"); return err }); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(path); string(b) != "new" {
		t.Fatalf("replace: file holds %q", b)
	}
}
