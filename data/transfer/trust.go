package transfer

import (
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
// rewritten atomically.
const TrustFileName = "trust.json"

// TrustEntry is one trusted signing key under a name the user chose
// ("lab", "tablet Anna").
type TrustEntry struct {
	Name        string      `json:"name"`
	Fingerprint Fingerprint `json:"fingerprint"`
}

// TrustList is the explicit list of keys whose bundles this store
// imports. The store's own key is always trusted and never listed.
type TrustList struct {
	path    string
	Entries []TrustEntry // sorted by name
}

// LoadTrust reads dir/trust.json; a missing file is an empty list.
func LoadTrust(dir string) (*TrustList, error) {
	t := &TrustList{path: filepath.Join(dir, TrustFileName)}
	b, err := os.ReadFile(t.path)
	if errors.Is(err, fs.ErrNotExist) {
		return t, nil
	}
	if err != nil {
		return nil, err
	}
	dec := json.NewDecoder(strings.NewReader(string(b)))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&t.Entries); err != nil {
		return nil, fmt.Errorf("%w: %s is damaged (%v); fix or remove it and add the keys again", ErrTrustName, t.path, err)
	}
	return t, nil
}

// Save writes the list atomically.
func (t *TrustList) Save() error {
	b, err := json.MarshalIndent(t.Entries, "", "  ")
	if err != nil {
		return err
	}
	return WriteFileAtomic(t.path, append(b, '\n'), 0o600)
}

// Add trusts fp under name. A name must be 1–64 printable characters; a
// name or key already present is an error naming the existing entry.
func (t *TrustList) Add(name string, fp Fingerprint) error {
	name = strings.TrimSpace(name)
	if name == "" || utf8.RuneCountInString(name) > 64 || strings.IndexFunc(name, func(r rune) bool { return !unicode.IsPrint(r) }) >= 0 {
		return fmt.Errorf("%w: name %q: use 1 to 64 printable characters", ErrTrustName, name)
	}
	for _, e := range t.Entries {
		if e.Fingerprint == fp {
			return fmt.Errorf("%w: key %s is already trusted as %q", ErrTrustName, fp, e.Name)
		}
		if e.Name == name {
			return fmt.Errorf("%w: the name %q is already used for key %s; choose another or remove it first", ErrTrustName, name, e.Fingerprint)
		}
	}
	t.Entries = append(t.Entries, TrustEntry{Name: name, Fingerprint: fp})
	sort.Slice(t.Entries, func(i, j int) bool { return t.Entries[i].Name < t.Entries[j].Name })
	return nil
}

// Remove drops the entry whose name or fingerprint is nameOrFP and
// returns it.
func (t *TrustList) Remove(nameOrFP string) (TrustEntry, error) {
	fp, fpErr := ParseFingerprint(nameOrFP)
	for i, e := range t.Entries {
		if e.Name == nameOrFP || (fpErr == nil && e.Fingerprint == fp) {
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
// store's own key, named "this device").
func (t *TrustList) Func(self Fingerprint) TrustFunc {
	return func(fp Fingerprint) (string, bool) {
		if fp == self {
			return "this device", true
		}
		e, ok := t.Lookup(fp)
		return e.Name, ok
	}
}
