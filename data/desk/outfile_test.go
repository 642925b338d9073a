package desk

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"
)

func TestWriteFileNeverReplacesWithoutForce(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "sites.csv")
	write := func(s string) func(io.Writer) error {
		return func(w io.Writer) error { _, err := io.WriteString(w, s); return err }
	}
	if err := WriteFile(path, false, write("first")); err != nil {
		t.Fatal(err)
	}
	err := WriteFile(path, false, write("second"))
	var ee *ExistsError
	if !errors.Is(err, ErrExists) || !errors.As(err, &ee) || ee.Path != path {
		t.Fatalf("second write without force: %v", err)
	}
	if b, _ := os.ReadFile(path); string(b) != "first" {
		t.Fatalf("file changed to %q", b)
	}
	if err := WriteFile(path, true, write("third")); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(path); string(b) != "third" {
		t.Fatalf("force: file holds %q", b)
	}
	// A failed write leaves neither the file nor a temporary one.
	boom := errors.New("boom")
	half := filepath.Join(dir, "half.csv")
	if err := WriteFile(half, false, func(w io.Writer) error { io.WriteString(w, "a,b\r\n"); return boom }); !errors.Is(err, boom) {
		t.Fatalf("failed write: %v", err)
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 1 || ents[0].Name() != "sites.csv" {
		t.Fatalf("folder after a failed write: %v", ents)
	}
	// A folder that is not there, a folder as the file.
	if err := WriteFile(filepath.Join(dir, "no", "x.csv"), false, write("x")); !errors.Is(err, ErrUsage) {
		t.Fatalf("missing folder: %v", err)
	}
	if err := WriteFile(dir, true, write("x")); !errors.Is(err, ErrUsage) {
		t.Fatalf("folder as file: %v", err)
	}
}

// TestWriteFileRaceLoses: a file that appears while the bytes are being
// written (after the check) is not replaced: the last step refuses it.
func TestWriteFileRaceLoses(t *testing.T) {
	dir := t.TempDir()
	dst := filepath.Join(dir, "out.html")
	err := WriteFile(dst, false, func(w io.Writer) error {
		if err := os.WriteFile(dst, []byte("theirs"), 0o644); err != nil {
			return err
		}
		_, err := io.WriteString(w, "new")
		return err
	})
	if !errors.Is(err, ErrExists) {
		t.Fatalf("a file made during the write: %v", err)
	}
	if b, _ := os.ReadFile(dst); string(b) != "theirs" {
		t.Fatalf("existing file replaced: %q", b)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 1 {
		t.Fatalf("temporary files left: %v", ents)
	}
}
