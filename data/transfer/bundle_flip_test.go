package transfer

import (
	"errors"
	"os"
	"testing"
	"time"
)

// TestBundleEveryByteFlipRefused changes every byte of a valid signed
// bundle, one at a time and in three ways (lowest bit, highest bit, all
// bits), and imports each result into a lab store: every one must be
// refused, and the store must stay as it was. The signature covers the
// protected header and the payload; the rest of the envelope is fixed
// by the strict reader.
func TestBundleEveryByteFlipRefused(t *testing.T) {
	g := newFixGen(t)
	ref := g.good()
	s, im := fixtureStore(t, g)
	before := xContentHash(t, s)
	refused := 0
	for i := range ref {
		for _, mask := range []byte{0x01, 0x80, 0xff} {
			fr := im.ImportBytes(flip(ref, i, mask))
			if fr.Err == nil {
				t.Fatalf("flip of byte %d (mask %#02x, %#02x -> %#02x) accepted: %+v", i, mask, ref[i], ref[i]^mask, fr)
			}
			refused++
		}
	}
	if after := xContentHash(t, s); after != before {
		t.Fatal("refused flips changed the store")
	}
	// Control: the unflipped reference is accepted, so the loop above
	// tested refusals of a file that is otherwise good.
	if fr := im.ImportBytes(ref); fr.Err != nil || fr.New != 3 {
		t.Fatalf("reference bundle: %+v", fr)
	}
	t.Logf("%d-byte bundle: %d of %d single-byte changes refused", len(ref), refused, 3*len(ref))
}

// TestImportFileSizeCap refuses an oversized file from its size alone
// (a sparse file, nothing is read) and the cap set on the importer.
func TestImportFileSizeCap(t *testing.T) {
	g := newFixGen(t)
	_, im := fixtureStore(t, g)
	path := t.TempDir() + "/huge" + BundleExt
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	// Truncate makes a sparse file: nothing is written or read.
	if err := f.Truncate(MaxBundleBytes + 1); err != nil {
		t.Fatal(err)
	}
	f.Close()
	start := time.Now()
	rep := im.ImportFiles([]string{path})
	if fr := rep.Files[0]; !errors.Is(fr.Err, ErrBundleTooLarge) {
		t.Fatalf("got %v, want ErrBundleTooLarge", fr.Err)
	}
	t.Logf("refused a %d-byte file in %v", MaxBundleBytes+1, time.Since(start))
	im.MaxBytes = 100
	if fr := im.ImportBytes(g.good()); !errors.Is(fr.Err, ErrBundleTooLarge) {
		t.Fatalf("importer cap: got %v", fr.Err)
	}
}
