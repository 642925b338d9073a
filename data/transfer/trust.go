package transfer

import (
	"baleassay/assess"
	"baleassay/data/store"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"unicode"
	"unicode/utf8"
)

// TrustFileName is the trust list in the store folder: JSON, mode 0600,
// rewritten atomically, changed only under the store's locks
// (UpdateTrust).
const TrustFileName = "trust.json"

// SelfName is what the store's own key is called; no entry may take it.
const SelfName = "this device"

// maxTrustFile caps the trust list read (a list of a few hundred keys is
// a few tens of kilobytes).
const maxTrustFile = 1 << 20

// TrustEntry is one trusted signing key under a name the user chose
// ("lab", "tablet Anna").
type TrustEntry struct {
	Name        string      `json:"name"`
	Fingerprint Fingerprint `json:"fingerprint"`
}

// Device is the device id the entry's key belongs to.
func (e TrustEntry) Device() string { return e.Fingerprint.Device().String() }

// TrustList is the explicit list of keys whose bundles this store
// imports. The store's own key is always trusted and never listed.
type TrustList struct {
	path    string
	Entries []TrustEntry // sorted by name
}

// ErrUnsafePermissions refuses a trust list, key or store folder that
// other users could change: whoever can write it decides whose bundles
// this device imports.
var ErrUnsafePermissions = errors.New("other users can change this file or folder")

// LoadTrust reads dir/trust.json; a missing file is an empty list. The
// store folder and the file must not be writable by group or others
// (nor the file be a link or another user's), as ssh insists for its
// keys; the error says the command that fixes it.
func LoadTrust(dir string) (*TrustList, error) {
	t := &TrustList{path: filepath.Join(dir, TrustFileName)}
	if err := checkPrivateDir(dir); err != nil {
		return nil, err
	}
	st, err := os.Lstat(t.path)
	if errors.Is(err, fs.ErrNotExist) {
		return t, nil
	}
	if err != nil {
		return nil, err
	}
	if err := checkPrivateFile(t.path, st); err != nil {
		return nil, err
	}
	if st.Size() > maxTrustFile {
		return nil, fmt.Errorf("%w: %s is %d bytes, more than a trust list holds (%d); fix or remove it and add the keys again", ErrTrustName, t.path, st.Size(), maxTrustFile)
	}
	b, err := os.ReadFile(t.path)
	if err != nil {
		return nil, err
	}
	if err := assess.CheckJSON(b); err != nil {
		return nil, fmt.Errorf("%w: %s is damaged (%v); fix or remove it and add the keys again", ErrTrustName, t.path, err)
	}
	dec := json.NewDecoder(bytes.NewReader(b))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&t.Entries); err != nil {
		return nil, fmt.Errorf("%w: %s is damaged (%v); fix or remove it and add the keys again", ErrTrustName, t.path, err)
	}
	seen := map[string]bool{}
	for _, e := range t.Entries {
		if err := checkTrustName(e.Name); err != nil {
			return nil, fmt.Errorf("%w: %s is damaged: %v", ErrTrustName, t.path, err)
		}
		if k := nameKey(e.Name); seen[k] || seen[e.Fingerprint.String()] {
			return nil, fmt.Errorf("%w: %s is damaged: %q or its key is listed twice", ErrTrustName, t.path, e.Name)
		}
		seen[nameKey(e.Name)], seen[e.Fingerprint.String()] = true, true
	}
	return t, nil
}

// UpdateTrust changes the trust list of s's folder under the store's
// locks (store.Exclusive: no other process has the store open, no other
// change of this process runs), so that concurrent changes never
// interleave: fn gets the list as it is on disk and may change it; when
// fn succeeds the list is written atomically (temporary file, fsync,
// rename, folder fsync).
func UpdateTrust(s *store.Store, fn func(*TrustList) error) error {
	return s.Exclusive(func() error {
		tl, err := LoadTrust(s.Dir())
		if err != nil {
			return err
		}
		if err := fn(tl); err != nil {
			return err
		}
		CleanStaleTemps(s.Dir())
		return tl.Save()
	})
}

// Save writes the list atomically. Use UpdateTrust to change a store's
// list.
func (t *TrustList) Save() error {
	entries := t.Entries
	if entries == nil {
		entries = []TrustEntry{}
	}
	b, err := json.MarshalIndent(entries, "", "  ")
	if err != nil {
		return err
	}
	return WriteFileAtomic(t.path, append(b, '\n'), 0o600)
}

// checkTrustName: 1–64 printable characters (no control or format
// characters: names are printed in lists and prompts), not the reserved
// SelfName, not a fingerprint (remove takes either).
func checkTrustName(name string) error {
	switch {
	case name == "" || name != strings.TrimSpace(name) || utf8.RuneCountInString(name) > 64:
		return fmt.Errorf("%w: name %q: use 1 to 64 characters, without leading or trailing spaces", ErrTrustName, name)
	case strings.IndexFunc(name, func(r rune) bool { return !unicode.IsPrint(r) || unicode.Is(unicode.Cf, r) }) >= 0:
		return fmt.Errorf("%w: name %q holds a control or invisible character", ErrTrustName, name)
	case nameKey(name) == SelfName:
		return fmt.Errorf("%w: %q is what this device's own key is called; choose another name", ErrTrustName, name)
	}
	if _, err := ParseFingerprint(name); err == nil {
		return fmt.Errorf("%w: name %q looks like a fingerprint; choose a name people say", ErrTrustName, name)
	}
	return nil
}

// nameKey is the form names are compared in: case and runs of spaces
// do not make two names different.
func nameKey(name string) string { return strings.ToLower(strings.Join(strings.Fields(name), " ")) }

// Add trusts fp under name. A name must be 1–64 printable characters,
// not "this device" and not a fingerprint; a name (compared without
// regard to case and spacing) or key already present is an error naming
// the existing entry.
func (t *TrustList) Add(name string, fp Fingerprint) error {
	if err := checkTrustName(name); err != nil {
		return err
	}
	for _, e := range t.Entries {
		if e.Fingerprint == fp {
			return fmt.Errorf("%w: key %s is already trusted as %q", ErrTrustName, fp, e.Name)
		}
		if nameKey(e.Name) == nameKey(name) {
			return fmt.Errorf("%w: the name %q is already used for key %s; choose another or remove it first", ErrTrustName, e.Name, e.Fingerprint)
		}
	}
	t.Entries = append(t.Entries, TrustEntry{Name: name, Fingerprint: fp})
	sort.Slice(t.Entries, func(i, j int) bool { return t.Entries[i].Name < t.Entries[j].Name })
	return nil
}

// Remove drops the entry whose name (compared as in Add) or fingerprint
// is nameOrFP and returns it.
func (t *TrustList) Remove(nameOrFP string) (TrustEntry, error) {
	fp, fpErr := ParseFingerprint(nameOrFP)
	for i, e := range t.Entries {
		if nameKey(e.Name) == nameKey(nameOrFP) || (fpErr == nil && e.Fingerprint == fp) {
			t.Entries = append(t.Entries[:i], t.Entries[i+1:]...)
			return e, nil
		}
	}
	return TrustEntry{}, fmt.Errorf("%w: no trusted key named or with fingerprint %q; see bale trust list", ErrTrustName, nameOrFP)
}

// Lookup finds a key by fingerprint.
func (t *TrustList) Lookup(fp Fingerprint) (TrustEntry, bool) {
	for _, e := range t.Entries {
		if e.Fingerprint == fp {
			return e, true
		}
	}
	return TrustEntry{}, false
}

// Func returns a TrustFunc that accepts the listed keys and self (the
// store's own key, named SelfName).
func (t *TrustList) Func(self Fingerprint) TrustFunc {
	return func(fp Fingerprint) (string, bool) {
		if fp == self {
			return SelfName, true
		}
		e, ok := t.Lookup(fp)
		return e.Name, ok
	}
}
