package desk

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"sync"
	"time"

	"baleassay/data/store"
	"baleassay/data/transfer"
)

// Where the stores live. A user's records and the demo scenario are kept
// in separate folders so that the demo never mixes into real data:
//
//	$XDG_DATA_HOME/baleassay/{store,demo}        when XDG_DATA_HOME is set
//	~/.local/share/baleassay/{store,demo}        otherwise on Linux and BSD
//	os.UserConfigDir()/baleassay/{store,demo}    on macOS and Windows
//
// $BALEASSAY_STORE, when set, replaces the default store folder (not the
// demo one).
const appDir = "baleassay"

func dataHome() (string, error) {
	if x := os.Getenv("XDG_DATA_HOME"); x != "" && filepath.IsAbs(x) {
		return filepath.Join(x, appDir), nil
	}
	switch runtime.GOOS {
	case "darwin", "windows", "ios", "android", "plan9":
		d, err := os.UserConfigDir()
		if err != nil {
			return "", fmt.Errorf("there is no user data folder (%v): name a store folder", err)
		}
		return filepath.Join(d, appDir), nil
	}
	h, err := os.UserHomeDir()
	if err != nil {
		return "", fmt.Errorf("there is no home folder (%v): name a store folder", err)
	}
	return filepath.Join(h, ".local", "share", appDir), nil
}

// DefaultDir is the user's store folder.
func DefaultDir() (string, error) {
	if d := os.Getenv("BALEASSAY_STORE"); d != "" {
		return d, nil
	}
	h, err := dataHome()
	if err != nil {
		return "", err
	}
	return filepath.Join(h, "store"), nil
}

// DemoDir is the demo scenario's own store folder.
func DemoDir() (string, error) {
	h, err := dataHome()
	if err != nil {
		return "", err
	}
	return filepath.Join(h, "demo"), nil
}

// Location names a store: a folder, the demo store, or (zero value) the
// default store.
type Location struct {
	Dir  string // a store folder; empty for the default or the demo store
	Demo bool   // the demo store made by MakeDemo
}

// Resolve gives the folder of a location.
func (l Location) Resolve() (string, error) {
	switch {
	case l.Dir != "":
		return l.Dir, nil
	case l.Demo:
		return DemoDir()
	}
	return DefaultDir()
}

// Options tune Open.
type Options struct {
	// Create makes the store when the folder holds none; without it a
	// missing store is an *NoStoreError.
	Create bool
	// Now is the wall clock (time.Now when nil); tests fix it.
	Now func() time.Time
	// Wait is how long to wait for another process to release the store
	// (store.OpenTimeout when 0); short commands such as trust changes
	// wait longer rather than fail.
	Wait time.Duration
}

// Desk is an open records store with the use cases of both front ends.
// Its methods are safe for concurrent use by several goroutines: reads
// run side by side, writes are serialised by the store, and the trust
// list is guarded by the desk.
type Desk struct {
	st   *store.Store
	loc  Location
	now  func() time.Time
	tmu  sync.Mutex // guards the trust list file
	demo bool
	// created: Open made the store and its key.
	created bool
}

// Open opens the store at loc.
func Open(loc Location, opt Options) (*Desk, error) {
	dir, err := loc.Resolve()
	if err != nil {
		return nil, err
	}
	_, statErr := os.Stat(filepath.Join(dir, store.DBFile))
	if !opt.Create && errors.Is(statErr, os.ErrNotExist) {
		return nil, &NoStoreError{Dir: dir, Demo: loc.Demo}
	}
	if opt.Now == nil {
		opt.Now = time.Now
	}
	// Read-only until the first write (store.Options.ReadFirst): reading
	// commands never take the write lock, and work on read-only media.
	so := store.Options{Now: opt.Now, Timeout: opt.Wait, ReadFirst: true}
	var s *store.Store
	created := errors.Is(statErr, os.ErrNotExist)
	if created {
		// A new store takes its device id from the signing key made
		// with it, so that every record it saves can be proven.
		s, _, err = transfer.OpenStore(dir, so)
	} else {
		s, err = store.OpenWith(dir, so)
	}
	if err != nil {
		if errors.Is(err, store.ErrStoreInUse) {
			return nil, err
		}
		return nil, fmt.Errorf("cannot open the records store at %s: %w", dir, err)
	}
	demo, err := s.IsDemo()
	if err != nil {
		s.Close()
		return nil, err
	}
	return &Desk{st: s, loc: Location{Dir: dir, Demo: loc.Demo}, now: opt.Now, demo: demo, created: created}, nil
}

// Created reports whether Open made the store (and its signing key).
func (d *Desk) Created() bool { return d.created }

// Close releases the store.
func (d *Desk) Close() error { return d.st.Close() }

// Dir is the store's folder.
func (d *Desk) Dir() string { return d.st.Dir() }

// IsDemo reports whether this is a demo store.
func (d *Desk) IsDemo() bool { return d.demo }

// Store is the underlying records store, for what the desk does not
// offer (tests, benchmarks). Front ends should not need it.
func (d *Desk) Store() *store.Store { return d.st }

// key loads (or makes) this device's signing key.
func (d *Desk) key() (*transfer.DeviceKey, bool, error) {
	return transfer.LoadOrCreateDeviceKey(d.st.Dir())
}
