package transfer

import (
	"baleassay/data/store"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"
)

// Names are unique without regard to case and spacing, the store's own
// name is reserved, and a name may not pass for a fingerprint or hide
// invisible characters.
func TestTrustNamesUniqueAndReserved(t *testing.T) {
	tl := &TrustList{}
	a, b := xKey(t, 1).Fingerprint(), xKey(t, 2).Fingerprint()
	if err := tl.Add("Lab", a); err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"lab", "LAB", "this device", "This  Device", "THIS DEVICE", b.String(), " padded", "tab\tname",
		"zero\u200bwidth", "rtl\u202eevil", "", strings.Repeat("x", 65)} {
		if err := tl.Add(name, b); !errors.Is(err, ErrTrustName) {
			t.Errorf("Add(%q) = %v, want ErrTrustName", name, err)
		}
	}
	if err := tl.Add("Lab bench 2", b); err != nil {
		t.Fatal(err)
	}
	if e, err := tl.Remove("lab"); err != nil || e.Fingerprint != a {
		t.Fatalf("remove by name in other case: %+v %v", e, err)
	}
	if n, _ := tl.Func(xKey(t, 9).Fingerprint())(xKey(t, 9).Fingerprint()); n != SelfName {
		t.Fatalf("own key named %q", n)
	}
}

// A trust list, key or store folder that other users can change is
// refused with the command that fixes it (as ssh refuses such keys).
func TestTrustRefusesUnsafePermissions(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "store")
	s, key, err := OpenStore(dir, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if err := UpdateTrust(s, func(tl *TrustList) error { return tl.Add("lab", xKey(t, 5).Fingerprint()) }); err != nil {
		t.Fatal(err)
	}
	file := filepath.Join(dir, TrustFileName)
	if err := os.Chmod(file, 0o666); err != nil {
		t.Fatal(err)
	}
	if _, err := LoadTrust(dir); !errors.Is(err, ErrUnsafePermissions) || !strings.Contains(err.Error(), "chmod 600 "+file) {
		t.Fatalf("trust file 0666: %v", err)
	}
	os.Chmod(file, 0o600)
	if err := os.Chmod(dir, 0o777); err != nil {
		t.Fatal(err)
	}
	if _, err := LoadTrust(dir); !errors.Is(err, ErrUnsafePermissions) || !strings.Contains(err.Error(), "chmod go-w "+dir) {
		t.Fatalf("store folder 0777: %v", err)
	}
	if _, err := LoadDeviceKey(dir); !errors.Is(err, ErrUnsafePermissions) {
		t.Fatalf("key in a folder others can write: %v", err)
	}
	if err := UpdateTrust(s, func(tl *TrustList) error { return nil }); !errors.Is(err, ErrUnsafePermissions) {
		t.Fatalf("change in a folder others can write: %v", err)
	}
	os.Chmod(dir, 0o700)
	// A link in place of the list is refused too.
	other := filepath.Join(t.TempDir(), "elsewhere.json")
	os.WriteFile(other, []byte("[]\n"), 0o600)
	os.Remove(file)
	if err := os.Symlink(other, file); err != nil {
		t.Fatal(err)
	}
	if _, err := LoadTrust(dir); !errors.Is(err, ErrUnsafePermissions) {
		t.Fatalf("trust list as a link: %v", err)
	}
	os.Remove(file)
	if _, err := LoadTrust(dir); err != nil || key == nil {
		t.Fatalf("after the fixes: %v", err)
	}
	// A repeated key in the file is damage, not the last entry silently.
	os.WriteFile(file, []byte(`[{"name":"lab","name":"evil","fingerprint":"`+xKey(t, 5).Fingerprint().String()+`"}]`), 0o600)
	if _, err := LoadTrust(dir); !errors.Is(err, ErrTrustName) {
		t.Fatalf("repeated key in trust.json: %v", err)
	}
}

// xTrustRound runs one round of concurrent trust changes, each through
// its own open of the store (as separate processes do; bbolt's file lock
// keeps them apart), and returns the changes reported done whose effect
// is missing afterwards. unlocked does what the program did before:
// read, change and write the list without the store's lock.
func xTrustRound(t *testing.T, unlocked bool) (lost, done int) {
	dir := t.TempDir()
	s, _, err := OpenStore(dir, store.Options{})
	if err != nil {
		t.Fatal(err)
	}
	old, added1, added2 := xKey(t, 11).Fingerprint(), xKey(t, 12).Fingerprint(), xKey(t, 13).Fingerprint()
	if err := UpdateTrust(s, func(tl *TrustList) error { return tl.Add("old", old) }); err != nil {
		t.Fatal(err)
	}
	s.Close()
	change := func(fn func(*TrustList) error) error {
		if unlocked {
			tl, err := LoadTrust(dir)
			if err != nil {
				return err
			}
			if err := fn(tl); err != nil {
				return err
			}
			return tl.Save()
		}
		s, err := store.OpenWith(dir, store.Options{Timeout: 20 * time.Second})
		if err != nil {
			return err
		}
		defer s.Close()
		return UpdateTrust(s, fn)
	}
	ops := []func(*TrustList) error{
		func(tl *TrustList) error { _, err := tl.Remove("old"); return err },
		func(tl *TrustList) error { return tl.Add("first", added1) },
		func(tl *TrustList) error { return tl.Add("second", added2) },
	}
	errs := make([]error, len(ops))
	var wg sync.WaitGroup
	start := make(chan struct{})
	for i, op := range ops {
		wg.Add(1)
		go func() {
			defer wg.Done()
			<-start
			errs[i] = change(op)
		}()
	}
	close(start)
	wg.Wait()
	tl, err := LoadTrust(dir)
	if err != nil {
		t.Fatal(err)
	}
	present := func(fp Fingerprint) bool { _, ok := tl.Lookup(fp); return ok }
	effects := []bool{!present(old), present(added1), present(added2)}
	for i, err := range errs {
		if err != nil {
			if !unlocked {
				t.Fatalf("change %d failed: %v", i, err)
			}
			continue
		}
		done++
		if !effects[i] {
			lost++
		}
	}
	return lost, done
}

// TestTrustChangesRace: a removal beside two additions, 100 rounds
// (BALEASSAY_TRUST_ROUNDS for more): every change reported done is in the
// list afterwards. The old unlocked read-change-write is run beside it
// for the record.
func TestTrustChangesRace(t *testing.T) {
	rounds := 100 // Source: issue 10 §7, at least 100 rounds
	if n, err := fmt.Sscan(os.Getenv("BALEASSAY_TRUST_ROUNDS"), &rounds); n == 1 && err == nil && rounds < 100 {
		rounds = 100
	}
	var lost, done, oldLost, oldDone int
	for range rounds {
		l, d := xTrustRound(t, false)
		lost, done = lost+l, done+d
		l, d = xTrustRound(t, true)
		oldLost, oldDone = oldLost+l, oldDone+d
	}
	t.Logf("%d rounds: under the store's lock %d of %d changes lost; unlocked (the old way) %d of %d lost", rounds, lost, done, oldLost, oldDone)
	if lost != 0 || done != 3*rounds {
		t.Fatalf("%d of %d changes lost under the lock (want 0 of %d)", lost, done, 3*rounds)
	}
}
