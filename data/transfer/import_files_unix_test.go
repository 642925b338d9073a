//go:build unix

package transfer

import (
	"baleassay/data/internal/testkit"
	"errors"
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"
)

// A FIFO, a folder and a device named *.bale are refused at once by the
// import of a folder (they used to block the import forever, or be read
// as damaged bundles); the good file beside them is imported.
func TestImportRefusesNonRegularFiles(t *testing.T) {
	src, key := xStoreWithEvents(t, 3)
	stick := t.TempDir()
	if _, err := Export(src, key, filepath.Join(stick, "good.bale"), ExportOptions{}); err != nil {
		t.Fatal(err)
	}
	if err := syscall.Mkfifo(filepath.Join(stick, "fifo.bale"), 0o600); err != nil {
		t.Skipf("no FIFOs here: %v", err)
	}
	if err := os.Mkdir(filepath.Join(stick, "folder.bale"), 0o700); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink("/dev/zero", filepath.Join(stick, "zero.bale")); err != nil {
		t.Fatal(err)
	}
	files, err := ExpandPaths([]string{stick})
	if err != nil || len(files) != 4 {
		t.Fatalf("ExpandPaths: %v %v", files, err)
	}
	dst := xferStore(t, t.TempDir(), testkit.XferNow)
	im := &Importer{Store: dst, Trust: xTrustOnly(key), Now: func() time.Time { return testkit.XferNow }}
	done := make(chan ImportReport, 1)
	go func() { done <- im.ImportFiles(files) }()
	var rep ImportReport
	select {
	case rep = <-done:
	case <-time.After(10 * time.Second):
		t.Fatal("the import blocked on a non-regular file")
	}
	for _, f := range rep.Files {
		good := filepath.Base(f.Path) == "good.bale"
		if good != (f.Err == nil) || (!good && !errors.Is(f.Err, ErrBundleNotFile)) {
			t.Errorf("%s: %v", f.Path, f.Err)
		}
	}
	if rep.Refused() != 3 {
		t.Fatalf("%d refused, want 3", rep.Refused())
	}
	for _, p := range []string{"fifo.bale", "folder.bale", "zero.bale"} {
		if _, err := ReadBundleFile(filepath.Join(stick, p), 0); !errors.Is(err, ErrBundleNotFile) {
			t.Errorf("ReadBundleFile(%s): %v", p, err)
		}
	}
}
