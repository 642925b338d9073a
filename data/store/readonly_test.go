package store

// Source: the names and coordinates in this file are invented test inputs.

import (
	"baleassay/data/record"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

func site(name string) []record.Event {
	return []record.Event{{Kind: record.KindSite, Site: &record.SiteRecord{Name: name, Lat: 51.5, Lon: -0.1}}}
}

// TestReadFirstOpensForReadingUntilTheFirstWrite: two ReadFirst opens
// read side by side; a write takes the write lock only then, and is told
// the store is in use while the other reader holds it; once that reader
// is gone the write goes through, and a read-only open refuses writes.
func TestReadFirstOpensForReadingUntilTheFirstWrite(t *testing.T) {
	dir := t.TempDir()
	s, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := s.Save(site("Invented yard"), SaveOptions{}); err != nil {
		t.Fatal(err)
	}
	s.Close()
	a, err := OpenWith(dir, Options{ReadFirst: true})
	if err != nil {
		t.Fatal(err)
	}
	defer a.Close()
	b, err := OpenWith(dir, Options{ReadFirst: true})
	if err != nil {
		t.Fatalf("a second reader: %v", err)
	}
	if !a.ReadOnly() || !b.ReadOnly() {
		t.Fatal("ReadFirst opened for writing")
	}
	if sv, err := b.Sites(); err != nil || len(sv) != 1 {
		t.Fatalf("reading beside another reader: %v %v", sv, err)
	}
	if _, err := a.Save(site("Second yard"), SaveOptions{}); !errors.Is(err, ErrStoreInUse) {
		t.Fatalf("a write while another process reads: %v", err)
	}
	if sv, err := a.Sites(); err != nil || len(sv) != 1 {
		t.Fatalf("the store stopped reading after a refused write: %v %v", sv, err)
	}
	b.Close()
	if _, err := a.Save(site("Second yard"), SaveOptions{}); err != nil {
		t.Fatal(err)
	}
	if a.ReadOnly() || a.SiteIndex().Len() != 2 {
		t.Fatalf("after the first write: read-only %v, %d sites indexed", a.ReadOnly(), a.SiteIndex().Len())
	}
	a.Close()
	r, err := OpenReadOnly(dir)
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	if _, err := r.Save(site("Third yard"), SaveOptions{}); !errors.Is(err, ErrReadOnly) {
		t.Fatalf("a write on a read-only store: %v", err)
	}
}

const envReadOnlyChild = "BALEASSAY_READONLY_CHILD"

// TestReadOnlyMedia: a store whose folder and file nobody may write
// (read-only media, as far as the process can tell) is listed by a
// ReadFirst open, and a write is refused with the reason. Run as a user
// that file modes bind: as root, the test re-runs itself as nobody.
func TestReadOnlyMedia(t *testing.T) {
	if dir := os.Getenv(envReadOnlyChild); dir != "" {
		s, err := OpenWith(dir, Options{ReadFirst: true})
		if err != nil {
			t.Fatalf("open on read-only media: %v", err)
		}
		defer s.Close()
		if sv, err := s.Sites(); err != nil || len(sv) != 1 {
			t.Fatalf("listing on read-only media: %v %v", sv, err)
		}
		if _, err := s.Save(site("Another yard"), SaveOptions{}); err == nil {
			t.Fatal("a write on read-only media went through")
		}
		return
	}
	base := t.TempDir()
	dir := filepath.Join(base, "store")
	s, err := Open(dir)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := s.Save(site("Invented yard"), SaveOptions{}); err != nil {
		t.Fatal(err)
	}
	s.Close()
	for _, p := range []string{filepath.Join(dir, DBFile), dir} {
		if err := os.Chmod(p, 0o555); err != nil {
			t.Fatal(err)
		}
	}
	os.Chmod(filepath.Join(dir, DBFile), 0o444)
	// The test's own temporary folders (t.TempDir makes two below the
	// system's temporary folder), so that another user can reach the
	// store. Never the system's folder itself: that is /tmp, whose mode
	// (1777) other programs need (an earlier loop up to / left /tmp 0755
	// and apt and the PostgreSQL test server could no longer write there).
	top := filepath.Clean(os.TempDir())
	for p := base; p != top && p != "/" && p != "." && strings.HasPrefix(p, top); p = filepath.Dir(p) {
		os.Chmod(p, 0o755)
	}
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	if os.Geteuid() == 0 { // the build folder is root's alone: run a copy that the user nobody may run
		bin, err := os.ReadFile(exe)
		if err != nil {
			t.Fatal(err)
		}
		exe = filepath.Join(base, "store.test")
		if err := os.WriteFile(exe, bin, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	cmd := exec.Command(exe, "-test.run=^TestReadOnlyMedia$", "-test.count=1")
	cmd.Env = append(os.Environ(), envReadOnlyChild+"="+dir)
	if os.Geteuid() == 0 {
		cmd.SysProcAttr = &syscall.SysProcAttr{Credential: &syscall.Credential{Uid: 65534, Gid: 65534}}
	}
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("child: %v\n%s", err, out)
	}
}
