//go:build unix

package assess

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// Non-regular files are refused from their status, without blocking;
// oversized ones before they are read.
func TestReadFileLimited(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pulls.csv")
	if err := syscall.Mkfifo(fifo, 0o600); err != nil {
		t.Skipf("no FIFOs here: %v", err)
	}
	done := make(chan error, 1)
	go func() { _, err := ReadFileLimited(fifo, 1<<20); done <- err }()
	select {
	case err := <-done:
		if !errors.Is(err, ErrNotRegular) || !strings.Contains(err.Error(), "FIFO") {
			t.Fatalf("FIFO: %v", err)
		}
	case <-time.After(5 * time.Second):
		t.Fatal("reading a FIFO blocked")
	}
	if _, err := ReadFileLimited(dir, 1<<20); !errors.Is(err, ErrNotRegular) {
		t.Fatalf("folder: %v", err)
	}
	if _, err := ReadFileLimited("/dev/zero", 1<<20); !errors.Is(err, ErrNotRegular) {
		t.Fatalf("/dev/zero: %v", err)
	}
	big := filepath.Join(dir, "big.json")
	if err := os.WriteFile(big, make([]byte, MaxDocumentFileBytes+1), 0o600); err != nil {
		t.Fatal(err)
	}
	if _, err := LoadSpec(big); !errors.Is(err, ErrFileTooLarge) {
		t.Fatalf("oversized spec: %v", err)
	}
	if _, err := ReadPullsFile(fifo); !errors.Is(err, ErrNotRegular) {
		t.Fatalf("pulls from a FIFO: %v", err)
	}
}
